// clausewright: bounds on an objective that tighten between solver calls.
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
//     objective, and the baseline the others are tested against); with
//     at-most-one sets given (bound_settings::at_most_one_sets) the group
//     methods apply too.
// The counters and the generalized totalizer keep outputs only up to a cut
// (the first bound asked for, plus one); a later bound beyond the cut builds
// a new structure with the larger cut (counted in rebuilds()), where the
// totalizer only adds the missing outputs.
//
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
#include <utility>
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
#include "groups.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "pipeline.hpp"
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"
#include "solver.hpp"

#include "objective.hpp"

namespace clausewright {

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
    case bound_method::automatic:
      return "automatic";
    case bound_method::totalizer:
      return "totalizer";
    case bound_method::sequential_counter:
      return "sequential-counter";
    case bound_method::generalized_totalizer:
      return "generalized-totalizer";
    case bound_method::sequential_weight_counter:
      return "sequential-weight-counter";
    case bound_method::bdd:
      return "bdd";
    case bound_method::adder:
      return "adder";
    case bound_method::reencode:
      return "reencode";
  }
  return "?";
}

inline constexpr std::array all_bound_methods{bound_method::automatic,
                                              bound_method::totalizer,
                                              bound_method::sequential_counter,
                                              bound_method::generalized_totalizer,
                                              bound_method::sequential_weight_counter,
                                              bound_method::bdd,
                                              bound_method::adder,
                                              bound_method::reencode};

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
  selection_policy policy = default_policy;
  std::uint64_t bdd_node_budget = default_bdd_node_budget;
  // For `reencode`: at-most-one sets that hold in the formula (an assignment
  // cost objective has one exactly-one per task): each bound gets its groups
  // from them, so the group methods of the table apply (groups.hpp).
  std::vector<std::vector<literal>> at_most_one_sets = {};
};

// Thrown out of a bound's construction when its interrupt check (see
// objective_bound::set_interrupt) says stop; the optimiser catches it.
struct bound_interrupted {};

namespace detail {

// Counts what the bounds add and, every 1024 clauses, asks whether to stop:
// a large bound (a BDD of a million nodes) can take seconds to build.
class watched_counter {
 public:
  void add_clause(std::span<const literal> clause) {
    counts_.add_clause(clause);
    if (interrupted_ && (counts_.clauses() & 1023U) == 0 && interrupted_()) throw bound_interrupted{};
  }
  [[nodiscard]] encoding_size size(std::uint64_t variables) const noexcept { return counts_.size(variables); }
  void set_interrupt(std::function<bool()> check) { interrupted_ = std::move(check); }

 private:
  counting_sink counts_;
  std::function<bool()> interrupted_;
};

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
        counter_ =
            build_sequential_weight_counter(out_, pool_, goal_.literals, goal_.coefficients, k + 1, sides::upper);
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
  adder_bound(Sink& out, variable_pool& pool, const normalized_objective& goal) : out_(out), pool_(pool), goal_(goal) {}
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
      : out_(out), pool_(pool), goal_(goal), settings_(settings), sets_(settings.at_most_one_sets) {
    for (std::size_t i = 0; i < goal.size(); ++i) terms_.push_back({goal.coefficients[i], goal.literals[i]});
  }
  literal at_most(std::int64_t k) override {
    normalized_constraint c = normalize(terms_, relation::le, k);
    if (sets_.size() != 0) assign_groups(c, sets_);
    choice_settings s;
    s.policy = settings_.policy;
    const std::optional<method_id> m = chooser_.choose(pool_, c, settings_.reencode_method, s);
    const literal active = pool_.fresh();
    const std::array<literal, 1> guard{~active};
    encode_constraint(out_, pool_, c, m, s, c.where(), guard);
    ++builds_;
    return active;
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  const normalized_objective& goal_;
  bound_settings settings_;
  at_most_one_index sets_;
  std::vector<term> terms_;
  method_chooser chooser_;
};

}  // namespace detail

// "objective <= value" as a literal, for any value, over one encoding of the
// objective. The literals it returns stay valid: assume any of them, or
// assert them as unit clauses, in any order.
template <class Sink>
class objective_bound {
  static_assert(check_clause_sink<Sink>());
  using counted_sink = tee_sink<Sink, detail::watched_counter>;

 public:
  objective_bound(Sink& sink, variable_pool& pool, const objective& goal, bound_settings settings = {})
      : out_(sink, counts_),
        pool_(pool),
        goal_(normalize_objective(goal)),
        settings_(std::move(settings)),
        truth_(out_, pool_) {
    method_ = settings_.method;
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
  // While set, building a bound calls `check` every 1024 clauses and throws
  // bound_interrupted when it answers true. The clauses already added only
  // define the bound's own auxiliary variables; the interrupted structure
  // must not be asked for bounds again (the optimiser ends its search).
  void set_interrupt(std::function<bool()> check) { counts_.set_interrupt(std::move(check)); }
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
      // A diagram whose nodes are known to pass the budget (bdd.hpp's exact
      // count on sampled levels) is not started: building it up to the
      // budget took seconds on a 200-item objective, and its clauses stay.
      std::vector<term> terms;
      terms.reserve(goal_.size());
      for (std::size_t i = 0; i < goal_.size(); ++i) terms.push_back({goal_.coefficients[i], goal_.literals[i]});
      if (bdd_clause_lower_bound(normalize(terms, relation::le, k), {}, settings_.bdd_node_budget) >
          settings_.bdd_node_budget)
        throw error(error_id::over_budget, "the objective's BDD would pass its node budget");
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
        return std::make_unique<detail::bdd_bound<counted_sink>>(out_, pool_, goal_, settings_.bdd_node_budget, truth_);
      case bound_method::adder:
        return std::make_unique<detail::adder_bound<counted_sink>>(out_, pool_, goal_);
      case bound_method::reencode:
        return std::make_unique<detail::reencode_bound<counted_sink>>(out_, pool_, goal_, settings_);
    }
    return nullptr;
  }

  detail::watched_counter counts_;
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

}  // namespace clausewright
