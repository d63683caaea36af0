// clausewright: closed-form sizes, for methods whose size is published.
//
// A prediction costs O(1) (O(m) for the networks, m the power of two they are
// cut at) where a dry run costs the whole encoding; the statistics use it to
// skip dry runs of huge cases. Each formula is tested equal to the dry run
// (tests/test_predict.cpp).
//
// Each encoding file declares its own closed form and lower bound (its
// `NAME_encoding::predict` and `lower_bound`, encodings/descriptor.hpp);
// this file adds what every method writes alike (units, constants, single
// clauses) and dispatches by method.
#pragma once

#include <algorithm>
#include <bit>
#include <cstdint>
#include <limits>
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
    case constraint_kind::constant_false:
      return encoding_size{0, 1, 0, 0};
    case constraint_kind::constant_true:
      return encoding_size{0, units, units, units != 0 ? 1U : 0U};
    case constraint_kind::clause:
      return encoding_size{0, units + 1, units + n, n > 0 ? n : (units != 0 ? 1U : 0U)};
    default:
      break;
  }
  if (!can_encode(method, c)) return std::nullopt;
  std::optional<encoding_size> predicted;
  switch (method) {
#define CLAUSEWRIGHT_PREDICT(name)                               \
  case method_id::name:                                          \
    predicted = detail::predict_by<name##_encoding>(c, options); \
    break;
    CLAUSEWRIGHT_ENCODINGS(CLAUSEWRIGHT_PREDICT)
#undef CLAUSEWRIGHT_PREDICT
  }
  if (!predicted) return std::nullopt;
  s = *predicted;
  s.clauses += units;
  s.literals += units;
  if (units != 0 && s.longest_clause == 0) s.longest_clause = 1;
  return s;
}

// A lower bound on the clauses of `method` on `c`, cheap to compute (O(n),
// or subset sums of the coefficients up to the bound where that is
// affordable); 0 when nothing better is known. The exact size where a closed
// form exists. Tested against dry runs (tests/test_predict.cpp).
// The count may stop once it passes `enough` (any value above it is then as
// good as the exact bound for a budget of `enough`).
[[nodiscard]] inline std::uint64_t clause_lower_bound(
    method_id method, const normalized_constraint& c, const encode_options& options = {},
    std::uint64_t enough = std::numeric_limits<std::uint64_t>::max()) {
  if (const auto exact = predict_size(method, c, options)) return exact->clauses;
  if (c.is_constant() || c.kind == constraint_kind::clause || !can_encode(method, c)) return 0;
  const auto units = static_cast<std::uint64_t>(c.units.size());
  std::uint64_t least = 0;
  switch (method) {
#define CLAUSEWRIGHT_LOWER_BOUND(name)                                   \
  case method_id::name:                                                  \
    least = detail::lower_bound_by<name##_encoding>(c, options, enough); \
    break;
    CLAUSEWRIGHT_ENCODINGS(CLAUSEWRIGHT_LOWER_BOUND)
#undef CLAUSEWRIGHT_LOWER_BOUND
  }
  return units + least;
}

}  // namespace clausewright
