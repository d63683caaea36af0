// The weighted (pseudo-Boolean) encodings: BDD, adder network, generalized
// totalizer and sequential weight counter.
//
// - Equivalence: every method through the harness (exhaustive over the inputs,
//   decided by CaDiCaL, the constraint evaluated on the user's terms) over
//   seeded random constraints from cw_test::random_linear and hand-made
//   corner cases, with both values of full_equivalence.
// - Sizes against the published building blocks and against diagrams and
//   trees counted by hand (each count is derived in a comment).
// - Propagation per relation, measured by the harness (brute force and our
//   own unit propagation).
// - Errors: overflow names the constraint, budgets throw over_budget.
#include <gtest/gtest.h>
#include <clausewright/clausewright.hpp>

#include <cstdint>
#include <random>
#include <set>
#include <string>
#include <vector>

#include "harness.hpp"

namespace cw = clausewright;
using cw::lit;
using cw::relation;

namespace {

constexpr std::int64_t two_to(int e) { return std::int64_t{1} << e; }

const cw::method_id weighted_methods[] = {cw::method_id::bdd, cw::method_id::adder,
                                          cw::method_id::generalized_totalizer,
                                          cw::method_id::sequential_weight_counter};

std::string name_of(cw::method_id m) { return std::string(cw::info(m).name); }

// Seeded random constraints through the exhaustive check: n = 1..max_n
// inputs, coefficients up to `max_coefficient`, with negative coefficients,
// repeated variables and complementary literals on alternate seeds.
std::uint64_t check_random(cw::method_id method, std::uint32_t seeds, std::int32_t max_n, std::int64_t max_coefficient,
                           std::uint32_t first_seed = 1) {
  std::uint64_t checked = 0;
  for (std::uint32_t seed = first_seed; seed < first_seed + seeds; ++seed) {
    std::mt19937_64 rng(seed);
    const auto n = static_cast<std::int32_t>(1 + rng() % static_cast<std::uint64_t>(max_n));
    const bool negative = (seed & 1U) != 0;
    const bool repeats = (seed & 2U) != 0;
    const cw_test::raw_constraint c = cw_test::random_linear(rng, n, max_coefficient, negative, repeats);
    for (const bool full : {false, true}) {
      const std::string context =
          "seed=" + std::to_string(seed) + " max_coefficient=" + std::to_string(max_coefficient);
      EXPECT_TRUE(cw_test::equivalent(c, method, cw::encode_options{full}, context));
      ++checked;
    }
  }
  return checked;
}

cw_test::raw_constraint make(std::vector<cw::term> terms, relation rel, std::int64_t bound) {
  cw_test::raw_constraint c;
  c.terms = std::move(terms);
  c.rel = rel;
  c.bound = bound;
  return c;
}

// Hand-made corner cases of normalisation and of the encodings.
std::vector<cw_test::raw_constraint> corner_cases(bool huge_bounds) {
  std::vector<cw_test::raw_constraint> cases;
  auto all_relations = [&](const std::vector<cw::term>& terms, std::int64_t bound) {
    for (const auto rel : {relation::le, relation::ge, relation::eq}) cases.push_back(make(terms, rel, bound));
  };
  // positive coefficients, one of each size
  all_relations({{5, lit(1)}, {3, lit(2)}, {3, lit(3)}, {2, lit(4)}, {1, lit(5)}}, 7);
  // negative and zero coefficients, a negated literal
  all_relations({{-4, lit(1)}, {3, lit(2)}, {0, lit(3)}, {-2, lit(-4)}, {5, lit(5)}}, 1);
  // duplicates of one variable
  all_relations({{2, lit(1)}, {3, lit(2)}, {2, lit(1)}, {1, lit(3)}, {1, lit(2)}}, 5);
  // complementary literals (x and ~x leave a constant)
  all_relations({{3, lit(1)}, {2, lit(-1)}, {4, lit(2)}, {1, lit(3)}, {2, lit(4)}}, 5);
  // coefficients far above the bound
  all_relations({{1000, lit(1)}, {2, lit(2)}, {3, lit(3)}, {999999, lit(4)}, {1, lit(5)}}, 4);
  // equalities: one solution each side of x1; a parity constraint (x3 forced)
  cases.push_back(make({{3, lit(1)}, {2, lit(2)}, {2, lit(3)}, {1, lit(4)}}, relation::eq, 4));
  cases.push_back(make({{2, lit(1)}, {2, lit(2)}, {1, lit(3)}}, relation::eq, 3));
  cases.push_back(make({{6, lit(1)}, {10, lit(2)}, {15, lit(3)}, {7, lit(4)}}, relation::eq, 17));
  // trivially true, trivially false, unreachable equality (gcd), all forced
  cases.push_back(make({{1, lit(1)}, {2, lit(2)}}, relation::le, 10));
  cases.push_back(make({{1, lit(1)}, {1, lit(2)}}, relation::ge, 3));
  cases.push_back(make({{2, lit(1)}, {4, lit(2)}, {6, lit(3)}}, relation::eq, 5));
  cases.push_back(make({{1, lit(1)}, {2, lit(2)}}, relation::eq, 0));
  // equal coefficients (a cardinality after dividing by the gcd), saturation for >=
  all_relations({{4, lit(1)}, {4, lit(2)}, {4, lit(3)}, {4, lit(-4)}}, 8);
  cases.push_back(make({{7, lit(1)}, {2, lit(2)}, {2, lit(3)}, {1, lit(4)}}, relation::ge, 3));
  if (huge_bounds) {
    // coefficients near 2^62 (their sum stays below 2^63)
    const std::vector<cw::term> big{{two_to(62) - 1, lit(1)},
                                    {two_to(60), lit(2)},
                                    {two_to(60) + 7, lit(3)},
                                    {3, lit(4)},
                                    {two_to(59) + 1, lit(5)}};
    all_relations(big, two_to(62));
    all_relations(big, two_to(61) + two_to(60) + 5);
    all_relations({{-(two_to(62) - 1), lit(1)}, {two_to(61) - 3, lit(-2)}, {5, lit(3)}, {two_to(60), lit(4)}},
                  -two_to(61));
  }
  return cases;
}

// Clauses satisfied by a full assignment (value[v] for variable v), evaluated
// directly: the independent check of the adder building blocks.
bool satisfies(const cw::cnf_buffer& cnf, const std::vector<bool>& value) {
  for (const auto clause : cnf) {
    bool sat = false;
    for (const cw::literal l : clause) {
      const bool v = value[static_cast<std::size_t>(l.var())];
      if (l.negative() ? !v : v) sat = true;
    }
    if (!sat) return false;
  }
  return true;
}

// Whether an adder's outputs (s, carry) may take these values when the
// inputs' sum bit is `sum` and their carry `carry_value`: both sides
// define them exactly; the upper side only forces them up (s + 2 carry at
// least the inputs' count), the lower side only down.
bool adder_outputs_allowed(cw::sides which, bool s, bool carry, bool sum, bool carry_value) {
  switch (which) {
    case cw::sides::both:
      return (s ? sum : !sum) && (carry ? carry_value : !carry_value);
    case cw::sides::upper:
      return (s || !sum) && (carry || !carry_value);
    case cw::sides::lower:
      return (!s || sum) && (!carry || carry_value);
  }
  return false;
}

std::vector<cw::literal> first_literals(std::int32_t n) {
  std::vector<cw::literal> xs;
  for (std::int32_t v = 1; v <= n; ++v) xs.push_back(lit(v));
  return xs;
}

// Every assignment of the inputs x1..xn (n = a.size()), assumed in one CaDiCaL
// over `cnf`: check(r) sees the answer and the weighted sum of the inputs.
struct input_outcome {
  CaDiCaL::Solver& solver;
  int status;          // 10 satisfiable, 20 unsatisfiable
  std::int64_t total;  // sum of a_i over the true inputs
  std::uint32_t bits;  // the assignment: bit i is x(i+1)
};
template <class Check>
void for_every_input(const cw::cnf_buffer& cnf, const std::vector<std::int64_t>& a, Check check) {
  CaDiCaL::Solver solver;
  cw_test::add_to_solver(solver, cnf);
  const auto n = static_cast<int>(a.size());
  for (std::uint32_t bits = 0; bits < (1U << n); ++bits) {
    std::int64_t total = 0;
    for (int i = 0; i < n; ++i) {
      const bool v = ((bits >> i) & 1U) != 0;
      solver.assume(v ? i + 1 : -(i + 1));
      if (v) total += a[static_cast<std::size_t>(i)];
    }
    const int status = solver.solve();
    check(input_outcome{solver, status, total, bits});
  }
}

}  // namespace

// ---------------------------------------------------------------- equivalence

TEST(WeightedEquivalence, CardinalitySuite) {
  // The cardinality and at-most-one kinds, unit coefficients.
  for (const auto m : weighted_methods) EXPECT_GT(cw_test::cardinality_suite(m, 8), 300U) << name_of(m);
}

TEST(WeightedEquivalence, RandomSmallCoefficients) {
  for (const auto m : weighted_methods) EXPECT_EQ(check_random(m, 60, 10, 9), 120U) << name_of(m);
}

TEST(WeightedEquivalence, RandomLargeCoefficients) {
  // The sequential weight counter has O(nK) registers: its bounds stay small.
  for (const auto m : weighted_methods) {
    const bool registers = m == cw::method_id::sequential_weight_counter;
    EXPECT_EQ(check_random(m, 30, 10, registers ? 40 : 1000, 101), 60U) << name_of(m);
    if (!registers) {
      EXPECT_EQ(check_random(m, 30, 10, two_to(58), 201), 60U) << name_of(m);
    }
  }
}

TEST(WeightedEquivalence, TwelveInputs) {
  for (const auto m : weighted_methods) EXPECT_EQ(check_random(m, 1, 12, 9, 999), 2U) << name_of(m);
  for (const auto m : weighted_methods) {
    auto c = make({}, relation::le, 0);
    for (std::int32_t v = 1; v <= 12; ++v) c.terms.push_back({(v * 7) % 11 + 1, lit(v % 3 == 0 ? -v : v)});
    for (const auto rel : {relation::le, relation::ge, relation::eq}) {
      c.rel = rel;
      c.bound = 31;
      EXPECT_TRUE(cw_test::equivalent(c, m, {}, "twelve inputs")) << name_of(m);
    }
  }
}

TEST(WeightedEquivalence, CornerCases) {
  for (const auto m : weighted_methods) {
    const bool huge = m != cw::method_id::sequential_weight_counter;
    for (const auto& c : corner_cases(huge))
      for (const bool full : {false, true})
        EXPECT_TRUE(cw_test::equivalent(c, m, cw::encode_options{full}, "corner case")) << name_of(m);
  }
}

// ---------------------------------------------------------------- propagation

TEST(WeightedPropagation, BddTotalizerAndCounterAreArcConsistentOnInequalities) {
  // Abío et al. 2012 (BDD), Joshi et al. 2015 (generalized totalizer),
  // Hölldobler et al. 2012 (sequential weight counter) state arc-consistency
  // for <=; >= is <= over the negations. Measured here, both option values.
  for (const auto m :
       {cw::method_id::bdd, cw::method_id::generalized_totalizer, cw::method_id::sequential_weight_counter})
    for (std::uint32_t seed = 1; seed <= 40; ++seed)
      for (const auto rel : {relation::le, relation::ge})
        for (const bool full : {false, true}) {
          std::mt19937_64 rng(seed);
          auto c = cw_test::random_linear(rng, static_cast<std::int32_t>(2 + rng() % 6), 9, true, seed % 3 == 0);
          c.rel = rel;
          if (c.normalized().is_constant()) continue;
          const auto r = cw_test::measure_propagation(c, m, cw::encode_options{full}, seed);
          EXPECT_TRUE(r.arc_consistent) << name_of(m) << " seed=" << seed << " " << c.describe() << ": "
                                        << r.counterexample;
        }
}

TEST(WeightedPropagation, CardinalityEqualityIsArcConsistent) {
  // On unit coefficients = stays arc-consistent for the three (measured).
  for (const auto m :
       {cw::method_id::bdd, cw::method_id::generalized_totalizer, cw::method_id::sequential_weight_counter})
    for (std::int32_t n = 3; n <= 7; ++n)
      for (std::int64_t k = 1; k < n; ++k) {
        const auto c = cw_test::cardinality(n, relation::eq, k, n % 2 == 0);
        const auto r = cw_test::measure_propagation(c, m);
        EXPECT_TRUE(r.arc_consistent) << name_of(m) << " " << c.describe() << ": " << r.counterexample;
      }
}

TEST(WeightedPropagation, WeightedEqualityIsNotArcConsistent) {
  // 2 x1 + 2 x2 + x3 = 3 forces x3 (the sum is odd) with nothing assigned;
  // brute force confirms it, and no node, register or output of the three
  // methods becomes unit, so unit propagation misses it: what an equality
  // implies is a subset-sum question. The table's arc-consistency claims are
  // for <= and >= (tests/test_method_table.cpp measures = apart).
  const auto c = make({{2, lit(1)}, {2, lit(2)}, {1, lit(3)}}, relation::eq, 3);
  for (std::uint32_t bits = 0; bits < 8; ++bits) {
    auto value = [&](std::int32_t v) { return ((bits >> (v - 1)) & 1U) != 0; };
    if (cw::holds(c.terms, c.rel, c.bound, value)) {
      EXPECT_TRUE(value(3));
    }
  }
  for (const auto m :
       {cw::method_id::bdd, cw::method_id::generalized_totalizer, cw::method_id::sequential_weight_counter}) {
    const auto r = cw_test::measure_propagation(c, m);
    EXPECT_FALSE(r.arc_consistent) << name_of(m);
    EXPECT_NE(r.counterexample.find("implies x3"), std::string::npos) << name_of(m) << ": " << r.counterexample;
  }
}

TEST(WeightedPropagation, AdderIsNotArcConsistent) {
  // Warners 1998 / Eén & Sörensson 2006: the adder network is not
  // arc-consistent. x1 + x2 + x3 + x4 <= 1 with x1 true implies ~x2, which the
  // sum bits do not propagate.
  const auto r = cw_test::measure_propagation(cw_test::cardinality(4, relation::le, 1), cw::method_id::adder);
  EXPECT_FALSE(r.arc_consistent);
  EXPECT_EQ(r.counterexample.rfind("UNSOUND", 0), std::string::npos) << r.counterexample;
}

// ---------------------------------------------------------------- adder sizes

TEST(Adder, FullAdderIsTheTextbookFourteen) {
  // Textbook full adder: sum = a xor b xor c is 8 clauses (one per odd/even
  // pattern), carry = majority is 6 (3 per direction). Truth table by direct
  // evaluation over all 2^5 assignments of a, b, c, sum, carry.
  for (const auto which : {cw::sides::both, cw::sides::upper, cw::sides::lower}) {
    cw::variable_pool pool(3);
    cw::cnf_buffer cnf;
    const auto o = cw::full_adder(cnf, pool, lit(1), lit(2), lit(3), which);
    const std::size_t expected = which == cw::sides::both ? 14 : 7;
    ASSERT_EQ(cnf.size(), expected);
    ASSERT_EQ(pool.auxiliary_variables(), 2);
    for (std::uint32_t bits = 0; bits < 32; ++bits) {
      std::vector<bool> value(6);
      for (int v = 1; v <= 5; ++v) value[static_cast<std::size_t>(v)] = ((bits >> (v - 1)) & 1U) != 0;
      const int count = static_cast<int>(value[1]) + static_cast<int>(value[2]) + static_cast<int>(value[3]);
      const bool s = value[static_cast<std::size_t>(o.sum.var())];
      const bool carry = value[static_cast<std::size_t>(o.carry.var())];
      const bool xor3 = count % 2 == 1;
      const bool majority = count >= 2;
      EXPECT_EQ(satisfies(cnf, value), adder_outputs_allowed(which, s, carry, xor3, majority)) << "bits " << bits;
    }
  }
}

TEST(Adder, HalfAdderIsTheTextbookSeven) {
  // Textbook half adder: sum = a xor b is 4 clauses, carry = a and b is 3
  // (one for a & b -> carry, two for carry -> a, carry -> b).
  for (const auto which : {cw::sides::both, cw::sides::upper, cw::sides::lower}) {
    cw::variable_pool pool(2);
    cw::cnf_buffer cnf;
    const auto o = cw::half_adder(cnf, pool, lit(1), lit(2), which);
    const std::size_t expected = which == cw::sides::both ? 7 : (which == cw::sides::upper ? 3 : 4);
    ASSERT_EQ(cnf.size(), expected);
    for (std::uint32_t bits = 0; bits < 16; ++bits) {
      std::vector<bool> value(5);
      for (int v = 1; v <= 4; ++v) value[static_cast<std::size_t>(v)] = ((bits >> (v - 1)) & 1U) != 0;
      const bool s = value[static_cast<std::size_t>(o.sum.var())];
      const bool carry = value[static_cast<std::size_t>(o.carry.var())];
      const bool xor2 = value[1] ? !value[2] : value[2];
      const bool both = value[1] && value[2];
      EXPECT_EQ(satisfies(cnf, value), adder_outputs_allowed(which, s, carry, xor2, both)) << "bits " << bits;
    }
  }
}

TEST(Adder, SmallNetworksCountedByHand) {
  // x1 + x2 + x3 <= 1: one full adder (upper half: 4 + 3 clauses), bits
  // (sum, carry); K = 01 has one zero bit below the top, bit 1: clause ~carry.
  // 8 clauses, 2 variables.
  {
    const auto m =
        cw::measure(cw::method_id::adder, cw::variable_pool(3), cw_test::cardinality(3, relation::le, 1).normalized());
    EXPECT_EQ(m.size.clauses, 8U);
    EXPECT_EQ(m.size.variables, 2U);
  }
  // The same with =: both halves (8 + 6) and the two units sum, ~carry.
  {
    const auto m =
        cw::measure(cw::method_id::adder, cw::variable_pool(3), cw_test::cardinality(3, relation::eq, 1).normalized());
    EXPECT_EQ(m.size.clauses, 16U);
  }
  // 5 x1 + 3 x2 <= 6: bit 0 holds x1, x2; bit 1 x2; bit 2 x1. Half adders:
  // (x1, x2) -> s0, c1; (x2, c1) -> s1, c2; (x1, c2) -> s2, c3: 3 x 3 upper
  // clauses, 6 variables. K = 0110 over 4 bits: zero bit 0 gives
  // ~s0 | ~s1 | ~s2, zero bit 3 gives ~c3. 11 clauses.
  {
    const auto m = cw::measure(cw::method_id::adder, cw::variable_pool(2),
                               make({{5, lit(1)}, {3, lit(2)}}, relation::le, 6).normalized());
    EXPECT_EQ(m.size.clauses, 11U);
    EXPECT_EQ(m.size.variables, 6U);
  }
}

TEST(Adder, SumBitsCompareAgainLater) {
  // One network (both sides), compared first with <= 9, later with <= 6 and
  // >= 4: the clauses are equivalent to 4 <= sum <= 6 (CaDiCaL, all 2^5
  // assignments against direct evaluation).
  const std::vector<std::int64_t> a{5, 3, 2, 2, 1};
  const auto xs = first_literals(5);
  cw::variable_pool pool(5);
  cw::cnf_buffer cnf;
  const auto sum = cw::build_adder_network(cnf, pool, xs, a, cw::sides::both);
  cw::compare_binary_sum(cnf, sum, relation::le, 9);
  cw::compare_binary_sum(cnf, sum, relation::le, 6);
  cw::compare_binary_sum(cnf, sum, relation::ge, 4);
  for_every_input(cnf, a, [&](const input_outcome& r) {
    EXPECT_EQ(r.status == 10, r.total >= 4 && r.total <= 6) << "bits " << r.bits;
    if (r.status == 10) {
      std::int64_t value = 0;
      for (std::size_t b = 0; b < sum.size(); ++b)
        if (sum.bits[b].valid() && r.solver.val(sum.bits[b].dimacs()) > 0) value += std::int64_t{1} << b;
      EXPECT_EQ(value, r.total) << "the bits are the binary sum";
    }
  });
}

// ---------------------------------------------------------------- BDD sizes

TEST(Bdd, HandDrawnDiagram) {
  // 3 x1 + 2 x2 + 2 x3 + x4 <= 4 (already in decreasing order). The reduced
  // diagram, drawn by hand (high child first):
  //   R  = x1 ? E : C          C = 2x2+2x3+x4 <= 4 = ~(x2 & x3 & x4)
  //   C  = x2 ? B : true       B = 2x3+x4 <= 2     = ~(x3 & x4)
  //   B  = x3 ? A : true       A = x4 <= 0         = ~x4
  //   A  = x4 ? false : true
  //   E  = x2 ? false : D      E = 2x2+2x3+x4 <= 1 = ~x2 & ~x3
  //   D  = x3 ? false : true   D = 2x3+x4 <= 1     = ~x3
  // 6 nodes. Two clauses per node (~v | low, ~v | ~x | high), dropping those
  // with a true child: A 1, B 1, C 1, D 1, E 2, R 2 = 8, plus the root unit.
  // With the 6 if-then-else clauses: A 2, B 4, C 4, D 2, E 4, R 6 = 22 + 1.
  const auto le = make({{3, lit(1)}, {2, lit(2)}, {2, lit(3)}, {1, lit(4)}}, relation::le, 4).normalized();
  auto m = cw::measure(cw::method_id::bdd, cw::variable_pool(4), le);
  EXPECT_EQ(m.size.variables, 6U);
  EXPECT_EQ(m.size.clauses, 9U);
  m = cw::measure(cw::method_id::bdd, cw::variable_pool(4), le, cw::encode_options{true});
  EXPECT_EQ(m.size.variables, 6U);
  EXPECT_EQ(m.size.clauses, 23U);
  // >= 4 is <= 4 over the negations (8 - 4 = 4): the same diagram.
  const auto ge = make({{3, lit(1)}, {2, lit(2)}, {2, lit(3)}, {1, lit(4)}}, relation::ge, 4).normalized();
  m = cw::measure(cw::method_id::bdd, cw::variable_pool(4), ge);
  EXPECT_EQ(m.size.variables, 6U);
  EXPECT_EQ(m.size.clauses, 9U);
  // = 4: the solutions are x1 ~x2 ~x3 x4 and ~x1 x2 x3 ~x4; the diagram
  //   R = x1 ? W : S,  W = x2 ? false : V,  V = x3 ? false : U,  U = x4 ? true : false,
  //                    S = x2 ? Q : false,  Q = x3 ? P : false,  P = x4 ? false : true,
  // 7 nodes. Three clauses per node (~v|~x|high, ~v|x|low, ~v|high|low),
  // dropping satisfied ones: U 1, P 1, the other five 3 each = 17, plus the root.
  const auto eq = make({{3, lit(1)}, {2, lit(2)}, {2, lit(3)}, {1, lit(4)}}, relation::eq, 4).normalized();
  m = cw::measure(cw::method_id::bdd, cw::variable_pool(4), eq);
  EXPECT_EQ(m.size.variables, 7U);
  EXPECT_EQ(m.size.clauses, 18U);
}

TEST(Bdd, CardinalityDiagramIsAGrid) {
  // The reduced diagram of "at most k of n" (1 <= k <= n-2) has a node for
  // every (trues so far t <= k, falses so far f <= n-k-1): (k+1)(n-k) nodes.
  // Hand check, n = 4, k = 2: levels hold 1, 2, 2, 1 nodes = 6 = 3 x 2.
  for (std::int32_t n = 3; n <= 14; ++n)
    for (std::int64_t k = 1; k <= n - 2; ++k) {
      const auto c = cw_test::cardinality(n, relation::le, k).normalized();
      const auto m = cw::measure(cw::method_id::bdd, cw::variable_pool(n), c);
      EXPECT_EQ(m.size.variables, static_cast<std::uint64_t>((k + 1) * (n - k))) << "n=" << n << " k=" << k;
    }
}

TEST(Bdd, OrderIsDecreasingCoefficientAndNodesAreExposed) {
  cw::variable_pool pool(4);
  cw::cnf_buffer cnf;
  const std::vector<std::int64_t> a{1, 3, 2, 2};
  const auto xs = first_literals(4);
  cw::bdd_builder<cw::cnf_buffer> diagram(cnf, pool, xs, a, cw::bdd_shape::at_most, false);
  const std::vector<cw::literal> order(diagram.inputs().begin(), diagram.inputs().end());
  EXPECT_EQ(order, (std::vector<cw::literal>{lit(2), lit(3), lit(4), lit(1)}));
  const cw::bdd_ref root = diagram.root(4);
  ASSERT_TRUE(root.is_node());
  EXPECT_EQ(diagram.nodes().size(), 6U);  // the hand-drawn diagram above
  const cw::bdd_node& r = diagram.nodes()[static_cast<std::size_t>(root.node)];
  EXPECT_EQ(r.level, 0U);
  // The root stands for every bound in [beta, gamma]: 3x+2y+2z+w <= 4 has the
  // same solutions as <= K exactly for K = 4 (3 + 2 = 5 and 2 + 2 = 4 are sums).
  EXPECT_EQ(r.beta, 4);
  EXPECT_EQ(r.gamma, 4);
  // The same diagram for a bound inside an interval is the same root.
  EXPECT_EQ(diagram.root(4), root);
  EXPECT_TRUE(diagram.root(8).is_true());
  EXPECT_TRUE(diagram.root(-1).is_false());
}

TEST(Bdd, TighteningTheBoundSharesNodes) {
  // Build <= 11, then tighten to <= 7 on the same builder: asserting the new
  // root gives exactly sum <= 7 (CaDiCaL over all assignments), and the second
  // diagram costs fewer nodes than building it alone.
  const std::vector<std::int64_t> a{6, 5, 4, 4, 3, 2, 2, 1};
  const auto xs = first_literals(8);
  cw::variable_pool pool(8);
  cw::cnf_buffer cnf;
  cw::bdd_builder<cw::cnf_buffer> diagram(cnf, pool, xs, a, cw::bdd_shape::at_most, false);
  const cw::bdd_ref loose = diagram.root(11);
  cnf.add_clause({diagram.literal_of(loose)});
  const std::size_t before = diagram.nodes().size();
  const cw::bdd_ref tight = diagram.root(7);
  cnf.add_clause({diagram.literal_of(tight)});
  const std::size_t added = diagram.nodes().size() - before;

  cw::variable_pool alone_pool(8);
  cw::counting_sink alone_sink;
  cw::bdd_builder<cw::counting_sink> alone(alone_sink, alone_pool, xs, a, cw::bdd_shape::at_most, false);
  (void)alone.root(7);
  EXPECT_LT(added, alone.nodes().size()) << "the tighter diagram reuses nodes";

  for_every_input(cnf, a,
                  [&](const input_outcome& r) { EXPECT_EQ(r.status == 10, r.total <= 7) << "bits " << r.bits; });
}

TEST(Bdd, FullEquivalenceRootsAreReified) {
  // With full_equivalence each root literal is equivalent to "sum <= K":
  // under every assignment of the inputs CaDiCaL finds the root true exactly
  // when the sum is at most K.
  const std::vector<std::int64_t> a{7, 4, 4, 3, 1, 1};
  const auto xs = first_literals(6);
  cw::variable_pool pool(6);
  cw::cnf_buffer cnf;
  cw::bdd_builder<cw::cnf_buffer> diagram(cnf, pool, xs, a, cw::bdd_shape::at_most, true);
  std::vector<std::pair<std::int64_t, cw::literal>> roots;
  for (std::int64_t k = 1; k < 20; k += 3) {
    const auto r = diagram.root(k);
    ASSERT_TRUE(r.is_node()) << k;
    roots.emplace_back(k, diagram.literal_of(r));
  }
  for_every_input(cnf, a, [&](const input_outcome& r) {
    ASSERT_EQ(r.status, 10);
    for (const auto& [k, l] : roots) EXPECT_EQ(r.solver.val(l.dimacs()) > 0, r.total <= k) << "bits " << r.bits;
  });
}

TEST(Bdd, NodeBudgetThrowsOverBudget) {
  // Distinct large coefficients make the diagram grow with the number of
  // distinct partial sums; a budget of 1000 nodes stops it with over_budget
  // naming the constraint.
  std::mt19937_64 rng(7);
  std::vector<cw::term> terms;
  for (std::int32_t v = 1; v <= 40; ++v) terms.push_back({static_cast<std::int64_t>(rng() % two_to(40)) + 1, lit(v)});
  std::int64_t total = 0;
  for (const auto& t : terms) total += t.coefficient;
  const auto c = cw::normalize(terms, relation::le, total / 2, 17, "knapsack");
  cw::variable_pool pool(40);
  cw::counting_sink sink;
  try {
    cw::encode_bdd(sink, pool, c, {}, 1000);
    FAIL() << "expected over_budget";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::over_budget);
    EXPECT_NE(std::string(e.what()).find("constraint 17 (knapsack)"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find("1000"), std::string::npos) << e.what();
  }
  // The builder takes the budget directly.
  cw::bdd_builder<cw::counting_sink> small(sink, pool, c.literals, c.coefficients, cw::bdd_shape::at_most, false, 50);
  EXPECT_THROW((void)small.root(c.bound), cw::error);
}

// ---------------------------------------------------------------- generalized totalizer

namespace {

// The totalizer with outputs cut at k+1 (Bailleux & Boufkhad 2003; Büttner &
// Rintanen 2005), counted independently: a node over m inputs has
// min(m, k+1) outputs; joining children with a and b outputs costs
// (a+1)(b+1)-1 clauses per direction. Same tree shape as the encoding: the
// left child takes floor(m/2). Hand check n = 3, k = 1: the node (x2, x3) has
// 3 clauses and 2 outputs; the root joins 1 and 2 outputs: 2*3-1 = 5 clauses,
// 2 outputs; 8 clauses + the unit ~o2 = 9, 4 variables.
struct tally {
  std::uint64_t outputs = 0;
  std::uint64_t clauses = 0;
  std::uint64_t variables = 0;
};
tally cut_totalizer(std::uint64_t m, std::uint64_t k) {
  if (m == 1) return {1, 0, 0};
  const tally l = cut_totalizer(m / 2, k);
  const tally r = cut_totalizer(m - m / 2, k);
  const std::uint64_t out = std::min(m, k + 1);
  return {out, l.clauses + r.clauses + (l.outputs + 1) * (r.outputs + 1) - 1, l.variables + r.variables + out};
}

}  // namespace

TEST(GeneralizedTotalizer, CardinalitySizeIsTheCutTotalizer) {
  EXPECT_EQ(cut_totalizer(3, 1).clauses, 8U);  // the hand check above
  for (std::uint64_t n = 3; n <= 40; ++n)
    for (std::uint64_t k = 1; k + 2 <= n; ++k) {
      const auto ni = static_cast<std::int32_t>(n);
      const auto ki = static_cast<std::int64_t>(k);
      const tally t = cut_totalizer(n, k);
      auto m = cw::measure(cw::method_id::generalized_totalizer, cw::variable_pool(ni),
                           cw_test::cardinality(ni, relation::le, ki).normalized());
      ASSERT_EQ(m.size.clauses, t.clauses + 1) << "n=" << n << " k=" << k;
      ASSERT_EQ(m.size.variables, t.variables) << "n=" << n << " k=" << k;
      // >= k is <= n-k over the negated inputs.
      const tally g = cut_totalizer(n, n - k);
      m = cw::measure(cw::method_id::generalized_totalizer, cw::variable_pool(ni),
                      cw_test::cardinality(ni, relation::ge, ki).normalized());
      if (k >= 2) {  // k = 1 is a clause; k = n-1 an at-most-one of the negations, the same count
        ASSERT_EQ(m.size.clauses, g.clauses + 1) << ">= n=" << n << " k=" << k;
        ASSERT_EQ(m.size.variables, g.variables) << ">= n=" << n << " k=" << k;
      }
    }
}

TEST(GeneralizedTotalizer, OutputsAreTheReachableSums) {
  // The root's outputs are the sums some subset of the inputs reaches
  // (brute force), those above K collapsed into K+1; with both sides each
  // output is "sum >= w" under every assignment (CaDiCaL).
  const std::vector<std::int64_t> a{9, 6, 5, 5, 2, 1};
  const auto xs = first_literals(6);
  const std::int64_t k = 17;
  cw::variable_pool pool(6);
  cw::cnf_buffer cnf;
  const auto root = cw::build_generalized_totalizer(cnf, pool, xs, a, k + 1, cw::sides::both);
  std::set<std::int64_t> reachable;
  for (std::uint32_t bits = 1; bits < 64; ++bits) {
    std::int64_t total = 0;
    for (int i = 0; i < 6; ++i)
      if (((bits >> i) & 1U) != 0) total += a[static_cast<std::size_t>(i)];
    reachable.insert(std::min(total, k + 1));
  }
  std::set<std::int64_t> keys;
  for (const auto& [w, l] : root.outputs) keys.insert(w);
  EXPECT_EQ(keys, reachable);
  for_every_input(cnf, a, [&](const input_outcome& r) {
    ASSERT_EQ(r.status, 10);
    for (const auto& [w, l] : root.outputs) EXPECT_EQ(r.solver.val(l.dimacs()) > 0, r.total >= w) << "bits " << r.bits;
  });
}

TEST(GeneralizedTotalizer, TighteningWithTheOutputs) {
  // Upper side only (the published encoding for <= K): asserting ~o_w for
  // every output w > K2 enforces sum <= K2 (CaDiCaL over all assignments).
  const std::vector<std::int64_t> a{8, 7, 4, 3, 3, 1};
  const auto xs = first_literals(6);
  cw::variable_pool pool(6);
  cw::cnf_buffer cnf;
  const auto root = cw::build_generalized_totalizer(cnf, pool, xs, a, 16, cw::sides::upper);
  for (const auto& [w, l] : root.outputs)
    if (w > 9) cnf.add_clause({~l});
  for_every_input(cnf, a,
                  [&](const input_outcome& r) { EXPECT_EQ(r.status == 10, r.total <= 9) << "bits " << r.bits; });
}

TEST(GeneralizedTotalizer, OutputBudgetThrowsOverBudget) {
  // 30 distinct powers of two reach 2^30 distinct sums: a budget of 5000
  // outputs stops the tree with over_budget naming the constraint.
  std::vector<cw::term> terms;
  for (std::int32_t v = 1; v <= 30; ++v) terms.push_back({two_to(v), lit(v)});
  const auto c = cw::normalize(terms, relation::le, two_to(30), 6, "powers");
  cw::variable_pool pool(30);
  cw::counting_sink sink;
  try {
    cw::encode_generalized_totalizer(sink, pool, c, {}, 5000);
    FAIL() << "expected over_budget";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::over_budget);
    EXPECT_NE(std::string(e.what()).find("constraint 6 (powers)"), std::string::npos) << e.what();
  }
}

// ---------------------------------------------------------------- sequential weight counter

TEST(SequentialWeightCounter, SizeMatchesThePublishedClauses) {
  // Hölldobler, Manthey, Steinke 2012, sum w_i x_i <= K over rows 1..n-1:
  // w_1 + sum_{i=2}^{n-1} (w_i + K + (K - w_i)) clauses from the three
  // families plus n-1 clauses ~xi | ~s(i-1,K+1-w_i); K(n-1) registers.
  // Hand check n = 3, w = (1, 2, 1), K = 2: row 1 ~x1|s11; row 2 ~x2|s21,
  // ~x2|s22, ~s11|s21, ~s12|s22 (no ternary: K - w2 = 0); ~x2|~s11; ~x3|~s22:
  // 7 clauses, 4 registers.
  auto published = [](const std::vector<std::int64_t>& w, std::int64_t k) {
    const std::size_t n = w.size();
    std::int64_t clauses = w[0] + static_cast<std::int64_t>(n - 1);
    for (std::size_t i = 1; i + 1 < n; ++i) clauses += w[i] + k + (k - w[i]);
    return clauses;
  };
  EXPECT_EQ(published({1, 2, 1}, 2), 7);
  std::mt19937_64 rng(11);
  for (int round = 0; round < 200; ++round) {
    const auto n = static_cast<std::int32_t>(3 + rng() % 20);
    std::vector<cw::term> terms;
    std::int64_t total = 0;
    for (std::int32_t v = 1; v <= n; ++v) {
      terms.push_back({static_cast<std::int64_t>(1 + rng() % 12), lit(v)});
      total += terms.back().coefficient;
    }
    if (total <= 13) continue;
    const std::int64_t k = 12 + static_cast<std::int64_t>(rng() % static_cast<std::uint64_t>(total - 12));
    const auto c = cw::normalize(terms, relation::le, k);
    if (c.kind != cw::constraint_kind::linear) continue;
    const auto m = cw::measure(cw::method_id::sequential_weight_counter, cw::variable_pool(n), c);
    EXPECT_EQ(m.size.clauses, static_cast<std::uint64_t>(published(c.coefficients, c.bound))) << "round " << round;
    EXPECT_EQ(m.size.variables, static_cast<std::uint64_t>(c.bound * static_cast<std::int64_t>(c.size() - 1)));
  }
}

TEST(SequentialWeightCounter, FullRowCountsWeight) {
  // The counter with both sides: the last row's register j is "weight >= j"
  // under every assignment (CaDiCaL).
  const std::vector<std::int64_t> a{4, 3, 3, 2, 1};
  const auto xs = first_literals(5);
  cw::variable_pool pool(5);
  cw::cnf_buffer cnf;
  const auto row = cw::build_sequential_weight_counter(cnf, pool, xs, a, 9, cw::sides::both);
  ASSERT_EQ(row.size(), 9U);
  for_every_input(cnf, a, [&](const input_outcome& r) {
    ASSERT_EQ(r.status, 10);
    for (std::size_t j = 1; j <= row.size(); ++j)
      EXPECT_EQ(r.solver.val(row.at_least(j).dimacs()) > 0, r.total >= static_cast<std::int64_t>(j)) << r.bits;
  });
}

TEST(SequentialWeightCounter, HugeBoundIsOverBudget) {
  // K(n-1) registers cannot exist for K near 2^62: a clear error naming the
  // constraint, before anything is allocated.
  const std::vector<cw::term> terms{{two_to(61), lit(1)}, {two_to(61) - 1, lit(2)}, {two_to(60), lit(3)}};
  for (const auto rel : {relation::le, relation::ge, relation::eq})
    for (const bool full : {false, true}) {
      const auto c = cw::normalize(terms, rel, two_to(61) + 5, 3, "huge");
      cw::variable_pool pool(3);
      cw::counting_sink sink;
      try {
        cw::encode_with(cw::method_id::sequential_weight_counter, sink, pool, c, cw::encode_options{full});
        FAIL() << "expected over_budget";
      } catch (const cw::error& e) {
        EXPECT_EQ(e.id(), cw::error_id::over_budget);
        EXPECT_NE(std::string(e.what()).find("constraint 3 (huge)"), std::string::npos) << e.what();
      }
      EXPECT_TRUE(cw::measure(cw::method_id::sequential_weight_counter, cw::variable_pool(3), c).over_budget);
    }
}

// ---------------------------------------------------------------- overflow

TEST(WeightedOverflow, SumBeyondRangeNamesTheConstraint) {
  // Normalisation checks every sum: 2^62 + 2^62 does not fit.
  const std::vector<cw::term> terms{{two_to(62), lit(1)}, {two_to(62), lit(2)}, {1, lit(3)}};
  try {
    (void)cw::normalize(terms, relation::le, 5, 4, "capacity");
    FAIL() << "expected overflow";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::overflow);
    EXPECT_NE(std::string(e.what()).find("constraint 4 (capacity)"), std::string::npos) << e.what();
  }
  // A bound moved beyond range by negated literals.
  const std::vector<cw::term> negated{{two_to(62), lit(-1)}, {two_to(62), lit(-2)}};
  EXPECT_THROW((void)cw::normalize(negated, relation::ge, -two_to(62), 5), cw::error);
}

TEST(WeightedOverflow, HandBuiltConstraintBeyondRangeNamesTheConstraint) {
  // A normalized_constraint built by hand skips normalisation's checks; the
  // methods that add coefficients check again.
  cw::normalized_constraint c;
  c.kind = cw::constraint_kind::linear;
  c.rel = relation::le;
  c.bound = two_to(62);
  c.literals = {lit(1), lit(2), lit(3)};
  c.coefficients = {two_to(62), two_to(62), 3};
  c.index = 9;
  c.name = "by hand";
  for (const auto m :
       {cw::method_id::bdd, cw::method_id::generalized_totalizer, cw::method_id::sequential_weight_counter}) {
    cw::variable_pool pool(3);
    cw::counting_sink sink;
    try {
      cw::encode_with(m, sink, pool, c);
      FAIL() << name_of(m) << ": expected overflow";
    } catch (const cw::error& e) {
      EXPECT_EQ(e.id(), cw::error_id::overflow) << name_of(m) << ": " << e.what();
      EXPECT_NE(std::string(e.what()).find("constraint 9 (by hand)"), std::string::npos) << e.what();
    }
  }
}

TEST(WeightedOverflow, NonPositiveCoefficientIsAnError) {
  cw::normalized_constraint c;
  c.kind = cw::constraint_kind::linear;
  c.rel = relation::le;
  c.bound = 3;
  c.literals = {lit(1), lit(2), lit(3)};
  c.coefficients = {2, 0, 1};
  c.index = 2;
  for (const auto m : weighted_methods) {
    cw::variable_pool pool(3);
    cw::counting_sink sink;
    EXPECT_THROW(cw::encode_with(m, sink, pool, c), cw::error) << name_of(m);
  }
}
