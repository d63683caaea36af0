// clausewright: what the optimiser is asked (strategy, limits, phases,
// callbacks, linear rows for a relaxation) and what it answers.
//
// Part of optimize.hpp (which includes it after the objective and its
// bounds, whose bound_settings it uses): include optimize.hpp, not this.
#pragma once

#include <array>
#include <atomic>
#include <chrono>
#include <cstdint>
#include <functional>
#include <optional>
#include <span>
#include <string_view>
#include <vector>

#include "../constraint.hpp"
#include "../literal.hpp"
#include "../select.hpp"

namespace clausewright {

// How minimize() looks for the optimum:
//   linear        solution-improving (SAT-UNSAT) from the first solution down;
//   binary        halves the interval between the proved lower bound and the
//                 best solution;
//   core_guided   OLL with stratification and weight-aware core extraction
//                 (search/core_guided.hpp): raises the lower bound until a
//                 solution meets it;
//   core_boosted  a core-guided phase for the lower bound, then
//                 solution-improving search with solution-guided phases and
//                 large-neighbourhood improvement (Berg, Demirović, Stuckey
//                 2019): the default.
enum class search_strategy : std::uint8_t { linear, binary, core_guided, core_boosted };

[[nodiscard]] constexpr std::string_view to_string(search_strategy s) noexcept {
  switch (s) {
    case search_strategy::linear: return "linear";
    case search_strategy::binary: return "binary";
    case search_strategy::core_guided: return "core-guided";
    case search_strategy::core_boosted: return "core-boosted";
  }
  return "?";
}

inline constexpr std::array all_search_strategies{search_strategy::linear, search_strategy::binary,
                                                  search_strategy::core_guided, search_strategy::core_boosted};

[[nodiscard]] inline std::optional<search_strategy> find_search_strategy(std::string_view name) noexcept {
  for (const search_strategy s : all_search_strategies)
    if (to_string(s) == name) return s;
  return std::nullopt;
}

enum class optimize_status : std::uint8_t {
  optimal,        // a solution, proved best
  satisfiable,    // a solution, the search ended before proving it best
  unsatisfiable,  // no solution
  unknown,        // the search ended before finding any solution
};

[[nodiscard]] constexpr std::string_view to_string(optimize_status s) noexcept {
  switch (s) {
    case optimize_status::optimal: return "optimal";
    case optimize_status::satisfiable: return "satisfiable";
    case optimize_status::unsatisfiable: return "unsatisfiable";
    case optimize_status::unknown: return "unknown";
  }
  return "?";
}

// Handed to the callback for every solution better than the ones before.
struct improving_solution {
  std::int64_t objective = 0;
  double seconds = 0;        // since the search began
  std::uint64_t solves = 0;  // solver calls so far
  const std::vector<bool>& values;  // the recorded variables (index 0 unused)

  [[nodiscard]] bool value(literal l) const {
    const auto v = static_cast<std::size_t>(l.var());
    const bool truth = v < values.size() && values[v];
    return l.negative() ? !truth : truth;
  }
};

// Where a proved lower bound came from.
enum class bound_source : std::uint8_t { trivial, relaxation, cores, refutation };

[[nodiscard]] constexpr std::string_view to_string(bound_source s) noexcept {
  switch (s) {
    case bound_source::trivial: return "trivial";
    case bound_source::relaxation: return "linear relaxation";
    case bound_source::cores: return "cores";
    case bound_source::refutation: return "refutation";
  }
  return "?";
}

// Handed to on_bound whenever the proved lower bound rises.
struct bound_update {
  std::int64_t lower_bound = 0;
  bound_source source = bound_source::trivial;
  double seconds = 0;
};

// Where the search stands, after every solver call (for progress lines).
struct search_progress {
  double seconds = 0;
  std::optional<std::int64_t> best;  // the best value found
  std::int64_t lower_bound = 0;
  std::uint64_t solves = 0;
  std::uint64_t conflicts = 0;  // where the solver reports them
};

// A linear constraint of the model, sum terms (rel) bound, for the linear
// relaxation: optional, and only sound when every model of the clauses
// satisfies it (the model's own constraints are such).
struct linear_row {
  std::vector<term> terms;
  relation rel = relation::le;
  std::int64_t bound = 0;
};

// The relaxation asked of an LP engine: minimise sum coefficients[i] *
// x(literals[i]) over 0 <= x <= 1 subject to the rows, where x(~v) = 1 - x(v).
struct relaxation_problem {
  std::span<const linear_row> rows;
  std::span<const literal> literals;
  std::span<const std::int64_t> coefficients;
  std::int32_t variables = 0;  // the largest variable in rows and objective
};

struct relaxation_answer {
  double value = 0;            // the relaxation's minimum (a lower bound on every integral solution)
  std::vector<double> values;  // x(v) at the minimum, index 0 unused (may be empty)
  // The reduced cost of x(v) at the minimum, index 0 unused (may be empty:
  // no reduced-cost fixing then). Must come from an optimal basis: the
  // optimiser fixes variables by them (search/reduced_costs.hpp).
  std::vector<double> reduced_costs;
};

// An LP engine: the minimum of the relaxation, nothing when it has none (it
// is infeasible: then so is the model) or the engine failed. lp_bound.hpp
// has one on COIN-OR CLP.
using relaxation_solver = std::function<std::optional<relaxation_answer>(const relaxation_problem&)>;

// The large-neighbourhood improvement (Shaw 1998): fix most variables to the
// best solution by assumptions and search the rest under a conflict limit.
struct neighbourhood_settings {
  bool enabled = true;
  double free_share = 0.2;          // of the recorded variables left free at first (adapted)
  std::int64_t conflicts = 400;     // per neighbourhood
  std::uint32_t per_round = 6;      // neighbourhoods between two proof attempts
};

struct optimize_options {
  search_strategy search = search_strategy::core_boosted;
  std::optional<std::chrono::duration<double>> time_limit;  // for the whole search
  std::optional<std::uint64_t> conflict_limit;              // for the whole search (where counted)
  // Set to true (from a signal handler, say) to end the search with the best
  // solution so far; read during solver calls where the solver can.
  const std::atomic<bool>* stop = nullptr;
  // true: every proved bound (better than the best so far) becomes a unit
  // clause; false: bounds are only assumed, so the solver keeps the original
  // formula and can be asked other questions afterwards.
  bool permanent_bounds = true;
  // The result keeps the values of variables 1..record_variables (negative:
  // the pool's user variables).
  std::int32_t record_variables = -1;
  bound_settings bound;
  // The best solution's values become the solver's phases (Demirović, Chu,
  // Stuckey 2018), where the solver takes phases.
  bool solution_phases = true;
  neighbourhood_settings neighbourhood;
  // For core_boosted: the share of the time limit the core-guided phase may
  // take (without a time limit: its conflicts, see core_conflicts).
  double core_share = 0.3;
  std::int64_t core_conflicts = 200000;  // the core phase's conflicts without a time limit
  std::uint64_t seed = 1;                // for the neighbourhoods
  // The model's linear constraints and an LP engine for the relaxation bound.
  std::vector<linear_row> rows;
  relaxation_solver relax;
  std::function<void(const improving_solution&)> on_solution;
  std::function<void(const bound_update&)> on_bound;
  std::function<void(const search_progress&)> on_progress;
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
  bound_source lower_bound_source = bound_source::trivial;
  std::vector<bool> values;               // the best solution, variables 1..n (index 0 unused)
  std::uint64_t solutions = 0;            // improving solutions found
  std::uint64_t solves = 0;               // solver calls
  std::uint64_t conflicts = 0;            // where the solver reports them
  std::uint64_t cores = 0;                // cores found by the core-guided phase
  double seconds = 0;
  bound_method bound = bound_method::automatic;  // the method the bounds used
  encoding_size bound_size;                      // what the bounds added

  [[nodiscard]] bool value(literal l) const {
    const auto v = static_cast<std::size_t>(l.var());
    const bool truth = v < values.size() && values[v];
    return l.negative() ? !truth : truth;
  }
};

}  // namespace clausewright
