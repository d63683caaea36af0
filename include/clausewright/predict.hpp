// clausewright: closed-form sizes, for methods whose size is published.
//
// A prediction costs O(1) where a dry run costs the whole encoding; the
// statistics use it to skip dry runs of huge cases. Each formula is tested
// equal to the dry run (tests/test_predict.cpp).
#pragma once

#include <cstdint>
#include <optional>

#include "constraint.hpp"
#include "encodings/common.hpp"
#include "methods.hpp"
#include "sink.hpp"

namespace clausewright {

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
    default: return std::nullopt;
  }
  s.clauses += units;
  s.literals += units;
  if (units != 0 && s.longest_clause == 0) s.longest_clause = 1;
  return s;
}

}  // namespace clausewright
