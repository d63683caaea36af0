// Group sequential weight counter: the sequential weight counter of
// Hölldobler, Manthey, Steinke 2012 (KI) with one row per at-most-one group,
// after Bofill, Coll, Nightingale, Suy, Ulrich-Oltean, Villaret 2022, "SAT
// encodings for pseudo-Boolean constraints together with at-most-one
// constraints" (Artificial Intelligence 302, 103604).
//
// Register s(i,j) means "groups 1..i weigh at least j", j = 1..K. Row i reads
// group i, whose true literal (if any) adds its coefficient; at most one does,
// so every literal x of the group (coefficient a_x <= K) gets the clauses the
// group-blind counter gives a single input (encodings/
// sequential_weight_counter.hpp), and the rows are per group, not per literal:
//     ~x | s(i,j)                    for j <= a_x          (i < n);
//     ~s(i-1,j) | s(i,j)             for j = 1..K          (1 < i < n);
//     ~x | ~s(i-1,j) | s(i,j+a_x)    for j <= K - a_x      (1 < i < n);
//     ~x | ~s(i-1,K+1-a_x)                                  (i > 1).
// Literals of a group that share a coefficient first share one fresh literal
// (detail::merge_equal_coefficients), so x ranges over the distinct
// coefficients of the group. Size for n groups and bound K:
// K(n-1) registers plus one literal per merged coefficient class; clauses as
// counted exactly by group_sequential_weight_counter_size() (about
// (d_i + 1) K per group with d_i distinct coefficients, against (m_i + 1) K
// per group of m_i literals without groups).
//
// The clauses are correct only together with the at-most-one constraints of
// the groups. Relations: <= as above (as published); >= goes through
// detail::at_most_form (a "none" literal per group, the row over the
// complements), = through both; full_equivalence adds the registers' other
// direction (group_sequential_weight_at_most). Propagation (with the groups'
// at-most-one clauses, pairwise): arc-consistent for <= (measured in
// tests/test_groups.cpp), not for >= (measured by tests/test_method_table.cpp).
#pragma once

#include <algorithm>
#include <cstdint>
#include <functional>
#include <optional>
#include <span>
#include <string>
#include <utility>
#include <vector>

#include "../groups.hpp"
#include "common.hpp"
#include "descriptor.hpp"
#include "sequential_weight_counter.hpp"

namespace clausewright {

namespace detail {

// Group sizes after merging: for each distinct coefficient, how many literals have it.
inline std::vector<std::pair<std::int64_t, std::size_t>> coefficient_classes(const std::vector<term>& group) {
  std::vector<std::int64_t> a;
  a.reserve(group.size());
  for (const term& t : group) a.push_back(t.coefficient);
  std::sort(a.begin(), a.end(), std::greater<>());
  std::vector<std::pair<std::int64_t, std::size_t>> classes;
  for (const std::int64_t x : a) {
    if (!classes.empty() && classes.back().first == x)
      ++classes.back().second;
    else
      classes.emplace_back(x, 1);
  }
  return classes;
}

// The counter over merged groups (every coefficient in 1..k, k >= 1); with
// the lower side also (full_equivalence) the registers' other direction,
// s(i,j) -> "groups 1..i weigh at least j":
//     ~s(1,j) | (the x of group 1 with a_x >= j);
//     ~s(i,j) | s(i-1,j) | (every x of group i)              (1 < i < n);
//     ~s(i,j) | ~x | s(i-1,j-a_x)      for a_x < j           (1 < i < n),
// valid because at most one x of a group is true.
template <class Sink>
void group_sequential_weight_at_most(Sink& out, variable_pool& pool, const std::vector<std::vector<term>>& rows,
                                     std::int64_t k, const error_position& where, sides which = sides::upper) {
  const std::size_t n = rows.size();
  if (n < 2) return;  // one group alone never exceeds k
  check_register_count(static_cast<std::int64_t>(n - 1), k, pool, where);
  const std::int32_t first = pool.fresh_block(k * static_cast<std::int64_t>(n - 1)).dimacs();
  auto s = [first, k](std::size_t i, std::int64_t j) {  // 1 <= i <= n-1, 1 <= j <= k
    return literal(first + static_cast<std::int32_t>(static_cast<std::int64_t>(i - 1) * k + (j - 1)));
  };
  for (std::size_t i = 1; i <= n; ++i) {
    if (i > 1 && i < n)
      for (std::int64_t j = 1; j <= k; ++j) emit(out, ~s(i - 1, j), s(i, j));
    for (const term& t : rows[i - 1]) {
      const literal x = t.lit;
      const std::int64_t a = t.coefficient;
      if (i < n) {
        for (std::int64_t j = 1; j <= a; ++j) emit(out, ~x, s(i, j));
        if (i > 1)
          for (std::int64_t j = 1; j <= k - a; ++j) emit(out, ~x, ~s(i - 1, j), s(i, j + a));
      }
      if (i > 1) emit(out, ~x, ~s(i - 1, k + 1 - a));
    }
    if (!has_lower(which) || i == n) continue;
    std::vector<literal> some;  // once per register, not a hot path of the upper side
    for (std::int64_t j = 1; j <= k; ++j) {
      some.clear();
      some.push_back(~s(i, j));
      if (i > 1) some.push_back(s(i - 1, j));
      for (const term& t : rows[i - 1])
        if (i > 1 || t.coefficient >= j) some.push_back(t.lit);
      out.add_clause(std::span<const literal>(some));
      if (i > 1)
        for (const term& t : rows[i - 1])
          if (t.coefficient < j) emit(out, ~s(i, j), ~t.lit, s(i - 1, j - t.coefficient));
    }
  }
}

}  // namespace detail

// Exact size of encode_group_sequential_weight_counter on a "<=" row whose
// coefficients are all in 1..bound (bound >= 1; a grouped normalised row),
// encoded without a group_literal_cache, counted from the clause patterns
// above without building anything.
[[nodiscard]] inline encoding_size group_sequential_weight_counter_size(const grouped_constraint& c) {
  encoding_size size;
  if (c.is_constant() || c.groups.size() < 2 || c.maximum_sum() <= c.bound) return size;
  const std::int64_t k = c.bound;
  const std::size_t n = c.groups.size();
  std::vector<std::vector<std::pair<std::int64_t, std::size_t>>> classes;
  for (const auto& g : c.groups) {
    classes.push_back(detail::coefficient_classes(g));
    for (const auto& [a, m] : classes.back()) {
      if (m > 1) {
        size.variables += 1;              // the shared literal
        detail::add_clauses(size, m, 2);  // x -> y
      }
    }
  }
  size.variables += static_cast<std::uint64_t>(k) * (n - 1);
  for (std::size_t i = 1; i <= n; ++i) {
    if (i > 1 && i < n) detail::add_clauses(size, static_cast<std::uint64_t>(k), 2);
    for (const auto& cls : classes[i - 1]) {
      const std::int64_t a = cls.first;
      if (i < n) {
        detail::add_clauses(size, static_cast<std::uint64_t>(a), 2);
        if (i > 1) detail::add_clauses(size, static_cast<std::uint64_t>(k - a), 3);
      }
      if (i > 1) detail::add_clauses(size, 1, 2);
    }
  }
  return size;
}

template <class Sink>
void encode_group_sequential_weight_counter(Sink& out, variable_pool& pool, const grouped_constraint& c,
                                            const encode_options& options, group_literal_cache* cache = nullptr) {
  const sides which = options.full_equivalence ? sides::both : sides::upper;
  detail::encode_groups_as_at_most(out, pool, c, [&](const grouped_constraint& le) {
    std::vector<std::vector<term>> rows;
    rows.reserve(le.groups.size());
    for (const auto& g : le.groups) rows.push_back(detail::merge_equal_coefficients(out, pool, g, which, cache));
    detail::group_sequential_weight_at_most(out, pool, rows, le.bound, c.where(), which);
  });
}

// The method table's entry (methods.hpp).
struct group_sequential_weight_counter_encoding {
  static constexpr encoding_descriptor descriptor{
      "group-sequential-weight-counter",
      applies::cardinality | applies::linear,
      false,
      "Bofill, Coll, Nightingale, Suy, Ulrich-Oltean, Villaret 2022 (Artificial Intelligence 302); "
      "Hölldobler, Manthey, Steinke 2012 (KI)",
      "n groups, bound K: K(n-1) registers, about (d_i + 1)K clauses per group of d_i distinct coefficients",
      "rows with at-most-one groups only, with their at-most-one constraints in the formula; K(n-1) registers",
      false,
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_group_sequential_weight_counter(out, pool, grouped_view(c), options);
  }
  // Exact for "<=" built one way (units not counted).
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    if (options.full_equivalence || c.rel != relation::le || c.bound < 1) return std::nullopt;
    return group_sequential_weight_counter_size(grouped_view(c));
  }
};

}  // namespace clausewright
