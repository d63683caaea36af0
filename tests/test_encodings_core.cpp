// The two pipeline encodings of the core: pairwise at-most-one and Sinz's
// sequential counter, through the harness (exhaustive equivalence against
// CaDiCaL, measured propagation) and against their published sizes.
#include <clausewright/clausewright.hpp>
#include <gtest/gtest.h>

#include "harness.hpp"

namespace cw = clausewright;
using cw::lit;
using cw::relation;

TEST(Pairwise, ExhaustivelyEquivalent) {
  EXPECT_GT(cw_test::cardinality_suite(cw::method_id::pairwise, 12), 20U);
}

TEST(Pairwise, SizeIsBinomial) {
  // Folklore: n(n-1)/2 clauses, no auxiliary variables.
  for (std::int32_t n = 2; n <= 40; ++n) {
    const auto c = cw_test::cardinality(n, relation::le, 1);
    const auto m = cw::measure(cw::method_id::pairwise, cw::variable_pool(n), c.normalized());
    EXPECT_EQ(m.size.clauses, static_cast<std::uint64_t>(n * (n - 1) / 2)) << "n=" << n;
    EXPECT_EQ(m.size.variables, 0U);
  }
}

TEST(SequentialCounter, ExhaustivelyEquivalent) {
  EXPECT_GT(cw_test::cardinality_suite(cw::method_id::sequential_counter, 12), 400U);
}

TEST(SequentialCounter, SizeMatchesSinz2005) {
  // Sinz 2005 (CP), at most k of n with 1 <= k < n: k(n-1) auxiliary variables
  // and 2nk + n - 3k - 1 clauses. Hand check: n = 3, k = 1 gives 2 variables
  // and 6 + 3 - 3 - 1 = 5 clauses: (~x1|s1) (~x2|s2) (~s1|s2) (~x2|~s1) (~x3|~s2).
  // Normalisation turns k = n-1 into one clause, so k runs to n-2.
  for (std::int64_t n = 3; n <= 60; ++n)
    for (std::int64_t k = 1; k <= n - 2; ++k) {
      const auto c = cw_test::cardinality(static_cast<std::int32_t>(n), relation::le, k);
      const auto m = cw::measure(cw::method_id::sequential_counter, cw::variable_pool(static_cast<std::int32_t>(n)),
                                 c.normalized());
      ASSERT_EQ(m.size.clauses, static_cast<std::uint64_t>(2 * n * k + n - 3 * k - 1)) << "n=" << n << " k=" << k;
      ASSERT_EQ(m.size.variables, static_cast<std::uint64_t>(k * (n - 1))) << "n=" << n << " k=" << k;
    }
}

TEST(SequentialCounter, HandDrawnSmallCase) {
  // n = 3, k = 1, Sinz's five clauses over s1 = x4, s2 = x5 (see above).
  cw::variable_pool pool(3);
  cw::cnf_buffer cnf;
  cw::encode_with(cw::method_id::sequential_counter, cnf, pool,
                  cw::normalize_cardinality(std::vector{lit(1), lit(2), lit(3)}, relation::le, 1));
  ASSERT_EQ(cnf.size(), 5U);
  const std::vector<std::vector<int>> expected{{-1, 4}, {-2, 5}, {-4, 5}, {-2, -4}, {-3, -5}};
  for (std::size_t i = 0; i < cnf.size(); ++i) {
    std::vector<int> got;
    for (auto l : cnf[i]) got.push_back(l.dimacs());
    EXPECT_EQ(got, expected[i]) << "clause " << i;
  }
}

TEST(SequentialCounter, OutputsCountInBothDirections) {
  // The full counter's outputs equal "at least j" under every assignment
  // (checked by CaDiCaL with the inputs fixed).
  const std::int32_t n = 7;
  cw::variable_pool pool(n);
  cw::cnf_buffer cnf;
  std::vector<cw::literal> xs;
  for (int v = 1; v <= n; ++v) xs.push_back(lit(v));
  const auto out = cw::build_sequential_counter(cnf, pool, xs, 4, cw::sides::both);
  ASSERT_EQ(out.size(), 4U);
  CaDiCaL::Solver s;
  cw_test::add_to_solver(s, cnf);
  for (std::uint32_t bits = 0; bits < (1U << n); ++bits) {
    for (int v = 1; v <= n; ++v) s.assume(((bits >> (v - 1)) & 1U) ? v : -v);
    ASSERT_EQ(s.solve(), 10);
    const int count = __builtin_popcount(bits);
    for (std::size_t j = 1; j <= 4; ++j)
      ASSERT_EQ(s.val(out.at_least(j).dimacs()) > 0, count >= static_cast<int>(j)) << "bits " << bits << " j " << j;
  }
}
