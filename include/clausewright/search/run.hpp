// clausewright: one run of the optimiser — the solver calls with their
// limits, the best solution, the proved lower bound, and the callbacks.
//
// Part of optimize.hpp: include optimize.hpp, not this.
#pragma once

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <optional>
#include <span>
#include <utility>
#include <vector>

#include "../error.hpp"
#include "../literal.hpp"
#include "../pool.hpp"
#include "../solver.hpp"
#include "options.hpp"

namespace clausewright::detail {

inline constexpr double max_time_limit_seconds = 100.0 * 365 * 24 * 3600;

template <class Solver>
class search_run {
 public:
  search_run(Solver& solver, variable_pool& pool, const optimize_options& options)
      : solver_(solver), pool_(pool), options_(options), start_(solver_clock::now()) {
    previous_deadline_ = solver_.deadline();
    deadline_ = previous_deadline_;
    if (options.time_limit) {
      deadline_.reset();
      const double seconds = options.time_limit->count();
      if (!(seconds >= 0))  // also NaN
        throw error(error_id::usage, "the time limit must be a number of seconds >= 0");
      // Beyond a century the clock's range may not reach: no deadline then.
      if (seconds <= max_time_limit_seconds)
        deadline_ = start_ + std::chrono::duration_cast<solver_clock::duration>(*options.time_limit);
      solver_.set_deadline(deadline_);
    }
    phase_deadline_ = deadline_;
    if constexpr (requires { solver_.set_stop_flag(options.stop); }) {
      previous_stop_ = solver_.stop_flag();
      if (options.stop != nullptr) solver_.set_stop_flag(options.stop);
    }
  }
  search_run(const search_run&) = delete;
  search_run& operator=(const search_run&) = delete;
  ~search_run() {
    solver_.set_deadline(previous_deadline_);
    if constexpr (requires { solver_.set_stop_flag(options_.stop); }) solver_.set_stop_flag(previous_stop_);
  }

  // One solver call under the assumptions, at most `conflicts` conflicts
  // where the solver counts them (and within the search's own budget).
  solve_result solve(std::span<const literal> assumptions = {}, std::optional<std::int64_t> conflicts = {}) {
    if (stopped()) return solve_result::unknown;
    if (options_.conflict_limit) {
      const auto left = static_cast<std::int64_t>(*options_.conflict_limit - result_.conflicts);
      conflicts = conflicts ? std::min(*conflicts, left) : left;
    }
    if (phase_conflicts_) {
      const auto left = static_cast<std::int64_t>(*phase_conflicts_ - result_.conflicts);
      conflicts = conflicts ? std::min(*conflicts, left) : left;
    }
    for (const literal l : assumptions) solver_.assume(l);
    if constexpr (requires { solver_.set_conflict_limit(std::int64_t{0}); }) {
      if (conflicts) solver_.set_conflict_limit(*conflicts);
    }
    ++result_.solves;
    std::uint64_t before = 0;
    if constexpr (requires { solver_.statistics().conflicts; }) before = solver_.statistics().conflicts;
    const solve_result answer = solver_.solve();
    if constexpr (requires { solver_.statistics().conflicts; })
      result_.conflicts += solver_.statistics().conflicts - before;
    if (options_.on_progress)
      options_.on_progress(
          search_progress{seconds(), result_.objective, result_.lower_bound, result_.solves, result_.conflicts});
    return answer;
  }
  solve_result solve(literal assumption, std::optional<std::int64_t> conflicts = {}) {
    return solve(std::span<const literal>(&assumption, 1), conflicts);
  }

  // The search must end: the deadline passed, the stop flag is set, or the
  // conflicts are spent.
  [[nodiscard]] bool stopped() const {
    if (options_.stop != nullptr && options_.stop->load(std::memory_order_relaxed)) return true;
    if (phase_deadline_ && solver_clock::now() >= *phase_deadline_) return true;
    if (phase_conflicts_ && result_.conflicts >= *phase_conflicts_) return true;
    return options_.conflict_limit && result_.conflicts >= *options_.conflict_limit;
  }
  // Whether the whole search must end (not only the current phase).
  [[nodiscard]] bool over() const {
    if (options_.stop != nullptr && options_.stop->load(std::memory_order_relaxed)) return true;
    if (deadline_ && solver_clock::now() >= *deadline_) return true;
    return options_.conflict_limit && result_.conflicts >= *options_.conflict_limit;
  }
  // Limits for a phase of the search (never past the search's own): a
  // deadline and a number of conflicts from now. Nothing: the search's own.
  void limit_phase(std::optional<solver_clock::time_point> until, std::optional<std::int64_t> conflicts = {}) {
    phase_deadline_ = until && (!deadline_ || *until < *deadline_) ? until : deadline_;
    solver_.set_deadline(phase_deadline_);
    phase_conflicts_.reset();
    if (conflicts)
      phase_conflicts_ = result_.conflicts + static_cast<std::uint64_t>(std::max<std::int64_t>(*conflicts, 0));
  }
  [[nodiscard]] std::optional<solver_clock::time_point> deadline() const noexcept { return deadline_; }
  [[nodiscard]] solver_clock::time_point start() const noexcept { return start_; }

  std::vector<bool> record() {
    const std::int32_t n = recorded();
    std::vector<bool> values(static_cast<std::size_t>(n) + 1, false);
    for (std::int32_t v = 1; v <= n; ++v) values[static_cast<std::size_t>(v)] = solver_.value(literal(v));
    return values;
  }
  [[nodiscard]] std::int32_t recorded() const {
    return options_.record_variables < 0 ? pool_.user_variables() : options_.record_variables;
  }
  void improved(std::int64_t value, std::vector<bool> values) {
    result_.objective = value;
    result_.values = std::move(values);
    ++result_.solutions;
    if (options_.on_solution)
      options_.on_solution(improving_solution{value, seconds(), result_.solves, result_.values});
  }
  // A proved lower bound; reported when it rises.
  void raise_lower_bound(std::int64_t value, bound_source source) {
    if (value <= result_.lower_bound) return;
    result_.lower_bound = value;
    result_.lower_bound_source = source;
    if (options_.on_bound) options_.on_bound(bound_update{value, source, seconds()});
  }
  // The solver's current model becomes its phases (every variable so far).
  void keep_phases() {
    if (!options_.solution_phases) return;
    if constexpr (requires { solver_.set_phase(literal(1)); }) {
      for (std::int32_t v = 1; v <= pool_.top(); ++v) {
        const literal x(v);
        solver_.set_phase(solver_.value(x) ? x : ~x);
      }
    }
  }
  // Phases from given values (a constructed start), variables
  // 1..values.size()-1; the encodings' own variables false, which is what
  // one-sided encodings need for the fewest of them to be forced.
  // (`auxiliary`: the phase of the others).
  void suggest(const std::vector<bool>& values, bool auxiliary = false) {
    if constexpr (requires { solver_.set_phase(literal(1)); }) {
      for (std::size_t v = 1; v < values.size(); ++v) {
        const literal x(static_cast<std::int32_t>(v));
        solver_.set_phase(values[v] ? x : ~x);
      }
      for (auto v = static_cast<std::int32_t>(values.size()); v <= pool_.top(); ++v)
        solver_.set_phase(auxiliary ? literal(v) : ~literal(v));
    }
  }

  [[nodiscard]] double seconds() const { return std::chrono::duration<double>(solver_clock::now() - start_).count(); }
  optimize_result finish(optimize_status status) {
    result_.status = status;
    result_.seconds = seconds();
    return std::move(result_);
  }
  optimize_result& result() noexcept { return result_; }
  [[nodiscard]] const optimize_options& options() const noexcept { return options_; }
  Solver& solver() noexcept { return solver_; }
  variable_pool& pool() noexcept { return pool_; }

 private:
  Solver& solver_;
  variable_pool& pool_;
  const optimize_options& options_;
  solver_clock::time_point start_;
  std::optional<solver_clock::time_point> deadline_;
  std::optional<solver_clock::time_point> previous_deadline_;
  std::optional<solver_clock::time_point> phase_deadline_;
  std::optional<std::uint64_t> phase_conflicts_;
  const std::atomic<bool>* previous_stop_ = nullptr;
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

// The scaled sum of the solver's solution: the objective's value in the
// model, or the caller's evaluation of the recorded variables when that is
// lower (rounded up, so the next bound, one scaled step below, is below
// the cost). Returns the sum, the value and the recorded variables.
struct solution_value {
  std::int64_t sum = 0;
  std::int64_t value = 0;
  std::vector<bool> values;
};

template <class Solver>
solution_value value_solution(search_run<Solver>& run, Solver& solver, const normalized_objective& goal) {
  solution_value out;
  out.sum = scaled_sum(solver, goal);
  out.value = goal.value_of_sum(out.sum);
  out.values = run.record();
  if (run.options().evaluate) {
    const std::int64_t cost = std::max(run.options().evaluate(out.values), goal.lowest());
    if (cost < out.value) {
      out.value = cost;
      out.sum = ceil_div(cost - goal.offset, goal.scale);
    }
  }
  return out;
}

// Takes the solver's solution as the new best and returns its scaled sum.
template <class Solver>
std::int64_t take_solution(search_run<Solver>& run, Solver& solver, const normalized_objective& goal,
                           const optimize_options& /*options*/ = {}) {
  solution_value s = value_solution(run, solver, goal);
  run.keep_phases();
  run.improved(s.value, std::move(s.values));
  return s.sum;
}

// Takes the solver's solution when it beats the best so far; returns the
// best scaled sum after it.
template <class Solver>
std::int64_t offer_solution(search_run<Solver>& run, Solver& solver, const normalized_objective& goal,
                            std::optional<std::int64_t> best_sum) {
  solution_value s = value_solution(run, solver, goal);
  if (best_sum && s.sum >= *best_sum) return *best_sum;
  run.keep_phases();
  run.improved(s.value, std::move(s.values));
  return s.sum;
}

}  // namespace clausewright::detail
