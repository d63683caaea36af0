// clausewright: soft constraints, through the constraint pipeline.
//
// Soft constraints are reified as in MaxSAT: add_soft makes a relaxation
// literal r, encodes the constraint guarded by ~r (r true forces it) and puts
// the weight on ~r into the objective (paid when the constraint is given up).
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

namespace clausewright {

// --- soft constraints -----------------------------------------------------

// Adds the constraint as a soft one: returns its relaxation literal r, with
// r -> constraint in the sink and `weight` * ~r in `cost`. A constraint that
// normalises to a single forced literal is its own relaxation literal (no
// clause, no variable). Weights are >= 0. The solver may leave r false
// while the constraint holds, so before the optimum a solution's objective
// can exceed the cost of its assignment (optimize_options::evaluate corrects
// that); at the optimum they agree.
template <class Sink>
literal add_soft(Sink& sink, variable_pool& pool, objective& cost, std::int64_t weight, const normalized_constraint& c,
                 std::optional<method_id> method = {}, const encoder_settings& settings = {}) {
  static_assert(check_clause_sink<Sink>());
  if (weight < 0)
    throw error(error_id::invalid_bound,
                "the weight of a soft constraint must not be negative (it is " + std::to_string(weight) + ")",
                c.where());
  auto check_variable = [&](literal l) {
    if (l.var() > pool.top())
      throw error(error_id::invalid_literal,
                  "variable " + std::to_string(l.var()) + " is not in the pool (declare the user's variables first)",
                  c.where());
  };
  for (const literal l : c.literals) check_variable(l);
  for (const literal l : c.units) check_variable(l);
  if (c.kind == constraint_kind::constant_true && c.units.size() == 1) {
    cost.add(weight, ~c.units.front());
    return c.units.front();
  }
  method_chooser chooser;
  std::optional<method_id> m;
  try {
    m = chooser.choose(pool, c, method, settings);
  } catch (const error& e) {
    detail::rethrow_at(e, c.where());
  }
  const literal r = pool.fresh();
  const std::array<literal, 1> guard{~r};
  encode_constraint(sink, pool, c, m, settings, c.where(), guard);
  cost.add(weight, ~r);
  return r;
}

template <class Sink>
literal add_soft(Sink& sink, variable_pool& pool, objective& cost, std::int64_t weight, std::span<const term> terms,
                 relation rel, std::int64_t bound, std::optional<method_id> method = {},
                 const encoder_settings& settings = {}, std::size_t index = 0, std::string name = {}) {
  return add_soft(sink, pool, cost, weight, normalize(terms, rel, bound, index, std::move(name)), method, settings);
}

}  // namespace clausewright
