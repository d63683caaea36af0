// clausewright: a whole model (named variables, hard and soft constraints, an
// objective) and its encoding into any clause sink.
//
// A model is what the file readers produce and what the command-line tool
// encodes, checks and measures. It stores its constraints compactly: every
// term of every constraint lives in one flat array, constraint names in one
// flat string, so a model of millions of constraints costs a few machine words
// per constraint beyond its terms.
//
// Readers that must not hold the whole model (a 2 GB OPB file) hand the
// constraints one at a time to a model_handler instead; model_encoder is the
// handler that streams them into a sink, and a model replays itself into any
// handler, so both paths share one encoding routine.
//
// Soft constraints and the objective follow the weighted MaxSAT reading:
//   - a soft constraint of weight w becomes a fresh relaxation literal r, the
//     constraint's clauses each extended by ~r (so r true forces the
//     constraint), and the soft unit clause (r) of weight w;
//   - an objective term a*l (minimised) becomes the soft unit clause (~l) of
//     weight a when a > 0, and (l) of weight -a when a < 0, plus the constant
//     a, so the cost of an assignment is the objective value minus the offset.
// Sinks without add_soft_clause (plain CNF) receive only the hard part.
#pragma once

#include <algorithm>
#include <array>
#include <chrono>
#include <cstdint>
#include <functional>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <unordered_map>
#include <utility>
#include <vector>

#include "constraint.hpp"
#include "error.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"

namespace clausewright {

__extension__ using wide_int = __int128;

[[nodiscard]] inline std::string to_string(wide_int v) {
  if (v == 0) return "0";
  const bool negative = v < 0;
  __extension__ unsigned __int128 u =
      negative ? static_cast<unsigned __int128>(-(v + 1)) + 1 : static_cast<unsigned __int128>(v);
  std::string digits;
  while (u != 0) {
    digits.push_back(static_cast<char>('0' + static_cast<int>(u % 10)));
    u /= 10;
  }
  if (negative) digits.push_back('-');
  std::reverse(digits.begin(), digits.end());
  return digits;
}

// A line and column in a model file (1-based; 0 when unknown).
struct source_position {
  std::uint64_t line = 0;
  std::uint64_t column = 0;
};

// How the user wrote a constraint; kept for messages and statistics.
enum class constraint_form : std::uint8_t { linear, at_most_one, exactly_one, at_most, at_least, exactly, clause };

[[nodiscard]] constexpr std::string_view to_string(constraint_form f) noexcept {
  switch (f) {
    case constraint_form::linear: return "linear";
    case constraint_form::at_most_one: return "at-most-one";
    case constraint_form::exactly_one: return "exactly-one";
    case constraint_form::at_most: return "at-most";
    case constraint_form::at_least: return "at-least";
    case constraint_form::exactly: return "exactly";
    case constraint_form::clause: return "clause";
  }
  return "?";
}

// One constraint as read: a view into the reader's or the model's storage,
// valid until the next constraint is read.
struct constraint_view {
  std::span<const term> terms;
  relation rel = relation::le;
  std::int64_t bound = 0;
  std::int64_t weight = 0;  // 0: hard; > 0: soft, this is what violating it costs
  std::optional<method_id> method;  // the model's own choice for this constraint
  std::string_view name;            // may be empty
  constraint_form form = constraint_form::linear;
  source_position position;
  std::string_view file;  // for messages; may be empty
  std::size_t index = 0;  // 0-based, in file order (the objective is not counted)

  [[nodiscard]] bool soft() const noexcept { return weight > 0; }
  // The name, or "#index" for unnamed constraints.
  [[nodiscard]] std::string label() const {
    if (!name.empty()) return std::string(name);
    std::string label = "#";
    label += std::to_string(index);
    return label;
  }
  [[nodiscard]] error_position where() const {
    error_position p = at_constraint(index, std::string(name));
    p.file = std::string(file);
    p.line = position.line;
    p.column = position.column;
    return p;
  }
};

// What a reader tells a handler, in this order: begin once, then products,
// the objective and constraints interleaved as they appear, then end.
struct model_header {
  std::int32_t variables = 0;              // user variables 1..variables
  std::optional<std::uint64_t> constraints;  // when the file states it (for progress)
  std::string_view file;
  // Names of the user variables; empty: variable v is called "x<v>".
  std::function<std::string(std::int32_t)> name_of;
};

class model_handler {
 public:
  virtual ~model_handler() = default;
  virtual void begin(const model_header& header) = 0;
  // A product of literals first seen; returns the literal standing for it.
  // Factors are distinct user literals, at least two.
  virtual literal product(std::span<const literal> factors) = 0;
  virtual void objective(std::span<const term> terms, source_position where) = 0;
  virtual void constraint(const constraint_view& c) = 0;
  virtual void end() {}

 protected:
  model_handler() = default;
  model_handler(const model_handler&) = default;
  model_handler& operator=(const model_handler&) = default;
};

// A constraint that does not hold under an assignment.
struct violation {
  std::size_t index = 0;
  std::string label;  // name or #index
  source_position position;
  std::int64_t weight = 0;  // 0 for hard constraints
  wide_int left_side = 0;   // the value of the sum under the assignment
  relation rel = relation::le;
  std::int64_t bound = 0;

  [[nodiscard]] bool soft() const noexcept { return weight > 0; }
};

// Everything about a constraint but its terms, for add_constraint.
struct constraint_settings {
  std::int64_t weight = 0;
  std::optional<method_id> method;
  std::string_view name;
  constraint_form form = constraint_form::linear;
  source_position position;
};

class model {
 public:
  model() = default;

  // --- variables ------------------------------------------------------------
  // The variable of `name`, added (numbered next) when new.
  literal variable(std::string_view name) {
    if (auto found = find_variable(name)) return *found;
    require_no_products("variable " + std::string(name));
    if (variables_ >= max_variable)
      throw error(error_id::overflow, "more than " + std::to_string(max_variable) + " variables");
    const auto [it, inserted] = by_name_.emplace(std::string(name), variables_ + 1);
    (void)inserted;
    names_.resize(static_cast<std::size_t>(variables_), nullptr);
    names_.push_back(&it->first);
    ++variables_;
    return literal(variables_);
  }
  [[nodiscard]] std::optional<literal> find_variable(std::string_view name) const {
    const auto it = by_name_.find(name);
    if (it == by_name_.end()) return std::nullopt;
    return literal(it->second);
  }
  // Makes 1..n user variables (unnamed ones are called x<v>, as in OPB).
  void reserve_variables(std::int32_t n) {
    if (n <= variables_) return;
    if (n > max_variable) throw error(error_id::overflow, "more than " + std::to_string(max_variable) + " variables");
    require_no_products("variables up to " + std::to_string(n));
    variables_ = n;
  }
  [[nodiscard]] std::int32_t variables() const noexcept { return variables_; }
  // User variables plus product variables.
  [[nodiscard]] std::int32_t top() const noexcept {
    return variables_ + static_cast<std::int32_t>(products_.size());
  }
  [[nodiscard]] std::string name_of(std::int32_t v) const {
    const auto i = static_cast<std::size_t>(v - 1);
    if (v >= 1 && i < names_.size() && names_[i] != nullptr) return *names_[i];
    // Appended, not "x" + to_string(v): g++ 12 warns falsely (-Wrestrict) on that.
    std::string name = v > variables_ ? "product" : "x";
    name += std::to_string(v > variables_ ? v - variables_ : v);
    return name;
  }
  [[nodiscard]] bool has_names() const noexcept { return !by_name_.empty(); }

  // --- products of literals (the non-linear part of OPB) ----------------------
  // A fresh variable after the user variables standing for the conjunction
  // of `factors` (user literals).
  literal add_product(std::span<const literal> factors) {
    for (const literal f : factors) require_user(f, error_position{});
    if (top() >= max_variable) throw error(error_id::overflow, "more than " + std::to_string(max_variable) + " variables");
    products_.push_back({factors_.size(), static_cast<std::uint32_t>(factors.size())});
    factors_.insert(factors_.end(), factors.begin(), factors.end());
    return literal(top());
  }
  [[nodiscard]] std::size_t products() const noexcept { return products_.size(); }
  // Factors of product variable variables() + 1 + i.
  [[nodiscard]] std::span<const literal> product_factors(std::size_t i) const {
    return {factors_.data() + products_[i].first, products_[i].count};
  }

  // --- constraints --------------------------------------------------------------
  std::size_t add_constraint(std::span<const term> terms, relation rel, std::int64_t bound,
                             const constraint_settings& s = {}) {
    const std::size_t index = records_.size();
    if (s.weight < 0)
      throw error(error_id::invalid_bound, "the weight of a soft constraint must be positive",
                  at_constraint(index, std::string(s.name)));
    for (const term& t : terms) require_known(t.lit, at_constraint(index, std::string(s.name)));
    record r;
    r.first_term = terms_.size();
    r.term_count = terms.size();
    r.bound = bound;
    r.weight = s.weight;
    r.name_first = constraint_names_.size();
    r.name_length = static_cast<std::uint32_t>(s.name.size());
    r.line = s.position.line;
    r.column = static_cast<std::uint32_t>(std::min<std::uint64_t>(s.position.column, UINT32_MAX));
    r.rel = rel;
    r.form = s.form;
    r.method = s.method ? static_cast<std::uint8_t>(*s.method) : no_method;
    terms_.insert(terms_.end(), terms.begin(), terms.end());
    constraint_names_.append(s.name);
    records_.push_back(r);
    if (r.weight > 0) ++soft_;
    return index;
  }
  [[nodiscard]] std::size_t constraints() const noexcept { return records_.size(); }
  [[nodiscard]] std::size_t soft_constraints() const noexcept { return soft_; }
  [[nodiscard]] std::size_t hard_constraints() const noexcept { return records_.size() - soft_; }
  [[nodiscard]] constraint_view constraint(std::size_t i) const {
    const record& r = records_.at(i);
    constraint_view v;
    v.terms = std::span<const term>(terms_.data() + r.first_term, r.term_count);
    v.rel = r.rel;
    v.bound = r.bound;
    v.weight = r.weight;
    if (r.method != no_method) v.method = static_cast<method_id>(r.method);
    v.name = std::string_view(constraint_names_).substr(r.name_first, r.name_length);
    v.form = r.form;
    v.position = {r.line, r.column};
    v.file = file_;
    v.index = i;
    return v;
  }

  // --- the objective (minimised) ---------------------------------------------------
  void set_objective(std::span<const term> terms, source_position where = {}) {
    for (const term& t : terms) require_known(t.lit, {});
    objective_.assign(terms.begin(), terms.end());
    objective_position_ = where;
    has_objective_ = true;
  }
  [[nodiscard]] bool has_objective() const noexcept { return has_objective_; }
  [[nodiscard]] std::span<const term> objective() const noexcept { return objective_; }
  [[nodiscard]] source_position objective_position() const noexcept { return objective_position_; }

  // The file the model came from, for messages.
  void set_file(std::string file) { file_ = std::move(file); }
  [[nodiscard]] const std::string& file() const noexcept { return file_; }

  // --- evaluation ------------------------------------------------------------------------
  // `value(v)` gives the truth of user variable v (1..variables()); products
  // are evaluated from their factors. Every violated constraint is listed, in
  // order, hard and soft alike (soft ones carry their weight).
  template <class ValueOf>
  [[nodiscard]] std::vector<violation> check(const ValueOf& value) const {
    std::vector<violation> out;
    const auto truth = truth_function(value);
    for (std::size_t i = 0; i < records_.size(); ++i) {
      const constraint_view c = constraint(i);
      const wide_int sum = left_side(c.terms, truth);
      bool ok = false;
      switch (c.rel) {
        case relation::le: ok = sum <= c.bound; break;
        case relation::ge: ok = sum >= c.bound; break;
        case relation::eq: ok = sum == c.bound; break;
      }
      if (!ok) out.push_back({i, c.label(), c.position, c.weight, sum, c.rel, c.bound});
    }
    return out;
  }
  template <class ValueOf>
  [[nodiscard]] wide_int objective_value(const ValueOf& value) const {
    return left_side(objective_, truth_function(value));
  }

  // --- streaming ----------------------------------------------------------------------------
  // Hands the model to a handler as a reader would: products first (so a
  // handler numbering them from variables() + 1 gets the model's numbers),
  // then the objective, then the constraints.
  void replay(model_handler& handler) const {
    model_header h;
    h.variables = variables_;
    h.constraints = records_.size();
    h.file = file_;
    if (has_names()) h.name_of = [this](std::int32_t v) { return name_of(v); };
    handler.begin(h);
    for (std::size_t i = 0; i < products_.size(); ++i) {
      const literal got = handler.product(product_factors(i));
      if (got.var() != variables_ + 1 + static_cast<std::int32_t>(i))
        throw error(error_id::usage, "a model handler numbered a product out of order");
    }
    if (has_objective_) handler.objective(objective_, objective_position_);
    for (std::size_t i = 0; i < records_.size(); ++i) handler.constraint(constraint(i));
    handler.end();
  }

 private:
  static constexpr std::uint8_t no_method = 0xFF;
  struct record {
    std::uint64_t first_term = 0;
    std::uint64_t term_count = 0;
    std::int64_t bound = 0;
    std::int64_t weight = 0;
    std::uint64_t name_first = 0;
    std::uint64_t line = 0;
    std::uint32_t name_length = 0;
    std::uint32_t column = 0;
    relation rel = relation::le;
    constraint_form form = constraint_form::linear;
    std::uint8_t method = no_method;
  };
  struct product_record {
    std::size_t first;
    std::uint32_t count;
  };
  struct name_hash {
    using is_transparent = void;
    std::size_t operator()(std::string_view s) const noexcept { return std::hash<std::string_view>{}(s); }
  };

  void require_no_products(const std::string& what) const {
    if (!products_.empty())
      throw error(error_id::usage, what + " added after product variables: user variables come first");
  }
  void require_user(literal l, const error_position& where) const {
    if (!l.valid() || l.var() > variables_)
      throw error(error_id::invalid_literal,
                  "literal " + std::to_string(l.dimacs()) + " is not one of the " + std::to_string(variables_) +
                      " user variables",
                  where);
  }
  void require_known(literal l, const error_position& where) const {
    if (!l.valid() || l.var() > top())
      throw error(error_id::invalid_literal,
                  "literal " + std::to_string(l.dimacs()) + " is not a variable of the model (it has " +
                      std::to_string(top()) + ")",
                  where);
  }

  template <class ValueOf>
  [[nodiscard]] auto truth_function(const ValueOf& value) const {
    return [this, &value](literal l) {
      bool v = false;
      if (l.var() <= variables_) {
        v = static_cast<bool>(value(l.var()));
      } else {
        v = true;
        for (const literal f : product_factors(static_cast<std::size_t>(l.var() - variables_ - 1))) {
          const bool fv = static_cast<bool>(value(f.var()));
          if (!(f.negative() ? !fv : fv)) {
            v = false;
            break;
          }
        }
      }
      return l.negative() ? !v : v;
    };
  }
  template <class Truth>
  [[nodiscard]] static wide_int left_side(std::span<const term> terms, const Truth& truth) {
    wide_int sum = 0;
    for (const term& t : terms)
      if (truth(t.lit)) sum += t.coefficient;
    return sum;
  }

  std::int32_t variables_ = 0;
  std::unordered_map<std::string, std::int32_t, name_hash, std::equal_to<>> by_name_;
  std::vector<const std::string*> names_;  // by variable - 1; map nodes do not move
  std::vector<product_record> products_;
  std::vector<literal> factors_;
  std::vector<record> records_;
  std::vector<term> terms_;
  std::string constraint_names_;
  std::vector<term> objective_;
  source_position objective_position_;
  bool has_objective_ = false;
  std::size_t soft_ = 0;
  std::string file_;
};

// --- encoding ----------------------------------------------------------------------------

// A sink that also takes weighted soft clauses (a WCNF writer).
template <class S>
concept weighted_clause_sink = clause_sink<S> && requires(S& sink, std::int64_t w, std::span<const literal> c) {
  { sink.add_soft_clause(w, c) };
};

struct model_encoding_settings {
  selection_policy policy = selection_policy::balanced;
  // The methods asked for (the tool's --method list): a constraint is encoded
  // with the first of them that can encode it, then with the model's own
  // choice for it, then by the policy.
  std::vector<method_id> methods;
  encode_options options;
  std::uint64_t clause_budget = default_clause_budget;
  // Adds "objective <= bound" as a hard constraint.
  std::optional<std::int64_t> objective_bound;
};

// Counts what passes through to another sink.
template <class Sink>
class counted_sink {
 public:
  explicit counted_sink(Sink& inner) : inner_(inner) {}
  void add_clause(std::span<const literal> clause) {
    counts_.add_clause(clause);
    inner_.add_clause(clause);
  }
  [[nodiscard]] const counting_sink& counts() const noexcept { return counts_; }

 private:
  Sink& inner_;
  counting_sink counts_;
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

// Encodes one normalised constraint with `method` (ignored for constants and
// single clauses); when `weight` > 0 as a soft constraint: a fresh
// relaxation literal r, every clause extended by ~r, and the soft unit (r).
// Into a sink without soft clauses a soft constraint writes nothing.
template <class Sink>
void encode_model_constraint(Sink& sink, variable_pool& pool, const normalized_constraint& c, method_id method,
                             std::int64_t weight, const encode_options& options) {
  if (weight <= 0) {
    encode_with(method, sink, pool, c, options);
    return;
  }
  if constexpr (weighted_clause_sink<Sink>) {
    const literal r = pool.fresh();
    {
      guarded_sink<Sink> guarded(sink, ~r);
      encode_with(method, guarded, pool, c, options);
    }
    emit_soft(sink, weight, r);
  }
}

// Measures what encode_model_constraint writes (exactly, by a dry run into a
// counting sink that also counts soft clauses), with a clause budget.
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

// Size of one constraint under one method as the encoder would write it
// (as a soft constraint when weight > 0).
[[nodiscard]] inline method_measurement measure_model_constraint(method_id id, const variable_pool& pool,
                                                                 const normalized_constraint& c, std::int64_t weight,
                                                                 const encode_options& options,
                                                                 std::uint64_t clause_budget) {
  method_measurement m{id, {}, false, 0};
  variable_pool scratch = pool;
  measuring_sink sink(clause_budget);
  const auto start = std::chrono::steady_clock::now();
  try {
    encode_model_constraint(sink, scratch, c, id, weight, options);
  } catch (const error& e) {
    if (e.id() != error_id::over_budget) throw;
    m.over_budget = true;
  }
  m.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  m.size = sink.counts().size(static_cast<std::uint64_t>(scratch.top() - pool.top()));
  return m;
}

// Normalises a constraint as read, turning errors into ones naming its
// position in the file.
[[nodiscard]] inline normalized_constraint normalize_view(const constraint_view& v) {
  if ((v.form == constraint_form::at_most || v.form == constraint_form::at_least ||
       v.form == constraint_form::exactly) &&
      v.bound < 0)
    throw error(error_id::invalid_bound, "the bound " + std::to_string(v.bound) + " of a cardinality constraint is negative",
                v.where());
  try {
    return normalize(v.terms, v.rel, v.bound, v.index, std::string(v.name));
  } catch (const error& e) {
    throw error(e.id(), e.detail(), v.where());
  }
}

// Remembers the policy's choice per shape of constraint (relation, bound,
// coefficients in order) and settings: sizes depend on nothing else, and models repeat
// shapes (one exactly-one per item, one capacity per bin), so the dry runs
// are made once per shape.
class pick_cache {
 public:
  [[nodiscard]] method_id pick(const variable_pool& pool, const normalized_constraint& c,
                               const model_encoding_settings& s) {
    key_.clear();
    key_.push_back(static_cast<std::int64_t>(s.policy));
    key_.push_back(s.options.full_equivalence ? 1 : 0);
    key_.push_back(static_cast<std::int64_t>(s.clause_budget));
    key_.push_back(static_cast<std::int64_t>(c.kind));
    key_.push_back(static_cast<std::int64_t>(c.rel));
    key_.push_back(c.bound);
    key_.push_back(static_cast<std::int64_t>(c.size()));
    if (!c.unit_coefficients()) key_.insert(key_.end(), c.coefficients.begin(), c.coefficients.end());
    if (const auto it = cache_.find(key_); it != cache_.end()) return it->second;
    const method_id m = select_method(pool, c, s.policy, s.options, s.clause_budget);
    if (key_.size() > max_held) return m;
    if (cache_.size() >= max_entries || held_ + key_.size() > max_held) {
      cache_.clear();
      held_ = 0;
    }
    cache_.emplace(key_, m);
    held_ += key_.size();
    return m;
  }

 private:
  // Bounds on what the cache holds: entries, and key words over all entries.
  static constexpr std::size_t max_entries = 4096;
  static constexpr std::size_t max_held = std::size_t{1} << 20;
  struct key_hash {
    std::size_t operator()(const std::vector<std::int64_t>& k) const noexcept {
      std::uint64_t h = 1469598103934665603ULL;
      for (const auto x : k) h = (h ^ static_cast<std::uint64_t>(x)) * 1099511628211ULL;
      return static_cast<std::size_t>(h);
    }
  };
  std::vector<std::int64_t> key_;
  std::unordered_map<std::vector<std::int64_t>, method_id, key_hash> cache_;
  std::size_t held_ = 0;
};

// The method a constraint gets: none for constants and single clauses; else
// the first of the asked-for methods that can encode it, else the model's own
// choice (an error when that one cannot encode it), else the policy's pick.
[[nodiscard]] inline std::optional<method_id> choose_method(const constraint_view& v, const normalized_constraint& c,
                                                            const model_encoding_settings& s,
                                                            const variable_pool& pool, pick_cache* cache = nullptr) {
  if (c.is_constant() || c.kind == constraint_kind::clause) return std::nullopt;
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
  std::uint64_t constraints = 0;     // constraints read (hard and soft)
  std::uint64_t hard_clauses = 0;    // clauses written as hard
  std::uint64_t soft_clauses = 0;    // soft clauses written (0 into a CNF sink)
  std::uint64_t literals = 0;        // literal occurrences over all clauses
  std::int32_t variables = 0;        // largest variable: the V of the header
  std::int32_t user_variables = 0;   // the model's variables
  std::uint64_t products = 0;        // product variables defined
  std::uint64_t skipped_soft = 0;    // soft constraints a CNF sink could not take
  wide_int soft_weight_sum = 0;      // sum of all soft weights written
  wide_int objective_offset = 0;     // cost = objective value - offset
};

// The model handler that streams every constraint into `Sink` as it arrives:
// it holds nothing per constraint but a cache of picks by shape.
template <class Sink>
class model_encoder final : public model_handler {
  static_assert(check_clause_sink<Sink>());

 public:
  model_encoder(Sink& sink, variable_pool& pool, model_encoding_settings settings = {})
      : sink_(sink), pool_(pool), settings_(std::move(settings)) {}

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
    if constexpr (weighted_clause_sink<Sink>) {
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
    const normalized_constraint c = normalize_view(v);
    if (v.soft()) {
      if constexpr (!weighted_clause_sink<Sink>) {
        ++summary_.skipped_soft;
        return;
      }
      add_weight(v.weight, v.where());
    }
    const std::optional<method_id> m = choose_method(v, c, settings_, pool_, &cache_);
    write(c, m, v.weight, v.index, v.name);
  }

  void end() override {
    if (settings_.objective_bound) {
      if (!has_objective_)
        throw error(error_id::usage, "an objective bound was given, but the model has no objective");
      constraint_view v;
      v.terms = objective_;
      v.rel = relation::le;
      v.bound = *settings_.objective_bound;
      v.name = "objective-bound";
      v.index = summary_.constraints;
      v.position = objective_position_;
      v.file = file_;
      const normalized_constraint c = normalize_view(v);
      const std::optional<method_id> m = choose_method(v, c, settings_, pool_, &cache_);
      write(c, m, 0, v.index, v.name);
    }
    summary_.variables = pool_.top();
  }

  // Forwarding, so soft units and product clauses are counted too.
  void add_clause(std::span<const literal> clause) {
    hard_.add_clause(clause);
    current_.add_clause(clause);
    sink_.add_clause(clause);
  }
  void add_soft_clause(std::int64_t weight, std::span<const literal> clause)
    requires weighted_clause_sink<Sink>
  {
    soft_.add_clause(clause);
    current_.add_clause(clause);
    sink_.add_soft_clause(weight, clause);
  }

  [[nodiscard]] model_encoding_summary summary() const {
    model_encoding_summary s = summary_;
    s.hard_clauses = hard_.clauses();
    s.soft_clauses = soft_.clauses();
    s.literals = hard_.literals() + soft_.literals();
    s.variables = pool_.top();
    return s;
  }

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
             std::string_view name) {
    current_.reset();
    const std::int32_t top_before = pool_.top();
    encode_model_constraint(*this, pool_, c, m.value_or(method_id::pairwise), weight, settings_.options);
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
  pick_cache cache_;
  model_encoding_summary summary_;
  std::vector<literal> scratch_;
  std::vector<term> objective_;
  source_position objective_position_;
  bool has_objective_ = false;
  std::string file_;
};

// Encodes a whole model into `sink` (hard constraints, products, and with a
// weighted sink the soft constraints and the objective). `pool` should be
// fresh: the model's variables are reserved in it.
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
