// Normalisation of linear constraints (common practice, see
// ../shared/REFERENCES.md "Normalisation"): each rule on a hand-made case, and
// on random constraints the normalised form is checked equivalent to the
// original by brute force over every assignment.
#include <clausewright/clausewright.hpp>
#include <gtest/gtest.h>

#include <random>

#include "harness.hpp"

namespace cw = clausewright;
using cw::lit;
using cw::relation;

namespace {
// Truth of a normalised constraint (units included) under an assignment.
template <class ValueOf>
bool normalized_holds(const cw::normalized_constraint& c, ValueOf&& value) {
  auto truth = [&value](cw::literal l) -> bool {
    const bool v = value(l.var());
    return l.negative() ? !v : v;  // not v != negative(): see cw::holds
  };
  for (const auto u : c.units)
    if (!truth(u)) return false;
  switch (c.kind) {
    case cw::constraint_kind::constant_true: return true;
    case cw::constraint_kind::constant_false: return false;
    default: break;
  }
  std::int64_t sum = 0;
  for (std::size_t i = 0; i < c.size(); ++i) sum += truth(c.literals[i]) ? c.coefficients[i] : 0;
  switch (c.rel) {
    case relation::le: return sum <= c.bound;
    case relation::ge: return sum >= c.bound;
    case relation::eq: return sum == c.bound;
  }
  return false;
}
}  // namespace

TEST(Normalize, NegativeCoefficientBecomesNegatedLiteral) {
  // 3x1 - 2x2 <= 1  ==  3x1 + 2~x2 <= 3  ==  (gcd 1) ...
  const auto c = cw::normalize(std::vector<cw::term>{{3, lit(1)}, {-2, lit(2)}}, relation::le, 1);
  ASSERT_EQ(c.kind, cw::constraint_kind::linear);
  EXPECT_EQ(c.bound, 3);
  EXPECT_EQ(c.literals, (std::vector{lit(1), lit(-2)}));
  EXPECT_EQ(c.coefficients, (std::vector<std::int64_t>{3, 2}));
}

TEST(Normalize, DuplicatesMergeAndComplementsBecomeConstants) {
  // 2x1 + 3x1 + x2 <= 5 -> 5x1 + x2 <= 5
  auto c = cw::normalize(std::vector<cw::term>{{2, lit(1)}, {3, lit(1)}, {1, lit(2)}}, relation::le, 5);
  EXPECT_EQ(c.coefficients, (std::vector<std::int64_t>{5, 1}));
  // x1 + ~x1 + x2 + x3 <= 2  ->  1 + x2 + x3 <= 2  ->  at most one of x2, x3
  c = cw::normalize(std::vector<cw::term>{{1, lit(1)}, {1, lit(-1)}, {1, lit(2)}, {1, lit(3)}}, relation::le, 2);
  EXPECT_EQ(c.kind, cw::constraint_kind::clause);  // at most 1 of 2 is the clause ~x2 | ~x3
  EXPECT_EQ(c.literals, (std::vector{lit(-2), lit(-3)}));
}

TEST(Normalize, ZeroTermsDrop) {
  const auto c = cw::normalize(std::vector<cw::term>{{0, lit(1)}, {1, lit(2)}, {1, lit(3)}, {1, lit(4)}}, relation::le, 1);
  EXPECT_EQ(c.kind, cw::constraint_kind::at_most_one);
  EXPECT_EQ(c.size(), 3U);
}

TEST(Normalize, CoefficientAboveBoundForcesFalse) {
  // 7x1 + 2x2 + 2x3 + 2x4 <= 4: x1 must be false; then 2(x2+x3+x4) <= 4 is at most 2.
  const auto c =
      cw::normalize(std::vector<cw::term>{{7, lit(1)}, {2, lit(2)}, {2, lit(3)}, {2, lit(4)}}, relation::le, 4);
  EXPECT_EQ(c.units, (std::vector{lit(-1)}));
  EXPECT_EQ(c.kind, cw::constraint_kind::clause);  // at most 2 of 3 = not all three
  // Same shape with 4 remaining terms stays a cardinality.
  const auto d = cw::normalize(std::vector<cw::term>{{7, lit(1)}, {2, lit(2)}, {2, lit(3)}, {2, lit(4)}, {2, lit(5)}},
                               relation::le, 4);
  EXPECT_EQ(d.kind, cw::constraint_kind::cardinality);
  EXPECT_EQ(d.bound, 2);
}

TEST(Normalize, GcdDividesThrough) {
  // 4x1 + 6x2 + 2x3 <= 7  -> gcd 2 -> 2x1 + 3x2 + x3 <= 3 (floor)
  auto c = cw::normalize(std::vector<cw::term>{{4, lit(1)}, {6, lit(2)}, {2, lit(3)}}, relation::le, 7);
  EXPECT_EQ(c.coefficients, (std::vector<std::int64_t>{2, 3, 1}));
  EXPECT_EQ(c.bound, 3);
  // >= rounds up: 4x1 + 6x2 + 2x3 + 2x4 >= 7 -> 2x1 + 3x2 + x3 + x4 >= 4
  c = cw::normalize(std::vector<cw::term>{{4, lit(1)}, {6, lit(2)}, {2, lit(3)}, {2, lit(4)}}, relation::ge, 7);
  EXPECT_EQ(c.coefficients, (std::vector<std::int64_t>{2, 3, 1, 1}));
  EXPECT_EQ(c.bound, 4);
  // >= cuts a coefficient above the bound to the bound: 4x1 + 6x2 + 2x3 >= 5
  // is 4x1 + 5x2 + 2x3 >= 5.
  c = cw::normalize(std::vector<cw::term>{{4, lit(1)}, {6, lit(2)}, {2, lit(3)}}, relation::ge, 5);
  EXPECT_EQ(c.coefficients, (std::vector<std::int64_t>{4, 5, 2}));
  // = with a bound the gcd does not divide is impossible.
  c = cw::normalize(std::vector<cw::term>{{4, lit(1)}, {6, lit(2)}, {2, lit(3)}}, relation::eq, 5);
  EXPECT_EQ(c.kind, cw::constraint_kind::constant_false);
}

TEST(Normalize, TrivialConstraintsEmitNothingOrTheEmptyClause) {
  cw::variable_pool pool(3);
  cw::cnf_buffer cnf;
  const auto always = cw::normalize(std::vector<cw::term>{{1, lit(1)}, {1, lit(2)}}, relation::le, 5);
  EXPECT_EQ(always.kind, cw::constraint_kind::constant_true);
  cw::encode_with(cw::method_id::sequential_counter, cnf, pool, always);
  EXPECT_TRUE(cnf.empty());
  const auto never = cw::normalize(std::vector<cw::term>{{1, lit(1)}, {1, lit(2)}}, relation::ge, 3);
  EXPECT_EQ(never.kind, cw::constraint_kind::constant_false);
  cw::encode_with(cw::method_id::sequential_counter, cnf, pool, never);
  ASSERT_EQ(cnf.size(), 1U);
  EXPECT_TRUE(cnf[0].empty());
  EXPECT_EQ(cw::normalize(std::vector<cw::term>{}, relation::le, -1).kind, cw::constraint_kind::constant_false);
  EXPECT_EQ(cw::normalize(std::vector<cw::term>{}, relation::eq, 0).kind, cw::constraint_kind::constant_true);
}

TEST(Normalize, EqualCoefficientsAreCardinality) {
  const auto c =
      cw::normalize(std::vector<cw::term>{{5, lit(1)}, {5, lit(2)}, {5, lit(3)}, {5, lit(4)}}, relation::ge, 10);
  EXPECT_EQ(c.kind, cw::constraint_kind::cardinality);
  EXPECT_EQ(c.bound, 2);
  EXPECT_TRUE(c.unit_coefficients());
  const auto amo = cw::normalize(std::vector<cw::term>{{3, lit(1)}, {3, lit(2)}, {3, lit(3)}}, relation::le, 4);
  EXPECT_EQ(amo.kind, cw::constraint_kind::at_most_one);
  const auto eo = cw::normalize(std::vector<cw::term>{{2, lit(1)}, {2, lit(2)}, {2, lit(3)}}, relation::eq, 2);
  EXPECT_EQ(eo.kind, cw::constraint_kind::exactly_one);
  // At least n-1 of n is at most one of the negations.
  const auto flipped = cw::normalize_cardinality(std::vector{lit(1), lit(2), lit(3), lit(4)}, relation::ge, 3);
  EXPECT_EQ(flipped.kind, cw::constraint_kind::at_most_one);
  EXPECT_EQ(flipped.literals, (std::vector{lit(-1), lit(-2), lit(-3), lit(-4)}));
}

TEST(Normalize, GreaterOrEqualForcesWhatItNeeds) {
  // 5x1 + x2 + x3 >= 6: x1 must be true, then x2 + x3 >= 1.
  const auto c = cw::normalize(std::vector<cw::term>{{5, lit(1)}, {1, lit(2)}, {1, lit(3)}}, relation::ge, 6);
  EXPECT_EQ(c.units, (std::vector{lit(1)}));
  EXPECT_EQ(c.kind, cw::constraint_kind::clause);
}

TEST(Normalize, OverflowIsAnErrorNamingTheConstraint) {
  const std::int64_t big = std::int64_t{1} << 62;
  try {
    (void)cw::normalize(std::vector<cw::term>{{big, lit(1)}, {big, lit(2)}, {big, lit(3)}}, relation::le, 5, 7, "cap");
    FAIL() << "sum beyond 2^63 must throw";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::overflow);
    EXPECT_EQ(e.where().constraint, 7U);
    EXPECT_NE(std::string(e.what()).find("constraint 7 (cap)"), std::string::npos);
  }
  EXPECT_THROW((void)cw::normalize(std::vector<cw::term>{{INT64_MIN, lit(1)}}, relation::le, 0), cw::error);
  EXPECT_THROW((void)cw::normalize(std::vector<cw::term>{{-5, lit(1)}}, relation::le, INT64_MAX), cw::error);
  EXPECT_THROW((void)cw::normalize(std::vector<cw::term>{{INT64_MAX, lit(1)}, {INT64_MAX, lit(1)}}, relation::le, 0),
               cw::error);
  // Coefficients up to 2^62 with a sum that fits are fine.
  const auto ok = cw::normalize(std::vector<cw::term>{{big, lit(1)}, {big - 1, lit(2)}}, relation::le, big);
  EXPECT_EQ(ok.kind, cw::constraint_kind::linear);
}

TEST(Normalize, LiteralZeroIsAnError) {
  EXPECT_THROW((void)cw::normalize(std::vector<cw::term>{{1, cw::literal()}}, relation::le, 0), cw::error);
}

TEST(Normalize, RandomConstraintsKeepTheirMeaning) {
  // Brute force over all assignments (independent of the normaliser's logic).
  for (std::uint32_t seed = 1; seed <= 3000; ++seed) {
    std::mt19937_64 rng(seed);
    const auto n = static_cast<std::int32_t>(1 + rng() % 7);
    const std::int64_t range = (seed % 3 == 0) ? 1 : (seed % 3 == 1 ? 4 : 20);
    const auto raw = cw_test::random_linear(rng, n, range, true, true);
    const auto c = raw.normalized();
    for (std::uint32_t bits = 0; bits < (1U << n); ++bits) {
      auto value = [&](std::int32_t v) { return ((bits >> (v - 1)) & 1U) != 0; };
      ASSERT_EQ(cw::holds(raw.terms, raw.rel, raw.bound, value), normalized_holds(c, value))
          << "seed " << seed << ": " << raw.describe() << " under bits " << bits;
    }
    for (std::size_t i = 0; i < c.size(); ++i) {
      ASSERT_GT(c.coefficients[i], 0) << "seed " << seed;
      if (c.rel != relation::ge) {
        ASSERT_LE(c.coefficients[i], c.bound) << "seed " << seed << ": " << raw.describe();
      }
    }
  }
}
