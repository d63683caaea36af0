// clausewright: the core-guided lower bound.
//
// OLL (Andres, Kaufmann, Matheis, Schaub 2012, ICLP technical communications;
// Morgado, Dodaro, Marques-Silva 2014, CP): every objective literal is a soft
// literal whose negation is assumed. An unsatisfiable answer names a core, a
// set of soft literals not all of which can be avoided; with w the smallest
// weight in it, the lower bound rises by w, every weight in the core drops by
// w, and a totalizer (Bailleux & Boufkhad 2003) over the core's literals
// gives a new soft literal "at least 2 of them" of weight w. When an output
// "at least j" of a totalizer is itself in a core, "at least j+1" joins with
// the weight of that core (the totalizer is extended in place). The cost of
// the objective equals the lower bound plus the remaining weights of the soft
// literals that are true, so a solution under all the assumptions is optimal.
//
// Stratification (Ansótegui, Bonet, Gabàs, Levy 2012-2013): only soft
// literals with a weight at or above a level are assumed; the level drops
// (here to half the largest weight below it) when the solver finds a
// solution, which is an upper bound on the way.
// Weight-aware core extraction (Berg & Järvisalo 2017, CP): after a core,
// its literals of weight 0 leave the assumptions and the search for cores
// goes on; the totalizers of the cores found are only added once the
// assumptions are satisfiable, so each core is found over the original
// literals, not over the outputs of the ones before.
//
// Size: a totalizer over a core of m literals, cut at j, adds O(m log m)
// variables and O(m j) clauses (upper side only, as the bounds need).
//
// Part of optimize.hpp: include optimize.hpp, not this.
#pragma once

#include <algorithm>
#include <cstdint>
#include <optional>
#include <vector>

#include "../encodings/totalizer.hpp"
#include "../literal.hpp"
#include "run.hpp"

namespace clausewright::detail {

enum class core_outcome : std::uint8_t {
  optimal,        // the best solution meets the lower bound
  unsatisfiable,  // no solution at all
  stopped,        // the limit came first
};

template <class Solver>
class core_guided_search {
 public:
  // `lower_sum`: the scaled lower bound proved so far (raised here).
  core_guided_search(search_run<Solver>& run, const normalized_objective& goal) : run_(run), goal_(goal) {
    for (std::size_t i = 0; i < goal.size(); ++i) softs_.push_back({goal.literals[i], goal.coefficients[i], -1, 0});
  }

  // Raises lower_sum and lowers best_sum until they meet or the run stops.
  core_outcome search(std::int64_t& lower_sum, std::optional<std::int64_t>& best_sum) {
    Solver& solver = run_.solver();
    lower_ = 0;
    std::int64_t level = largest_weight_below(INT64_MAX);
    std::vector<std::size_t> active;  // soft indices assumed
    std::vector<literal> assumptions;
    while (true) {
      if (best_sum && *best_sum <= std::max(lower_sum, lower_)) return core_outcome::optimal;
      if (run_.stopped()) return core_outcome::stopped;
      active.clear();
      assumptions.clear();
      for (std::size_t i = 0; i < softs_.size(); ++i)
        if (softs_[i].weight > 0 && softs_[i].weight >= level) {
          active.push_back(i);
          assumptions.push_back(~softs_[i].cost);
        }
      const solve_result answer = run_.solve(assumptions);
      if (answer == solve_result::unknown) return core_outcome::stopped;
      if (answer == solve_result::satisfiable) {
        best_sum = offer_solution(run_, solver, goal_, best_sum);
        if (!pending_.empty()) {
          relax_pending();
          continue;
        }
        const std::int64_t below = largest_weight_below(level);
        if (below > 0) {
          level = std::max<std::int64_t>(1, (below + 1) / 2);
          continue;
        }
        // Every soft literal with weight holds: the cost is the lower bound.
        if (*best_sum <= std::max(lower_sum, lower_)) return core_outcome::optimal;
        return core_outcome::stopped;  // not expected; leave the proof to the caller
      }
      // Unsatisfiable: the failed assumptions are a core.
      std::vector<std::size_t> core;
      for (std::size_t k = 0; k < active.size(); ++k)
        if (solver.failed(assumptions[k])) core.push_back(active[k]);
      // No assumption took part: the clauses alone are unsatisfiable. With a
      // solution in hand that cannot be (the clauses added here only define
      // fresh variables or are implied): claim nothing.
      if (core.empty()) return best_sum ? core_outcome::stopped : core_outcome::unsatisfiable;
      trim(core);
      std::int64_t w = INT64_MAX;
      for (const std::size_t i : core) w = std::min(w, softs_[i].weight);
      for (const std::size_t i : core) softs_[i].weight -= w;
      lower_ += w;
      ++run_.result().cores;
      if (lower_ > lower_sum) {
        lower_sum = lower_;
        run_.raise_lower_bound(goal_.value_of_sum(lower_sum), bound_source::cores);
      }
      if (core.size() == 1) {
        // The formula implies the literal: a unit clause, and no totalizer.
        emit(solver, softs_[core.front()].cost);
        add_next_output(core.front(), w);
      } else {
        pending_.push_back({std::move(core), w});
      }
    }
  }

 private:
  struct soft {
    literal cost;         // true costs `weight`
    std::int64_t weight;  // what is left of it
    std::int32_t tree;    // the totalizer whose output it is, or -1
    std::size_t level;    // that output: "at least level" of the tree's inputs
  };
  struct found_core {
    std::vector<std::size_t> softs;
    std::int64_t weight;
  };

  [[nodiscard]] std::int64_t largest_weight_below(std::int64_t level) const {
    std::int64_t best = 0;
    for (const soft& s : softs_)
      if (s.weight < level) best = std::max(best, s.weight);
    return best;
  }

  // Asks again with only the core's assumptions (a few times, a few
  // conflicts each): the answer is often a smaller core.
  void trim(std::vector<std::size_t>& core) {
    Solver& solver = run_.solver();
    std::vector<literal> assumptions;
    for (int round = 0; round < 2 && core.size() > 2; ++round) {
      assumptions.clear();
      for (const std::size_t i : core) assumptions.push_back(~softs_[i].cost);
      if (run_.solve(assumptions, std::int64_t{1000}) != solve_result::unsatisfiable) return;
      std::vector<std::size_t> smaller;
      for (std::size_t k = 0; k < core.size(); ++k)
        if (solver.failed(assumptions[k])) smaller.push_back(core[k]);
      if (smaller.empty() || smaller.size() == core.size()) return;
      core = std::move(smaller);
    }
  }

  // OLL: the output one above `i`'s, when `i` is a totalizer output.
  void add_next_output(std::size_t i, std::int64_t w) {
    const soft s = softs_[i];
    if (s.tree < 0) return;
    totalizer& t = trees_[static_cast<std::size_t>(s.tree)];
    const std::size_t next = s.level + 1;
    if (next > t.input_count()) return;
    t.extend(run_.solver(), run_.pool(), next);
    softs_.push_back({t.outputs().at_least(next), w, s.tree, next});
  }

  void relax_pending() {
    for (found_core& c : pending_) {
      for (const std::size_t i : c.softs) add_next_output(i, c.weight);
      std::vector<literal> inputs;
      inputs.reserve(c.softs.size());
      for (const std::size_t i : c.softs) inputs.push_back(softs_[i].cost);
      trees_.emplace_back(run_.solver(), run_.pool(), inputs, std::size_t{2}, sides::upper);
      softs_.push_back({trees_.back().outputs().at_least(2), c.weight, static_cast<std::int32_t>(trees_.size() - 1),
                        2});
    }
    pending_.clear();
  }

  search_run<Solver>& run_;
  const normalized_objective& goal_;
  std::vector<soft> softs_;
  std::vector<totalizer> trees_;
  std::vector<found_core> pending_;
  std::int64_t lower_ = 0;
};

}  // namespace clausewright::detail
