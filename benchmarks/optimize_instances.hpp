// Optimisation instances of our own (generated with fixed seeds) and their
// reference optima computed independently of the optimiser: dynamic
// programs for the knapsacks, the volume bound for bin packing built to meet
// it, GLPK's MIP solver for assignment and rota models. Shared by
// benchmarks/bench_optimize.cpp and tests/test_optimize_bounds.cpp.
#pragma once

#include <glpk.h>

#include <algorithm>
#include <cstdint>
#include <numeric>
#include <optional>
#include <random>
#include <string>
#include <vector>

#include <clausewright/optimize.hpp>

namespace optimize_instances {

namespace cw = clausewright;

struct instance {
  std::string name;
  std::int32_t variables = 0;
  std::vector<cw::linear_row> rows;  // every constraint of the model
  std::vector<cw::term> objective;   // minimised
  std::optional<std::int64_t> optimum;
  std::string reference;  // where the optimum comes from
  // The value as the scenario states it: packed value for the knapsacks
  // (sign -1: the optimiser minimises the value left behind), else the same.
  std::int64_t natural_offset = 0;
  std::int64_t natural_sign = 1;
  [[nodiscard]] std::int64_t natural(std::int64_t minimised) const { return natural_offset + natural_sign * minimised; }

  // Whether an assignment (index 0 unused) satisfies every row, and its value.
  [[nodiscard]] bool feasible(const std::vector<bool>& x) const {
    return std::all_of(rows.begin(), rows.end(), [&](const cw::linear_row& r) {
      const std::int64_t s = sum(r.terms, x);
      return r.rel == cw::relation::le ? s <= r.bound : r.rel == cw::relation::ge ? s >= r.bound : s == r.bound;
    });
  }
  [[nodiscard]] std::int64_t value(const std::vector<bool>& x) const { return sum(objective, x); }
  static std::int64_t sum(const std::vector<cw::term>& terms, const std::vector<bool>& x) {
    std::int64_t s = 0;
    for (const cw::term& t : terms) {
      const bool v = static_cast<std::size_t>(t.lit.var()) < x.size() && x[static_cast<std::size_t>(t.lit.var())];
      if (t.lit.negative() ? !v : v) s += t.coefficient;
    }
    return s;
  }
};

inline cw::literal var(std::int32_t v) { return cw::literal(v); }

// --- references -------------------------------------------------------------

// The 0-1 knapsack's best packed value by dynamic programming over capacity
// (textbook DP, O(n C)).
inline std::int64_t knapsack_dp(const std::vector<std::int64_t>& weight, const std::vector<std::int64_t>& value,
                                std::int64_t capacity) {
  std::vector<std::int64_t> best(static_cast<std::size_t>(capacity) + 1, 0);
  for (std::size_t i = 0; i < weight.size(); ++i)
    for (std::int64_t c = capacity; c >= weight[i]; --c)
      best[static_cast<std::size_t>(c)] =
          std::max(best[static_cast<std::size_t>(c)], best[static_cast<std::size_t>(c - weight[i])] + value[i]);
  return best[static_cast<std::size_t>(capacity)];
}

// Two-dimensional knapsack by DP over both capacities (small capacities).
inline std::int64_t knapsack2_dp(const std::vector<std::int64_t>& w1, const std::vector<std::int64_t>& w2,
                                 const std::vector<std::int64_t>& value, std::int64_t c1, std::int64_t c2) {
  const auto width = static_cast<std::size_t>(c2) + 1;
  std::vector<std::int64_t> best((static_cast<std::size_t>(c1) + 1) * width, 0);
  for (std::size_t i = 0; i < value.size(); ++i)
    for (std::int64_t a = c1; a >= w1[i]; --a)
      for (std::int64_t b = c2; b >= w2[i]; --b) {
        auto& here = best[static_cast<std::size_t>(a) * width + static_cast<std::size_t>(b)];
        here = std::max(here, best[static_cast<std::size_t>(a - w1[i]) * width + static_cast<std::size_t>(b - w2[i])] +
                                  value[i]);
      }
  return best.back();
}

// The optimum of the model as a 0-1 integer programme, by GLPK's branch and
// cut; nothing when GLPK does not prove it within the time limit.
inline std::optional<std::int64_t> glpk_optimum(const instance& m, int seconds = 60) {
  glp_prob* lp = glp_create_prob();
  glp_set_obj_dir(lp, GLP_MIN);
  glp_add_cols(lp, m.variables);
  double constant = 0;
  std::vector<double> cost(static_cast<std::size_t>(m.variables) + 1, 0.0);
  for (const cw::term& t : m.objective) {
    const auto c = static_cast<double>(t.coefficient);
    if (t.lit.negative()) {
      constant += c;
      cost[static_cast<std::size_t>(t.lit.var())] -= c;
    } else {
      cost[static_cast<std::size_t>(t.lit.var())] += c;
    }
  }
  for (int j = 1; j <= m.variables; ++j) {
    glp_set_col_kind(lp, j, GLP_BV);
    glp_set_obj_coef(lp, j, cost[static_cast<std::size_t>(j)]);
  }
  glp_set_obj_coef(lp, 0, constant);
  glp_add_rows(lp, static_cast<int>(m.rows.size()));
  std::vector<int> ia{0};
  std::vector<int> ja{0};
  std::vector<double> ar{0.0};
  int row = 0;
  for (const cw::linear_row& r : m.rows) {
    ++row;
    double shift = 0;
    for (const cw::term& t : r.terms) {
      ia.push_back(row);
      ja.push_back(t.lit.var());
      ar.push_back(t.lit.negative() ? -static_cast<double>(t.coefficient) : static_cast<double>(t.coefficient));
      if (t.lit.negative()) shift += static_cast<double>(t.coefficient);
    }
    const double rhs = static_cast<double>(r.bound) - shift;
    glp_set_row_bnds(lp, row, r.rel == cw::relation::le ? GLP_UP : r.rel == cw::relation::ge ? GLP_LO : GLP_FX, rhs,
                     rhs);
  }
  glp_load_matrix(lp, static_cast<int>(ia.size()) - 1, ia.data(), ja.data(), ar.data());
  glp_iocp parameters;
  glp_init_iocp(&parameters);
  parameters.presolve = GLP_ON;
  parameters.msg_lev = GLP_MSG_OFF;
  parameters.tm_lim = seconds * 1000;
  const int code = glp_intopt(lp, &parameters);
  std::optional<std::int64_t> out;
  if (code == 0 && glp_mip_status(lp) == GLP_OPT) out = std::llround(glp_mip_obj_val(lp));
  glp_delete_prob(lp);
  return out;
}

// --- generators ------------------------------------------------------------

// Weights and values 1..1000, capacity half the weight sum; minimise the
// value left behind. Reference: the DP.
inline instance knapsack(int n, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> d(1, 1000);
  std::vector<std::int64_t> w(static_cast<std::size_t>(n));
  std::vector<std::int64_t> v(static_cast<std::size_t>(n));
  instance m;
  m.name = "knapsack n=" + std::to_string(n);
  m.variables = n;
  cw::linear_row cap;
  std::int64_t total_value = 0;
  for (int i = 0; i < n; ++i) {
    w[static_cast<std::size_t>(i)] = d(rng);
    v[static_cast<std::size_t>(i)] = d(rng);
    cap.terms.push_back({w[static_cast<std::size_t>(i)], var(i + 1)});
    m.objective.push_back({v[static_cast<std::size_t>(i)], ~var(i + 1)});
    total_value += v[static_cast<std::size_t>(i)];
  }
  cap.bound = std::accumulate(w.begin(), w.end(), std::int64_t{0}) / 2;
  m.rows.push_back(cap);
  m.optimum = total_value - knapsack_dp(w, v, cap.bound);
  m.reference = "DP";
  m.natural_offset = total_value;
  m.natural_sign = -1;
  return m;
}

// Two capacity rows, weights 1..60 and values 1..1000. Reference: the DP.
inline instance multi_knapsack(int n, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> dw(1, 60);
  std::uniform_int_distribution<std::int64_t> dv(1, 1000);
  std::vector<std::int64_t> w1;
  std::vector<std::int64_t> w2;
  std::vector<std::int64_t> v;
  instance m;
  m.name = "multi-knapsack n=" + std::to_string(n);
  m.variables = n;
  cw::linear_row r1;
  cw::linear_row r2;
  for (int i = 0; i < n; ++i) {
    w1.push_back(dw(rng));
    w2.push_back(dw(rng));
    v.push_back(dv(rng));
    r1.terms.push_back({w1.back(), var(i + 1)});
    r2.terms.push_back({w2.back(), var(i + 1)});
    m.objective.push_back({v.back(), ~var(i + 1)});
  }
  r1.bound = std::accumulate(w1.begin(), w1.end(), std::int64_t{0}) / 2;
  r2.bound = std::accumulate(w2.begin(), w2.end(), std::int64_t{0}) / 2;
  m.rows = {r1, r2};
  const std::int64_t total = std::accumulate(v.begin(), v.end(), std::int64_t{0});
  m.optimum = total - knapsack2_dp(w1, w2, v, r1.bound, r2.bound);
  m.reference = "DP";
  m.natural_offset = total;
  m.natural_sign = -1;
  return m;
}

// `bins` bins of capacity 100, each cut into `per_bin` items: the items fill
// exactly `bins` bins, so the optimum is the volume bound. The model offers
// a few bins more. x(i,j) item i in bin j, y(j) bin j used; bins in order.
inline instance bin_packing(int bins, int per_bin, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  constexpr std::int64_t capacity = 100;
  std::vector<std::int64_t> size;
  for (int b = 0; b < bins; ++b) {
    std::vector<std::int64_t> cuts{0, capacity};
    std::uniform_int_distribution<std::int64_t> d(1, capacity - 1);
    while (static_cast<int>(cuts.size()) < per_bin + 1) {
      const std::int64_t c = d(rng);
      if (std::find(cuts.begin(), cuts.end(), c) == cuts.end()) cuts.push_back(c);
    }
    std::sort(cuts.begin(), cuts.end());
    for (std::size_t k = 1; k < cuts.size(); ++k) size.push_back(cuts[k] - cuts[k - 1]);
  }
  std::shuffle(size.begin(), size.end(), rng);
  const int items = static_cast<int>(size.size());
  const int offered = bins + std::max(2, bins / 10);
  instance m;
  m.name = "bin packing " + std::to_string(items) + " items";
  auto x = [&](int i, int j) { return var(i * offered + j + 1); };
  auto y = [&](int j) { return var(items * offered + j + 1); };
  m.variables = items * offered + offered;
  for (int i = 0; i < items; ++i) {
    cw::linear_row one{{}, cw::relation::eq, 1};
    for (int j = 0; j < offered; ++j) one.terms.push_back({1, x(i, j)});
    m.rows.push_back(one);
  }
  for (int j = 0; j < offered; ++j) {
    cw::linear_row load{{}, cw::relation::le, 0};
    for (int i = 0; i < items; ++i) load.terms.push_back({size[static_cast<std::size_t>(i)], x(i, j)});
    load.terms.push_back({-capacity, y(j)});
    m.rows.push_back(load);
    if (j + 1 < offered) m.rows.push_back({{{1, y(j)}, {-1, y(j + 1)}}, cw::relation::ge, 0});
    m.objective.push_back({1, y(j)});
  }
  m.optimum = bins;
  m.reference = "volume bound";
  return m;
}

// Tasks to machines: each task on one machine, machine capacities, costs
// 10..50 and resources 5..25 per pair. Reference: GLPK.
inline instance assignment(int tasks, int machines, std::uint64_t seed, bool with_reference = true) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> dc(10, 50);
  std::uniform_int_distribution<std::int64_t> dr(5, 25);
  instance m;
  m.name = "assignment " + std::to_string(tasks) + "x" + std::to_string(machines);
  m.variables = tasks * machines;
  auto x = [&](int t, int k) { return var(t * machines + k + 1); };
  std::vector<std::vector<std::int64_t>> r(static_cast<std::size_t>(tasks));
  for (int t = 0; t < tasks; ++t) {
    cw::linear_row one{{}, cw::relation::eq, 1};
    for (int k = 0; k < machines; ++k) {
      one.terms.push_back({1, x(t, k)});
      m.objective.push_back({dc(rng), x(t, k)});
      r[static_cast<std::size_t>(t)].push_back(dr(rng));
    }
    m.rows.push_back(one);
  }
  for (int k = 0; k < machines; ++k) {
    cw::linear_row load{{}, cw::relation::le, 0};
    std::int64_t sum = 0;
    for (int t = 0; t < tasks; ++t) {
      load.terms.push_back({r[static_cast<std::size_t>(t)][static_cast<std::size_t>(k)], x(t, k)});
      sum += r[static_cast<std::size_t>(t)][static_cast<std::size_t>(k)];
    }
    load.bound = sum * 3 / (2 * machines);  // half again the fair share: tight, not too tight
    m.rows.push_back(load);
  }
  if (with_reference) {
    m.optimum = glpk_optimum(m);
    m.reference = "GLPK MIP";
  }
  return m;
}

// A rota: `staff` people, 7 days, 2 shifts a day each needing `need`
// people, at most one shift a day and `most` a week per person, a dislike
// 0..5 per person and shift. Reference: GLPK.
inline instance rota(int staff, int need, int most, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> dislike(0, 5);
  constexpr int days = 7;
  constexpr int shifts = 2;
  instance m;
  m.name = "rota " + std::to_string(staff) + " staff";
  m.variables = staff * days * shifts;
  auto x = [&](int p, int d, int s) { return var((p * days + d) * shifts + s + 1); };
  for (int d = 0; d < days; ++d)
    for (int s = 0; s < shifts; ++s) {
      cw::linear_row cover{{}, cw::relation::eq, need};
      for (int p = 0; p < staff; ++p) cover.terms.push_back({1, x(p, d, s)});
      m.rows.push_back(cover);
    }
  for (int p = 0; p < staff; ++p) {
    cw::linear_row week{{}, cw::relation::le, most};
    for (int d = 0; d < days; ++d) {
      m.rows.push_back({{{1, x(p, d, 0)}, {1, x(p, d, 1)}}, cw::relation::le, 1});
      if (d + 1 < days) m.rows.push_back({{{1, x(p, d, 1)}, {1, x(p, d + 1, 0)}}, cw::relation::le, 1});
      for (int s = 0; s < shifts; ++s) {
        week.terms.push_back({1, x(p, d, s)});
        const std::int64_t w = dislike(rng);
        if (w != 0) m.objective.push_back({w, x(p, d, s)});
      }
    }
    m.rows.push_back(week);
  }
  m.optimum = glpk_optimum(m);
  m.reference = "GLPK MIP";
  return m;
}

// Encodes the instance into the solver (every row through the encoder;
// rows with weights other than 1 by `weighted` when given and small enough).
template <class Solver>
void encode(const instance& m, Solver& solver, cw::variable_pool& pool, std::optional<cw::method_id> weighted = {}) {
  cw::encoder enc(solver, pool);
  for (const cw::linear_row& r : m.rows) {
    const bool unit = std::all_of(r.terms.begin(), r.terms.end(), [](const cw::term& t) { return t.coefficient == 1; });
    // A diagram has at most terms x (bound + 1) nodes: beyond a million the
    // encoder's pick is taken instead.
    std::int64_t reach = r.bound + 1;
    for (const cw::term& t : r.terms) reach += t.coefficient < 0 ? -t.coefficient : 0;
    const bool small = static_cast<double>(r.terms.size()) * static_cast<double>(reach) <= 1e6;
    if (!unit && weighted && small) {
      // A diagram over its node budget leaves only its own node literals
      // constrained: the encoder's pick takes over.
      try {
        enc.linear(r.terms, r.rel, r.bound, weighted);
        continue;
      } catch (const cw::error& e) {
        if (e.id() != cw::error_id::over_budget) throw;
      }
    }
    enc.linear(r.terms, r.rel, r.bound);
  }
}

}  // namespace optimize_instances
