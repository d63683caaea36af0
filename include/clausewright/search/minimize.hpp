// clausewright: satisfy() and minimize() — the strategies of the optimiser.
//
// linear: solution-improving search (Martins, Joshi, Manquinho, Lynce 2014):
// every solution of value v is followed by the bound v-1 until the solver
// proves there is none. binary: halves the interval between the proved lower
// bound and the best solution. core_guided: OLL (search/core_guided.hpp).
// core_boosted, the default (Berg, Demirović, Stuckey 2019, CPAIOR): the
// linear relaxation's bound (when rows and an LP engine are given), a
// constructive start, a core-guided phase for the lower bound, then rounds of
// large-neighbourhood improvement (search/neighbourhood.hpp), a
// solution-improving proof attempt under a growing conflict limit, and a
// probe at the lower bound that either meets it or raises it by one step.
// The best solution's values are the solver's phases throughout (Demirović,
// Chu, Stuckey 2018). The search stops as soon as the lower bound meets the
// best solution; a time limit, a conflict limit or the stop flag ends it with
// the best solution ("satisfiable") and the proved lower bound.
//
// With the relaxation's reduced costs, every bound "objective <= t" asked
// by the linear and the core-boosted search comes with the variables that
// reduced-cost fixing settles below t + 1 (search/reduced_costs.hpp), and
// the neighbourhoods fix them too.
//
// "optimal" is only claimed on a proof: an unsatisfiable answer for a bound
// below the best solution that no other assumption took part in, or a lower
// bound (from cores, the relaxation or such answers) equal to the best value.
// The fixings are implied by the bound they come with, so they leave such an
// answer a proof.
//
// The time limit and the stop flag are also checked while the objective's
// bound is built (objective_bound::set_interrupt): a large bound ends the
// search with the best solution as promptly as a solver call does.
//
// Part of optimize.hpp: include optimize.hpp, not this.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <optional>
#include <vector>

#include "../error.hpp"
#include "../solver.hpp"
#include "core_guided.hpp"
#include "neighbourhood.hpp"
#include "options.hpp"
#include "reduced_costs.hpp"
#include "run.hpp"

namespace clausewright {

namespace detail {

// The relaxation's bound as a scaled sum (raising lower_sum), and its answer.
template <class Solver>
std::optional<relaxation_answer> relaxation_bound(search_run<Solver>& run, const normalized_objective& goal,
                                                  std::int64_t& lower_sum) {
  const optimize_options& o = run.options();
  if (!o.relax || o.rows.empty() || goal.size() == 0) return std::nullopt;
  std::int32_t top = 0;
  for (const linear_row& r : o.rows)
    for (const term& t : r.terms) top = std::max(top, t.lit.var());
  for (const literal l : goal.literals) top = std::max(top, l.var());
  const relaxation_problem problem{o.rows, goal.literals, goal.coefficients, top};
  std::optional<relaxation_answer> answer = o.relax(problem);
  if (!answer || !std::isfinite(answer->value)) return std::nullopt;
  // The scaled objective has integral coefficients: its minimum over integral
  // points is at least the relaxation's rounded up. The margin keeps the
  // engine's tolerances from rounding a value just below an integer up.
  const double margin = 1e-6 * std::max(1.0, std::fabs(answer->value));
  const double rounded = std::ceil(answer->value - margin);
  if (rounded > 0) {
    const auto k = static_cast<std::int64_t>(std::min(rounded, static_cast<double>(goal.total)));
    if (k > lower_sum) {
      lower_sum = k;
      run.raise_lower_bound(goal.value_of_sum(k), bound_source::relaxation);
    }
  }
  return answer;
}

// The first solution's start: the greedy over packing rows, tried as
// assumptions (a few conflicts: other constraints may reject it; true when
// the solver has a model of it), else the relaxation's solution rounded as
// phases.
template <class Solver>
bool suggest_start(search_run<Solver>& run, const normalized_objective& goal,
                   const std::optional<relaxation_answer>& relaxed) {
  const optimize_options& o = run.options();
  if (std::optional<std::vector<bool>> greedy = greedy_packing(o.rows, goal, run.recorded())) {
    run.suggest(*greedy);
    std::vector<literal> assumptions;
    for (std::size_t v = 1; v < greedy->size(); ++v) {
      const literal x(static_cast<std::int32_t>(v));
      assumptions.push_back((*greedy)[v] ? x : ~x);
    }
    // Checking a full assignment can take search when the rows' encodings
    // propagate weakly: twice a fortieth of the time limit and a number of
    // conflicts; then the greedy values are the phases of the next call.
    // One-sided encodings leave their auxiliary variables free where the
    // inputs do not force them: an upper side (for <=) is satisfied with
    // them false, a lower side (a ">=" row over negated inputs) with them
    // true. Which side the rows took follows from their normal form (a
    // try with the wrong phases also moves the solver's decision order, so
    // the likelier side goes first).
    std::size_t lower_sides = 0;
    for (const linear_row& r : o.rows)
      if (normalize(r.terms, r.rel, r.bound).rel == relation::ge) ++lower_sides;
    const bool first = 2 * lower_sides > o.rows.size();
    for (const bool auxiliary : {first, !first}) {
      run.suggest(*greedy, auxiliary);
      if (o.time_limit && run.deadline())
        run.limit_phase(solver_clock::now() + std::chrono::duration_cast<solver_clock::duration>(*o.time_limit * 0.025),
                        std::int64_t{10000});
      else
        run.limit_phase(std::nullopt, std::int64_t{10000});
      const solve_result answer = run.solve(assumptions);
      run.limit_phase(std::nullopt);
      if (answer == solve_result::satisfiable) return true;
      if (answer == solve_result::unsatisfiable || run.over()) break;  // other constraints reject it
    }
    run.suggest(*greedy);
    return false;
  }
  if (!o.solution_phases) return false;
  if (relaxed && !relaxed->values.empty()) {
    std::vector<bool> rounded(relaxed->values.size(), false);
    for (std::size_t v = 1; v < rounded.size(); ++v) rounded[v] = relaxed->values[v] >= 0.5;
    run.suggest(rounded);
  }
  return false;
}

}  // namespace detail

// Decides satisfiability (no objective): a solution is "satisfiable", none
// "unsatisfiable", a stop at the time limit before an answer "unknown".
template <class Solver>
optimize_result satisfy(Solver& solver, variable_pool& pool, const optimize_options& options = {}) {
  static_assert(incremental_solver<Solver>, "clausewright: satisfy needs a solver sink (solver_sink, cadical_solver)");
  detail::search_run<Solver> run(solver, pool, options);
  switch (run.solve()) {
    case solve_result::satisfiable: {
      run.result().values = run.record();
      run.result().solutions = 1;
      return run.finish(optimize_status::satisfiable);
    }
    case solve_result::unsatisfiable:
      return run.finish(optimize_status::unsatisfiable);
    case solve_result::unknown:
      break;
  }
  return run.finish(optimize_status::unknown);
}

namespace detail {

// The variables reduced-cost fixing settles for every solution of scaled sum
// at most t, as clauses guarded by `bound_literal` (that bound's literal), or
// as unit clauses when the bound is asserted (no literal); each fixing once
// per literal, units once.
template <class Solver>
class fixings_in_solver {
 public:
  fixings_in_solver(Solver& solver, const std::optional<relaxation_answer>& relaxed) : solver_(solver) {
    if (relaxed) fixing_ = reduced_cost_fixing(*relaxed);
  }
  void add(std::int64_t t, std::optional<literal> bound_literal) {
    const std::span<const reduced_cost_fixing::fixing> implied = fixing_.implied_by(t);
    if (!bound_literal) {
      for (std::size_t k = units_; k < implied.size(); ++k) emit(solver_, implied[k].lit);
      units_ = std::max(units_, implied.size());
      return;
    }
    std::size_t k = units_;
    if (guard_ && *guard_ == *bound_literal) k = std::max(k, guarded_);
    for (; k < implied.size(); ++k) emit(solver_, ~*bound_literal, implied[k].lit);
    guard_ = bound_literal;
    guarded_ = implied.size();
  }
  [[nodiscard]] const reduced_cost_fixing& fixing() const noexcept { return fixing_; }

 private:
  Solver& solver_;
  reduced_cost_fixing fixing_;
  std::size_t units_ = 0;         // fixings asserted as units (a prefix of the list)
  std::optional<literal> guard_;  // the bound literal of the last guarded fixings
  std::size_t guarded_ = 0;       // how many of them
};

template <class Solver>
optimize_result minimize_run(search_run<Solver>& run, objective_bound<Solver>& bound) {
  Solver& solver = run.solver();
  const optimize_options& options = run.options();
  const normalized_objective& goal = bound.normalized();
  optimize_result& result = run.result();
  result.lower_bound = goal.lowest();
  std::int64_t lower_sum = 0;  // proved: no solution has a smaller scaled sum
  auto done = [&](optimize_status status) {
    result.bound = bound.method();
    result.bound_size = bound.size();
    if (status == optimize_status::optimal) run.raise_lower_bound(*result.objective, bound_source::refutation);
    if (status == optimize_status::optimal) result.lower_bound = *result.objective;
    return run.finish(status);
  };
  // The bound every later solution must beat, assumed or asserted.
  auto tighten = [&](std::int64_t value) -> std::optional<literal> {
    if (options.permanent_bounds) {
      bound.require_at_most(value);
      return std::nullopt;
    }
    return bound.at_most(value);
  };
  auto solve_with = [&](std::optional<literal> assumption, std::optional<std::int64_t> conflicts = {}) {
    if (!assumption) return run.solve(std::span<const literal>(), conflicts);
    return run.solve(*assumption, conflicts);
  };

  const std::optional<relaxation_answer> relaxed = detail::relaxation_bound(run, goal, lower_sum);
  fixings_in_solver<Solver> fixings(solver, relaxed);
  // Below the best: the bound (asserted or assumed) and its fixings.
  auto improve_on = [&](std::int64_t best) {
    const std::optional<literal> assumption = tighten(goal.value_of_sum(best - 1));
    fixings.add(best - 1, assumption);
    return assumption;
  };
  const bool boosted = options.search == search_strategy::core_boosted;
  const bool started =
      (boosted || options.search == search_strategy::core_guided) && detail::suggest_start(run, goal, relaxed);

  // The first solution, with no bound.
  if (!started) {
    switch (run.solve()) {
      case solve_result::unsatisfiable:
        return done(optimize_status::unsatisfiable);
      case solve_result::unknown:
        return done(optimize_status::unknown);
      case solve_result::satisfiable:
        break;
    }
  }
  std::int64_t best_sum = detail::take_solution(run, solver, goal, options);
  auto stopped_status = [&] { return best_sum <= lower_sum ? optimize_status::optimal : optimize_status::satisfiable; };

  if (options.search == search_strategy::linear) {
    while (best_sum > lower_sum) {
      const std::optional<literal> assumption = improve_on(best_sum);
      switch (solve_with(assumption)) {
        case solve_result::unsatisfiable:
          return done(optimize_status::optimal);
        case solve_result::unknown:
          return done(stopped_status());
        case solve_result::satisfiable:
          break;
      }
      const std::int64_t sum = detail::take_solution(run, solver, goal, options);
      CLAUSEWRIGHT_ASSERT(sum < best_sum, "a solution under the bound must improve on the best");
      best_sum = sum;
    }
    return done(optimize_status::optimal);
  }

  if (options.search == search_strategy::binary) {
    // Binary search over scaled sums: no solution lies below lo, the best is best_sum.
    std::int64_t lo = lower_sum;
    std::int64_t asserted = -1;  // the scaled bound last asserted as a unit clause
    while (lo < best_sum) {
      const std::int64_t hi = best_sum - 1;
      std::optional<literal> question;
      if (hi != asserted) {
        question = tighten(goal.value_of_sum(hi));
        if (!question) asserted = hi;
      }
      const std::int64_t mid = lo + (hi - lo) / 2;
      if (mid < hi) question = bound.at_most(goal.value_of_sum(mid));
      const solve_result answer = solve_with(question);
      if (answer == solve_result::unknown) {
        run.raise_lower_bound(goal.value_of_sum(lo), bound_source::refutation);
        return done(optimize_status::satisfiable);
      }
      if (answer == solve_result::unsatisfiable) {
        // Unsatisfiable without the assumption's help: nothing beats the best.
        const bool assumption_used = question && solver.failed(*question);
        lo = assumption_used ? mid + 1 : best_sum;
        continue;
      }
      const std::int64_t sum = detail::take_solution(run, solver, goal, options);
      CLAUSEWRIGHT_ASSERT(sum <= mid, "a solution under the bound must respect it");
      best_sum = sum;
    }
    return done(optimize_status::optimal);
  }

  // Core-guided: complete on its own; core-boosted: for a share of the limits.
  if (best_sum <= lower_sum) return done(optimize_status::optimal);
  {
    if (boosted) {
      std::optional<solver_clock::time_point> until;
      std::optional<std::int64_t> conflicts;
      // With the relaxation's bound at hand the cores have less to add.
      const double share = relaxed ? options.core_share / 10 : options.core_share;
      if (options.time_limit && run.deadline())
        until = run.start() + std::chrono::duration_cast<solver_clock::duration>(*options.time_limit * share);
      else
        conflicts = options.core_conflicts;
      run.limit_phase(until, conflicts);
    }
    std::optional<std::int64_t> best = best_sum;
    detail::core_guided_search<Solver> cores(run, goal);
    const detail::core_outcome outcome = cores.search(lower_sum, best);
    best_sum = *best;
    run.limit_phase(std::nullopt);
    if (outcome == detail::core_outcome::optimal) return done(optimize_status::optimal);
    if (outcome == detail::core_outcome::unsatisfiable) return done(optimize_status::unsatisfiable);
    if (!boosted || run.over()) return done(stopped_status());
  }

  // Improvement and proof attempts, alternating.
  detail::neighbourhood_search<Solver> neighbourhoods(run, goal, &fixings.fixing());
  std::int64_t effort = 2000;  // conflicts of the next proof attempt, doubled after each
  while (best_sum > lower_sum && !run.over()) {
    // While the neighbourhoods improve, they have the time: a proof attempt
    // needs the objective's bound, which can be large to build.
    const std::int64_t before = best_sum;
    neighbourhoods.round(best_sum);
    if (best_sum <= lower_sum || run.over()) break;
    if (best_sum < before) continue;
    // Solution-improving: below the best.
    const std::optional<literal> assumption = improve_on(best_sum);
    switch (solve_with(assumption, effort)) {
      case solve_result::unsatisfiable:
        return done(optimize_status::optimal);
      case solve_result::satisfiable:
        best_sum = detail::offer_solution(run, solver, goal, best_sum);
        break;
      case solve_result::unknown:
        break;
    }
    if (best_sum <= lower_sum || run.over()) break;
    // A probe at the lower bound: meets it, or raises it by one step.
    if (lower_sum < best_sum - 1) {
      const literal probe = bound.at_most(goal.value_of_sum(lower_sum));
      switch (run.solve(probe, effort / 2)) {
        case solve_result::unsatisfiable:
          ++lower_sum;
          run.raise_lower_bound(goal.value_of_sum(lower_sum), bound_source::refutation);
          break;
        case solve_result::satisfiable:
          best_sum = detail::offer_solution(run, solver, goal, best_sum);
          break;
        case solve_result::unknown:
          break;
      }
    }
    effort = std::min<std::int64_t>(effort * 2, INT32_MAX / 2);
  }
  return done(stopped_status());
}

}  // namespace detail

// Minimises the objective behind `bound` (which must write into `solver`).
template <class Solver>
optimize_result minimize(Solver& solver, variable_pool& pool, objective_bound<Solver>& bound,
                         const optimize_options& options = {}) {
  static_assert(incremental_solver<Solver>, "clausewright: minimize needs a solver sink (solver_sink, cadical_solver)");
  detail::search_run<Solver> run(solver, pool, options);
  // The limits hold while a bound is built, too.
  struct interrupt_guard {
    objective_bound<Solver>& bound;
    interrupt_guard(objective_bound<Solver>& b, detail::search_run<Solver>& r) : bound(b) {
      bound.set_interrupt([&r] { return r.over(); });
    }
    interrupt_guard(const interrupt_guard&) = delete;
    interrupt_guard& operator=(const interrupt_guard&) = delete;
    ~interrupt_guard() { bound.set_interrupt({}); }
  } guard(bound, run);
  try {
    return detail::minimize_run(run, bound);
  } catch (const bound_interrupted&) {
    // Stopped while a bound was built: the best solution and the lower bound so far.
    optimize_result& result = run.result();
    result.bound = bound.method();
    result.bound_size = bound.size();
    if (!result.objective) return run.finish(optimize_status::unknown);
    return run.finish(*result.objective <= result.lower_bound ? optimize_status::optimal
                                                              : optimize_status::satisfiable);
  }
}

// Minimises `goal`, bounding it with options.bound.
template <class Solver>
optimize_result minimize(Solver& solver, variable_pool& pool, const objective& goal,
                         const optimize_options& options = {}) {
  objective_bound<Solver> bound(solver, pool, goal, options.bound);
  return minimize(solver, pool, bound, options);
}

}  // namespace clausewright
