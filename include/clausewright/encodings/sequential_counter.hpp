// Sequential counter: Sinz 2005, "Towards an optimal CNF encoding of Boolean
// cardinality constraints" (CP 2005).
//
// Register s(i,j) means "at least j of x1..xi are true". For sum <= k with
// 1 <= k < n the published clauses are
//     ~x1 | s(1,1);   ~s(1,j) for 1 < j <= k;
//     for 1 < i < n:  ~xi | s(i,1);  ~s(i-1,1) | s(i,1);
//                     ~xi | ~s(i-1,j-1) | s(i,j);  ~s(i-1,j) | s(i,j)  (1 < j <= k);
//                     ~xi | ~s(i-1,k);
//     ~xn | ~s(n-1,k);
// that is k(n-1) auxiliary variables and 2nk + n - 3k - 1 clauses. It is
// arc-consistent. ">=" is encoded as "<=" over the negated inputs (Sinz's
// way); "=" and full equivalence use one counter over all n rows with k+1
// registers per row, defined in both directions, so both bounds of an
// equality are unit clauses on the same registers and nothing is doubled.
#pragma once

#include <algorithm>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

// Sinz's at-most-k exactly as published (requires 1 <= k < n).
template <class Sink>
void encode_sequential_at_most(Sink& out, variable_pool& pool, std::span<const literal> x, std::int64_t k) {
  const std::size_t n = x.size();
  const auto kk = static_cast<std::size_t>(k);
  CLAUSEWRIGHT_ASSERT(k >= 1 && kk < n, "sequential counter needs 1 <= k < n");
  // Registers row by row: s(i,j) = first + (i-1)*k + (j-1), for i = 1..n-1.
  const std::int32_t first =
      pool.fresh_block(static_cast<std::int64_t>(kk) * static_cast<std::int64_t>(n - 1)).dimacs();
  auto s = [first, kk](std::size_t i, std::size_t j) {
    return literal(first + static_cast<std::int32_t>((i - 1) * kk + (j - 1)));
  };
  emit(out, ~x[0], s(1, 1));
  for (std::size_t j = 2; j <= kk; ++j) emit(out, ~s(1, j));
  for (std::size_t i = 2; i < n; ++i) {
    const literal xi = x[i - 1];
    emit(out, ~xi, s(i, 1));
    emit(out, ~s(i - 1, 1), s(i, 1));
    for (std::size_t j = 2; j <= kk; ++j) {
      emit(out, ~xi, ~s(i - 1, j - 1), s(i, j));
      emit(out, ~s(i - 1, j), s(i, j));
    }
    emit(out, ~xi, ~s(i - 1, kk));
  }
  emit(out, ~x[n - 1], ~s(n - 1, kk));
}

// A counter over all inputs with `cut` registers per row, in the given sides.
// Returns the last row: outputs[j-1] <-> "at least j inputs true" (for j up to
// cut). Rows hold only registers that can be true: row i has min(i, cut).
template <class Sink>
unary_outputs build_sequential_counter(Sink& out, variable_pool& pool, std::span<const literal> x, std::size_t cut,
                                       sides which) {
  unary_outputs result;
  result.built = which;
  if (x.empty() || cut == 0) return result;
  std::vector<literal> previous;
  std::vector<literal> current;
  previous.reserve(cut);
  current.reserve(cut);
  for (std::size_t i = 1; i <= x.size(); ++i) {
    const literal xi = x[i - 1];
    const std::size_t width = std::min(i, cut);
    current.clear();
    for (std::size_t j = 1; j <= width; ++j) current.push_back(pool.fresh());
    for (std::size_t j = 1; j <= width; ++j) {
      const literal sij = current[j - 1];
      const bool has_prev_j = j <= previous.size();  // s(i-1,j) exists
      const bool has_prev_j1 = j >= 2;               // s(i-1,j-1) exists (j-1 <= i-1)
      if (has_upper(which)) {
        // s(i-1,j) -> s(i,j);  xi & s(i-1,j-1) -> s(i,j)  (s(i-1,0) is true)
        if (has_prev_j) emit(out, ~previous[j - 1], sij);
        if (has_prev_j1)
          emit(out, ~xi, ~previous[j - 2], sij);
        else
          emit(out, ~xi, sij);
      }
      if (has_lower(which)) {
        // s(i,j) -> s(i-1,j) | xi;  s(i,j) -> s(i-1,j-1)
        if (has_prev_j)
          emit(out, ~sij, previous[j - 1], xi);
        else
          emit(out, ~sij, xi);
        if (has_prev_j1) emit(out, ~sij, previous[j - 2]);
      }
    }
    previous.swap(current);
  }
  result.outputs = previous;
  return result;
}

template <class Sink>
void encode_sequential_counter(Sink& out, variable_pool& pool, const normalized_constraint& c,
                               const encode_options& options) {
  require_unit_coefficients(c, "the sequential counter");
  const std::size_t n = c.size();
  if (c.kind == constraint_kind::clause) {
    out.add_clause(std::span<const literal>(c.literals));
    return;
  }
  const auto k = static_cast<std::size_t>(c.bound);
  if (!options.full_equivalence && c.rel != relation::eq) {
    if (c.rel == relation::le) {
      encode_sequential_at_most(out, pool, c.literals, c.bound);
    } else {
      // sum x >= k  <=>  sum ~x <= n - k
      const normalized_constraint flipped = negated_view(c);
      if (flipped.kind == constraint_kind::clause)
        out.add_clause(std::span<const literal>(flipped.literals));
      else
        encode_sequential_at_most(out, pool, flipped.literals, flipped.bound);
    }
    return;
  }
  // Full counter: registers up to k+1 for <= and =, up to k for >=.
  const std::size_t cut = c.rel == relation::ge ? k : std::min(n, k + 1);
  const unary_outputs counter = build_sequential_counter(out, pool, c.literals, cut, sides::both);
  if (c.rel != relation::ge && k < counter.size()) emit(out, counter.at_most(k));
  if (c.rel != relation::le) emit(out, counter.at_least(k));
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct sequential_counter_encoding {
  static constexpr encoding_descriptor descriptor{
      "sequential-counter",
      applies::at_most_one | applies::cardinality,
      true,
      "Sinz 2005 (CP)",
      "at most k, 1 <= k < n: k(n-1) auxiliary variables, 2nk + n - 3k - 1 clauses",
      "k(n-1) auxiliary variables must fit the variable range",
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_sequential_counter(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    // Sinz 2005, at most k with 1 <= k < n: k(n-1) variables, 2nk + n - 3k - 1 clauses:
    // k-1 units ~s(1,j), (n-2)(k-1) ternary ~xi|~s(i-1,j-1)|s(i,j), the rest binary.
    if (options.full_equivalence || c.rel != relation::le) return std::nullopt;
    const auto n = static_cast<std::uint64_t>(c.size());
    const auto k = static_cast<std::uint64_t>(c.bound);
    encoding_size s;
    s.variables = k * (n - 1);
    s.clauses = 2 * n * k + n - 3 * k - 1;
    const std::uint64_t unit = k - 1;
    const std::uint64_t ternary = (n - 2) * (k - 1);
    const std::uint64_t binary = s.clauses - unit - ternary;
    s.literals = unit + 2 * binary + 3 * ternary;
    s.longest_clause = ternary != 0 ? 3 : 2;
    return s;
  }
};

}  // namespace clausewright
