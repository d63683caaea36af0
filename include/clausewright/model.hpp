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
// The encoding of a model into a sink is in model_encoder.hpp.
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

}  // namespace clausewright

// The encoding of models into sinks.
#include "model_encoder.hpp"  // IWYU pragma: export
