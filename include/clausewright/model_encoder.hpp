// clausewright: the encoding of a whole model into any clause sink, through
// the constraint pipeline (pipeline.hpp).
//
// Readers that must not hold the whole model (a 2 GB OPB file) hand the
// constraints one at a time to a model_handler; model_encoder is the handler
// that streams them into a sink, and a model replays itself into any
// handler, so both paths share one encoding routine.
//
// Soft constraints and the objective follow the weighted MaxSAT reading:
//   - a soft constraint of weight w becomes a fresh relaxation literal r and
//     the constraint's clauses each extended by ~r (so r true forces the
//     constraint); its cost, w when r is false, goes to the sink as the
//     objective term w*~r (objective_sink) or as the soft unit clause (r) of
//     weight w (weighted_clause_sink);
//   - the objective goes term by term to an objective_sink; to a weighted
//     sink a*l (minimised) becomes the soft unit clause (~l) of weight a when
//     a > 0, and (l) of weight -a when a < 0, plus the constant a, so the cost
//     of an assignment is the objective value minus the offset.
// Sinks with neither (plain CNF) receive only the hard part.
//
// Which method encodes a constraint, first that applies:
//   1. a per-constraint rule (`--method NAME=METHOD`): the first rule whose
//      pattern (fnmatch, on the name, or on "#index" for unnamed
//      constraints) matches; an exact name whose method cannot encode the
//      constraint is an error, a glob passes over it;
//   2. the whole-model methods (`--method METHOD`, repeatable): the first
//      that can encode it;
//   3. the model's own choice for the constraint (an error when it cannot);
//   4. the selection policy's pick.
//
// At-most-one groups (groups.hpp): every hard at-most-one, exactly-one and
// cardinality <= 1 constraint is an at-most-one set; each linear or
// cardinality row (and the objective bound) gets its groups from the sets
// stated before it (a streamed model is read once, so a set counts from its
// place in the file on) and from model_encoding_settings::at_most_one_sets.
// A row with a group of two literals or more can be encoded by the group
// methods of the table; the sets themselves are encoded as any constraint,
// so the formula holds them, as those methods need. Soft sets do not count:
// the formula does not enforce them.
#pragma once

#include <fnmatch.h>

#include <array>
#include <cstdint>
#include <functional>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "constraint.hpp"
#include "error.hpp"
#include "groups.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "model.hpp"
#include "pipeline.hpp"
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"

namespace clausewright {

// A method for the constraints whose name matches a pattern.
struct method_rule {
  std::string pattern;  // fnmatch(3) pattern, or a plain name
  method_id method;
};

struct model_encoding_settings : choice_settings {
  // Per-constraint rules, tried in order (the tool's --method NAME=METHOD).
  std::vector<method_rule> method_rules;
  // The methods asked for (the tool's --method list): a constraint is encoded
  // with the first of them that can encode it, then with the model's own
  // choice for it, then by the policy.
  std::vector<method_id> methods;
  // Adds "objective <= bound" as a hard constraint.
  std::optional<std::int64_t> objective_bound;
  // Whether rows get their at-most-one groups (see the top of this file).
  bool find_groups = true;
  // At-most-one sets the caller vouches for beside the model's own: each
  // must hold in the formula (stated as constraints, or implied by them).
  std::vector<std::vector<literal>> at_most_one_sets = {};
};

// The model's at-most-one sets as they arrive, and the groups of each row.
class group_finder {
 public:
  explicit group_finder(const model_encoding_settings& s) : enabled_(s.find_groups) {
    for (const auto& set : s.at_most_one_sets) index_.add(set);
  }
  // Records `c` when it is a hard at-most-one set (`soft`: it is not), else
  // gives a linear or cardinality row its groups.
  void see(normalized_constraint& c, bool soft) {
    if (!enabled_) return;
    if (c.kind == constraint_kind::at_most_one || c.kind == constraint_kind::exactly_one) {
      if (!soft) index_.add(c.literals);
      return;
    }
    if (index_.size() != 0) assign_groups(c, index_);
  }

 private:
  bool enabled_;
  at_most_one_index index_;
};

// The clauses of product variable p = f1 & ... & fk, both directions:
// p -> fi for each i, and f1 & ... & fk -> p. Tseitin 1968.
template <class Sink>
void define_product(Sink& sink, literal p, std::span<const literal> factors, std::vector<literal>& scratch) {
  for (const literal f : factors) emit(sink, ~p, f);
  scratch.clear();
  scratch.push_back(p);
  for (const literal f : factors) scratch.push_back(~f);
  sink.add_clause(std::span<const literal>(scratch));
}

template <class Sink>
void emit_soft(Sink& sink, std::int64_t weight, literal l) {
  const std::array<literal, 1> unit{l};
  sink.add_soft_clause(weight, std::span<const literal>(unit));
}

// The cost `weight` of relaxation literal r being false, as the sink takes
// it (nothing into a sink that takes no costs).
template <class Sink>
void add_relaxation_cost(Sink& sink, std::int64_t weight, literal r) {
  if constexpr (objective_sink<Sink>)
    sink.add_objective_term(weight, ~r);
  else if constexpr (weighted_clause_sink<Sink>)
    emit_soft(sink, weight, r);
}

// Encodes one normalised constraint with `method` (none for constants and
// single clauses) through the pipeline; when `weight` > 0 as a soft
// constraint: a fresh relaxation literal r, every clause extended by ~r, and
// its cost. Into a sink that takes no costs a soft constraint writes nothing.
template <class Sink>
void encode_model_constraint(Sink& sink, variable_pool& pool, const normalized_constraint& c,
                             std::optional<method_id> method, std::int64_t weight, const choice_settings& settings,
                             const error_position& where) {
  if (weight <= 0) {
    encode_constraint(sink, pool, c, method, settings, where);
    return;
  }
  if constexpr (weighted_clause_sink<Sink> || objective_sink<Sink>) {
    const literal r = pool.fresh();
    const std::array<literal, 1> guard{~r};
    encode_constraint(sink, pool, c, method, settings, where, guard);
    add_relaxation_cost(sink, weight, r);
  }
}

template <class Sink>
void encode_model_constraint(Sink& sink, variable_pool& pool, const normalized_constraint& c,
                             std::optional<method_id> method, std::int64_t weight, const encode_options& options) {
  choice_settings s;
  s.options = options;
  s.clause_budget = std::numeric_limits<std::uint64_t>::max();
  encode_model_constraint(sink, pool, c, method, weight, s, c.where());
}

// Counts what encode_model_constraint writes, soft clauses too, within a
// clause budget.
class measuring_sink {
 public:
  explicit measuring_sink(std::uint64_t clause_limit) : budget_(clause_limit) {}
  void add_clause(std::span<const literal> clause) { budget_.add_clause(clause); }
  void add_soft_clause(std::int64_t /*weight*/, std::span<const literal> clause) {
    budget_.add_clause(clause);
    ++soft_;
  }
  [[nodiscard]] const counting_sink& counts() const noexcept { return budget_.counts(); }
  [[nodiscard]] std::uint64_t soft_clauses() const noexcept { return soft_; }

 private:
  budget_sink budget_;
  std::uint64_t soft_ = 0;
};

// The size of a constraint of size `hard` written as a soft one: one
// relaxation variable, each clause one literal longer, and the soft unit.
[[nodiscard]] constexpr encoding_size as_soft(const encoding_size& hard) noexcept {
  encoding_size s = hard;
  s.variables += 1;
  s.literals += hard.clauses + 1;
  s.clauses += 1;
  s.longest_clause = std::max<std::uint64_t>(hard.clauses != 0 ? hard.longest_clause + 1 : 0, 1);
  return s;
}

// Size of one constraint under one method as the model encoder writes it
// (as a soft constraint when weight > 0): the pipeline's measurement.
[[nodiscard]] inline method_measurement measure_model_constraint(method_id id, const variable_pool& pool,
                                                                 const normalized_constraint& c, std::int64_t weight,
                                                                 const encode_options& options,
                                                                 std::uint64_t clause_budget) {
  method_measurement m = measure(id, pool, c, options, clause_budget);
  if (weight > 0) m.size = as_soft(m.size);
  return m;
}

// Normalises a constraint as read, turning errors into ones naming its
// position in the file.
[[nodiscard]] inline normalized_constraint normalize_view(const constraint_view& v) {
  if ((v.form == constraint_form::at_most || v.form == constraint_form::at_least ||
       v.form == constraint_form::exactly) &&
      v.bound < 0)
    throw error(error_id::invalid_bound,
                "the bound " + std::to_string(v.bound) + " of a cardinality constraint is negative", v.where());
  try {
    return normalize(v.terms, v.rel, v.bound, v.index, std::string(v.name));
  } catch (const error& e) {
    throw error(e.id(), e.detail(), v.where());
  }
}

// The policy's picks, cached by shape (the pipeline's chooser).
using pick_cache = method_chooser;

namespace detail {
[[nodiscard]] inline bool is_glob(std::string_view pattern) noexcept {
  return pattern.find_first_of("*?[") != std::string_view::npos;
}
}  // namespace detail

// Whether a rule's pattern names constraint `v`.
[[nodiscard]] inline bool rule_matches(const method_rule& rule, const constraint_view& v) {
  const std::string label = v.label();
  return ::fnmatch(rule.pattern.c_str(), label.c_str(), 0) == 0;
}

// The method a constraint gets (see the top of this file); none for
// constants and single clauses.
[[nodiscard]] inline std::optional<method_id> choose_method(const constraint_view& v, const normalized_constraint& c,
                                                            const model_encoding_settings& s, const variable_pool& pool,
                                                            pick_cache* cache = nullptr) {
  if (!needs_method(c)) return std::nullopt;
  for (const method_rule& rule : s.method_rules) {
    if (!rule_matches(rule, v)) continue;
    if (can_encode(rule.method, c)) return rule.method;
    if (!detail::is_glob(rule.pattern))
      throw error(error_id::method_not_applicable,
                  "method " + std::string(info(rule.method).name) + " (asked for by --method " + rule.pattern + "=" +
                      std::string(info(rule.method).name) + ") cannot encode this " + std::string(to_string(c.kind)) +
                      " constraint",
                  v.where());
  }
  for (const method_id m : s.methods)
    if (can_encode(m, c)) return m;
  if (v.method) {
    if (!can_encode(*v.method, c))
      throw error(error_id::method_not_applicable,
                  "method " + std::string(info(*v.method).name) + " cannot encode this " +
                      std::string(to_string(c.kind)) + " constraint",
                  v.where());
    return v.method;
  }
  try {
    if (cache != nullptr) return cache->pick(pool, c, s);
    return select_method(pool, c, s.policy, s.options, s.clause_budget);
  } catch (const error& e) {
    throw error(e.id(), e.detail(), v.where());
  }
}

// What one constraint became.
struct constraint_outcome {
  std::size_t index = 0;
  std::string_view name;
  constraint_kind kind = constraint_kind::constant_true;
  std::optional<method_id> method;
  std::int64_t weight = 0;
  encoding_size size;  // everything it wrote, relaxation and soft unit included
};

// Totals of a finished encoding.
struct model_encoding_summary {
  std::uint64_t constraints = 0;    // constraints read (hard and soft)
  std::uint64_t hard_clauses = 0;   // clauses written as hard
  std::uint64_t soft_clauses = 0;   // soft clauses written (0 into a CNF sink)
  std::uint64_t literals = 0;       // literal occurrences over all clauses
  std::int32_t variables = 0;       // largest variable: the V of the header
  std::int32_t user_variables = 0;  // the model's variables
  std::uint64_t products = 0;       // product variables defined
  std::uint64_t skipped_soft = 0;   // soft constraints a CNF sink could not take
  wide_int soft_weight_sum = 0;     // sum of all soft weights written
  wide_int objective_offset = 0;    // cost = objective value - offset
};

// The model handler that streams every constraint into `Sink` as it arrives:
// it holds nothing per constraint but the pipeline's cache of picks.
template <class Sink>
class model_encoder final : public model_handler {
  static_assert(check_clause_sink<Sink>());
  static constexpr bool takes_costs = weighted_clause_sink<Sink> || objective_sink<Sink>;

 public:
  model_encoder(Sink& sink, variable_pool& pool, model_encoding_settings settings = {})
      : sink_(sink), pool_(pool), settings_(std::move(settings)), groups_(settings_) {}

  // Called after each constraint is written (comments, progress).
  std::function<void(const constraint_outcome&)> on_constraint;

  void begin(const model_header& header) override {
    pool_.reserve_user(header.variables);
    summary_.user_variables = header.variables;
    file_ = std::string(header.file);
  }

  literal product(std::span<const literal> factors) override {
    const literal p = pool_.fresh();
    define_product(*this, p, factors, scratch_);
    ++summary_.products;
    return p;
  }

  void objective(std::span<const term> terms, source_position where) override {
    objective_.assign(terms.begin(), terms.end());
    objective_position_ = where;
    has_objective_ = true;
    if constexpr (objective_sink<Sink>) {
      for (const term& t : terms)
        if (t.coefficient != 0) sink_.add_objective_term(t.coefficient, t.lit);
    } else if constexpr (weighted_clause_sink<Sink>) {
      for (const term& t : terms) {
        if (t.coefficient == 0) continue;
        if (t.coefficient == std::numeric_limits<std::int64_t>::min())
          throw error(error_id::overflow, "an objective coefficient overflows when negated", objective_where());
        const std::int64_t w = t.coefficient > 0 ? t.coefficient : -t.coefficient;
        if (t.coefficient < 0) summary_.objective_offset += t.coefficient;
        add_weight(w, objective_where());
        emit_soft(*this, w, t.coefficient > 0 ? ~t.lit : t.lit);
      }
    }
  }

  void constraint(const constraint_view& v) override {
    ++summary_.constraints;
    normalized_constraint c = normalize_view(v);
    groups_.see(c, v.soft());
    if (v.soft()) {
      if constexpr (!takes_costs) {
        ++summary_.skipped_soft;
        return;
      }
      add_weight(v.weight, v.where());
    }
    const std::optional<method_id> m = choose_method(v, c, settings_, pool_, &chooser_);
    write(c, m, v.weight, v.index, v.name, v.where());
  }

  void end() override {
    if (settings_.objective_bound) {
      if (!has_objective_) throw error(error_id::usage, "an objective bound was given, but the model has no objective");
      constraint_view v;
      v.terms = objective_;
      v.rel = relation::le;
      v.bound = *settings_.objective_bound;
      v.name = "objective-bound";
      v.index = summary_.constraints;
      v.position = objective_position_;
      v.file = file_;
      normalized_constraint c = normalize_view(v);
      groups_.see(c, false);
      const std::optional<method_id> m = choose_method(v, c, settings_, pool_, &chooser_);
      write(c, m, 0, v.index, v.name, v.where());
    }
    summary_.variables = pool_.top();
  }

  // Forwarding, so soft units and product clauses are counted too.
  void add_clause(std::span<const literal> clause) {
    hard_.add_clause(clause);
    current_.add_clause(clause);
    sink_.add_clause(clause);
  }
  void add_soft_clause(std::int64_t weight, std::span<const literal> clause) requires weighted_clause_sink<Sink> {
    soft_.add_clause(clause);
    current_.add_clause(clause);
    sink_.add_soft_clause(weight, clause);
  }
  void add_objective_term(std::int64_t coefficient, literal l) requires objective_sink<Sink> {
    sink_.add_objective_term(coefficient, l);
  }

  [[nodiscard]] model_encoding_summary summary() const {
    model_encoding_summary s = summary_;
    s.hard_clauses = hard_.clauses();
    s.soft_clauses = soft_.clauses();
    s.literals = hard_.literals() + soft_.literals();
    s.variables = pool_.top();
    return s;
  }
  [[nodiscard]] method_chooser& chooser() noexcept { return chooser_; }

 private:
  error_position objective_where() const {
    error_position p;
    p.file = file_;
    p.line = objective_position_.line;
    p.column = objective_position_.column;
    return p;
  }
  void add_weight(std::int64_t w, const error_position& where) {
    summary_.soft_weight_sum += w;
    // The older WCNF header needs a top weight above the sum of the soft
    // weights, still a 64-bit integer.
    if (summary_.soft_weight_sum >= static_cast<wide_int>(std::numeric_limits<std::int64_t>::max()))
      throw error(error_id::overflow, "the soft weights add up beyond the 64-bit range", where);
  }
  void write(const normalized_constraint& c, std::optional<method_id> m, std::int64_t weight, std::size_t index,
             std::string_view name, const error_position& where) {
    current_.reset();
    const std::int32_t top_before = pool_.top();
    encode_model_constraint(*this, pool_, c, m, weight, settings_, where);
    if (on_constraint) {
      constraint_outcome o;
      o.index = index;
      o.name = name;
      o.kind = c.kind;
      o.method = m;
      o.weight = weight;
      o.size = current_.size(static_cast<std::uint64_t>(pool_.top() - top_before));
      on_constraint(o);
    }
  }

  Sink& sink_;
  counting_sink hard_;
  counting_sink soft_;
  counting_sink current_;
  variable_pool& pool_;
  model_encoding_settings settings_;
  group_finder groups_;
  method_chooser chooser_;
  model_encoding_summary summary_;
  std::vector<literal> scratch_;
  std::vector<term> objective_;
  source_position objective_position_;
  bool has_objective_ = false;
  std::string file_;
};

// Encodes a whole model into `sink` (hard constraints, products, and with a
// sink that takes costs the soft constraints and the objective). `pool`
// should be fresh: the model's variables are reserved in it.
template <class Sink>
model_encoding_summary encode_model(const model& m, Sink& sink, variable_pool& pool,
                                    const model_encoding_settings& settings = {},
                                    const std::function<void(const constraint_outcome&)>& on_constraint = {}) {
  model_encoder<Sink> encoder(sink, pool, settings);
  encoder.on_constraint = on_constraint;
  m.replay(encoder);
  return encoder.summary();
}

}  // namespace clausewright
