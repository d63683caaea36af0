// Product at-most-one: Chen 2010, "A new SAT encoding of the at-most-one
// constraint" (ModRef).
//
// The n inputs are laid out on a p x q grid (p*q >= n, both about sqrt(n));
// input x_k in row i and column j gets the clauses ~x_k | u_i and ~x_k | v_j
// over fresh row and column variables, and at most one u and at most one v
// are then required, recursively, with the pairwise encoding once at most
// product_pairwise_limit literals are left. Two true inputs differ in their
// row or their column, so they would make two u's or two v's true. Size:
// A(n) = p + q + A(p) + A(q) auxiliary variables and C(n) = 2n + C(p) + C(q)
// clauses, A = 0 and C = n(n-1)/2 below the limit; that is
// 2*sqrt(n) + O(n^(1/4)) variables and 2n + 4*sqrt(n) + O(n^(1/4)) clauses.
// Arc-consistent: a true x_k sets u_i and v_j, the recursive at-most-ones
// set every other u and v false, and every other input has a false u or v.
//
// Full equivalence defines each row and column variable both ways,
// u_i <-> OR(row i), v_j <-> OR(column j), adding u_i -> OR(row i) and
// v_j -> OR(column j) (p + q more clauses per level). Exactly-one adds the
// clause x_1 | ... | x_n.
#pragma once

#include <algorithm>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"
#include "pairwise.hpp"

namespace clausewright {

// Pairwise up to here: n(n-1)/2 <= 2n + C(p) + C(q) for n <= 6 (15 < 16 at
// n = 6, a 3 x 2 grid), the product is smaller from n = 7 on (20 < 21).
inline constexpr std::size_t product_pairwise_limit = 6;

// Grid of the product encoding: q = ceil(sqrt(n)) columns and
// p = ceil(n / q) rows, so p*q >= n and every row and column is used.
struct product_grid {
  std::size_t rows = 0;
  std::size_t columns = 0;
};

[[nodiscard]] constexpr product_grid product_grid_for(std::size_t n) noexcept {
  std::size_t root = 0;
  while ((root + 1) * (root + 1) <= n) ++root;
  const std::size_t columns = root * root == n ? root : root + 1;
  return {columns == 0 ? 0 : (n + columns - 1) / columns, columns};
}

template <class Sink>
void encode_product_at_most_one(Sink& out, variable_pool& pool, std::span<const literal> x, bool full = false) {
  const std::size_t n = x.size();
  if (n <= product_pairwise_limit) {
    encode_pairwise_at_most_one(out, x);
    return;
  }
  const product_grid grid = product_grid_for(n);
  std::vector<literal> u(grid.rows);
  std::vector<literal> v(grid.columns);
  for (literal& r : u) r = pool.fresh();
  for (literal& col : v) col = pool.fresh();
  for (std::size_t k = 0; k < n; ++k) {
    emit(out, ~x[k], u[k / grid.columns]);
    emit(out, ~x[k], v[k % grid.columns]);
  }
  if (full) {
    std::vector<literal> clause;
    clause.reserve(std::max(grid.rows, grid.columns) + 1);
    for (std::size_t i = 0; i < grid.rows; ++i) {
      clause.assign(1, ~u[i]);
      for (std::size_t k = i * grid.columns; k < std::min(n, (i + 1) * grid.columns); ++k) clause.push_back(x[k]);
      out.add_clause(std::span<const literal>(clause));
    }
    for (std::size_t j = 0; j < grid.columns; ++j) {
      clause.assign(1, ~v[j]);
      for (std::size_t k = j; k < n; k += grid.columns) clause.push_back(x[k]);
      out.add_clause(std::span<const literal>(clause));
    }
  }
  encode_product_at_most_one(out, pool, std::span<const literal>(u), full);
  encode_product_at_most_one(out, pool, std::span<const literal>(v), full);
}

template <class Sink>
void encode_product(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
  if (c.kind != constraint_kind::at_most_one && c.kind != constraint_kind::exactly_one)
    throw error(error_id::method_not_applicable, "the product encoding takes only at-most-one and exactly-one",
                c.where());
  encode_product_at_most_one(out, pool, c.literals, options.full_equivalence);
  if (c.kind == constraint_kind::exactly_one) out.add_clause(std::span<const literal>(c.literals));
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct product_encoding {
  static constexpr encoding_descriptor descriptor{
      "product",
      static_cast<std::uint8_t>(applies::at_most_one),
      true,
      "Chen 2010",
      "2*sqrt(n) + O(n^(1/4)) auxiliary variables, 2n + 4*sqrt(n) + O(n^(1/4)) clauses",
      "none",
      false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_product(out, pool, c, options);
  }
};

}  // namespace clausewright
