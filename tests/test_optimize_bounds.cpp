// The optimiser's strategies against optima computed outside the project:
// dynamic programs (knapsack, two-dimensional knapsack), brute force over
// every assignment (small random models), the volume bound (bin packing
// built to meet it) and GLPK's MIP solver (assignment). An "optimal" claim
// must match the reference, and a lower bound must never pass it, under
// every strategy, with and without the relaxation, and when the search is
// cut short. Seeds are fixed and printed on failure.
#include <algorithm>
#include <atomic>
#include <chrono>
#include <cstdint>
#include <numeric>
#include <optional>
#include <random>
#include <span>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include <clausewright/cadical.hpp>
#include <clausewright/lp_bound.hpp>
#include <clausewright/optimize.hpp>

#include "../benchmarks/families.hpp"

namespace {

namespace cw = clausewright;
namespace oi = clausewright::bench::optimize;

constexpr std::uint64_t seed = 20261202;

cw::optimize_result solve(const oi::instance& m, cw::search_strategy s, bool relax, bool permanent = true,
                          std::optional<double> seconds = {}, std::optional<std::uint64_t> conflicts = {}) {
  cw::cadical_solver solver;
  cw::variable_pool pool(m.variables);
  oi::encode(m, solver, pool);
  cw::optimize_options o;
  o.search = s;
  o.permanent_bounds = permanent;
  o.rows = m.rows;
  if (relax) o.relax = cw::clp_relaxation;
  if (seconds) o.time_limit = std::chrono::duration<double>(*seconds);
  o.conflict_limit = conflicts;
  std::int64_t last_bound = INT64_MIN;
  o.on_bound = [&](const cw::bound_update& b) {
    EXPECT_GT(b.lower_bound, last_bound) << "the lower bound is reported as it rises";
    last_bound = b.lower_bound;
    if (m.optimum) {
      EXPECT_LE(b.lower_bound, *m.optimum) << "a lower bound (" << cw::to_string(b.source) << ") passes the optimum";
    }
  };
  const cw::objective goal(m.objective);
  cw::optimize_result r = cw::minimize(solver, pool, goal, o);
  if (r.objective) {
    EXPECT_TRUE(m.feasible(r.values)) << "the best solution satisfies every row";
    EXPECT_EQ(m.value(r.values), *r.objective) << "the reported value is the solution's";
  }
  return r;
}

// Checks a finished search against the reference optimum.
void expect_sound(const oi::instance& m, const cw::optimize_result& r) {
  ASSERT_TRUE(m.optimum.has_value());
  if (r.status == cw::optimize_status::optimal) {
    EXPECT_EQ(*r.objective, *m.optimum) << "an optimal claim matches the " << m.reference;
  }
  if (r.objective) {
    EXPECT_GE(*r.objective, *m.optimum);
  }
  EXPECT_LE(r.lower_bound, *m.optimum) << "the lower bound stays below the " << m.reference;
  EXPECT_NE(r.status, cw::optimize_status::unsatisfiable);
}

TEST(OptimizeBounds, KnapsackAgainstTheDynamicProgram) {
  for (int round = 0; round < 6; ++round) {
    const oi::instance m = oi::knapsack(10 + 2 * round, seed + static_cast<std::uint64_t>(round));
    for (const cw::search_strategy s : cw::all_search_strategies)
      for (const bool relax : {false, true}) {
        SCOPED_TRACE("seed " + std::to_string(seed + static_cast<std::uint64_t>(round)) + " " + m.name + " search " +
                     std::string(cw::to_string(s)) + (relax ? " with relaxation" : ""));
        const cw::optimize_result r = solve(m, s, relax);
        ASSERT_EQ(r.status, cw::optimize_status::optimal);
        expect_sound(m, r);  // the reference: knapsack DP
      }
  }
}

TEST(OptimizeBounds, TwoDimensionalKnapsackAgainstTheDynamicProgram) {
  for (int round = 0; round < 4; ++round) {
    const oi::instance m = oi::multi_knapsack(10 + round, seed + 100 + static_cast<std::uint64_t>(round));
    for (const cw::search_strategy s : cw::all_search_strategies) {
      SCOPED_TRACE("seed " + std::to_string(seed + 100 + static_cast<std::uint64_t>(round)) + " search " +
                   std::string(cw::to_string(s)));
      const cw::optimize_result r = solve(m, s, round % 2 == 0, round < 2);
      ASSERT_EQ(r.status, cw::optimize_status::optimal);
      expect_sound(m, r);  // the reference: two-dimensional knapsack DP
    }
  }
}

TEST(OptimizeBounds, BinPackingMeetsTheVolumeBound) {
  for (int round = 0; round < 2; ++round) {
    const oi::instance m = oi::bin_packing(3, 3, seed + 200 + static_cast<std::uint64_t>(round));
    for (const cw::search_strategy s : cw::all_search_strategies) {
      SCOPED_TRACE("seed " + std::to_string(seed + 200 + static_cast<std::uint64_t>(round)) + " search " +
                   std::string(cw::to_string(s)));
      const cw::optimize_result r = solve(m, s, true);
      ASSERT_EQ(r.status, cw::optimize_status::optimal);
      expect_sound(m, r);  // the reference: the volume bound, met by construction
    }
  }
}

TEST(OptimizeBounds, AssignmentAgainstGlpk) {
  for (int round = 0; round < 3; ++round) {
    const oi::instance m = oi::assignment(8, 3, seed + 300 + static_cast<std::uint64_t>(round));
    ASSERT_TRUE(m.optimum.has_value()) << "GLPK proves the optimum";
    for (const cw::search_strategy s : cw::all_search_strategies)
      for (const bool relax : {false, true}) {
        SCOPED_TRACE("seed " + std::to_string(seed + 300 + static_cast<std::uint64_t>(round)) + " search " +
                     std::string(cw::to_string(s)) + (relax ? " with relaxation" : ""));
        const cw::optimize_result r = solve(m, s, relax);
        ASSERT_EQ(r.status, cw::optimize_status::optimal);
        expect_sound(m, r);  // the reference: GLPK's MIP optimum
      }
  }
}

// Random small models (8 variables, a few rows with mixed signs and
// relations) against brute force over all 256 assignments, unsatisfiable
// ones included.
TEST(OptimizeBounds, RandomModelsAgainstBruteForce) {
  std::mt19937_64 rng(seed + 400);
  int unsatisfiable = 0;
  for (int round = 0; round < 40; ++round) {
    oi::instance m;
    m.variables = 8;
    std::uniform_int_distribution<std::int64_t> coef(-6, 9);
    std::uniform_int_distribution<int> pick(0, 7);
    std::uniform_int_distribution<int> rel(0, 2);
    const int rows = 2 + round % 3;
    for (int k = 0; k < rows; ++k) {
      cw::linear_row r;
      std::int64_t positive = 0;
      for (int j = 0; j < 4; ++j) {
        const std::int64_t a = coef(rng);
        const cw::literal l = oi::var(pick(rng) + 1);
        r.terms.push_back({a, pick(rng) % 3 == 0 ? ~l : l});
        positive += a > 0 ? a : 0;
      }
      r.rel = rel(rng) == 0 ? cw::relation::ge : rel(rng) == 1 ? cw::relation::eq : cw::relation::le;
      r.bound = std::uniform_int_distribution<std::int64_t>(-3, positive)(rng);
      m.rows.push_back(r);
    }
    for (int v = 1; v <= 8; ++v) m.objective.push_back({coef(rng), pick(rng) % 2 == 0 ? oi::var(v) : ~oi::var(v)});
    // Brute force.
    std::optional<std::int64_t> best;
    for (unsigned a = 0; a < 256; ++a) {
      std::vector<bool> x(9, false);
      for (int v = 1; v <= 8; ++v) x[static_cast<std::size_t>(v)] = ((a >> (v - 1)) & 1U) != 0;
      if (m.feasible(x) && (!best || m.value(x) < *best)) best = m.value(x);
    }
    m.optimum = best;
    m.reference = "brute force";
    if (!best) ++unsatisfiable;
    for (const cw::search_strategy s : cw::all_search_strategies)
      for (const bool relax : {false, true}) {
        SCOPED_TRACE("seed " + std::to_string(seed + 400) + " round " + std::to_string(round) + " search " +
                     std::string(cw::to_string(s)) + (relax ? " with relaxation" : ""));
        const cw::optimize_result r = solve(m, s, relax, round % 2 == 0);
        if (!best) {
          EXPECT_EQ(r.status, cw::optimize_status::unsatisfiable);
          continue;
        }
        ASSERT_EQ(r.status, cw::optimize_status::optimal);
        expect_sound(m, r);  // the reference: brute force
      }
  }
  EXPECT_GT(unsatisfiable, 0) << "the rounds include unsatisfiable models";
}

// Cut short by a conflict limit or the stop flag: never a wrong optimal
// claim, a lower bound below the optimum, the best solution kept.
TEST(OptimizeBounds, CutShortSearchesStaySound) {
  const oi::instance m = oi::knapsack(24, seed + 500);
  for (const cw::search_strategy s : cw::all_search_strategies)
    for (const std::uint64_t conflicts : {100U, 2000U}) {
      SCOPED_TRACE("seed " + std::to_string(seed + 500) + " search " + std::string(cw::to_string(s)) + " conflicts " +
                   std::to_string(conflicts));
      const cw::optimize_result r = solve(m, s, true, true, std::nullopt, conflicts);
      EXPECT_NE(r.status, cw::optimize_status::unsatisfiable);
      if (r.status != cw::optimize_status::unknown) expect_sound(m, r);  // the reference: knapsack DP
    }
  // The stop flag, set before the search: nothing found, "unknown".
  std::atomic<bool> stop{true};
  cw::cadical_solver solver;
  cw::variable_pool pool(m.variables);
  oi::encode(m, solver, pool);
  cw::optimize_options o;
  o.stop = &stop;
  const cw::optimize_result r = cw::minimize(solver, pool, cw::objective(m.objective), o);
  EXPECT_EQ(r.status, cw::optimize_status::unknown);
  EXPECT_FALSE(r.objective.has_value());
}

}  // namespace

namespace {

// Reduced-cost fixing against brute force: every fixing the relaxation's
// reduced costs give for a threshold holds in every feasible assignment of
// scaled value at most that threshold (small knapsacks and two-row
// knapsacks, all 2^12 assignments).
TEST(OptimizeBounds, ReducedCostFixingsHoldInEveryBetterSolution) {
  int checked = 0;
  for (int round = 0; round < 8; ++round) {
    const std::uint64_t s = seed + 600 + static_cast<std::uint64_t>(round);
    const oi::instance m = round % 2 == 0 ? oi::knapsack(12, s) : oi::multi_knapsack(12, s);
    const cw::normalized_objective goal = cw::normalize_objective(cw::objective(m.objective));
    const cw::relaxation_problem problem{m.rows, goal.literals, goal.coefficients, m.variables};
    const std::optional<cw::relaxation_answer> answer = cw::clp_relaxation(problem);
    ASSERT_TRUE(answer.has_value());
    const cw::detail::reduced_cost_fixing fixing(*answer);
    std::vector<std::int64_t> sums;
    std::vector<std::vector<bool>> feasible;
    for (unsigned a = 0; a < (1U << 12U); ++a) {
      std::vector<bool> x(13, false);
      for (int v = 1; v <= 12; ++v) x[static_cast<std::size_t>(v)] = ((a >> (v - 1)) & 1U) != 0;
      if (!m.feasible(x)) continue;
      sums.push_back((m.value(x) - goal.offset) / goal.scale);
      feasible.push_back(std::move(x));
    }
    const std::int64_t best = *std::min_element(sums.begin(), sums.end());
    for (std::int64_t t = best; t <= best + 400; t += 20)
      for (const auto& f : fixing.implied_by(t))
        for (std::size_t k = 0; k < feasible.size(); ++k) {
          if (sums[k] > t) continue;
          const bool truth = feasible[k][static_cast<std::size_t>(f.lit.var())];
          ++checked;
          EXPECT_TRUE(f.lit.negative() ? !truth : truth)
              << "seed " << s << ": a solution of scaled sum " << sums[k] << " <= " << t << " breaks the fixing of x"
              << f.lit.var() << " (reach " << f.reach << ")";
        }
  }
  EXPECT_GT(checked, 0) << "some fixings were checked";
}

// The fixings under every strategy and both kinds of bound, on knapsacks
// large enough for the relaxation to fix variables: the optimum is the DP's.
TEST(OptimizeBounds, FixingKeepsOptimalClaimsRight) {
  for (int round = 0; round < 3; ++round) {
    const std::uint64_t s = seed + 700 + static_cast<std::uint64_t>(round);
    const oi::instance m = oi::knapsack(14 + 2 * round, s);
    for (const cw::search_strategy strategy : cw::all_search_strategies)
      for (const bool permanent : {false, true}) {
        SCOPED_TRACE("seed " + std::to_string(s) + " search " + std::string(cw::to_string(strategy)) +
                     (permanent ? " permanent bounds" : " assumed bounds"));
        const cw::optimize_result r = solve(m, strategy, true, permanent);
        ASSERT_EQ(r.status, cw::optimize_status::optimal);
        expect_sound(m, r);  // the reference: knapsack DP
      }
  }
}

// A solver that sets the stop flag once `after` clauses have arrived since
// it was armed: a stop in the middle of building the objective's bound.
class tripwire_solver : public cw::cadical_solver {
 public:
  void add_clause(std::span<const cw::literal> clause) {
    if (armed && ++seen == after) stop.store(true);
    cw::cadical_solver::add_clause(clause);
  }
  std::atomic<bool> stop{false};
  bool armed = false;
  std::uint64_t seen = 0;
  std::uint64_t after = 5000;
};

TEST(OptimizeBounds, StopWhileTheBoundIsBuiltEndsWithTheBestSolution) {
  // 150 items, values 1..1000: the BDD of "left behind <= v" grows with
  // every better v (measured on this seed with linear search: 151 clauses
  // for the first bound, 18 574 more for the second, 825 628 after 3 s), so
  // the stop after 5000 clauses falls inside a bound's construction.
  const oi::instance m = oi::knapsack(150, seed + 800);
  for (const cw::search_strategy strategy : {cw::search_strategy::linear, cw::search_strategy::binary}) {
    SCOPED_TRACE("seed " + std::to_string(seed + 800) + " search " + std::string(cw::to_string(strategy)));
    tripwire_solver solver;
    cw::variable_pool pool(m.variables);
    oi::encode(m, solver, pool);
    cw::optimize_options o;
    o.search = strategy;
    o.stop = &solver.stop;
    std::optional<std::int64_t> last;
    o.on_solution = [&](const cw::improving_solution& found) {
      last = found.objective;
      solver.armed = true;
    };
    const cw::optimize_result r = cw::minimize(solver, pool, cw::objective(m.objective), o);
    ASSERT_TRUE(last.has_value());
    EXPECT_TRUE(solver.stop.load()) << "the stop came while the bound was built";
    EXPECT_EQ(r.status, cw::optimize_status::satisfiable);
    ASSERT_TRUE(r.objective.has_value());
    EXPECT_EQ(*r.objective, *last) << "the best solution is kept";
    EXPECT_TRUE(m.feasible(r.values));
    EXPECT_EQ(m.value(r.values), *r.objective);
    // The check runs every 1024 clauses of the bound: it stopped soon after
    // the flag, far short of the full diagram.
    EXPECT_LT(solver.seen, solver.after + 1100) << "clauses added after the stop: " << solver.seen - solver.after;
    EXPECT_LE(r.lower_bound, *m.optimum);  // the reference: knapsack DP
  }
}

}  // namespace

namespace {

// The constructed start is kept: on a 200-item knapsack whose capacity row
// is an adder network (not arc-consistent, one-sided: the solver must find
// its auxiliary values itself), the best solution is never worse than the
// greedy by ratio (Dantzig's order, computed here from the rows), even
// when the search is cut short.
TEST(OptimizeBounds, TheGreedyStartIsKept) {
  for (int round = 0; round < 2; ++round) {
    const std::uint64_t s = seed + 900 + static_cast<std::uint64_t>(round);
    const oi::instance m = oi::knapsack(200, s);
    SCOPED_TRACE("seed " + std::to_string(s));
    // Dantzig's greedy: items by value / weight, taken while they fit.
    const cw::linear_row& row = m.rows.front();
    std::vector<std::size_t> order(row.terms.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
      return m.objective[a].coefficient * row.terms[b].coefficient >
             m.objective[b].coefficient * row.terms[a].coefficient;
    });
    std::vector<bool> greedy(static_cast<std::size_t>(m.variables) + 1, false);
    std::int64_t left = row.bound;
    for (const std::size_t i : order)
      if (row.terms[i].coefficient <= left) {
        left -= row.terms[i].coefficient;
        greedy[static_cast<std::size_t>(row.terms[i].lit.var())] = true;
      }
    ASSERT_TRUE(m.feasible(greedy));
    cw::cadical_solver solver;
    cw::variable_pool pool(m.variables);
    cw::encoder enc(solver, pool);
    const cw::encoded_constraint e = enc.linear(row.terms, row.rel, row.bound, cw::method_id::adder);
    ASSERT_EQ(e.method, cw::method_id::adder);
    cw::optimize_options o;
    o.rows = m.rows;
    o.relax = cw::clp_relaxation;
    o.conflict_limit = 3000;
    const cw::optimize_result r = cw::minimize(solver, pool, cw::objective(m.objective), o);
    ASSERT_TRUE(r.objective.has_value());
    EXPECT_LE(*r.objective, m.value(greedy)) << "the greedy start (" << m.value(greedy) << ") is kept";
    EXPECT_TRUE(m.feasible(r.values));
    expect_sound(m, r);  // the reference: knapsack DP
  }
}

}  // namespace
