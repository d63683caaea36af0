// clausewright: the front end that takes constraints and streams their clauses.
//
// An encoder normalises each constraint as it is added and hands it to the
// constraint pipeline (pipeline.hpp): the method asked for, or the selection
// policy's pick (cached by the shape of the constraint), written straight
// into the sink within the clause budget. It keeps nothing per constraint
// but the cache of picks, so memory stays bounded by the largest single
// constraint however many are added.
#pragma once

#include <cstdint>
#include <initializer_list>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "constraint.hpp"
#include "groups.hpp"
#include "methods.hpp"
#include "pipeline.hpp"
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"

namespace clausewright {

// What one added constraint became.
struct encoded_constraint {
  std::size_t index = 0;
  constraint_kind kind = constraint_kind::constant_true;
  std::optional<method_id> method;  // empty for constants and single clauses
  encoding_size size;               // clauses and auxiliary variables it added
};

struct encoder_settings : choice_settings {};

template <class Sink>
class encoder {
  static_assert(check_clause_sink<Sink>());

 public:
  encoder(Sink& sink, variable_pool& pool, encoder_settings settings = {})
      : sink_(sink), pool_(pool), settings_(settings) {}

  // --- cardinality front doors -------------------------------------------
  encoded_constraint at_most_one(std::span<const literal> lits, std::optional<method_id> m = {}) {
    return add(normalize_cardinality(lits, relation::le, 1, next_), m);
  }
  encoded_constraint exactly_one(std::span<const literal> lits, std::optional<method_id> m = {}) {
    require_literals(lits, "exactly-one");
    return add(normalize_cardinality(lits, relation::eq, 1, next_), m);
  }
  encoded_constraint at_most(std::span<const literal> lits, std::int64_t k, std::optional<method_id> m = {}) {
    return add(normalize_cardinality(lits, relation::le, k, next_), m);
  }
  encoded_constraint at_least(std::span<const literal> lits, std::int64_t k, std::optional<method_id> m = {}) {
    return add(normalize_cardinality(lits, relation::ge, k, next_), m);
  }
  encoded_constraint exactly(std::span<const literal> lits, std::int64_t k, std::optional<method_id> m = {}) {
    return add(normalize_cardinality(lits, relation::eq, k, next_), m);
  }
  encoded_constraint at_least_one(std::span<const literal> lits) {
    require_literals(lits, "at-least-one");
    return add(normalize_cardinality(lits, relation::ge, 1, next_), {});
  }
  // --- linear -------------------------------------------------------------
  encoded_constraint linear(std::span<const term> terms, relation rel, std::int64_t bound,
                            std::optional<method_id> m = {}) {
    return add(normalize(terms, rel, bound, next_), m);
  }
  encoded_constraint linear(std::initializer_list<term> terms, relation rel, std::int64_t bound,
                            std::optional<method_id> m = {}) {
    return linear(std::span<const term>(terms.begin(), terms.size()), rel, bound, m);
  }
  // A row stated with its at-most-one groups: the terms of each group, at
  // most one of whose literals the caller guarantees true (state that as a
  // constraint too: the group methods rely on it). The group methods of the
  // table apply to it, and the policy weighs them (groups.hpp).
  encoded_constraint linear_groups(std::span<const std::vector<term>> groups, relation rel, std::int64_t bound,
                                   std::optional<method_id> m = {}) {
    return add(normalize_groups(groups, rel, bound, next_), m);
  }
  encoded_constraint at_most_one(std::initializer_list<literal> lits, std::optional<method_id> m = {}) {
    return at_most_one(std::span<const literal>(lits.begin(), lits.size()), m);
  }
  encoded_constraint exactly_one(std::initializer_list<literal> lits, std::optional<method_id> m = {}) {
    return exactly_one(std::span<const literal>(lits.begin(), lits.size()), m);
  }

  // Encodes an already normalised constraint (its index is renumbered).
  encoded_constraint add(normalized_constraint c, std::optional<method_id> m = {}) {
    c.index = next_++;
    for (const literal l : c.literals) note_user(l);
    for (const literal l : c.units) note_user(l);
    encoded_constraint result;
    result.index = c.index;
    result.kind = c.kind;
    try {
      result.method = chooser_.choose(pool_, c, m, settings_);
    } catch (const error& e) {
      detail::rethrow_at(e, c.where());
    }
    result.size = encode_constraint(sink_, pool_, c, result.method, settings_, c.where());
    return result;
  }

  [[nodiscard]] std::size_t constraints() const noexcept { return next_; }
  [[nodiscard]] variable_pool& pool() noexcept { return pool_; }
  [[nodiscard]] const encoder_settings& settings() const noexcept { return settings_; }
  [[nodiscard]] method_chooser& chooser() noexcept { return chooser_; }

 private:
  void require_literals(std::span<const literal> lits, const char* what) const {
    if (lits.empty())
      throw error(error_id::empty_constraint, std::string(what) + " needs at least one literal", at_constraint(next_));
  }
  void note_user(literal l) {
    if (l.var() > pool_.top())
      throw error(error_id::invalid_literal,
                  "variable " + std::to_string(l.var()) + " is not in the pool (declare the user's variables first)",
                  at_constraint(next_ - 1));
  }

  Sink& sink_;
  variable_pool& pool_;
  encoder_settings settings_;
  method_chooser chooser_;
  std::size_t next_ = 0;
};

}  // namespace clausewright
