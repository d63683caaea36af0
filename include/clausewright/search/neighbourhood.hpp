// clausewright: upper bounds early — a constructive start and the
// large-neighbourhood improvement.
//
// The start: when every linear row is a packing row (over positive
// literals, <= with positive coefficients or >= with negative ones: a
// knapsack, several knapsacks), the
// greedy by ratio fills the rows with the variables whose truth saves the
// most objective per unit of capacity (Dantzig's order for the knapsack);
// otherwise, with a relaxation solved, its solution rounded. Either only
// suggests the solver's phases for its first call, so constraints outside
// the rows are still respected.
//
// Large-neighbourhood search (Shaw 1998, CP): fix most variables to the best
// solution by assumptions, free a neighbourhood of related variables (those
// of a few random rows, the relatedness of sharing a constraint; random
// variables without rows), ask for a better solution under a conflict limit.
// The free share grows after a neighbourhood proved empty and shrinks after
// one that ran out of conflicts. The bound of a neighbourhood is "the free
// part of the objective below what the best solution leaves it", encoded
// afresh for the neighbourhood (a few dozen literals, where the objective's
// own bound may be large or propagate weakly) and retired after the call.
// Its answers prove nothing about the whole model: it only finds solutions.
//
// With the relaxation's reduced costs (search/reduced_costs.hpp), every
// other neighbourhood is the core problem (Balas & Zemel 1980, "An algorithm
// for large zero-one knapsack problems", Operations Research; Puchinger,
// Raidl, Pferschy 2010, "The multidimensional knapsack problem: structure and
// algorithms", INFORMS Journal on Computing): the variables whose reduced
// cost is smallest in magnitude, those the relaxation leaves most open, are
// freed, the rest fixed to the best solution. Variables that reduced-cost
// fixing settles for every better solution are fixed to that value.
//
// Part of optimize.hpp: include optimize.hpp, not this.
#pragma once

#include <algorithm>
#include <cstdint>
#include <numeric>
#include <optional>
#include <random>
#include <span>
#include <utility>
#include <vector>

#include "../constraint.hpp"
#include "../encoder.hpp"
#include "../literal.hpp"
#include "../methods.hpp"
#include "../select.hpp"
#include "../sink.hpp"
#include "options.hpp"
#include "reduced_costs.hpp"
#include "run.hpp"

namespace clausewright::detail {

// The greedy start for packing rows: values of variables 1..variables, or
// nothing when a row is not a packing row.
[[nodiscard]] inline std::optional<std::vector<bool>> greedy_packing(std::span<const linear_row> rows,
                                                                     const normalized_objective& goal,
                                                                     std::int32_t variables) {
  if (rows.empty() || variables <= 0) return std::nullopt;
  const auto n = static_cast<std::size_t>(variables);
  // Each row over positive literals (a ~x = a - a x, the constant to the
  // bound), a ">=" row with its signs turned ("-w x >= -C" is "w x <= C", as
  // OPB writes capacities): a packing row has only non-negative
  // coefficients and capacity.
  struct packing_row {
    std::vector<std::pair<std::size_t, std::int64_t>> uses;  // variable, weight
    std::int64_t capacity = 0;
  };
  std::vector<packing_row> packing(rows.size());
  for (std::size_t k = 0; k < rows.size(); ++k) {
    const linear_row& r = rows[k];
    if (r.rel == relation::eq) return std::nullopt;
    const std::int64_t sign = r.rel == relation::ge ? -1 : 1;
    std::int64_t capacity = r.bound;
    for (const term& t : r.terms) {
      if (static_cast<std::size_t>(t.lit.var()) > n) return std::nullopt;
      if (t.lit.negative()) capacity -= t.coefficient;
      packing[k].uses.emplace_back(static_cast<std::size_t>(t.lit.var()),
                                   sign * (t.lit.negative() ? -t.coefficient : t.coefficient));
    }
    packing[k].capacity = sign * capacity;
    if (packing[k].capacity < 0) return std::nullopt;
    for (const auto& u : packing[k].uses)
      if (u.second < 0) return std::nullopt;
  }
  // Per variable, its use of each row's capacity, summed relative to the capacity.
  std::vector<double> load(n + 1, 0.0);
  for (const packing_row& r : packing)
    for (const auto& [v, a] : r.uses)
      load[v] += static_cast<double>(a) / static_cast<double>(std::max<std::int64_t>(r.capacity, 1));
  // What setting each variable true saves: its coefficient on ~x.
  std::vector<double> saving(n + 1, 0.0);
  for (std::size_t i = 0; i < goal.size(); ++i) {
    const literal l = goal.literals[i];
    if (static_cast<std::size_t>(l.var()) > n) continue;
    saving[static_cast<std::size_t>(l.var())] +=
        l.negative() ? static_cast<double>(goal.coefficients[i]) : -static_cast<double>(goal.coefficients[i]);
  }
  std::vector<std::size_t> order;
  for (std::size_t v = 1; v <= n; ++v)
    if (saving[v] > 0) order.push_back(v);
  std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
    return saving[a] * std::max(load[b], 1e-12) > saving[b] * std::max(load[a], 1e-12);
  });
  // Rows by variable, to check the capacity left.
  std::vector<std::vector<std::pair<std::size_t, std::int64_t>>> uses(n + 1);
  for (std::size_t k = 0; k < packing.size(); ++k)
    for (const auto& [v, a] : packing[k].uses) uses[v].emplace_back(k, a);
  std::vector<std::int64_t> left(packing.size());
  for (std::size_t k = 0; k < packing.size(); ++k) left[k] = packing[k].capacity;
  std::vector<bool> values(n + 1, false);
  for (const std::size_t v : order) {
    const bool fits =
        std::all_of(uses[v].begin(), uses[v].end(), [&](const auto& u) { return u.second <= left[u.first]; });
    if (!fits) continue;
    for (const auto& [k, a] : uses[v]) left[k] -= a;
    values[v] = true;
  }
  return values;
}

template <class Solver>
class neighbourhood_search {
 public:
  neighbourhood_search(search_run<Solver>& run, const normalized_objective& goal,
                       const reduced_cost_fixing* fixing = nullptr)
      : run_(run),
        goal_(goal),
        settings_(run.options().neighbourhood),
        random_(run.options().seed),
        share_(settings_.free_share),
        fixing_(fixing) {
    const std::int32_t n = run.recorded();
    if (fixing != nullptr && !fixing->empty()) {
      // The recorded variables by the magnitude of their reduced cost, smallest first.
      const std::vector<double>& d = fixing->magnitudes();
      for (std::int32_t v = 1; v <= n && static_cast<std::size_t>(v) < d.size(); ++v) open_.push_back(v);
      std::stable_sort(open_.begin(), open_.end(), [&](std::int32_t a, std::int32_t b) {
        return d[static_cast<std::size_t>(a)] < d[static_cast<std::size_t>(b)];
      });
    }
    for (const linear_row& r : run.options().rows) {
      std::vector<std::int32_t> vars;
      for (const term& t : r.terms)
        if (t.lit.var() <= n) vars.push_back(t.lit.var());
      if (!vars.empty()) rows_.push_back(std::move(vars));
    }
  }

  // Up to per_round neighbourhoods; best_sum falls with every better
  // solution. The bound is encoded over the free objective literals only
  // (small, so an arc-consistent method fits), guarded by a fresh literal
  // that is retired after the call.
  void round(std::int64_t& best_sum) {
    const std::vector<bool>& incumbent = run_.result().values;
    const auto n = static_cast<std::int32_t>(incumbent.size()) - 1;
    if (!settings_.enabled || n <= 0 || best_sum <= 0) return;
    Solver& solver = run_.solver();
    std::vector<char> free(static_cast<std::size_t>(n) + 1, 0);
    std::vector<literal> assumptions;
    std::vector<term> free_terms;
    // The values every better solution has (reduced-cost fixing): 1 true, -1 false.
    std::vector<signed char> settled(static_cast<std::size_t>(n) + 1, 0);
    if (fixing_ != nullptr)
      for (const reduced_cost_fixing::fixing& f : fixing_->implied_by(best_sum - 1))
        if (f.lit.var() <= n) settled[static_cast<std::size_t>(f.lit.var())] = f.lit.negative() ? -1 : 1;
    auto value = [&](std::size_t v) { return settled[v] != 0 ? settled[v] > 0 : static_cast<bool>(incumbent[v]); };
    for (std::uint32_t k = 0; k < settings_.per_round && best_sum > 0 && !run_.stopped(); ++k) {
      choose(free, n, settled);
      free_terms.clear();
      std::int64_t fixed = 0;
      for (std::size_t i = 0; i < goal_.size(); ++i) {
        const literal l = goal_.literals[i];
        const auto v = static_cast<std::size_t>(l.var());
        if (l.var() <= n && free[v] == 0) {
          const bool truth = value(v);
          if (l.negative() ? !truth : truth) fixed += goal_.coefficients[i];
        } else {
          free_terms.push_back({goal_.coefficients[i], l});
        }
      }
      const std::int64_t limit = best_sum - 1 - fixed;
      if (limit < 0) continue;  // the fixed part alone is too dear
      const literal active = run_.pool().fresh();
      {
        guarded_sink<Solver> guarded(solver, ~active);
        const normalized_constraint c = normalize(free_terms, relation::le, limit);
        const method_id m = (c.is_constant() || c.kind == constraint_kind::clause)
                                ? method_id::pairwise
                                : select_method(run_.pool(), c, run_.options().bound.policy);
        encode_with(m, guarded, run_.pool(), c);
      }
      assumptions.clear();
      assumptions.push_back(active);
      for (std::int32_t v = 1; v <= n; ++v) {
        if (free[static_cast<std::size_t>(v)] != 0) continue;
        const literal x(v);
        assumptions.push_back(value(static_cast<std::size_t>(v)) ? x : ~x);
      }
      const solve_result answer = run_.solve(assumptions, settings_.conflicts);
      if (answer == solve_result::satisfiable) best_sum = offer_solution(run_, solver, goal_, best_sum);
      emit(solver, ~active);  // retires the neighbourhood's bound
      if (answer == solve_result::unsatisfiable) share_ = std::min(0.9, share_ * 1.15);
      if (answer == solve_result::unknown) share_ = std::max(0.01, share_ * 0.85);
    }
  }

 private:
  // Frees a neighbourhood; settled variables stay fixed.
  void choose(std::vector<char>& free, std::int32_t n, const std::vector<signed char>& settled) {
    std::fill(free.begin(), free.end(), 0);
    const auto want = std::max<std::int64_t>(2, static_cast<std::int64_t>(share_ * n));
    std::int64_t count = 0;
    if (!open_.empty() && (++chosen_ & 1U) != 0) {
      // The core problem: a random `want` of the 2 * want most open variables.
      std::vector<std::int32_t> candidates;
      for (const std::int32_t v : open_) {
        if (static_cast<std::int64_t>(candidates.size()) >= 2 * want) break;
        if (settled[static_cast<std::size_t>(v)] == 0) candidates.push_back(v);
      }
      std::shuffle(candidates.begin(), candidates.end(), random_);
      for (std::size_t j = 0; j < candidates.size() && static_cast<std::int64_t>(j) < want; ++j)
        free[static_cast<std::size_t>(candidates[j])] = 1;
      return;
    }
    if (!rows_.empty()) {
      std::uniform_int_distribution<std::size_t> pick(0, rows_.size() - 1);
      // A row longer than the neighbourhood contributes a random stretch.
      for (std::size_t tries = 0; count < want && tries < 4 * rows_.size() + 4; ++tries) {
        const std::vector<std::int32_t>& row = rows_[pick(random_)];
        const std::size_t first = std::uniform_int_distribution<std::size_t>(0, row.size() - 1)(random_);
        for (std::size_t j = 0; j < row.size() && count < want; ++j) {
          char& f = free[static_cast<std::size_t>(row[(first + j) % row.size()])];
          if (f == 0) {
            f = 1;
            ++count;
          }
        }
      }
      return;
    }
    std::uniform_int_distribution<std::int32_t> pick(1, n);
    for (std::int64_t tries = 0; count < want && tries < 4 * want; ++tries) {
      char& f = free[static_cast<std::size_t>(pick(random_))];
      if (f == 0) {
        f = 1;
        ++count;
      }
    }
  }

  search_run<Solver>& run_;
  const normalized_objective& goal_;
  neighbourhood_settings settings_;
  std::mt19937_64 random_;
  double share_;
  std::vector<std::vector<std::int32_t>> rows_;  // the recorded variables of each row
  const reduced_cost_fixing* fixing_ = nullptr;
  std::vector<std::int32_t> open_;  // recorded variables by |reduced cost|, smallest first
  std::uint64_t chosen_ = 0;        // neighbourhoods chosen
};

}  // namespace clausewright::detail
