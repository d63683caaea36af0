// clausewright: closed-form sizes, for methods whose size is published.
//
// A prediction costs O(1) (O(m) for the networks, m the power of two they are
// cut at) where a dry run costs the whole encoding; the statistics use it to
// skip dry runs of huge cases. Each formula is tested equal to the dry run
// (tests/test_predict.cpp).
//
// Covered: pairwise, the ladder and bitwise at-most-one, the sequential
// counter (one-directional "<="), Batcher's sorting network on a power of two
// inputs, and the cardinality network when the inputs fill whole blocks
// (n a multiple of m). The other cases return no prediction.
#pragma once

#include <algorithm>
#include <bit>
#include <cstdint>
#include <optional>

#include "constraint.hpp"
#include "encodings/bitwise.hpp"
#include "encodings/common.hpp"
#include "methods.hpp"
#include "sink.hpp"

namespace clausewright {

namespace detail {

// Clauses of one length, added to a size.
constexpr void add_clauses(encoding_size& s, std::uint64_t count, std::uint64_t length) noexcept {
  if (count == 0) return;
  s.clauses += count;
  s.literals += count * length;
  s.longest_clause = std::max(s.longest_clause, length);
}

// Comparators of a network: `full` ones compute max and min, `half` ones
// only the max (the last comparator of a simplified merge).
struct comparator_count {
  std::uint64_t full = 0;
  std::uint64_t half = 0;
  constexpr comparator_count& operator+=(const comparator_count& o) noexcept {
    full += o.full;
    half += o.half;
    return *this;
  }
};

// Comparators of comparator_network::merge on a sequence of `length` wires
// (no constant wire among them) when its first `need` outputs are wanted:
// the same recursion, without the wires.
[[nodiscard]] constexpr comparator_count merge_comparators(std::uint64_t length, std::uint64_t need) noexcept {
  comparator_count c;
  if (need == 0) return c;
  if (length <= 2) {
    (need >= 2 ? c.full : c.half) = 1;
    return c;
  }
  c += merge_comparators(length / 2, std::min(need / 2 + 1, length / 2));
  c += merge_comparators(length / 2, std::min(need / 2, length / 2));
  const std::uint64_t pairs = std::min(need / 2, length / 2 - 1);
  const std::uint64_t full = std::min(pairs, (need - 1) / 2);  // comparator i is full when 2i < need
  c.full += full;
  c.half += pairs - full;
  return c;
}

// Comparators of Batcher's odd-even merge sort of `length` wires (a power of
// two): (t^2 - t + 4) 2^(t-2) - 1 for length 2^t, all full.
[[nodiscard]] constexpr comparator_count sort_comparators(std::uint64_t length) noexcept {
  if (length < 2) return {};
  comparator_count c = sort_comparators(length / 2);
  c += c;
  c += merge_comparators(length, length);
  return c;
}

// Size of a network of `c` comparators built with sides `which`: a full
// comparator is 2 binary + 1 ternary clauses per side and 2 variables, a
// half one 2 binary (upper) or 1 ternary (lower) and 1 variable.
constexpr void add_comparators(encoding_size& s, const comparator_count& c, sides which) noexcept {
  s.variables += 2 * c.full + c.half;
  if (has_upper(which)) {
    add_clauses(s, 2 * (c.full + c.half), 2);
    add_clauses(s, c.full, 3);
  }
  if (has_lower(which)) {
    add_clauses(s, 2 * c.full, 2);
    add_clauses(s, c.full + c.half, 3);
  }
}

// Bits of a binary code below n that have bit j set: inputs i < n with bit j
// of i equal to 1.
[[nodiscard]] constexpr std::uint64_t codes_with_bit(std::uint64_t n, std::size_t j) noexcept {
  const std::uint64_t half = std::uint64_t{1} << j;
  const std::uint64_t period = half * 2;
  return n / period * half + (n % period > half ? n % period - half : 0);
}

}  // namespace detail

// Clauses and auxiliary variables of `method` on `c`, when a closed form is
// known for this case; empty otherwise (then measure() gives the exact size).
[[nodiscard]] inline std::optional<encoding_size> predict_size(method_id method, const normalized_constraint& c,
                                                               const encode_options& options = {}) {
  const auto n = static_cast<std::uint64_t>(c.size());
  const auto units = static_cast<std::uint64_t>(c.units.size());
  encoding_size s;
  switch (c.kind) {
    case constraint_kind::constant_false: return encoding_size{0, 1, 0, 0};
    case constraint_kind::constant_true:
      return encoding_size{0, units, units, units != 0 ? 1U : 0U};
    case constraint_kind::clause:
      return encoding_size{0, units + 1, units + n, n > 0 ? n : (units != 0 ? 1U : 0U)};
    default: break;
  }
  if (!can_encode(method, c)) return std::nullopt;
  switch (method) {
    case method_id::pairwise: {
      // n(n-1)/2 binary clauses, plus the clause of all inputs for exactly-one.
      const std::uint64_t pairs = n * (n - 1) / 2;
      const bool exactly = c.kind == constraint_kind::exactly_one;
      s.clauses = pairs + (exactly ? 1 : 0);
      s.literals = 2 * pairs + (exactly ? n : 0);
      s.longest_clause = exactly ? n : (pairs != 0 ? 2 : 0);
      break;
    }
    case method_id::sequential_counter: {
      // Sinz 2005, at most k with 1 <= k < n: k(n-1) variables, 2nk + n - 3k - 1 clauses:
      // k-1 units ~s(1,j), (n-2)(k-1) ternary ~xi|~s(i-1,j-1)|s(i,j), the rest binary.
      if (options.full_equivalence || c.rel != relation::le) return std::nullopt;
      const auto k = static_cast<std::uint64_t>(c.bound);
      s.variables = k * (n - 1);
      s.clauses = 2 * n * k + n - 3 * k - 1;
      const std::uint64_t unit = k - 1;
      const std::uint64_t ternary = (n - 2) * (k - 1);
      const std::uint64_t binary = s.clauses - unit - ternary;
      s.literals = unit + 2 * binary + 3 * ternary;
      s.longest_clause = ternary != 0 ? 3 : 2;
      break;
    }
    case method_id::ladder: {
      // Sinz 2005 with k = 1 (Gent & Nightingale's ladder): n-1 variables,
      // 3n-4 binary clauses; full equivalence adds 1 binary and n-2 ternary.
      if (n >= 2) {
        s.variables = n - 1;
        detail::add_clauses(s, 3 * n - 4 + (options.full_equivalence ? 1 : 0), 2);
        if (options.full_equivalence) detail::add_clauses(s, n - 2, 3);
      }
      if (c.kind == constraint_kind::exactly_one) detail::add_clauses(s, 1, n);
      break;
    }
    case method_id::bitwise: {
      // Frisch et al. 2005: ceil(log2 n) bits, n ceil(log2 n) binary clauses;
      // full equivalence adds one clause per bit over the inputs whose code
      // has that bit set.
      const std::size_t bits = binary_code_bits(n);
      s.variables = bits;
      detail::add_clauses(s, n * bits, 2);
      if (options.full_equivalence)
        for (std::size_t j = 0; j < bits; ++j) detail::add_clauses(s, 1, 1 + detail::codes_with_bit(n, j));
      if (c.kind == constraint_kind::exactly_one) detail::add_clauses(s, 1, n);
      break;
    }
    case method_id::sorting_network:
    case method_id::cardinality_network: {
      const cardinality_sides need = needed_sides(c);
      if (need.impossible) {
        s.clauses = 1;  // the empty clause
        break;
      }
      if (!need.at_most && !need.at_least) break;
      const sides which = sides_for(c.rel, options);
      const auto k = static_cast<std::uint64_t>(c.bound);
      if (method == method_id::sorting_network) {
        if (!std::has_single_bit(n)) return std::nullopt;  // padding removes comparators
        detail::add_comparators(s, detail::sort_comparators(n), which);
      } else {
        const std::uint64_t m = std::bit_ceil(need.at_most ? k + 1 : k);
        if (n % m != 0) return std::nullopt;  // padding removes comparators
        const std::uint64_t blocks = n / m;
        detail::comparator_count total;
        const auto sort = detail::sort_comparators(m);
        const auto merge = detail::merge_comparators(2 * m, m);
        total.full = blocks * sort.full + (blocks - 1) * merge.full;
        total.half = blocks * sort.half + (blocks - 1) * merge.half;
        detail::add_comparators(s, total, which);
      }
      detail::add_clauses(s, (need.at_most ? 1 : 0) + (need.at_least ? 1 : 0), 1);
      break;
    }
    default: return std::nullopt;
  }
  s.clauses += units;
  s.literals += units;
  if (units != 0 && s.longest_clause == 0) s.longest_clause = 1;
  return s;
}

}  // namespace clausewright
