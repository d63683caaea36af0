// Weighted rows over at-most-one groups: group detection and the group-aware
// encodings (group MDD, group generalized totalizer, group sequential weight
// counter), checked on whole models: the row together with the model's
// at-most-one constraints.
//
// - Semantics, exhaustively for small models: for every assignment of the
//   inputs that satisfies the at-most-one sets, the encoding's clauses plus
//   the at-most-one clauses plus that assignment are satisfiable (CaDiCaL)
//   exactly when the row holds, evaluated on the user's terms (so
//   normalisation and grouping are checked too).
// - Semantics on larger random models: satisfiability of random partial
//   assignments under CaDiCaL against an independent dynamic program over the
//   at-most-one blocks (each block: none or one literal true).
// - Propagation: with the at-most-one sets encoded pairwise, unit propagation
//   must derive every input literal that (row and at-most-ones) implies under
//   a partial assignment, found by brute force, and a conflict when nothing
//   extends it.
// - Sizes: MDD nodes <= groups * (bound + 1) (Bofill, Coll, Suy, Villaret
//   2017, recalled from memory; it also follows from the disjoint intervals
//   of one layer, each holding a bound in 0..K); the group sequential weight
//   counter's predicted size against a counting sink; the register count
//   K(n-1) of Hölldobler et al. 2012 carried over to n groups (from memory).
// - Group detection against its definition, by brute force.
// Random cases use fixed seeds; failures print the seed and the model.
#include <gtest/gtest.h>

#include <algorithm>
#include <cadical.hpp>
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/encodings/group_generalized_totalizer.hpp>
#include <clausewright/encodings/group_mdd.hpp>
#include <clausewright/encodings/group_sequential_weight_counter.hpp>
#include <clausewright/groups.hpp>
#include <cstdint>
#include <map>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "../benchmarks/families.hpp"
#include "harness.hpp"

namespace {

namespace cw = clausewright;
using cw_test::propagator;

enum class group_method : std::uint8_t { mdd, totalizer, reduced_totalizer, weight_counter };
constexpr std::array all_methods{group_method::mdd, group_method::totalizer, group_method::reduced_totalizer,
                                 group_method::weight_counter};

const char* name(group_method m) {
  switch (m) {
    case group_method::mdd:
      return "group-mdd";
    case group_method::totalizer:
      return "group-generalized-totalizer";
    case group_method::reduced_totalizer:
      return "group-reduced-generalized-totalizer";
    case group_method::weight_counter:
      return "group-sequential-weight-counter";
  }
  return "?";
}

template <class Sink>
void encode_group(group_method m, Sink& out, cw::variable_pool& pool, const cw::grouped_constraint& c,
                  const cw::encode_options& options, cw::group_literal_cache* cache = nullptr) {
  switch (m) {
    case group_method::mdd:
      cw::encode_group_mdd(out, pool, c, options, cw::default_bdd_node_budget, cache);
      return;
    case group_method::totalizer:
      cw::encode_group_generalized_totalizer(out, pool, c, options, cw::default_generalized_totalizer_output_budget,
                                             cache);
      return;
    case group_method::reduced_totalizer:
      cw::encode_group_reduced_generalized_totalizer(out, pool, c, options,
                                                     cw::default_generalized_totalizer_output_budget, cache);
      return;
    case group_method::weight_counter:
      cw::encode_group_sequential_weight_counter(out, pool, c, options, cache);
      return;
  }
}

// A model: variables 1..vars, at-most-one sets of literals, one weighted row.
struct model {
  std::int32_t vars = 0;
  std::vector<std::vector<cw::literal>> amos;
  std::vector<cw::term> row;
  cw::relation rel = cw::relation::le;
  std::int64_t bound = 0;

  [[nodiscard]] std::string describe() const {
    std::ostringstream os;
    for (std::size_t i = 0; i < row.size(); ++i)
      os << (i ? " + " : "") << row[i].coefficient << "*" << (row[i].lit.negative() ? "~x" : "x") << row[i].lit.var();
    os << " " << cw::to_string(rel) << " " << bound << "; amo:";
    for (const auto& s : amos) {
      os << " {";
      for (const auto l : s) os << (l.negative() ? " ~x" : " x") << l.var();
      os << " }";
    }
    return os.str();
  }
  [[nodiscard]] cw::grouped_constraint grouped() const {
    return cw::group_constraint(cw::normalize(row, rel, bound), amos);
  }
  // Whether the at-most-one sets hold under a full assignment (bit v-1 of `bits`).
  [[nodiscard]] bool amos_hold(std::uint64_t bits) const {
    for (const auto& s : amos) {
      int n = 0;
      for (const auto l : s) {
        const bool v = ((bits >> (l.var() - 1)) & 1U) != 0;
        n += (l.negative() ? !v : v) ? 1 : 0;
      }
      if (n > 1) return false;
    }
    return true;
  }
  [[nodiscard]] bool row_holds(std::uint64_t bits) const {
    return cw::holds(row, rel, bound, [&](std::int32_t v) { return ((bits >> (v - 1)) & 1U) != 0; });
  }
};

// The at-most-one sets, pairwise, as the propagation measure assumes.
void add_pairwise(cw::cnf_buffer& cnf, const model& m) {
  for (const auto& s : m.amos)
    for (std::size_t i = 0; i < s.size(); ++i)
      for (std::size_t j = i + 1; j < s.size(); ++j) cnf.add_clause({~s[i], ~s[j]});
}

struct encoded_model {
  cw::cnf_buffer cnf;
  cw::variable_pool pool;
  cw::grouped_constraint grouped;
};

// Units of normalisation, the method's clauses, and the pairwise at-most-ones.
encoded_model encode_model(const model& m, group_method method, const cw::encode_options& options) {
  encoded_model e;
  e.pool.reserve_user(m.vars);
  e.grouped = m.grouped();
  for (const auto u : e.grouped.units) e.cnf.add_clause({u});
  encode_group(method, e.cnf, e.pool, e.grouped, options);
  add_pairwise(e.cnf, m);
  return e;
}

// Random model: variables split into at-most-one blocks of 1..max_block
// literals of random polarity (blocks are disjoint), plus sometimes an extra
// set overlapping them; a row over random terms.
model random_model(std::mt19937_64& rng, std::int32_t vars, std::int32_t max_block, std::int64_t max_coefficient,
                   bool negative, bool overlap, bool clean = false) {
  model m;
  m.vars = vars;
  std::vector<std::int32_t> order(static_cast<std::size_t>(vars));
  for (std::int32_t v = 1; v <= vars; ++v) order[static_cast<std::size_t>(v - 1)] = v;
  std::shuffle(order.begin(), order.end(), rng);
  for (std::size_t i = 0; i < order.size();) {
    const auto size = static_cast<std::size_t>(1 + rng() % static_cast<std::uint64_t>(max_block));
    std::vector<cw::literal> s;
    for (std::size_t j = i; j < std::min(order.size(), i + size); ++j)
      s.push_back(cw::lit((rng() % 4 == 0) ? -order[j] : order[j]));
    m.amos.push_back(std::move(s));
    i += size;
  }
  if (overlap && !clean && vars >= 3) {
    std::vector<cw::literal> s;
    for (std::int32_t v = 1; v <= vars; ++v)
      if (rng() % 3 == 0) s.push_back(cw::lit(v));
    if (s.size() >= 2) m.amos.push_back(std::move(s));
  }
  std::uniform_int_distribution<std::int64_t> coefficient(negative && !clean ? -max_coefficient : 1, max_coefficient);
  std::int64_t positive = 0;
  for (std::int32_t v = 1; v <= vars; ++v) {
    if (!clean && rng() % 5 == 0) continue;  // not every variable is in the row
    // Mostly the polarity of the variable's set, so groups form.
    cw::literal l = cw::lit(v);
    for (const auto& s : m.amos)
      for (const auto x : s)
        if (x.var() == v) l = x;
    if (!clean && rng() % 5 == 0) l = ~l;
    const std::int64_t a = coefficient(rng);
    m.row.push_back({a, l});
    positive += a > 0 ? a : 0;
  }
  std::uniform_int_distribution<std::int64_t> b(-1, std::max<std::int64_t>(positive / 2, 1));
  m.bound = b(rng);
  m.rel = static_cast<cw::relation>(rng() % 3);
  return m;
}

::testing::AssertionResult exhaustive_equivalent(const model& m, group_method method,
                                                 const cw::encode_options& options) {
  encoded_model e;
  try {
    e = encode_model(m, method, options);
  } catch (const std::exception& ex) {
    return ::testing::AssertionFailure() << name(method) << " on " << m.describe() << " threw: " << ex.what();
  }
  CaDiCaL::Solver solver;
  solver.set("quiet", 1);
  cw_test::add_to_solver(solver, e.cnf);
  for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << m.vars); ++bits) {
    if (!m.amos_hold(bits)) continue;  // outside the model: need not be checked
    for (std::int32_t v = 1; v <= m.vars; ++v) solver.assume(((bits >> (v - 1)) & 1U) ? v : -v);
    const int status = solver.solve();
    if (status != 10 && status != 20) return ::testing::AssertionFailure() << "CaDiCaL returned " << status;
    const bool expected = m.row_holds(bits);
    if ((status == 10) != expected)
      return ::testing::AssertionFailure()
             << name(method) << (options.full_equivalence ? " (full)" : "") << " on " << m.describe()
             << ": assignment bits " << bits << " is " << (status == 10 ? "satisfiable" : "unsatisfiable")
             << " but the row " << (expected ? "holds" : "is violated");
  }
  return ::testing::AssertionSuccess();
}

struct propagation_result {
  bool sound = true;
  bool arc_consistent = true;
  std::string counterexample;
};

// Arc-consistency of (clauses + pairwise at-most-ones) for (row and at-most-ones):
// over every partial assignment of the inputs (3^vars), by brute force.
propagation_result measure_group_propagation(const model& m, group_method method, const cw::encode_options& options) {
  propagation_result r;
  const encoded_model e = encode_model(m, method, options);
  propagator up(e.cnf, std::max(e.pool.top(), e.cnf.max_variable()));
  const auto n = static_cast<std::size_t>(m.vars);
  std::uint64_t total = 1;
  for (std::size_t i = 0; i < n; ++i) total *= 3;
  // Models of (row and amos), listed once.
  std::vector<std::uint64_t> models;
  for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << n); ++bits)
    if (m.amos_hold(bits) && m.row_holds(bits)) models.push_back(bits);
  std::vector<int> partial(n);
  for (std::uint64_t code = 0; code < total; ++code) {
    std::uint64_t c = code;
    std::uint64_t fixed_mask = 0;
    std::uint64_t fixed_bits = 0;
    for (std::size_t i = 0; i < n; ++i) {
      partial[i] = static_cast<int>(c % 3) - 1;
      c /= 3;
      if (partial[i] != 0) {
        fixed_mask |= std::uint64_t{1} << i;
        if (partial[i] > 0) fixed_bits |= std::uint64_t{1} << i;
      }
    }
    std::uint64_t can_true = 0;
    std::uint64_t can_false = 0;
    bool satisfiable = false;
    for (const std::uint64_t bits : models) {
      if ((bits & fixed_mask) != fixed_bits) continue;
      satisfiable = true;
      can_true |= bits;
      can_false |= ~bits;
    }
    std::vector<cw::literal> assumed;
    for (std::size_t i = 0; i < n; ++i)
      if (partial[i] != 0)
        assumed.push_back(
            cw::lit(partial[i] > 0 ? static_cast<std::int32_t>(i + 1) : -static_cast<std::int32_t>(i + 1)));
    const bool no_conflict = up.run(assumed);
    auto where = [&] {
      std::ostringstream os;
      os << "under";
      for (const auto l : assumed) os << (l.negative() ? " ~x" : " x") << l.var();
      return os.str();
    };
    if (!satisfiable) {
      if (no_conflict && r.arc_consistent) {
        r.arc_consistent = false;
        r.counterexample = where() + " nothing extends to a model, but propagation finds no conflict";
      }
      continue;
    }
    if (!no_conflict) {
      r.sound = false;
      r.arc_consistent = false;
      r.counterexample = "UNSOUND: " + where() + " propagation conflicts but a model extends it";
      return r;
    }
    for (std::size_t i = 0; i < n; ++i) {
      if (partial[i] != 0) continue;
      const bool t = ((can_true >> i) & 1U) != 0;
      const bool f = ((can_false >> i) & 1U) != 0;
      if (t && f) continue;
      const cw::literal implied = cw::lit(t ? static_cast<std::int32_t>(i + 1) : -static_cast<std::int32_t>(i + 1));
      if (up.val(implied) <= 0 && r.arc_consistent) {
        r.arc_consistent = false;
        r.counterexample = where() + " the model implies " + (implied.negative() ? "~x" : "x") +
                           std::to_string(implied.var()) + " but propagation does not derive it";
      }
    }
  }
  return r;
}

// Every group method builds both relations and full equivalence.
bool applicable(group_method /*method*/, const cw::encode_options& /*options*/) { return true; }

// ---------------------------------------------------------------------------
// Group detection.

TEST(GroupDetection, GreedyLargestCoverFirstAndPolarity) {
  // Row: x1..x6 with AMO {x1,x2,x3,x4} and {x4,x5,x6}; x4 goes to the larger set.
  const std::vector<cw::term> row{{2, cw::lit(1)}, {3, cw::lit(2)}, {1, cw::lit(3)},
                                  {2, cw::lit(4)}, {4, cw::lit(5)}, {1, cw::lit(6)}};
  const std::vector<std::vector<cw::literal>> amos{{cw::lit(4), cw::lit(5), cw::lit(6)},
                                                   {cw::lit(1), cw::lit(2), cw::lit(3), cw::lit(4)}};
  const auto g = cw::group_constraint(cw::normalize(row, cw::relation::le, 5), amos);
  ASSERT_EQ(g.groups.size(), 2U);
  EXPECT_EQ(g.groups[0].size(), 4U);  // {x1..x4}: the set covering the most
  EXPECT_EQ(g.groups[1].size(), 2U);  // {x5, x6}: what is left of the other
  // Negative coefficient: -2*x2 is 2*~x2 after normalisation, and ~x2 is not in the set.
  const std::vector<cw::term> row2{{3, cw::lit(1)}, {-2, cw::lit(2)}, {2, cw::lit(3)}};
  const std::vector<std::vector<cw::literal>> amos2{{cw::lit(1), cw::lit(2), cw::lit(3)}};
  const auto g2 = cw::group_constraint(cw::normalize(row2, cw::relation::le, 2), amos2);
  ASSERT_EQ(g2.groups.size(), 2U);
  EXPECT_EQ(g2.groups[0].size(), 2U);  // {x1, x3}
  EXPECT_EQ(g2.groups[1].size(), 1U);  // {~x2}
  EXPECT_EQ(g2.groups[1][0].lit, cw::lit(-2));
  // A coefficient above the bound: normalisation forces the literal false.
  const std::vector<cw::term> row3{{9, cw::lit(1)}, {2, cw::lit(2)}, {2, cw::lit(3)}, {1, cw::lit(4)}};
  const auto g3 = cw::group_constraint(cw::normalize(row3, cw::relation::le, 2), amos2);
  EXPECT_EQ(g3.units, std::vector<cw::literal>{cw::lit(-1)});
  EXPECT_EQ(g3.literal_count(), 3U);
}

TEST(GroupDetection, AtMostOneSetsFromConstraints) {
  const std::vector<cw::literal> x{cw::lit(1), cw::lit(2), cw::lit(3)};
  // x1 + x2 + x3 <= 1 and = 1 are their own sets.
  EXPECT_EQ(cw::at_most_one_literals(cw::normalize_cardinality(x, cw::relation::le, 1)), x);
  EXPECT_EQ(cw::at_most_one_literals(cw::normalize_cardinality(x, cw::relation::eq, 1)), x);
  // At least two of three: at most one of the negations (normalisation turns it around).
  const std::vector<cw::literal> negated{cw::lit(-1), cw::lit(-2), cw::lit(-3)};
  EXPECT_EQ(cw::at_most_one_literals(cw::normalize_cardinality(x, cw::relation::ge, 2)), negated);
  // At most two of three says nothing about pairs.
  EXPECT_TRUE(cw::at_most_one_literals(cw::normalize_cardinality(x, cw::relation::le, 2)).empty());
}

TEST(GroupDetection, RandomPartitionsAgainstDefinition) {
  int checked = 0;
  int constant = 0;
  for (std::uint32_t seed = 1; seed <= 400; ++seed) {
    std::mt19937_64 rng(seed);
    const model m = random_model(rng, 6 + static_cast<std::int32_t>(rng() % 20), 5, 9, true, true);
    const cw::normalized_constraint c = cw::normalize(m.row, m.rel, m.bound);
    const cw::grouped_constraint g = cw::group_constraint(c, m.amos);
    if (c.is_constant()) {
      EXPECT_TRUE(g.is_constant()) << "seed " << seed;
      continue;
    }
    if (g.is_constant()) {
      // The groups showed the row constant: every assignment within the
      // at-most-one sets satisfies it (constant true) or none does, by brute force.
      ++constant;
      if (m.vars > 16) continue;
      const bool value = g.kind == cw::constraint_kind::constant_true;
      for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << m.vars); ++bits)
        if (m.amos_hold(bits) && m.row_holds(bits) != value) {
          ADD_FAILURE() << "seed " << seed << ": grouped as constant " << value << " but bits " << bits
                        << " disagree: " << m.describe();
          break;
        }
      continue;
    }
    ++checked;
    // Every literal of the row exactly once, with its coefficient.
    std::map<std::int32_t, std::int64_t> seen;
    for (const auto& group : g.groups) {
      ASSERT_FALSE(group.empty()) << "seed " << seed;
      for (const auto& t : group) EXPECT_TRUE(seen.emplace(t.lit.dimacs(), t.coefficient).second) << "seed " << seed;
      // A group of two or more lies inside one given set, same polarity.
      if (group.size() < 2) continue;
      bool inside_one = false;
      for (const auto& s : m.amos) {
        bool all = true;
        for (const auto& t : group) all = all && std::find(s.begin(), s.end(), t.lit) != s.end();
        inside_one = inside_one || all;
      }
      EXPECT_TRUE(inside_one) << "seed " << seed << ": " << m.describe();
    }
    ASSERT_EQ(seen.size(), c.size()) << "seed " << seed;
    for (std::size_t i = 0; i < c.size(); ++i) {
      const auto it = seen.find(c.literals[i].dimacs());
      ASSERT_NE(it, seen.end()) << "seed " << seed;
      EXPECT_EQ(it->second, c.coefficients[i]) << "seed " << seed;
    }
    // Maximal: no set covers two literals that are both left as singletons.
    for (const auto& s : m.amos) {
      int singles = 0;
      for (const auto& group : g.groups)
        if (group.size() == 1 && std::find(s.begin(), s.end(), group[0].lit) != s.end()) ++singles;
      EXPECT_LE(singles, 1) << "seed " << seed << ": " << m.describe();
    }
  }
  EXPECT_GT(checked, 300);
  std::printf("grouped %d rows, %d found constant by their groups\n", checked, constant);
}

TEST(GroupDetection, ExplicitGroups) {
  // 3*x1 + 2*x2 (one group), -4*x3 + 1*x4 (a group; -4*x3 normalises to 4*~x3, a singleton) <= 0.
  const std::vector<std::vector<cw::term>> groups{{{3, cw::lit(1)}, {2, cw::lit(2)}},
                                                  {{-4, cw::lit(3)}, {1, cw::lit(4)}}};
  const auto g = cw::group_terms(groups, cw::relation::le, 0);
  // Bound 0 + 4 = 4; groups {x1, x2}, then ~x3 and x4 alone (normalised order).
  EXPECT_EQ(g.bound, 4);
  ASSERT_EQ(g.groups.size(), 3U);
  EXPECT_EQ(g.groups[0].size(), 2U);
  EXPECT_EQ(g.groups[1][0].lit, cw::lit(-3));
  EXPECT_EQ(g.groups[2][0].lit, cw::lit(4));
  // With bound -1 the bound becomes 3 and 4*~x3 is forced false: x3 is a unit.
  const auto g2 = cw::group_terms(groups, cw::relation::le, -1);
  EXPECT_EQ(g2.units, std::vector<cw::literal>{cw::lit(3)});
  EXPECT_EQ(g2.groups.size(), 2U);
}

// ---------------------------------------------------------------------------
// Semantics.

TEST(GroupEncodings, ExhaustiveOnSmallModels) {
  std::uint64_t checked = 0;
  for (std::uint32_t seed = 1; seed <= 150; ++seed) {
    std::mt19937_64 rng(seed);
    const auto vars = static_cast<std::int32_t>(3 + rng() % 8);
    const model m = random_model(rng, vars, 4, 6, seed % 3 == 0, seed % 4 == 0);
    for (const auto method : all_methods)
      for (const bool full : {false, true}) {
        const cw::encode_options options{full};
        if (!applicable(method, options)) continue;
        EXPECT_TRUE(exhaustive_equivalent(m, method, options)) << "seed " << seed;
        ++checked;
      }
  }
  EXPECT_GT(checked, 400U);
}

TEST(GroupEncodings, TheMethodTableNamesTheMethods) {
  // The table's rows carry the names used here, and apply only to rows with groups.
  for (const auto method : all_methods) {
    const auto id = cw::find_method(name(method));
    ASSERT_TRUE(id.has_value()) << name(method);
    EXPECT_TRUE(cw::info(*id).needs_groups) << name(method);
  }
}

TEST(GroupEncodings, FullEquivalenceDefinesEveryAuxiliaryVariable) {
  // Through the table and the harness: with the at-most-one set in the
  // formula, every auxiliary variable is a function of the inputs.
  cw_test::raw_constraint c;
  c.terms = {{2, cw::lit(1)}, {3, cw::lit(2)}, {1, cw::lit(3)}, {2, cw::lit(4)}};
  c.amos = {{cw::lit(1), cw::lit(2), cw::lit(3)}};
  for (const auto rel : {cw::relation::le, cw::relation::ge, cw::relation::eq})
    for (std::int64_t bound = 1; bound <= 5; ++bound) {
      c.rel = rel;
      c.bound = bound;
      for (const auto method : all_methods)
        EXPECT_TRUE(cw_test::equivalent(c, *cw::find_method(name(method)), cw::encode_options{true}));
    }
}

TEST(GroupEncodings, RowsSharingGroupLiteralsThroughACache) {
  // Two rows over the same at-most-one sets (two resources of one schedule),
  // encoded into one formula with one group_literal_cache: for every
  // assignment within the sets, satisfiable exactly when both rows hold.
  std::uint64_t shared = 0;
  for (std::uint32_t seed = 1; seed <= 60; ++seed) {
    std::mt19937_64 rng(20000 + seed);
    const auto vars = static_cast<std::int32_t>(4 + rng() % 7);
    model a = random_model(rng, vars, 4, 5, false, false, true);
    model b = a;
    for (auto& t : b.row) t.coefficient = 1 + static_cast<std::int64_t>(rng() % 5);
    b.rel = static_cast<cw::relation>(rng() % 3);
    b.bound = static_cast<std::int64_t>(rng() % 8);
    for (const auto method : all_methods)
      for (const bool full : {false, true}) {
        const cw::encode_options options{full};
        if (!applicable(method, options)) continue;
        cw::cnf_buffer cnf;
        cw::variable_pool pool(vars);
        cw::group_literal_cache cache;
        for (const model* m : {&a, &b}) {
          const cw::grouped_constraint g = m->grouped();
          for (const auto u : g.units) cnf.add_clause({u});
          encode_group(method, cnf, pool, g, options, &cache);
        }
        add_pairwise(cnf, a);
        shared += cache.size();
        CaDiCaL::Solver solver;
        solver.set("quiet", 1);
        cw_test::add_to_solver(solver, cnf);
        for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << vars); ++bits) {
          if (!a.amos_hold(bits)) continue;
          for (std::int32_t v = 1; v <= vars; ++v) solver.assume(((bits >> (v - 1)) & 1U) ? v : -v);
          const bool expected = a.row_holds(bits) && b.row_holds(bits);
          ASSERT_EQ(solver.solve() == 10, expected)
              << "seed " << 20000 + seed << " " << name(method) << (full ? " (full)" : "") << ": " << a.describe()
              << " and " << b.describe() << ", bits " << bits;
        }
      }
  }
  EXPECT_GT(shared, 0U);  // the cache was used
}

// Satisfiability of a partial assignment by a dynamic program over disjoint
// at-most-one blocks (each: none or one literal true), independent of the
// encodings; the row is evaluated on the user's terms.
bool dp_satisfiable(const model& m, const std::vector<int>& partial) {
  std::map<std::int32_t, std::int64_t> coefficient;  // on the positive variable, constant aside
  std::int64_t constant = 0;
  for (const auto& t : m.row) {
    if (t.lit.negative()) {
      constant += t.coefficient;
      coefficient[t.lit.var()] -= t.coefficient;
    } else {
      coefficient[t.lit.var()] += t.coefficient;
    }
  }
  std::set<std::int64_t> sums{constant};
  for (const auto& s : m.amos) {
    // Options: every literal of the block false, or exactly one true.
    std::set<std::int64_t> contributions;
    for (std::size_t chosen = 0; chosen <= s.size(); ++chosen) {  // s.size(): none
      std::int64_t add = 0;
      bool consistent = true;
      for (std::size_t i = 0; i < s.size(); ++i) {
        const bool lit_true = i == chosen;
        const bool var_true = s[i].negative() ? !lit_true : lit_true;
        const int p = partial[static_cast<std::size_t>(s[i].var() - 1)];
        if (p != 0 && (p > 0) != var_true) consistent = false;
        if (var_true) add += coefficient.count(s[i].var()) ? coefficient[s[i].var()] : 0;
      }
      if (consistent) contributions.insert(add);
    }
    std::set<std::int64_t> next;
    for (const auto a : sums)
      for (const auto b : contributions) next.insert(a + b);
    sums.swap(next);
  }
  for (const auto v : sums) {
    switch (m.rel) {
      case cw::relation::le:
        if (v <= m.bound) return true;
        break;
      case cw::relation::ge:
        if (v >= m.bound) return true;
        break;
      case cw::relation::eq:
        if (v == m.bound) return true;
        break;
    }
  }
  return false;
}

TEST(GroupEncodings, RandomLargerModelsAgainstDynamicProgram) {
  for (std::uint32_t seed = 1; seed <= 30; ++seed) {
    std::mt19937_64 rng(1000 + seed);
    const auto vars = static_cast<std::int32_t>(20 + rng() % 21);
    const model m = random_model(rng, vars, 6, 15, seed % 2 == 0, false);  // disjoint blocks for the DP
    for (const auto method : all_methods)
      for (const bool full : {false, true}) {
        const cw::encode_options options{full};
        if (!applicable(method, options)) continue;
        const encoded_model e = encode_model(m, method, options);
        CaDiCaL::Solver solver;
        solver.set("quiet", 1);
        cw_test::add_to_solver(solver, e.cnf);
        std::vector<int> partial(static_cast<std::size_t>(vars));
        for (int round = 0; round < 40; ++round) {
          for (auto& p : partial) p = rng() % 10 < 7 ? 0 : (rng() % 2 ? 1 : -1);
          for (std::int32_t v = 1; v <= vars; ++v)
            if (partial[static_cast<std::size_t>(v - 1)] != 0)
              solver.assume(partial[static_cast<std::size_t>(v - 1)] > 0 ? v : -v);
          const int status = solver.solve();
          ASSERT_TRUE(status == 10 || status == 20);
          ASSERT_EQ(status == 10, dp_satisfiable(m, partial))
              << "seed " << 1000 + seed << " round " << round << " " << name(method) << (full ? " (full)" : "") << ": "
              << m.describe();
        }
      }
  }
}

// ---------------------------------------------------------------------------
// Propagation.

TEST(GroupEncodings, PropagationMeasured) {
  // Arc-consistency claimed in the files' opening blocks: the MDD for <= and
  // >=, the two counters for <=, on "clean" models, where the
  // at-most-one sets are disjoint and are exactly the groups (every literal of
  // a set is in the row, with positive coefficient). On other models
  // (literals of a set left out of the row or negated by normalisation, sets
  // overlapping) the implications can run through the at-most-one sets
  // outside the row's groups, which no group encoding sees; there only
  // soundness is asserted. Everything is measured and printed.
  std::map<std::string, std::pair<int, int>> tally;  // name -> (arc-consistent, cases)
  for (std::uint32_t seed = 1; seed <= 160; ++seed) {
    std::mt19937_64 rng(5000 + seed);
    const auto vars = static_cast<std::int32_t>(3 + rng() % 6);
    const bool clean = seed % 2 == 0;
    const model m = random_model(rng, vars, 4, 5, seed % 3 == 0, seed % 5 == 0, clean);
    for (const auto method : all_methods)
      for (const bool full : {false, true}) {
        const cw::encode_options options{full};
        if (!applicable(method, options)) continue;
        const propagation_result r = measure_group_propagation(m, method, options);
        ASSERT_TRUE(r.sound) << "seed " << 5000 + seed << " " << name(method) << ": " << m.describe() << ": "
                             << r.counterexample;
        const std::string key = std::string(name(method)) + (full ? " full " : " ") +
                                std::string(cw::to_string(m.rel)) + (clean ? " clean" : " other");
        auto& [ac, cases] = tally[key];
        ++cases;
        ac += r.arc_consistent ? 1 : 0;
        const bool claimed =
            clean && (m.rel == cw::relation::le || (method == group_method::mdd && m.rel == cw::relation::ge));
        if (claimed) {
          EXPECT_TRUE(r.arc_consistent) << "seed " << 5000 + seed << " " << name(method) << (full ? " (full)" : "")
                                        << ": " << m.describe() << ": " << r.counterexample;
        }
      }
  }
  for (const auto& [key, counts] : tally)
    std::printf("propagation %-45s arc-consistent on %d of %d models\n", key.c_str(), counts.first, counts.second);
}

// ---------------------------------------------------------------------------
// Sizes.

TEST(GroupEncodings, MddNodesWithinGroupsTimesBoundPlusOne) {
  for (std::uint32_t seed = 1; seed <= 200; ++seed) {
    std::mt19937_64 rng(9000 + seed);
    model m = random_model(rng, 10 + static_cast<std::int32_t>(rng() % 30), 6, 12, false, false);
    m.rel = cw::relation::le;
    const cw::grouped_constraint g = m.grouped();
    if (g.is_constant()) continue;
    cw::counting_sink sink;
    cw::variable_pool pool(m.vars);
    cw::group_mdd_builder<cw::counting_sink> builder(sink, pool, g.groups, cw::sides::upper);
    (void)builder.root(g.bound);
    EXPECT_LE(builder.node_count(), cw::group_mdd_node_bound(g)) << "seed " << 9000 + seed << ": " << m.describe();
  }
}

TEST(GroupEncodings, WeightCounterSizeAsPredicted) {
  for (std::uint32_t seed = 1; seed <= 200; ++seed) {
    std::mt19937_64 rng(12000 + seed);
    model m = random_model(rng, 5 + static_cast<std::int32_t>(rng() % 30), 6, 12, seed % 2 == 0, false);
    m.rel = cw::relation::le;
    const cw::grouped_constraint g = m.grouped();
    if (g.is_constant() || g.bound < 1) continue;
    cw::counting_sink sink;
    cw::variable_pool pool(m.vars);
    cw::encode_group_sequential_weight_counter(sink, pool, g, {});
    const cw::encoding_size predicted = cw::group_sequential_weight_counter_size(g);
    EXPECT_EQ(sink.clauses(), predicted.clauses) << "seed " << 12000 + seed << ": " << m.describe();
    EXPECT_EQ(static_cast<std::uint64_t>(pool.auxiliary_variables()), predicted.variables) << "seed " << 12000 + seed;
  }
  // By hand: groups {3 x1, 3 x2}, {2 x3}, {1 x4} <= 4. Merging x1, x2: 1 literal, 2 clauses.
  // Registers K(n-1) = 4*2 = 8. Row 1 (y, a=3): 3 clauses. Row 2 (x3, a=2): chain 4, set 2,
  // carry 4-2 = 2, cut 1: 9. Row 3 (x4, a=1): cut 1. Total 2 + 3 + 9 + 1 = 15 clauses, 9 variables.
  model m;
  m.vars = 4;
  m.amos = {{cw::lit(1), cw::lit(2)}};
  m.row = {{3, cw::lit(1)}, {3, cw::lit(2)}, {2, cw::lit(3)}, {1, cw::lit(4)}};
  m.bound = 4;
  const cw::grouped_constraint g = m.grouped();
  const auto predicted = cw::group_sequential_weight_counter_size(g);
  EXPECT_EQ(predicted.clauses, 15U);
  EXPECT_EQ(predicted.variables, 9U);
}

TEST(GroupEncodings, GroupsCutTheSchedulingRow) {
  // One resource row of a small time-indexed schedule: 6 jobs of duration 3,
  // demand 1..3, each starting at one of 8 times; the row at time 4 sums the
  // starts 2..4 of every job. Group-aware encodings must be smaller than the
  // group-blind BDD of the same row.
  model m;
  std::int32_t next = 1;
  for (int job = 0; job < 6; ++job) {
    std::vector<cw::literal> starts;
    starts.reserve(8);
    for (int t = 0; t < 8; ++t) starts.push_back(cw::lit(next++));
    for (int t = 2; t <= 4; ++t) m.row.push_back({1 + job % 3, starts[static_cast<std::size_t>(t)]});
    m.amos.push_back(std::move(starts));
  }
  m.vars = next - 1;
  m.bound = 4;
  cw::counting_sink blind;
  cw::variable_pool blind_pool(m.vars);
  cw::encode_with(cw::method_id::bdd, blind, blind_pool, cw::normalize(m.row, m.rel, m.bound));
  for (const auto method : all_methods) {
    cw::counting_sink sink;
    cw::variable_pool pool(m.vars);
    encode_group(method, sink, pool, m.grouped(), {});
    EXPECT_LT(sink.clauses(), blind.clauses()) << name(method);
  }
}

TEST(GroupEncodings, GroupMddCutsTheFamilyRows) {
  // The resource rows of a small time-indexed schedule of the group families
  // (benchmarks/families.hpp): the group MDD is smaller than the group-blind
  // BDD of the same row (the other group methods not always: a row of few
  // short jobs has few literals per group).
  const auto f = cw::bench::group_scheduling(6, 10, 1, 1, 3);
  cw::at_most_one_index sets;
  std::uint64_t rows = 0;
  for (const auto& r : f.rows) {
    cw::normalized_constraint c = cw::normalize(r.terms, r.rel, r.bound);
    if (r.group != cw::bench::row_group::none) {
      sets.add(c.literals);
      continue;
    }
    cw::assign_groups(c, sets);
    if (!c.has_groups() || c.size() < 6) continue;
    ++rows;
    cw::counting_sink blind;
    cw::variable_pool blind_pool(f.variables);
    cw::encode_with(cw::method_id::bdd, blind, blind_pool, c);
    cw::counting_sink sink;
    cw::variable_pool pool(f.variables);
    encode_group(group_method::mdd, sink, pool, cw::grouped_view(c), {});
    EXPECT_LT(sink.clauses(), blind.clauses()) << r.label;
  }
  EXPECT_GT(rows, 3U);
}

TEST(GroupEncodings, GroupFamiliesThroughTheModelEncoder) {
  // Whole models of the group families through the model encoder into
  // CaDiCaL, with the default policy: the rows with groups get group methods
  // where they win, and the answer, checked row by row, agrees in status with
  // the same model encoded without groups.
  const std::vector<cw::bench::family_instance> instances{
      cw::bench::group_scheduling(6, 10, 1, 1, 5), cw::bench::group_scheduling(5, 12, 2, 2, 6),
      cw::bench::group_scheduling(6, 8, 1, 1, 7, 2, 4, 90), cw::bench::group_assignment(8, 3, 8)};
  for (const auto& f : instances) {
    const cw::model m = cw::bench::to_model(f);
    int status[2] = {0, 0};
    std::uint64_t group_picks = 0;
    for (const bool groups : {false, true}) {
      cw::cadical_solver solver;
      cw::variable_pool pool;
      cw::model_encoding_settings settings;
      settings.find_groups = groups;
      cw::encode_model(m, solver, pool, settings, [&](const cw::constraint_outcome& o) {
        if (o.method && cw::info(*o.method).needs_groups) ++group_picks;
      });
      const auto r = solver.solve();
      status[groups ? 1 : 0] = static_cast<int>(r);
      if (r == cw::solve_result::satisfiable) {
        std::vector<bool> values(static_cast<std::size_t>(f.variables) + 1, false);
        for (std::int32_t v = 1; v <= f.variables; ++v) values[static_cast<std::size_t>(v)] = solver.value(cw::lit(v));
        std::size_t failed = 0;
        EXPECT_TRUE(cw::bench::satisfies(f, values, &failed)) << f.name << ": row " << f.rows[failed].label;
      }
    }
    EXPECT_EQ(status[0], status[1]) << f.name;
    if (f.family != "assignment") {
      EXPECT_GT(group_picks, 0U) << f.name;
    }
  }
}

}  // namespace

namespace {

// The policies on rows with groups (seeded): the cheap choice equals the pick
// from every size measured in full, and `propagating` takes a group method
// exactly when one has fewer clauses than the group-blind pick and is
// arc-consistent where that pick is (README "Choosing an encoding").
TEST(GroupPolicy, CheapChoiceAndTheUpgradeRule) {
  std::uint64_t upgrades = 0;
  for (std::uint32_t seed = 1; seed <= 120; ++seed) {
    std::mt19937_64 rng(seed);
    const auto raw = cw_test::random_grouped(rng, static_cast<std::int32_t>(4 + rng() % 12), 9, false);
    const cw::normalized_constraint c = raw.normalized();
    if (c.kind != cw::constraint_kind::linear || !c.has_groups()) continue;
    const cw::variable_pool pool(raw.max_var());
    const auto all = cw::measure_all(pool, c);
    for (const auto policy : cw::all_policies)
      EXPECT_EQ(cw::select_method(pool, c, policy), cw::pick(all, policy, c))
          << "seed " << seed << " policy " << cw::to_string(policy) << ": " << raw.describe();
    // The rule, from the full measurements.
    std::vector<cw::method_measurement> blind;
    for (const auto& m : all)
      if (!cw::info(m.method).needs_groups) blind.push_back(m);
    const cw::method_id b = cw::pick(blind, cw::selection_policy::propagating, c);
    std::uint64_t blind_clauses = 0;
    for (const auto& m : blind)
      if (m.method == b) blind_clauses = m.size.clauses;
    std::optional<cw::method_id> expected;
    std::uint64_t least = 0;
    for (const auto& m : all) {
      const auto& i = cw::info(m.method);
      if (!i.needs_groups || m.over_budget || m.size.clauses >= blind_clauses) continue;
      if (cw::info(b).arc_consistent && !i.arc_consistent) continue;
      if (!expected || m.size.clauses < least) {
        expected = m.method;
        least = m.size.clauses;
      }
    }
    const cw::method_id got = cw::select_method(pool, c, cw::selection_policy::propagating);
    if (expected) {
      EXPECT_TRUE(cw::info(got).needs_groups) << "seed " << seed << ": " << raw.describe();
      EXPECT_EQ(cw::measure(got, pool, c).size.clauses, least) << "seed " << seed;
      ++upgrades;
    } else {
      EXPECT_EQ(got, b) << "seed " << seed << ": " << raw.describe();
    }
  }
  EXPECT_GT(upgrades, 10U);
}

// The shape cache keys on the grouping: the same coefficients with and
// without groups never share a pick.
TEST(GroupPolicy, ShapesDifferingInGroupingDoNotSharePicks) {
  cw_test::raw_constraint raw;
  for (std::int32_t v = 1; v <= 8; ++v) raw.terms.push_back({1 + v % 4, cw::lit(v)});
  raw.bound = 7;
  const cw::normalized_constraint blind = raw.normalized();
  raw.amos = {{cw::lit(1), cw::lit(2), cw::lit(3), cw::lit(4)}, {cw::lit(5), cw::lit(6), cw::lit(7), cw::lit(8)}};
  const cw::normalized_constraint grouped = raw.normalized();
  ASSERT_TRUE(grouped.has_groups());
  const cw::variable_pool pool(8);
  cw::method_chooser chooser;
  const cw::choice_settings s;
  const cw::method_id first = chooser.pick(pool, blind, s);
  const cw::method_id second = chooser.pick(pool, grouped, s);
  EXPECT_FALSE(cw::info(first).needs_groups);
  EXPECT_EQ(second, cw::select_method(pool, grouped));
  EXPECT_TRUE(cw::info(second).needs_groups) << cw::info(second).name;
  EXPECT_NE(cw::shape_of(blind, s), cw::shape_of(grouped, s));
}

}  // namespace
