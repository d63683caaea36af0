// clausewright: the optimiser.
//
// The optimiser searches SAT-UNSAT from the top by default: every solution of
// value v is followed by the bound v-1 until the solver proves there is none
// (the last solution is then optimal); binary search halves the interval
// between the proved lower bound and the best solution instead. A time limit
// ends the search with the best solution found so far ("satisfiable").
//
// The objective (objective.hpp), its bounds (objective_bound.hpp) and soft
// constraints (soft.hpp) are in their own files, included here.
#pragma once

#include <algorithm>
#include <array>
#include <chrono>
#include <cstdint>
#include <functional>
#include <initializer_list>
#include <map>
#include <memory>
#include <numeric>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "constraint.hpp"
#include "encoder.hpp"
#include "encodings/adder.hpp"
#include "encodings/bdd.hpp"
#include "encodings/common.hpp"
#include "encodings/generalized_totalizer.hpp"
#include "encodings/sequential_counter.hpp"
#include "encodings/sequential_weight_counter.hpp"
#include "encodings/totalizer.hpp"
#include "error.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "pipeline.hpp"
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"
#include "solver.hpp"

#include "objective.hpp"
#include "objective_bound.hpp"
#include "soft.hpp"

namespace clausewright {

// --- the optimiser ----------------------------------------------------------

enum class search_strategy : std::uint8_t { linear, binary };

[[nodiscard]] constexpr std::string_view to_string(search_strategy s) noexcept {
  return s == search_strategy::linear ? "linear" : "binary";
}

enum class optimize_status : std::uint8_t {
  optimal,        // a solution, proved best
  satisfiable,    // a solution, the search ended before proving it best
  unsatisfiable,  // no solution
  unknown,        // the search ended before finding any solution
};

[[nodiscard]] constexpr std::string_view to_string(optimize_status s) noexcept {
  switch (s) {
    case optimize_status::optimal:
      return "optimal";
    case optimize_status::satisfiable:
      return "satisfiable";
    case optimize_status::unsatisfiable:
      return "unsatisfiable";
    case optimize_status::unknown:
      return "unknown";
  }
  return "?";
}

// Handed to the callback for every solution better than the ones before.
struct improving_solution {
  std::int64_t objective = 0;
  double seconds = 0;               // since the search began
  std::uint64_t solves = 0;         // solver calls so far
  const std::vector<bool>& values;  // the recorded variables (index 0 unused)

  [[nodiscard]] bool value(literal l) const {
    const auto v = static_cast<std::size_t>(l.var());
    const bool truth = v < values.size() && values[v];
    return l.negative() ? !truth : truth;
  }
};

struct optimize_options {
  search_strategy search = search_strategy::linear;
  std::optional<std::chrono::duration<double>> time_limit;  // for the whole search
  // true: every proved bound (better than the best so far) becomes a unit
  // clause; false: bounds are only assumed, so the solver keeps the original
  // formula and can be asked other questions afterwards.
  bool permanent_bounds = true;
  // The result keeps the values of variables 1..record_variables (negative:
  // the pool's user variables).
  std::int32_t record_variables = -1;
  bound_settings bound;
  std::function<void(const improving_solution&)> on_solution;
  // The cost of a solution on the user's terms, from its recorded variables.
  // With soft constraints the solver may leave a relaxation literal false
  // although the constraint holds, so the objective in its model can be above
  // the cost of the user's assignment; when this gives less, the solution
  // counts at this value (and the next bound is below it). It must be the
  // objective's value of some model extending the assignment, as the cost of
  // the original constraints is.
  std::function<std::int64_t(const std::vector<bool>&)> evaluate;
};

struct optimize_result {
  optimize_status status = optimize_status::unknown;
  std::optional<std::int64_t> objective;  // value of the best solution
  std::int64_t lower_bound = 0;           // proved: no solution has a smaller value
  std::vector<bool> values;               // the best solution, variables 1..n (index 0 unused)
  std::uint64_t solutions = 0;            // improving solutions found
  std::uint64_t solves = 0;               // solver calls
  double seconds = 0;
  bound_method bound = bound_method::automatic;  // the method the bounds used
  encoding_size bound_size;                      // what the bounds added

  [[nodiscard]] bool value(literal l) const {
    const auto v = static_cast<std::size_t>(l.var());
    const bool truth = v < values.size() && values[v];
    return l.negative() ? !truth : truth;
  }
};

namespace detail {

inline constexpr double max_time_limit_seconds = 100.0 * 365 * 24 * 3600;

template <class Solver>
class search_run {
 public:
  search_run(Solver& solver, variable_pool& pool, const optimize_options& options)
      : solver_(solver), pool_(pool), options_(options), start_(solver_clock::now()) {
    if (options.time_limit) {
      const double seconds = options.time_limit->count();
      if (!(seconds >= 0))  // also NaN
        throw error(error_id::usage, "the time limit must be a number of seconds >= 0");
      previous_deadline_ = solver_.deadline();
      // Beyond a century the clock's range may not reach: no deadline then.
      if (seconds <= max_time_limit_seconds)
        solver_.set_deadline(start_ + std::chrono::duration_cast<solver_clock::duration>(*options.time_limit));
      else
        solver_.set_deadline(std::nullopt);
    }
  }
  search_run(const search_run&) = delete;
  search_run& operator=(const search_run&) = delete;
  ~search_run() {
    if (options_.time_limit) solver_.set_deadline(previous_deadline_);
  }

  solve_result solve(std::optional<literal> assumption = {}) {
    if (assumption) solver_.assume(*assumption);
    ++result_.solves;
    return solver_.solve();
  }
  std::vector<bool> record() {
    const std::int32_t n = options_.record_variables < 0 ? pool_.user_variables() : options_.record_variables;
    std::vector<bool> values(static_cast<std::size_t>(n) + 1, false);
    for (std::int32_t v = 1; v <= n; ++v) values[static_cast<std::size_t>(v)] = solver_.value(literal(v));
    return values;
  }
  void improved(std::int64_t value, std::vector<bool> values) {
    result_.objective = value;
    result_.values = std::move(values);
    ++result_.solutions;
    if (options_.on_solution)
      options_.on_solution(improving_solution{value, seconds(), result_.solves, result_.values});
  }
  [[nodiscard]] double seconds() const { return std::chrono::duration<double>(solver_clock::now() - start_).count(); }
  optimize_result finish(optimize_status status) {
    result_.status = status;
    result_.seconds = seconds();
    return std::move(result_);
  }
  optimize_result& result() noexcept { return result_; }

 private:
  Solver& solver_;
  variable_pool& pool_;
  const optimize_options& options_;
  solver_clock::time_point start_;
  std::optional<solver_clock::time_point> previous_deadline_;
  optimize_result result_;
};

// The scaled sum of the objective in the solver's model.
template <class Solver>
std::int64_t scaled_sum(Solver& solver, const normalized_objective& goal) {
  std::int64_t sum = 0;
  for (std::size_t i = 0; i < goal.size(); ++i)
    if (solver.value(goal.literals[i])) sum += goal.coefficients[i];
  return sum;
}

// Takes the solver's solution as the new best and returns its scaled sum:
// the objective's value in the model, or the caller's evaluation of the
// recorded variables when that is lower.
template <class Solver>
std::int64_t take_solution(search_run<Solver>& run, Solver& solver, const normalized_objective& goal,
                           const optimize_options& options) {
  std::int64_t sum = scaled_sum(solver, goal);
  std::int64_t value = goal.value_of_sum(sum);
  std::vector<bool> values = run.record();
  if (options.evaluate) {
    const std::int64_t cost = std::max(options.evaluate(values), goal.lowest());
    if (cost < value) {
      value = cost;
      // Rounded up, so the next bound (one scaled step below) is below the cost.
      sum = ceil_div(cost - goal.offset, goal.scale);
    }
  }
  run.improved(value, std::move(values));
  return sum;
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

// Minimises the objective behind `bound` (which must write into `solver`).
template <class Solver>
optimize_result minimize(Solver& solver, variable_pool& pool, objective_bound<Solver>& bound,
                         const optimize_options& options = {}) {
  static_assert(incremental_solver<Solver>, "clausewright: minimize needs a solver sink (solver_sink, cadical_solver)");
  const normalized_objective& goal = bound.normalized();
  detail::search_run<Solver> run(solver, pool, options);
  optimize_result& result = run.result();
  result.lower_bound = goal.lowest();
  auto done = [&](optimize_status status) {
    result.bound = bound.method();
    result.bound_size = bound.size();
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

  // The first solution, with no bound.
  switch (run.solve()) {
    case solve_result::unsatisfiable:
      return done(optimize_status::unsatisfiable);
    case solve_result::unknown:
      return done(optimize_status::unknown);
    case solve_result::satisfiable:
      break;
  }
  std::int64_t best_sum = detail::take_solution(run, solver, goal, options);

  if (options.search == search_strategy::linear) {
    while (best_sum > 0) {
      const std::optional<literal> assumption = tighten(goal.value_of_sum(best_sum) - 1);
      switch (run.solve(assumption)) {
        case solve_result::unsatisfiable:
          return done(optimize_status::optimal);
        case solve_result::unknown:
          return done(optimize_status::satisfiable);
        case solve_result::satisfiable:
          break;
      }
      const std::int64_t sum = detail::take_solution(run, solver, goal, options);
      CLAUSEWRIGHT_ASSERT(sum < best_sum, "a solution under the bound must improve on the best");
      best_sum = sum;
    }
    return done(optimize_status::optimal);
  }

  // Binary search over scaled sums: no solution lies below lo, the best is best_sum.
  std::int64_t lo = 0;
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
    const solve_result answer = run.solve(question);
    if (answer == solve_result::unknown) {
      result.lower_bound = goal.value_of_sum(lo);
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

// Minimises `goal`, bounding it with options.bound.
template <class Solver>
optimize_result minimize(Solver& solver, variable_pool& pool, const objective& goal,
                         const optimize_options& options = {}) {
  objective_bound<Solver> bound(solver, pool, goal, options.bound);
  return minimize(solver, pool, bound, options);
}

}  // namespace clausewright
