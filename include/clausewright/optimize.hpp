// clausewright: objectives, bounds that tighten between solver calls, soft
// constraints, and the optimiser.
//
// An `objective` is a weighted sum of literals to minimise. An
// `objective_bound` turns "objective <= j" into one literal for any j:
// assume it for one solver call, or assert it as a unit clause; asking for a
// smaller j later adds only what the smaller bound needs, never a second copy
// of the objective. It sits on the encodings that expose their outputs:
//   - the totalizer (Bailleux & Boufkhad 2003): unary outputs, "count <= j"
//     is ~output[j]; unit coefficients; extended in place when a bound beyond
//     its cut is asked for;
//   - the sequential counter (Sinz 2005): unary outputs as the totalizer's;
//   - the generalized totalizer (Joshi, Martins, Manquinho 2015): one output
//     per reachable sum, chained so that "sum <= j" is the negation of the
//     smallest output above j;
//   - the sequential weight counter (Hölldobler, Manthey, Steinke 2012):
//     weighted unary outputs;
//   - the BDD (Abío et al. 2012): a root per bound, nodes shared between the
//     diagrams of different bounds;
//   - the adder network (Warners 1998): the binary sum is built once, each
//     bound adds a comparator guarded by its own literal;
//   - re-encoding: "objective <= j" encoded anew by any method of the table
//     under a fresh activation literal, for every bound (correct for every
//     objective, and the baseline the others are tested against).
// The counters and the generalized totalizer keep outputs only up to a cut
// (the first bound asked for, plus one); a later bound beyond the cut builds
// a new structure with the larger cut (counted in rebuilds()), where the
// totalizer only adds the missing outputs.
//
// The optimiser searches SAT-UNSAT from the top by default: every solution of
// value v is followed by the bound v-1 until the solver proves there is none
// (the last solution is then optimal); binary search halves the interval
// between the proved lower bound and the best solution instead. A time limit
// ends the search with the best solution found so far ("satisfiable").
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
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"
#include "solver.hpp"

namespace clausewright {

// --- the objective --------------------------------------------------------

// sum coefficient_i * l_i + constant, to be minimised.
class objective {
 public:
  objective() = default;
  objective(std::initializer_list<term> terms) { add(std::span<const term>(terms.begin(), terms.size())); }
  explicit objective(std::span<const term> terms) { add(terms); }

  void add(std::int64_t coefficient, literal l) {
    if (!l.valid() || l.dimacs() < -max_variable || l.dimacs() > max_variable)
      throw error(error_id::invalid_literal, "objective term " + std::to_string(terms_.size()) +
                                                 " has literal " + std::to_string(l.dimacs()) +
                                                 " (variables are 1.." + std::to_string(max_variable) + ")");
    terms_.push_back({coefficient, l});
  }
  void add(std::span<const term> terms) {
    for (const term& t : terms) add(t.coefficient, t.lit);
  }
  void add_constant(std::int64_t c) {
    constant_ = detail::checked_add(constant_, c, {}, "the objective's constant");
  }

  [[nodiscard]] std::span<const term> terms() const noexcept { return terms_; }
  [[nodiscard]] std::int64_t constant() const noexcept { return constant_; }
  [[nodiscard]] bool empty() const noexcept { return terms_.empty(); }

  // Value under a full assignment; value_of(v) is the truth of variable v.
  template <class ValueOf>
  [[nodiscard]] std::int64_t value(ValueOf&& value_of) const {
    __extension__ using wide = __int128;
    wide sum = constant_;
    for (const term& t : terms_) {
      const bool v = value_of(t.lit.var());
      if (t.lit.negative() ? !v : v) sum += t.coefficient;
    }
    if (sum > INT64_MAX || sum < INT64_MIN)
      throw error(error_id::overflow, "the objective's value overflows the 64-bit range");
    return static_cast<std::int64_t>(sum);
  }

 private:
  std::vector<term> terms_;
  std::int64_t constant_ = 0;
};

// The objective as the bounds take it:
//   value = offset + scale * sum coefficients[i] * [literals[i]]
// with distinct variables, positive coefficients whose gcd is 1, and scale
// the gcd taken out. Its values lie in [offset, offset + scale * total].
struct normalized_objective {
  std::vector<literal> literals;
  std::vector<std::int64_t> coefficients;
  std::int64_t offset = 0;
  std::int64_t scale = 1;
  std::int64_t total = 0;  // sum of `coefficients`

  [[nodiscard]] std::size_t size() const noexcept { return literals.size(); }
  [[nodiscard]] bool unit_coefficients() const noexcept {
    return std::all_of(coefficients.begin(), coefficients.end(), [](std::int64_t a) { return a == 1; });
  }
  [[nodiscard]] std::int64_t lowest() const noexcept { return offset; }
  [[nodiscard]] std::int64_t highest() const noexcept { return offset + scale * total; }
  // The value of a solution whose scaled sum is `sum`.
  [[nodiscard]] std::int64_t value_of_sum(std::int64_t sum) const noexcept { return offset + scale * sum; }
};

[[nodiscard]] inline normalized_objective normalize_objective(const objective& goal) {
  const error_position where{};
  // Merge by variable, on the positive literal: a*~x = a - a*x.
  std::map<std::int32_t, std::int64_t> by_variable;
  std::vector<std::int32_t> order;  // first appearance, so the result follows the input
  std::int64_t offset = goal.constant();
  for (const term& t : goal.terms()) {
    if (t.coefficient == 0) continue;
    std::int64_t a = t.coefficient;
    if (t.lit.negative()) {
      offset = detail::checked_add(offset, a, where, "the objective's constant");
      if (a == INT64_MIN) throw error(error_id::overflow, "an objective coefficient overflows when negated");
      a = -a;
    }
    auto [it, fresh] = by_variable.try_emplace(t.lit.var(), 0);
    if (fresh) order.push_back(t.lit.var());
    it->second = detail::checked_add(it->second, a, where, "a merged objective coefficient");
  }
  normalized_objective out;
  std::int64_t g = 0;
  for (const std::int32_t v : order) {
    const std::int64_t a = by_variable[v];
    if (a == 0) continue;
    if (a > 0) {
      out.literals.push_back(literal(v));
      out.coefficients.push_back(a);
    } else {
      // a*x = a + |a|*~x
      offset = detail::checked_add(offset, a, where, "the objective's constant");
      if (a == INT64_MIN) throw error(error_id::overflow, "an objective coefficient overflows when negated");
      out.literals.push_back(literal(-v));
      out.coefficients.push_back(-a);
    }
    g = std::gcd(g, out.coefficients.back());
  }
  out.scale = g == 0 ? 1 : g;
  std::int64_t total = 0;
  std::int64_t raw_total = 0;
  for (std::int64_t& a : out.coefficients) {
    raw_total = detail::checked_add(raw_total, a, where, "the sum of the objective's coefficients");
    a /= out.scale;
    total += a;
  }
  static_cast<void>(detail::checked_add(offset, raw_total, where, "the objective's largest value"));
  out.offset = offset;
  out.total = total;
  return out;
}

// --- bounds on the objective ---------------------------------------------

enum class bound_method : std::uint8_t {
  automatic,                  // unit coefficients: totalizer; weighted: BDD, then adder over budget
  totalizer,                  // unary outputs, extended past its cut (unit coefficients only)
  sequential_counter,         // unary outputs (unit coefficients only)
  generalized_totalizer,      // weighted outputs, one per reachable sum below the cut
  sequential_weight_counter,  // weighted unary outputs
  bdd,                        // a diagram root per bound, shared nodes
  adder,                      // binary sum once, a guarded comparator per bound
  reencode,                   // the bound encoded anew under an activation literal, every time
};

[[nodiscard]] constexpr std::string_view to_string(bound_method m) noexcept {
  switch (m) {
    case bound_method::automatic: return "automatic";
    case bound_method::totalizer: return "totalizer";
    case bound_method::sequential_counter: return "sequential-counter";
    case bound_method::generalized_totalizer: return "generalized-totalizer";
    case bound_method::sequential_weight_counter: return "sequential-weight-counter";
    case bound_method::bdd: return "bdd";
    case bound_method::adder: return "adder";
    case bound_method::reencode: return "reencode";
  }
  return "?";
}

inline constexpr std::array all_bound_methods{
    bound_method::automatic, bound_method::totalizer, bound_method::sequential_counter,
    bound_method::generalized_totalizer, bound_method::sequential_weight_counter, bound_method::bdd,
    bound_method::adder, bound_method::reencode};

[[nodiscard]] inline std::optional<bound_method> find_bound_method(std::string_view name) noexcept {
  for (const bound_method m : all_bound_methods)
    if (to_string(m) == name) return m;
  return std::nullopt;
}

struct bound_settings {
  bound_settings() = default;
  bound_settings(bound_method m) : method(m) {}  // NOLINT(google-explicit-constructor): a method is a setting

  bound_method method = bound_method::automatic;
  // For `reencode`: the method of the table to encode each bound with (empty:
  // chosen by `policy` for each bound).
  std::optional<method_id> reencode_method;
  selection_policy policy = selection_policy::balanced;
  std::uint64_t bdd_node_budget = default_bdd_node_budget;
};

namespace detail {

// A literal that is true, made on first use (a fresh variable and its unit).
template <class Sink>
class truth_literal {
 public:
  truth_literal(Sink& out, variable_pool& pool) : out_(out), pool_(pool) {}
  literal get() {
    if (!lit_.valid()) {
      lit_ = pool_.fresh();
      emit(out_, lit_);
    }
    return lit_;
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  literal lit_;
};

// One way of bounding the scaled sum: at_most(k) for 0 <= k < total returns
// a literal whose truth enforces sum <= k.
class bound_backend {
 public:
  virtual ~bound_backend() = default;
  virtual literal at_most(std::int64_t k) = 0;
  [[nodiscard]] std::uint64_t builds() const noexcept { return builds_; }
  [[nodiscard]] std::uint64_t extensions() const noexcept { return extensions_; }

 protected:
  bound_backend() = default;
  bound_backend(const bound_backend&) = default;
  bound_backend& operator=(const bound_backend&) = default;
  std::uint64_t builds_ = 0;      // structures built (more than one: rebuilt past a cut)
  std::uint64_t extensions_ = 0;  // cuts raised in place
};

template <class Sink>
class totalizer_bound final : public bound_backend {
 public:
  totalizer_bound(Sink& out, variable_pool& pool, const normalized_objective& goal)
      : out_(out), pool_(pool), goal_(goal) {}
  literal at_most(std::int64_t k) override {
    const auto j = static_cast<std::size_t>(k);
    // Only the upper side: "count >= j+1" forces output j, so ~output j forbids it.
    if (!tree_) {
      tree_.emplace(out_, pool_, goal_.literals, j + 1, sides::upper);
      builds_ = 1;
    } else if (j >= tree_->cut()) {
      tree_->extend(out_, pool_, j + 1);
      ++extensions_;
    }
    return tree_->outputs().at_most(j);
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  const normalized_objective& goal_;
  std::optional<totalizer> tree_;
};

// The sequential counter (weighted or not) over the objective, built anew
// with a higher cut when a bound beyond its cut is asked for: its registers
// depend on the cut, so it cannot be extended in place.
template <class Sink, bool Weighted>
class sequential_bound final : public bound_backend {
 public:
  sequential_bound(Sink& out, variable_pool& pool, const normalized_objective& goal)
      : out_(out), pool_(pool), goal_(goal) {}
  literal at_most(std::int64_t k) override {
    const auto j = static_cast<std::size_t>(k);
    if (j >= counter_.size()) {
      // Only the upper side: "sum >= j+1" forces output j, so ~output j forbids it.
      if constexpr (Weighted)
        counter_ = build_sequential_weight_counter(out_, pool_, goal_.literals, goal_.coefficients, k + 1,
                                                   sides::upper);
      else
        counter_ = build_sequential_counter(out_, pool_, goal_.literals, j + 1, sides::upper);
      ++builds_;
    }
    return counter_.at_most(j);
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  const normalized_objective& goal_;
  unary_outputs counter_;
};

template <class Sink>
class generalized_totalizer_bound final : public bound_backend {
 public:
  generalized_totalizer_bound(Sink& out, variable_pool& pool, const normalized_objective& goal)
      : out_(out), pool_(pool), goal_(goal) {}
  literal at_most(std::int64_t k) override {
    if (k >= root_.cap) {
      root_ = build_generalized_totalizer(out_, pool_, goal_.literals, goal_.coefficients, k + 1, sides::upper);
      ++builds_;
      // o_w' -> o_w for consecutive outputs w < w'. Sound on the upper side
      // alone (the outputs set to "sum >= w" satisfy every clause), and it
      // makes the negation of one output bound the sum.
      const literal* previous = nullptr;
      for (const auto& [value, lit] : root_.outputs) {
        if (previous != nullptr) emit(out_, ~lit, *previous);
        previous = &lit;
      }
    }
    // The smallest reachable sum above k exists: k < total and the cut is above k.
    const auto above = root_.outputs.upper_bound(k);
    CLAUSEWRIGHT_ASSERT(above != root_.outputs.end(), "the totalizer has an output above every bound below its cut");
    return ~above->second;
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  const normalized_objective& goal_;
  generalized_totalizer_outputs root_;  // cap 0: nothing built yet
};

template <class Sink>
class bdd_bound final : public bound_backend {
 public:
  bdd_bound(Sink& out, variable_pool& pool, const normalized_objective& goal, std::uint64_t node_budget,
            truth_literal<Sink>& truth)
      : builder_(out, pool, goal.literals, goal.coefficients, bdd_shape::at_most, false, node_budget), truth_(truth) {
    builds_ = 1;
  }
  literal at_most(std::int64_t k) override {
    // One-directional nodes: a node literal implies its function, so the
    // root literal enforces "sum <= k".
    const bdd_ref root = builder_.root(k);
    if (root.is_true()) return truth_.get();
    if (root.is_false()) return ~truth_.get();
    return builder_.literal_of(root);
  }

 private:
  bdd_builder<Sink> builder_;
  truth_literal<Sink>& truth_;
};

template <class Sink>
class adder_bound final : public bound_backend {
 public:
  adder_bound(Sink& out, variable_pool& pool, const normalized_objective& goal)
      : out_(out), pool_(pool), goal_(goal) {}
  literal at_most(std::int64_t k) override {
    if (builds_ == 0) {
      // The upper side: the bits count at least the weighted sum, which is
      // what "sum <= k" on the bits needs.
      sum_ = build_adder_network(out_, pool_, goal_.literals, goal_.coefficients, sides::upper);
      ++builds_;
    }
    const literal active = pool_.fresh();
    guarded_sink<Sink> guarded(out_, ~active);
    compare_binary_sum(guarded, sum_, relation::le, k);
    return active;
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  const normalized_objective& goal_;
  binary_sum sum_;
};

template <class Sink>
class reencode_bound final : public bound_backend {
 public:
  reencode_bound(Sink& out, variable_pool& pool, const normalized_objective& goal, const bound_settings& settings)
      : out_(out), pool_(pool), goal_(goal), settings_(settings) {
    for (std::size_t i = 0; i < goal.size(); ++i) terms_.push_back({goal.coefficients[i], goal.literals[i]});
  }
  literal at_most(std::int64_t k) override {
    const normalized_constraint c = normalize(terms_, relation::le, k);
    const method_id m = settings_.reencode_method ? *settings_.reencode_method
                        : (c.is_constant() || c.kind == constraint_kind::clause)
                            ? method_id::pairwise  // encode_with needs no method for these
                            : select_method(pool_, c, settings_.policy);
    const literal active = pool_.fresh();
    guarded_sink<Sink> guarded(out_, ~active);
    encode_with(m, guarded, pool_, c);
    ++builds_;
    return active;
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  const normalized_objective& goal_;
  bound_settings settings_;
  std::vector<term> terms_;
};

}  // namespace detail

// "objective <= value" as a literal, for any value, over one encoding of the
// objective. The literals it returns stay valid: assume any of them, or
// assert them as unit clauses, in any order.
template <class Sink>
class objective_bound {
  static_assert(check_clause_sink<Sink>());
  using counted_sink = tee_sink<Sink, counting_sink>;

 public:
  objective_bound(Sink& sink, variable_pool& pool, const objective& goal, bound_settings settings = {})
      : out_(sink, counts_), pool_(pool), goal_(normalize_objective(goal)), settings_(settings),
        truth_(out_, pool_) {
    method_ = settings.method;
    if (method_ == bound_method::automatic)
      method_ = goal_.unit_coefficients() ? bound_method::totalizer : bound_method::bdd;
    if ((method_ == bound_method::sequential_counter || method_ == bound_method::totalizer) &&
        !goal_.unit_coefficients())
      throw error(error_id::method_not_applicable, "the " + std::string(to_string(method_)) +
                                                       " bounds only objectives whose coefficients are all equal");
  }
  objective_bound(const objective_bound&) = delete;
  objective_bound& operator=(const objective_bound&) = delete;
  objective_bound(objective_bound&&) = delete;
  objective_bound& operator=(objective_bound&&) = delete;
  ~objective_bound() = default;

  // A literal whose truth enforces objective <= value (the constant true
  // literal when every solution satisfies it, its negation when none can).
  [[nodiscard]] literal at_most(std::int64_t value) {
    __extension__ using wide = __int128;
    const wide shifted = static_cast<wide>(value) - goal_.offset;
    wide k = shifted / goal_.scale;
    if (shifted % goal_.scale != 0 && shifted < 0) --k;  // floor
    if (k < 0) return ~truth_.get();
    if (k >= goal_.total) return truth_.get();
    const auto scaled = static_cast<std::int64_t>(k);
    if (const auto hit = cache_.find(scaled); hit != cache_.end()) return hit->second;
    const std::int32_t top_before = pool_.top();
    const literal l = backend_at_most(scaled);
    variables_ += static_cast<std::uint64_t>(pool_.top() - top_before);
    cache_.emplace(scaled, l);
    return l;
  }
  // Asserts objective <= value for good (a unit clause).
  void require_at_most(std::int64_t value) { emit(out_, at_most(value)); }

  [[nodiscard]] const normalized_objective& normalized() const noexcept { return goal_; }
  [[nodiscard]] std::int64_t lowest() const noexcept { return goal_.lowest(); }
  [[nodiscard]] std::int64_t highest() const noexcept { return goal_.highest(); }
  // The method in use: the automatic choice resolved, and adder after a BDD
  // over budget.
  [[nodiscard]] bound_method method() const noexcept { return method_; }
  // What the bounds have added so far (including the unit clauses asserted).
  [[nodiscard]] encoding_size size() const noexcept { return counts_.size(variables_); }
  // Structures built past the first: a bound beyond a cut (for reencode:
  // every bound past the first).
  [[nodiscard]] std::uint64_t rebuilds() const noexcept {
    const std::uint64_t b = backend_ ? backend_->builds() : 0;
    return b > 0 ? b - 1 : 0;
  }
  // Cuts raised in place (the totalizer) for a bound beyond the cut.
  [[nodiscard]] std::uint64_t extensions() const noexcept { return backend_ ? backend_->extensions() : 0; }

 private:
  literal backend_at_most(std::int64_t k) {
    if (!backend_) backend_ = make_backend(method_);
    if (method_ != bound_method::bdd || settings_.method == bound_method::bdd) return backend_->at_most(k);
    try {
      return backend_->at_most(k);
    } catch (const error& e) {
      if (e.id() != error_id::over_budget) throw;
      // Automatic choice: the adder network never explodes. The BDD's clauses
      // already added only constrain its own node literals.
      method_ = bound_method::adder;
      backend_ = make_backend(method_);
      return backend_->at_most(k);
    }
  }

  std::unique_ptr<detail::bound_backend> make_backend(bound_method m) {
    switch (m) {
      case bound_method::automatic:
      case bound_method::totalizer:
        return std::make_unique<detail::totalizer_bound<counted_sink>>(out_, pool_, goal_);
      case bound_method::sequential_counter:
        return std::make_unique<detail::sequential_bound<counted_sink, false>>(out_, pool_, goal_);
      case bound_method::generalized_totalizer:
        return std::make_unique<detail::generalized_totalizer_bound<counted_sink>>(out_, pool_, goal_);
      case bound_method::sequential_weight_counter:
        return std::make_unique<detail::sequential_bound<counted_sink, true>>(out_, pool_, goal_);
      case bound_method::bdd:
        return std::make_unique<detail::bdd_bound<counted_sink>>(out_, pool_, goal_, settings_.bdd_node_budget,
                                                                 truth_);
      case bound_method::adder: return std::make_unique<detail::adder_bound<counted_sink>>(out_, pool_, goal_);
      case bound_method::reencode:
        return std::make_unique<detail::reencode_bound<counted_sink>>(out_, pool_, goal_, settings_);
    }
    return nullptr;
  }

  counting_sink counts_;
  counted_sink out_;
  variable_pool& pool_;
  normalized_objective goal_;
  bound_settings settings_;
  bound_method method_;
  detail::truth_literal<counted_sink> truth_;
  std::unique_ptr<detail::bound_backend> backend_;
  std::map<std::int64_t, literal> cache_;  // scaled bound -> its literal
  std::uint64_t variables_ = 0;
};

// --- soft constraints -----------------------------------------------------

// Adds the constraint as a soft one: returns its relaxation literal r, with
// r -> constraint in the sink and `weight` * ~r in `cost`. A constraint that
// normalises to a single forced literal is its own relaxation literal (no
// clause, no variable). Weights are >= 0. The solver may leave r false
// while the constraint holds, so before the optimum a solution's objective
// can exceed the cost of its assignment (optimize_options::evaluate corrects
// that); at the optimum they agree.
template <class Sink>
literal add_soft(Sink& sink, variable_pool& pool, objective& cost, std::int64_t weight,
                 const normalized_constraint& c, std::optional<method_id> method = {},
                 const encoder_settings& settings = {}) {
  static_assert(check_clause_sink<Sink>());
  if (weight < 0)
    throw error(error_id::invalid_bound, "the weight of a soft constraint must not be negative (it is " +
                                             std::to_string(weight) + ")",
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
  const literal r = pool.fresh();
  guarded_sink<Sink> guarded(sink, ~r);
  const std::optional<method_id> m = method_for(pool, c, method, settings);
  encode_with(m.value_or(method_id::pairwise), guarded, pool, c, settings.options);
  cost.add(weight, ~r);
  return r;
}

template <class Sink>
literal add_soft(Sink& sink, variable_pool& pool, objective& cost, std::int64_t weight, std::span<const term> terms,
                 relation rel, std::int64_t bound, std::optional<method_id> method = {},
                 const encoder_settings& settings = {}, std::size_t index = 0, std::string name = {}) {
  return add_soft(sink, pool, cost, weight, normalize(terms, rel, bound, index, std::move(name)), method, settings);
}

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
  double seconds = 0;       // since the search began
  std::uint64_t solves = 0; // solver calls so far
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
  [[nodiscard]] double seconds() const {
    return std::chrono::duration<double>(solver_clock::now() - start_).count();
  }
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
    case solve_result::unsatisfiable: return run.finish(optimize_status::unsatisfiable);
    case solve_result::unknown: break;
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
    case solve_result::unsatisfiable: return done(optimize_status::unsatisfiable);
    case solve_result::unknown: return done(optimize_status::unknown);
    case solve_result::satisfiable: break;
  }
  std::int64_t best_sum = detail::take_solution(run, solver, goal, options);

  if (options.search == search_strategy::linear) {
    while (best_sum > 0) {
      const std::optional<literal> assumption = tighten(goal.value_of_sum(best_sum) - 1);
      switch (run.solve(assumption)) {
        case solve_result::unsatisfiable: return done(optimize_status::optimal);
        case solve_result::unknown: return done(optimize_status::satisfiable);
        case solve_result::satisfiable: break;
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
