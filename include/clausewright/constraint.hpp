// clausewright: linear constraints and their normalisation.
//
// Users state  sum a_i * l_i  {<=, >=, =}  k  with signed 64-bit coefficients.
// normalize() rewrites it into the form every encoding takes:
//   - negative coefficients become positive on the negated literal, moving the
//     constant to the bound:  a*l = a + |a|*~l  for a < 0;
//   - literals of one variable merge, x with ~x leaving a constant;
//   - zero terms drop;
//   - literals the constraint forces are taken out as units (for <=, a
//     coefficient above the bound forces its literal false; for >=, a literal
//     without which the bound is out of reach is forced true), repeatedly;
//   - for >=, coefficients above the bound are cut to the bound;
//   - the gcd of the coefficients divides through (floor for <=, ceil for >=;
//     an equality whose bound it does not divide is impossible);
//   - what is left is classified: constant, clause, at-most-one,
//     exactly-one, cardinality (all coefficients equal, hence 1), or linear.
// All arithmetic is checked: an overflow is an error naming the constraint.
#pragma once

#include <algorithm>
#include <cstdint>
#include <numeric>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"
#include "literal.hpp"

namespace clausewright {

enum class relation : std::uint8_t { le, ge, eq };

[[nodiscard]] constexpr std::string_view to_string(relation r) noexcept {
  switch (r) {
    case relation::le: return "<=";
    case relation::ge: return ">=";
    case relation::eq: return "=";
  }
  return "?";
}

struct term {
  std::int64_t coefficient = 0;
  literal lit;
};

enum class constraint_kind : std::uint8_t {
  constant_true,   // nothing left to encode (units may remain)
  constant_false,  // impossible: encodes as the empty clause
  clause,          // at least one of the literals (a single clause)
  at_most_one,     // sum <= 1, unit coefficients
  exactly_one,     // sum = 1, unit coefficients
  cardinality,     // unit coefficients, any relation and bound
  linear,          // general positive coefficients
};

[[nodiscard]] constexpr std::string_view to_string(constraint_kind k) noexcept {
  switch (k) {
    case constraint_kind::constant_true: return "true";
    case constraint_kind::constant_false: return "false";
    case constraint_kind::clause: return "clause";
    case constraint_kind::at_most_one: return "at-most-one";
    case constraint_kind::exactly_one: return "exactly-one";
    case constraint_kind::cardinality: return "cardinality";
    case constraint_kind::linear: return "linear";
  }
  return "?";
}

// The normalised constraint:  sum coefficients[i] * literals[i]  rel  bound,
// with every coefficient in 1..bound (for <= and =), distinct variables, and
// the forced literals in `units`. For constant kinds the literal list is empty.
struct normalized_constraint {
  constraint_kind kind = constraint_kind::constant_true;
  relation rel = relation::le;
  std::int64_t bound = 0;
  std::vector<literal> literals;
  std::vector<std::int64_t> coefficients;
  std::vector<literal> units;  // literals the constraint forces true
  std::size_t index = 0;       // constraint index, for messages
  std::string name;            // constraint name, for messages (may be empty)
  // The at-most-one groups of the literals (groups.hpp): group_of[i] is the
  // group of literals[i], numbered from 0 in order of first appearance. Empty
  // when no group has two literals; then only the group-blind methods apply.
  // The group-aware methods are correct only with the at-most-one
  // constraints the groups come from in the same formula.
  std::vector<std::uint32_t> group_of = {};

  [[nodiscard]] std::size_t size() const noexcept { return literals.size(); }
  // Whether some group has two literals or more (group_of is kept empty otherwise).
  [[nodiscard]] bool has_groups() const noexcept { return !group_of.empty(); }
  [[nodiscard]] bool unit_coefficients() const noexcept {
    return kind == constraint_kind::clause || kind == constraint_kind::at_most_one ||
           kind == constraint_kind::exactly_one || kind == constraint_kind::cardinality;
  }
  [[nodiscard]] bool is_constant() const noexcept {
    return kind == constraint_kind::constant_true || kind == constraint_kind::constant_false;
  }
  // Sum of all coefficients (cannot overflow: normalize checked it).
  [[nodiscard]] std::int64_t coefficient_sum() const noexcept {
    std::int64_t s = 0;
    for (const auto a : coefficients) s += a;
    return s;
  }
  [[nodiscard]] error_position where() const { return at_constraint(index, name); }
};

namespace detail {

inline std::int64_t checked_add(std::int64_t a, std::int64_t b, const error_position& where, const char* what) {
  std::int64_t r = 0;
  if (__builtin_add_overflow(a, b, &r))
    throw error(error_id::overflow, std::string(what) + " overflows the 64-bit range", where);
  return r;
}
inline std::int64_t checked_sub(std::int64_t a, std::int64_t b, const error_position& where, const char* what) {
  std::int64_t r = 0;
  if (__builtin_sub_overflow(a, b, &r))
    throw error(error_id::overflow, std::string(what) + " overflows the 64-bit range", where);
  return r;
}

inline std::int64_t floor_div(std::int64_t a, std::int64_t b) noexcept {  // b > 0
  const std::int64_t q = a / b;
  return (a % b != 0 && a < 0) ? q - 1 : q;
}
inline std::int64_t ceil_div(std::int64_t a, std::int64_t b) noexcept {  // b > 0
  const std::int64_t q = a / b;
  return (a % b != 0 && a > 0) ? q + 1 : q;
}

}  // namespace detail

// Evaluates the original (unnormalised) constraint under a full assignment.
// `value(v)` gives the truth value of variable v. Uses wide arithmetic so any
// int64 input is evaluated exactly.
template <class ValueOf>
[[nodiscard]] bool holds(std::span<const term> terms, relation rel, std::int64_t bound, ValueOf&& value) {
  __extension__ using wide = __int128;
  wide sum = 0;
  for (const term& t : terms) {
    // Spelled as a branch: g++ 12.2 at -O1 and above folds the comparison of
    // two bools, one of them ((x >> n) & 1) != 0, wrongly.
    const bool v = value(t.lit.var());
    const bool truth = t.lit.negative() ? !v : v;
    if (truth) sum += t.coefficient;
  }
  switch (rel) {
    case relation::le: return sum <= bound;
    case relation::ge: return sum >= bound;
    case relation::eq: return sum == bound;
  }
  return false;
}

// Normalises sum terms rel bound. Throws error (naming constraint `index`) on
// an invalid literal or on overflow.
[[nodiscard]] inline normalized_constraint normalize(std::span<const term> terms, relation rel, std::int64_t bound,
                                                     std::size_t index = 0, std::string name = {}) {
  normalized_constraint out;
  out.index = index;
  out.name = std::move(name);
  const error_position where = at_constraint(index, out.name);

  // 1. Validate and gather signed coefficients on positive variables:
  //    a*x stays, a*~x = a - a*x moves a to the constant side.
  struct entry {
    std::int32_t var;
    std::int64_t coefficient;  // on the positive literal
    std::size_t first;         // position of first appearance, to keep input order
  };
  std::vector<entry> entries;
  entries.reserve(terms.size());
  std::int64_t k = bound;
  for (std::size_t i = 0; i < terms.size(); ++i) {
    const term& t = terms[i];
    if (!t.lit.valid())
      throw error(error_id::invalid_literal, "term " + std::to_string(i) + " has literal 0 (variables start at 1)", where);
    if (t.lit.var() > max_variable || t.lit.dimacs() == INT32_MIN)
      throw error(error_id::invalid_literal, "term " + std::to_string(i) + " has a literal beyond the largest variable",
                  where);
    if (t.coefficient == 0) continue;
    if (t.lit.negative()) {
      k = detail::checked_sub(k, t.coefficient, where, "the bound after moving a negated literal's coefficient");
      if (t.coefficient == INT64_MIN)
        throw error(error_id::overflow, "coefficient of term " + std::to_string(i) + " overflows when negated", where);
      entries.push_back({t.lit.var(), -t.coefficient, i});
    } else {
      entries.push_back({t.lit.var(), t.coefficient, i});
    }
  }
  std::sort(entries.begin(), entries.end(),
            [](const entry& a, const entry& b) { return a.var != b.var ? a.var < b.var : a.first < b.first; });
  std::size_t merged = 0;
  for (std::size_t i = 0; i < entries.size();) {
    entry e = entries[i];
    std::size_t j = i + 1;
    for (; j < entries.size() && entries[j].var == e.var; ++j)
      e.coefficient = detail::checked_add(e.coefficient, entries[j].coefficient, where,
                                          "the merged coefficient of a repeated variable");
    entries[merged++] = e;
    i = j;
  }
  entries.resize(merged);
  std::sort(entries.begin(), entries.end(), [](const entry& a, const entry& b) { return a.first < b.first; });

  // 2. Positive coefficients: a*x with a < 0 is a + |a|*~x.
  std::vector<term> pos;
  pos.reserve(entries.size());
  std::int64_t sum = 0;
  for (const entry& e : entries) {
    if (e.coefficient == 0) continue;
    if (e.coefficient > 0) {
      pos.push_back({e.coefficient, literal(e.var)});
    } else {
      if (e.coefficient == INT64_MIN)
        throw error(error_id::overflow, "a coefficient of variable " + std::to_string(e.var) + " overflows when negated",
                    where);
      k = detail::checked_sub(k, e.coefficient, where, "the bound after moving a negative coefficient");
      pos.push_back({-e.coefficient, literal(-e.var)});
    }
    sum = detail::checked_add(sum, pos.back().coefficient, where, "the sum of the coefficients");
  }

  // 3. Units and trivial cases, until nothing changes.
  auto finish_constant = [&](bool value) {
    out.kind = value ? constraint_kind::constant_true : constraint_kind::constant_false;
    out.literals.clear();
    out.coefficients.clear();
    out.bound = 0;
    out.rel = rel;
    if (!value) out.units.clear();
    return out;
  };
  auto force_all = [&](bool truth) {
    for (const term& t : pos) out.units.push_back(truth ? t.lit : ~t.lit);
    pos.clear();
    sum = 0;
  };
  for (bool changed = true; changed;) {
    changed = false;
    switch (rel) {
      case relation::le:
        if (k < 0) return finish_constant(false);
        if (sum <= k) {
          pos.clear();
          return finish_constant(true);
        }
        break;
      case relation::ge:
        if (k <= 0) {
          pos.clear();
          return finish_constant(true);
        }
        if (sum < k) return finish_constant(false);
        break;
      case relation::eq:
        if (k < 0 || sum < k) return finish_constant(false);
        if (k == 0) {
          force_all(false);
          return finish_constant(true);
        }
        if (sum == k) {
          force_all(true);
          return finish_constant(true);
        }
        break;
    }
    std::vector<term> kept;
    kept.reserve(pos.size());
    const std::int64_t k0 = k;
    const std::int64_t sum0 = sum;
    for (const term& t : pos) {
      if ((rel == relation::le || rel == relation::eq) && t.coefficient > k0) {
        out.units.push_back(~t.lit);
        sum -= t.coefficient;
        changed = true;
      } else if ((rel == relation::ge || rel == relation::eq) && sum0 - t.coefficient < k0) {
        out.units.push_back(t.lit);
        sum -= t.coefficient;
        k -= t.coefficient;
        changed = true;
      } else {
        kept.push_back(t);
      }
    }
    pos.swap(kept);
    if (!changed && rel == relation::ge) {
      for (term& t : pos) {
        if (t.coefficient > k) {
          sum -= t.coefficient - k;
          t.coefficient = k;
        }
      }
    }
  }

  // 4. Divide by the gcd.
  std::int64_t g = 0;
  for (const term& t : pos) g = std::gcd(g, t.coefficient);
  if (g > 1) {
    for (term& t : pos) t.coefficient /= g;
    switch (rel) {
      case relation::le: k = detail::floor_div(k, g); break;
      case relation::ge: k = detail::ceil_div(k, g); break;
      case relation::eq:
        if (k % g != 0) {
          out.units.clear();
          return finish_constant(false);
        }
        k /= g;
        break;
    }
  }

  // 5. Classify.
  out.rel = rel;
  out.bound = k;
  out.literals.reserve(pos.size());
  out.coefficients.reserve(pos.size());
  bool all_one = true;
  for (const term& t : pos) {
    out.literals.push_back(t.lit);
    out.coefficients.push_back(t.coefficient);
    all_one = all_one && t.coefficient == 1;
  }
  if (all_one && (rel == relation::ge || rel == relation::eq) && out.literals.size() >= 3 &&
      k == static_cast<std::int64_t>(out.literals.size()) - 1) {
    // At least n-1 of n is at most one of the negations (exactly likewise).
    for (literal& l : out.literals) l = ~l;
    k = 1;
    out.bound = 1;
    out.rel = rel == relation::ge ? relation::le : relation::eq;
  } else if (all_one && rel == relation::le && k == static_cast<std::int64_t>(out.literals.size()) - 1) {
    // At most n-1 of n: one clause, at least one negation true.
    for (literal& l : out.literals) l = ~l;
    k = 1;
    out.bound = 1;
    out.rel = relation::ge;
  }
  if (!all_one) {
    out.kind = constraint_kind::linear;
  } else if (out.rel == relation::ge && k == 1) {
    out.kind = constraint_kind::clause;
  } else if (out.rel == relation::le && k == 1) {
    out.kind = constraint_kind::at_most_one;
  } else if (out.rel == relation::eq && k == 1) {
    out.kind = constraint_kind::exactly_one;
  } else {
    out.kind = constraint_kind::cardinality;
  }
  return out;
}

// Cardinality helpers: sum of literals rel k.
[[nodiscard]] inline std::vector<term> unit_terms(std::span<const literal> lits) {
  std::vector<term> t;
  t.reserve(lits.size());
  for (const literal l : lits) t.push_back({1, l});
  return t;
}

[[nodiscard]] inline normalized_constraint normalize_cardinality(std::span<const literal> lits, relation rel,
                                                                 std::int64_t k, std::size_t index = 0,
                                                                 std::string name = {}) {
  if (k < 0)
    throw error(error_id::invalid_bound, "cardinality bound " + std::to_string(k) + " is negative",
                at_constraint(index, name));
  const auto terms = unit_terms(lits);
  return normalize(terms, rel, k, index, std::move(name));
}

// The same constraint over the negated literals with the relation turned:
// sum a_i l_i >= k  <=>  sum a_i ~l_i <= sum a_i - k. Used by methods that
// encode >= through <= (the published way for several of them).
[[nodiscard]] inline normalized_constraint negated_view(const normalized_constraint& c) {
  normalized_constraint n = c;
  n.group_of.clear();  // the negated literals of a group are not at-most-one
  for (literal& l : n.literals) l = ~l;
  n.bound = c.coefficient_sum() - c.bound;
  n.rel = c.rel == relation::le ? relation::ge : (c.rel == relation::ge ? relation::le : relation::eq);
  if (n.unit_coefficients()) {
    if (n.rel == relation::ge && n.bound == 1)
      n.kind = constraint_kind::clause;
    else if (n.rel == relation::le && n.bound == 1)
      n.kind = constraint_kind::at_most_one;
    else if (n.rel == relation::eq && n.bound == 1)
      n.kind = constraint_kind::exactly_one;
    else
      n.kind = constraint_kind::cardinality;
  }
  n.units.clear();
  return n;
}

}  // namespace clausewright
