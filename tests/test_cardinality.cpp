// The cardinality family: totalizer, modulo totalizer, cardinality network,
// Batcher's sorting network and the binomial encoding.
// - every method through the harness' exhaustive suite (n <= 12, every k from
//   0 to n+1, every relation, plain and negated inputs, one-way and full),
//   decided by CaDiCaL;
// - sizes against the published counts, each confirmed by hand on a small
//   case (see the comments);
// - the exposed unary outputs against brute-force counting, decided by
//   CaDiCaL, and the totalizer's extend() against a fresh build.
#include <clausewright/clausewright.hpp>
#include <gtest/gtest.h>

#include <algorithm>
#include <set>
#include <vector>

#include "harness.hpp"

namespace cw = clausewright;
using cw::lit;
using cw::relation;
using cw::sides;

namespace {

std::vector<cw::literal> inputs(std::int32_t n) {
  std::vector<cw::literal> xs;
  for (std::int32_t v = 1; v <= n; ++v) xs.push_back(lit(v));
  return xs;
}

const char* name(sides s) {
  switch (s) {
    case sides::upper: return "upper";
    case sides::lower: return "lower";
    case sides::both: return "both";
  }
  return "?";
}

// CaDiCaL on the inputs fixed to `bits` plus extra assumptions.
int solve_under(CaDiCaL::Solver& solver, std::int32_t n, std::uint32_t bits, std::initializer_list<cw::literal> extra) {
  for (std::int32_t v = 1; v <= n; ++v) solver.assume(((bits >> (v - 1)) & 1U) != 0 ? v : -v);
  for (const cw::literal l : extra) solver.assume(l.dimacs());
  return solver.solve();
}

// Checks that outputs[j-1] means "at least j of the n inputs are true" in the
// sides built, for every assignment (brute-force count, CaDiCaL decides):
// upper side: a count of at least j makes ~o_j unsatisfiable; lower side: a
// count below j makes o_j unsatisfiable; and the exact values are always a
// model, so neither side says more than it should.
::testing::AssertionResult outputs_count(const cw::cnf_buffer& cnf, std::int32_t n, const cw::unary_outputs& out,
                                         sides which) {
  CaDiCaL::Solver solver;
  cw_test::add_to_solver(solver, cnf);
  for (std::uint32_t bits = 0; bits < (1U << n); ++bits) {
    const auto count = static_cast<std::size_t>(__builtin_popcount(bits));
    for (std::int32_t v = 1; v <= n; ++v) solver.assume(((bits >> (v - 1)) & 1U) != 0 ? v : -v);
    for (std::size_t j = 1; j <= out.size(); ++j) solver.assume(count >= j ? out.at_least(j).dimacs() : out.at_most(j - 1).dimacs());
    if (solver.solve() != 10)
      return ::testing::AssertionFailure() << "inputs " << bits << ": the exact output values are not a model";
    for (std::size_t j = 1; j <= out.size(); ++j) {
      if (cw::has_upper(which) && count >= j && solve_under(solver, n, bits, {out.at_most(j - 1)}) != 20)
        return ::testing::AssertionFailure() << "inputs " << bits << " (count " << count << "): output " << j
                                             << " can be false";
      if (cw::has_lower(which) && count < j && solve_under(solver, n, bits, {out.at_least(j)}) != 20)
        return ::testing::AssertionFailure() << "inputs " << bits << " (count " << count << "): output " << j
                                             << " can be true";
    }
  }
  return ::testing::AssertionSuccess();
}

cw::method_measurement measure(cw::method_id method, std::int32_t n, relation rel, std::int64_t k,
                               const cw::encode_options& options = {}) {
  return cw::measure(method, cw::variable_pool(n), cw_test::cardinality(n, rel, k).normalized(), options);
}

// Pascal's triangle, independent of the encoder's arithmetic.
std::vector<std::vector<std::uint64_t>> pascal(std::size_t rows) {
  std::vector<std::vector<std::uint64_t>> c(rows + 1);
  for (std::size_t n = 0; n <= rows; ++n) {
    c[n].assign(n + 1, 1);
    for (std::size_t r = 1; r < n; ++r) c[n][r] = c[n - 1][r - 1] + c[n - 1][r];
  }
  return c;
}

}  // namespace

// --- exhaustive equivalence (harness, CaDiCaL) --------------------------------
// Split by n so that CTest can run the parts side by side.

#define CARDINALITY_SUITE(test_name, method)                                                       \
  TEST(test_name, ExhaustivelyEquivalentUpTo10) {                                                  \
    EXPECT_EQ(cw_test::cardinality_suite(method, 10), 900U);                                         \
  }                                                                                                \
  TEST(test_name, ExhaustivelyEquivalentAt11) {                                                    \
    EXPECT_EQ(cw_test::cardinality_suite(method, 11, 11), 13U * 3U * 2U * 2U);                     \
  }                                                                                                \
  TEST(test_name, ExhaustivelyEquivalentAt12) {                                                    \
    EXPECT_EQ(cw_test::cardinality_suite(method, 12, 12), 14U * 3U * 2U * 2U);                     \
  }

CARDINALITY_SUITE(Totalizer, cw::method_id::totalizer)
CARDINALITY_SUITE(ModuloTotalizer, cw::method_id::modulo_totalizer)
CARDINALITY_SUITE(CardinalityNetwork, cw::method_id::cardinality_network)
CARDINALITY_SUITE(SortingNetwork, cw::method_id::sorting_network)
CARDINALITY_SUITE(Binomial, cw::method_id::binomial)

#undef CARDINALITY_SUITE

// --- sizes -----------------------------------------------------------------------

TEST(SortingNetwork, ComparatorCountIsBatchers) {
  // Batcher 1968: odd-even merge sort of n = 2^m inputs has
  // (m^2 - m + 4) * 2^(m-2) - 1 comparators: 1, 5, 19, 63 for n = 2, 4, 8, 16.
  // Hand check n = 4: sort (x1,x2) and (x3,x4): 2 comparators; merge them:
  // odd elements (1st of each), even elements (2nd of each), then the middle
  // pair: 3 comparators; 5 in all. A comparator is 3 clauses per direction and
  // 2 auxiliary variables (Eén & Sörensson 2006; Asín et al. 2011).
  const std::uint64_t expected[] = {1, 5, 19, 63, 191, 543};
  for (std::uint32_t m = 1; m <= 6; ++m) {
    const std::uint64_t comparators = ((m * m - m + 4) << m) / 4 - 1;  // 2^(m-2) as 2^m / 4
    ASSERT_EQ(comparators, expected[m - 1]) << "m=" << m;
    const auto n = static_cast<std::int32_t>(1U << m);
    for (const sides which : {sides::upper, sides::lower, sides::both}) {
      cw::variable_pool pool(n);
      cw::counting_sink sink;
      const auto out = cw::build_sorting_network(sink, pool, inputs(n), which);
      EXPECT_EQ(out.size(), static_cast<std::size_t>(n));
      const std::uint64_t per = which == sides::both ? 6 : 3;
      EXPECT_EQ(sink.clauses(), per * comparators) << "n=" << n << " " << name(which);
      EXPECT_EQ(pool.auxiliary_variables(), static_cast<std::int64_t>(2 * comparators)) << "n=" << n;
    }
  }
}

TEST(CardinalityNetwork, OneBlockIsTheSortingNetwork) {
  // Asín et al. 2011: with m = n (one block) the cardinality network is
  // Batcher's sorter of the block.
  for (std::int32_t n : {2, 4, 8, 16, 32}) {
    cw::variable_pool p1(n);
    cw::variable_pool p2(n);
    cw::counting_sink s1;
    cw::counting_sink s2;
    (void)cw::build_sorting_network(s1, p1, inputs(n), sides::upper);
    (void)cw::build_cardinality_network(s2, p2, inputs(n), static_cast<std::size_t>(n), sides::upper);
    EXPECT_EQ(s1.clauses(), s2.clauses()) << "n=" << n;
    EXPECT_EQ(p1.top(), p2.top()) << "n=" << n;
  }
}

TEST(CardinalityNetwork, SizeIsBlockSortersPlusMerges) {
  // Asín et al. 2011: for fixed k the network is n/m sorters of m-blocks and
  // n/m - 1 simplified merges (O(n log^2 k) in all), so doubling n (a multiple of m)
  // doubles the comparators plus the one extra merge: 2*size(n) + merge(m).
  for (std::size_t k : {1U, 3U, 7U, 15U}) {
    auto size = [&](std::int32_t n) {
      cw::variable_pool pool(n);
      cw::counting_sink sink;
      (void)cw::build_cardinality_network(sink, pool, inputs(n), k + 1, sides::upper);
      return sink.clauses();
    };
    const auto m = static_cast<std::int32_t>(k + 1);
    const std::uint64_t merge = size(2 * m) - 2 * size(m);
    EXPECT_GT(merge, 0U);
    for (std::int32_t n = 2 * m; n <= 64 * m; n *= 2) EXPECT_EQ(size(2 * n), 2 * size(n) + merge) << "k=" << k;
  }
}

namespace {

// Bailleux & Boufkhad 2003: a node joining counts of sizes a and b has
// (a+1)(b+1)-1 clauses per direction before cutting, and a+b outputs.
// Hand check a = b = 1: a1->r1, b1->r1, a1&b1->r2 (upper), r1->a1|b1, r2->a1,
// r2->b1 (lower): 3 each. The tree splits n into floor(n/2) and ceil(n/2).
std::uint64_t uncut_clauses(std::uint64_t n) {
  if (n <= 1) return 0;
  const std::uint64_t a = n / 2;
  const std::uint64_t b = n - a;
  return uncut_clauses(a) + uncut_clauses(b) + (a + 1) * (b + 1) - 1;
}
std::uint64_t uncut_variables(std::uint64_t n) { return n <= 1 ? 0 : uncut_variables(n / 2) + uncut_variables(n - n / 2) + n; }

// With the outputs cut at c (Büttner & Rintanen 2005) a node whose children
// give p = min(a, c) and q = min(b, c) outputs has m = min(p+q, c) outputs;
// the upper side keeps the pairs with 1 <= i+j <= m, the lower side those with
// i+j+1 <= m (counted here pair by pair).
struct cut_size {
  std::uint64_t upper = 0;
  std::uint64_t lower = 0;
  std::uint64_t variables = 0;
};
cut_size cut_clauses(std::uint64_t n, std::uint64_t c) {
  cut_size s;
  if (n <= 1) return s;
  const std::uint64_t a = n / 2;
  const std::uint64_t b = n - a;
  const cut_size l = cut_clauses(a, c);
  const cut_size r = cut_clauses(b, c);
  const std::uint64_t p = std::min(a, c);
  const std::uint64_t q = std::min(b, c);
  const std::uint64_t m = std::min(p + q, c);
  s.upper = l.upper + r.upper;
  s.lower = l.lower + r.lower;
  s.variables = l.variables + r.variables + m;
  for (std::uint64_t i = 0; i <= p; ++i)
    for (std::uint64_t j = 0; j <= q; ++j) {
      if (i + j >= 1 && i + j <= m) ++s.upper;
      if (i + j + 1 <= m) ++s.lower;
    }
  return s;
}

}  // namespace

TEST(Totalizer, UncutSizeIsTheNodeSum) {
  EXPECT_EQ(uncut_clauses(2), 3U);   // by hand, above
  EXPECT_EQ(uncut_clauses(3), 8U);   // (1) + (2: 3) + (1+1)(2+1)-1 = 5: 0 + 3 + 5
  EXPECT_EQ(uncut_clauses(4), 14U);  // 3 + 3 + 3*3-1
  for (std::int32_t n = 1; n <= 64; ++n)
    for (const sides which : {sides::upper, sides::lower, sides::both}) {
      cw::variable_pool pool(n);
      cw::counting_sink sink;
      const cw::totalizer tree(sink, pool, inputs(n), static_cast<std::size_t>(n), which);
      const std::uint64_t per = uncut_clauses(static_cast<std::uint64_t>(n));
      EXPECT_EQ(sink.clauses(), which == sides::both ? 2 * per : per) << "n=" << n << " " << name(which);
      EXPECT_EQ(static_cast<std::uint64_t>(pool.auxiliary_variables()), uncut_variables(static_cast<std::uint64_t>(n)));
      EXPECT_EQ(tree.outputs().size(), static_cast<std::size_t>(n));
    }
}

TEST(Totalizer, CutSizeCountsThePairsBelowTheCut) {
  for (std::int32_t n = 2; n <= 40; ++n)
    for (std::int64_t k = 1; k <= n - 2; ++k) {
      const cut_size le = cut_clauses(static_cast<std::uint64_t>(n), static_cast<std::uint64_t>(k + 1));
      const cut_size ge = cut_clauses(static_cast<std::uint64_t>(n), static_cast<std::uint64_t>(k));
      // "<= k": upper side, cut k+1, plus the unit ~r_(k+1).
      auto m = measure(cw::method_id::totalizer, n, relation::le, k);
      EXPECT_EQ(m.size.clauses, le.upper + 1) << "n=" << n << " k=" << k;
      EXPECT_EQ(m.size.variables, le.variables) << "n=" << n << " k=" << k;
      if (k >= 2 && k <= n - 2) {
        // ">= k" (normalisation keeps 2 <= k <= n-2): lower side, cut k, plus r_k.
        m = measure(cw::method_id::totalizer, n, relation::ge, k);
        EXPECT_EQ(m.size.clauses, ge.lower + 1) << "n=" << n << " k=" << k;
        EXPECT_EQ(m.size.variables, ge.variables) << "n=" << n << " k=" << k;
      }
      // "=": both sides of one tree cut at k+1, two units.
      m = measure(cw::method_id::totalizer, n, relation::eq, k);
      EXPECT_EQ(m.size.clauses, le.upper + le.lower + 2) << "n=" << n << " k=" << k;
      EXPECT_EQ(m.size.variables, le.variables) << "n=" << n << " k=" << k;
    }
}

TEST(Binomial, SizeIsTheBinomialCoefficient) {
  // Folklore: C(n, k+1) clauses for "<= k", C(n, n-k+1) for ">= k", both for
  // "="; no auxiliary variables. Hand check n = 4, k = 2: the 4 triples
  // (~x1|~x2|~x3) (~x1|~x2|~x4) (~x1|~x3|~x4) (~x2|~x3|~x4).
  const auto c = pascal(16);
  EXPECT_EQ(c[4][3], 4U);
  for (std::int32_t n = 2; n <= 16; ++n)
    for (std::int64_t k = 1; k <= n - 2; ++k) {
      const auto un = static_cast<std::size_t>(n);
      const auto uk = static_cast<std::size_t>(k);
      auto m = measure(cw::method_id::binomial, n, relation::le, k);
      EXPECT_EQ(m.size.clauses, c[un][uk + 1]) << "n=" << n << " k=" << k;
      EXPECT_EQ(m.size.variables, 0U);
      if (k >= 2) {
        m = measure(cw::method_id::binomial, n, relation::ge, k);
        EXPECT_EQ(m.size.clauses, c[un][un - uk + 1]) << "n=" << n << " k=" << k;
      }
      m = measure(cw::method_id::binomial, n, relation::eq, k);
      EXPECT_EQ(m.size.clauses, c[un][uk + 1] + c[un][un - uk + 1]) << "n=" << n << " k=" << k;
      EXPECT_EQ(m.size.variables, 0U);
    }
}

TEST(Binomial, HugeCaseIsOverBudgetBeforeAnyClause) {
  static_assert(cw::binomial_clause_budget == cw::default_clause_budget);
  // C(60, 31) is about 1.1e17: the estimate stops it before the first clause.
  const auto c = cw_test::cardinality(60, relation::le, 30).normalized();
  const auto m = cw::measure(cw::method_id::binomial, cw::variable_pool(60), c);
  EXPECT_TRUE(m.over_budget);
  EXPECT_EQ(m.size.clauses, 0U);
  cw::counting_sink sink;
  cw::variable_pool pool(60);
  try {
    cw::encode_with(cw::method_id::binomial, sink, pool, c);
    FAIL() << "no error";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::over_budget);
    EXPECT_EQ(e.where().constraint, 0U);
  }
  EXPECT_EQ(sink.clauses(), 0U);
  // Checked arithmetic at the extremes: C(2^40, 2^39) does not overflow into a small number.
  EXPECT_FALSE(cw::binomial_coefficient(std::uint64_t{1} << 40, std::uint64_t{1} << 39, UINT64_MAX).has_value());
  EXPECT_EQ(cw::binomial_coefficient(12, 6, 1000), 924U);
  EXPECT_EQ(cw::binomial_coefficient(67, 33, UINT64_MAX), 14226520737620288370ULL);  // largest C(n, n/2) in 64 bits
}

TEST(ModuloTotalizer, FewerClausesThanTheTotalizerForMidRangeK) {
  // Ogawa et al. 2013: O(n sqrt k) clauses against the totalizer's O(nk).
  for (std::int32_t n : {200, 1000}) {
    for (std::int64_t k : {std::int64_t{n / 10}, std::int64_t{n / 4}, std::int64_t{n / 2}}) {
      const auto mod = measure(cw::method_id::modulo_totalizer, n, relation::le, k);
      const auto tot = measure(cw::method_id::totalizer, n, relation::le, k);
      EXPECT_LT(mod.size.clauses, tot.size.clauses) << "n=" << n << " k=" << k;
      EXPECT_LT(mod.size.variables, tot.size.variables) << "n=" << n << " k=" << k;
    }
  }
}

TEST(Cardinality, OnlyUnitCoefficients) {
  const std::vector<cw::term> terms{{2, lit(1)}, {3, lit(2)}, {4, lit(3)}};
  const auto c = cw::normalize(terms, relation::le, 5, 7, "weights");
  ASSERT_EQ(c.kind, cw::constraint_kind::linear);
  for (const auto method : {cw::method_id::totalizer, cw::method_id::modulo_totalizer,
                            cw::method_id::cardinality_network, cw::method_id::sorting_network,
                            cw::method_id::binomial}) {
    EXPECT_FALSE(cw::can_encode(method, c));
    cw::cnf_buffer cnf;
    cw::variable_pool pool(3);
    try {
      cw::encode_with(method, cnf, pool, c);
      ADD_FAILURE() << cw::info(method).name << " took a weighted constraint";
    } catch (const cw::error& e) {
      EXPECT_EQ(e.id(), cw::error_id::method_not_applicable);
      EXPECT_EQ(e.where().constraint, 7U);
    }
  }
}

// --- exposed outputs (brute-force count, CaDiCaL) -------------------------------

TEST(Totalizer, OutputsCount) {
  for (std::int32_t n = 1; n <= 8; ++n)
    for (std::size_t cut = 1; cut <= static_cast<std::size_t>(n); ++cut)
      for (const sides which : {sides::upper, sides::lower, sides::both}) {
        cw::variable_pool pool(n);
        cw::cnf_buffer cnf;
        const cw::totalizer tree(cnf, pool, inputs(n), cut, which);
        ASSERT_EQ(tree.outputs().size(), cut);
        EXPECT_TRUE(outputs_count(cnf, n, tree.outputs(), which)) << "n=" << n << " cut=" << cut << " " << name(which);
      }
}

TEST(CardinalityNetwork, OutputsCount) {
  for (std::int32_t n = 1; n <= 8; ++n)
    for (std::size_t needed = 1; needed <= static_cast<std::size_t>(n); ++needed)
      for (const sides which : {sides::upper, sides::lower, sides::both}) {
        cw::variable_pool pool(n);
        cw::cnf_buffer cnf;
        const auto out = cw::build_cardinality_network(cnf, pool, inputs(n), needed, which);
        // m = the least power of two >= needed outputs, at most n.
        std::size_t m = 1;
        while (m < needed) m *= 2;
        ASSERT_EQ(out.size(), std::min(m, static_cast<std::size_t>(n)));
        EXPECT_TRUE(outputs_count(cnf, n, out, which)) << "n=" << n << " needed=" << needed << " " << name(which);
      }
}

TEST(SortingNetwork, OutputsCount) {
  for (std::int32_t n = 1; n <= 8; ++n)
    for (const sides which : {sides::upper, sides::lower, sides::both}) {
      cw::variable_pool pool(n);
      cw::cnf_buffer cnf;
      const auto out = cw::build_sorting_network(cnf, pool, inputs(n), which);
      ASSERT_EQ(out.size(), static_cast<std::size_t>(n));
      EXPECT_TRUE(outputs_count(cnf, n, out, which)) << "n=" << n << " " << name(which);
    }
}

TEST(Totalizer, ExtendRaisesTheCut) {
  // What is asserted, for n <= 8, every cut c < c' <= n and every side:
  // - extend() adds exactly what a fresh build with cut c' has beyond cut c:
  //   the clause and variable counts of build(c) + extend(c') equal those of
  //   build(c'), and no clause of the combined CNF is repeated (nothing is
  //   encoded twice);
  // - the outputs handed out before keep their literals;
  // - with the upper side, assuming "count <= j" (~r_(j+1)) for each j < c' is
  //   satisfiable exactly when at most j inputs are true (brute force);
  //   with the lower side, assuming "count >= j" (r_j) for each j <= c' is
  //   satisfiable exactly when at least j are (CaDiCaL decides);
  // - a cut at or below the current one adds nothing.
  for (std::int32_t n = 1; n <= 8; ++n)
    for (std::size_t c = 0; c < static_cast<std::size_t>(n); ++c)
      for (std::size_t c2 = c + 1; c2 <= static_cast<std::size_t>(n); ++c2)
        for (const sides which : {sides::upper, sides::lower, sides::both}) {
          const std::string context =
              "n=" + std::to_string(n) + " c=" + std::to_string(c) + " c'=" + std::to_string(c2) + " " + name(which);
          cw::variable_pool pool(n);
          cw::cnf_buffer cnf;
          cw::totalizer tree(cnf, pool, inputs(n), c, which);
          const std::vector<cw::literal> before = tree.outputs().outputs;
          const std::size_t first_clauses = cnf.size();
          tree.extend(cnf, pool, c2);
          cw::variable_pool fresh_pool(n);
          cw::counting_sink fresh;
          (void)cw::totalizer(fresh, fresh_pool, inputs(n), c2, which);
          ASSERT_EQ(cnf.size(), fresh.clauses()) << context;
          ASSERT_EQ(pool.top(), fresh_pool.top()) << context;
          ASSERT_EQ(tree.cut(), c2) << context;
          ASSERT_EQ(tree.outputs().size(), c2) << context;
          ASSERT_TRUE(std::equal(before.begin(), before.end(), tree.outputs().outputs.begin())) << context;
          ASSERT_GE(cnf.size(), first_clauses) << context;
          std::set<std::vector<std::int32_t>> seen;
          for (const auto clause : cnf) {
            std::vector<std::int32_t> key;
            for (const cw::literal l : clause) key.push_back(l.dimacs());
            std::sort(key.begin(), key.end());
            ASSERT_TRUE(seen.insert(key).second) << context << ": a clause is repeated";
          }
          const std::size_t settled = cnf.size();
          tree.extend(cnf, pool, c2);
          tree.extend(cnf, pool, c);
          ASSERT_EQ(cnf.size(), settled) << context;
          ASSERT_EQ(pool.top(), fresh_pool.top()) << context;

          CaDiCaL::Solver solver;
          cw_test::add_to_solver(solver, cnf);
          const cw::unary_outputs& r = tree.outputs();
          for (std::uint32_t bits = 0; bits < (1U << n); ++bits) {
            const auto count = static_cast<std::size_t>(__builtin_popcount(bits));
            for (std::size_t j = 0; j <= c2; ++j) {
              if (cw::has_upper(which) && j < c2) {
                ASSERT_EQ(solve_under(solver, n, bits, {r.at_most(j)}) == 10, count <= j)
                    << context << " inputs " << bits << ": count <= " << j;
              }
              if (cw::has_lower(which) && j >= 1) {
                ASSERT_EQ(solve_under(solver, n, bits, {r.at_least(j)}) == 10, count >= j)
                    << context << " inputs " << bits << ": count >= " << j;
              }
            }
          }
        }
}
