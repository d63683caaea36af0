// Cardinality networks: Asín, Nieuwenhuis, Oliveras, Rodríguez-Carbonell 2011,
// "Cardinality networks: a theoretical and empirical study" (Constraints 16),
// built from Batcher's odd-even merges (Batcher 1968, "Sorting networks and
// their applications", AFIPS); and Batcher's full odd-even sorting network,
// used for cardinality constraints by Eén & Sörensson 2006 (JSAT).
//
// A comparator turns wires a, b into max = a | b and min = a & b, 3 clauses
// per direction: a -> max, b -> max, a & b -> min (upper side) and
// max -> a | b, min -> a, min -> b (lower side); 2 auxiliary variables.
// Wires are sorted in decreasing order, so output j of a network over n inputs
// stands for "at least j inputs are true".
//
// The cardinality network for the m largest of n (m a power of two, the
// inputs padded with false to a multiple of m): every block of m inputs is
// sorted by Batcher's network, then blocks are merged pairwise by the
// simplified merge, which keeps only the m largest of two sorted m-sequences:
// Batcher's merge without the comparators that reach only the discarded
// outputs (the last comparator computes only its max). For "<= k" m is the
// least power of two >= k+1, the upper side is built and ~c_(k+1) asserted;
// for ">= k" (as published, the other three clauses) m >= k, the lower side,
// and c_k; "=" builds both sides of one network with m >= k+1; full
// equivalence builds both sides. Padding is constant false: a comparator
// with a false input is a wire, without clauses.
// Size: O(n log^2 m) comparators. Batcher's sorting network on n = 2^t
// inputs has (t^2 - t + 4) * 2^(t-2) - 1 comparators. Both are arc-consistent
// (Asín et al.; measured by tests/test_method_table.cpp).
#pragma once

#include <algorithm>
#include <bit>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

namespace detail {

// A network on a working array of wires; the invalid literal is the constant
// false wire.
template <class Sink>
class comparator_network {
 public:
  comparator_network(Sink& out, variable_pool& pool, sides which) : out_(out), pool_(pool), which_(which) {}

  std::vector<literal> wires;

  // wires[x] becomes the max, wires[y] the min (or is left stale when the min
  // is not needed).
  void compare(std::size_t x, std::size_t y, bool need_min) {
    const literal a = wires[x];
    const literal b = wires[y];
    if (!b.valid()) return;
    if (!a.valid()) {
      wires[x] = b;
      wires[y] = a;
      return;
    }
    const literal max = pool_.fresh();
    wires[x] = max;
    if (has_upper(which_)) {
      emit(out_, ~a, max);
      emit(out_, ~b, max);
    }
    if (has_lower(which_)) emit(out_, ~max, a, b);
    if (!need_min) return;
    const literal min = pool_.fresh();
    wires[y] = min;
    if (has_upper(which_)) emit(out_, ~a, ~b, min);
    if (has_lower(which_)) {
      emit(out_, ~min, a);
      emit(out_, ~min, b);
    }
  }

  // Batcher's odd-even merge of the sequence wires[lo], wires[lo+r], ... up
  // to (not including) lo+n, whose two halves are sorted; only its first
  // `need` elements are computed (need = n/r: all).
  void merge(std::size_t lo, std::size_t n, std::size_t r, std::size_t need) {
    if (need == 0) return;
    const std::size_t length = n / r;
    const std::size_t step = r * 2;
    if (step >= n) {
      compare(lo, lo + r, need >= 2);
      return;
    }
    // Element 2i of the result is element i of the even subsequence, 2i-1
    // element i-1 of the odd one; comparator i joins positions 2i-1 and 2i.
    merge(lo, n, step, std::min(need / 2 + 1, length / 2));
    merge(lo + r, n, step, std::min(need / 2, length / 2));
    const std::size_t pairs = std::min(need / 2, length / 2 - 1);  // those with 2i-1 < need
    for (std::size_t i = 1; i <= pairs; ++i) {
      const std::size_t x = lo + (2 * i - 1) * r;
      compare(x, x + r, 2 * i < need);
    }
  }

  // Batcher's odd-even merge sort of wires[lo .. lo+n), n a power of two.
  void sort(std::size_t lo, std::size_t n) {
    if (n < 2) return;
    sort(lo, n / 2);
    sort(lo + n / 2, n / 2);
    merge(lo, n, 1, n);
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  sides which_;
};

[[nodiscard]] constexpr std::size_t power_of_two_at_least(std::size_t n) noexcept {
  std::size_t p = 1;
  while (p < n) p *= 2;
  return p;
}

inline unary_outputs take_outputs(const std::vector<literal>& wires, std::size_t count, sides which) {
  unary_outputs result;
  result.built = which;
  result.outputs.assign(wires.begin(), wires.begin() + static_cast<std::ptrdiff_t>(count));
  for (const literal l : result.outputs) CLAUSEWRIGHT_ASSERT(l.valid(), "a network output below n is a constant");
  return result;
}

}  // namespace detail

// Batcher's odd-even sorting network over `inputs` (padded with false to a
// power of two): n outputs, outputs[j-1] <-> "at least j inputs true" in the
// sides built.
template <class Sink>
unary_outputs build_sorting_network(Sink& out, variable_pool& pool, std::span<const literal> inputs, sides which) {
  detail::comparator_network<Sink> net(out, pool, which);
  const std::size_t size = detail::power_of_two_at_least(inputs.size());
  net.wires.assign(inputs.begin(), inputs.end());
  net.wires.resize(size, literal());
  if (!inputs.empty()) net.sort(0, size);
  return detail::take_outputs(net.wires, inputs.size(), which);
}

// The cardinality network giving the `needed` largest of `inputs` (computed
// for the least power of two m >= needed): min(n, m) outputs.
template <class Sink>
unary_outputs build_cardinality_network(Sink& out, variable_pool& pool, std::span<const literal> inputs,
                                        std::size_t needed, sides which) {
  if (inputs.empty() || needed == 0) return detail::take_outputs({}, 0, which);
  const std::size_t m = detail::power_of_two_at_least(needed);
  const std::size_t blocks = (inputs.size() + m - 1) / m;
  detail::comparator_network<Sink> net(out, pool, which);
  net.wires.assign(inputs.begin(), inputs.end());
  net.wires.resize(blocks * m, literal());
  for (std::size_t b = 0; b < blocks; ++b) net.sort(b * m, m);
  // Merge neighbouring blocks; the m largest of each pair move to the front.
  for (std::size_t count = blocks; count > 1; count = (count + 1) / 2) {
    for (std::size_t pair = 0; 2 * pair < count; ++pair) {
      const std::size_t lo = 2 * pair * m;
      if (2 * pair + 1 < count) net.merge(lo, 2 * m, 1, m);
      if (pair != 0)
        std::copy_n(net.wires.begin() + static_cast<std::ptrdiff_t>(lo), m,
                    net.wires.begin() + static_cast<std::ptrdiff_t>(pair * m));
    }
  }
  return detail::take_outputs(net.wires, std::min(inputs.size(), m), which);
}

template <class Sink>
void encode_cardinality_network(Sink& out, variable_pool& pool, const normalized_constraint& c,
                                const encode_options& options) {
  detail::encode_with_counter(out, c, options, "a cardinality network", [&](std::size_t needed, sides which) {
    return build_cardinality_network(out, pool, c.literals, needed, which);
  });
}

template <class Sink>
void encode_sorting_network(Sink& out, variable_pool& pool, const normalized_constraint& c,
                            const encode_options& options) {
  detail::encode_with_counter(out, c, options, "a sorting network", [&](std::size_t /*needed*/, sides which) {
    return build_sorting_network(out, pool, c.literals, which);
  });
}

namespace detail {

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

// The size of a network encoding of `c` as encode_with_counter writes it:
// the empty clause when the bound cannot hold, nothing when it always holds,
// else the comparators `count` gives (nullopt: no closed form, as when
// constant padding removes comparators) on the sides built, and one unit per
// side asserted.
using comparator_counter = std::optional<comparator_count> (*)(const normalized_constraint& c,
                                                               const cardinality_sides& need);
[[nodiscard]] inline std::optional<encoding_size> network_size(const normalized_constraint& c,
                                                               const encode_options& options,
                                                               comparator_counter count) {
  const cardinality_sides need = needed_sides(c);
  encoding_size s;
  if (need.impossible) {
    s.clauses = 1;  // the empty clause
    return s;
  }
  if (!need.at_most && !need.at_least) return s;
  const std::optional<comparator_count> comparators = count(c, need);
  if (!comparators) return std::nullopt;
  add_comparators(s, *comparators, sides_for(c.rel, options));
  add_clauses(s, (need.at_most ? 1 : 0) + (need.at_least ? 1 : 0), 1);
  return s;
}

}  // namespace detail

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct cardinality_network_encoding {
  static constexpr encoding_descriptor descriptor{
      "cardinality-network",
      applies::at_most_one | applies::cardinality,
      true,
      "Asín, Nieuwenhuis, Oliveras, Rodríguez-Carbonell 2011 (Constraints); Batcher 1968",
      "O(n log^2 k) comparators, 3 clauses and 2 auxiliary variables each per direction",
      "none",
      false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_cardinality_network(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    return detail::network_size(c, options, comparators);
  }
  // Blocks of m sorted, then merged pairwise keeping the m largest.
  [[nodiscard]] static std::optional<detail::comparator_count> comparators(const normalized_constraint& c,
                                                                           const cardinality_sides& need) {
    const auto n = static_cast<std::uint64_t>(c.size());
    const auto k = static_cast<std::uint64_t>(c.bound);
    const std::uint64_t m = std::bit_ceil(need.at_most ? k + 1 : k);
    if (n % m != 0) return std::nullopt;  // padding removes comparators
    const std::uint64_t blocks = n / m;
    const auto sort = detail::sort_comparators(m);
    const auto merge = detail::merge_comparators(2 * m, m);
    return detail::comparator_count{blocks * sort.full + (blocks - 1) * merge.full,
                                    blocks * sort.half + (blocks - 1) * merge.half};
  }
};

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct sorting_network_encoding {
  static constexpr encoding_descriptor descriptor{
      "sorting-network",
      applies::at_most_one | applies::cardinality,
      true,
      "Batcher 1968 (odd-even merge sort); Eén & Sörensson 2006 (JSAT)",
      "n = 2^m: (m^2 - m + 4) * 2^(m-2) - 1 comparators, 3 clauses and 2 auxiliary variables each per "
      "direction (inputs padded with false to a power of two)",
      "inputs padded with false to a power of two",
      false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_sorting_network(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    return detail::network_size(c, options, comparators);
  }
  // One sort of all the inputs.
  [[nodiscard]] static std::optional<detail::comparator_count> comparators(const normalized_constraint& c,
                                                                           const cardinality_sides& /*need*/) {
    const auto n = static_cast<std::uint64_t>(c.size());
    if (!std::has_single_bit(n)) return std::nullopt;  // padding removes comparators
    return detail::sort_comparators(n);
  }
};

}  // namespace clausewright
