// The at-most-one family: ladder, bitwise, commander, product and bimander.
// Every method goes through the harness (exhaustive equivalence against
// CaDiCaL, n up to 12, every relation that normalises to at-most-one or
// exactly-one, one-way and full), its size is checked against the published
// formula or the recursion of the paper's construction, and full equivalence
// is checked to define every auxiliary variable as a function of the inputs.
#include <gtest/gtest.h>
#include <clausewright/clausewright.hpp>

#include <array>
#include <cmath>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "harness.hpp"

namespace cw = clausewright;
using cw::lit;
using cw::relation;

namespace {

constexpr std::array amo_methods{cw::method_id::ladder, cw::method_id::bitwise, cw::method_id::commander,
                                 cw::method_id::product, cw::method_id::bimander};

// Size of a method on at-most-one (or exactly-one) over x1..xn, through the
// public dry run.
cw::encoding_size size_of(cw::method_id method, std::int32_t n, bool exactly_one = false, bool full = false) {
  const auto c = cw_test::cardinality(n, exactly_one ? relation::eq : relation::le, 1);
  const auto normal = c.normalized();
  EXPECT_EQ(normal.kind, exactly_one ? cw::constraint_kind::exactly_one : cw::constraint_kind::at_most_one)
      << "n=" << n;
  return cw::measure(method, cw::variable_pool(n), normal, cw::encode_options{full}).size;
}

std::vector<cw::literal> inputs(std::int32_t n) {
  std::vector<cw::literal> x;
  for (std::int32_t v = 1; v <= n; ++v) x.push_back(lit(v));
  return x;
}

std::vector<std::vector<int>> clauses_of(const cw::cnf_buffer& cnf) {
  std::vector<std::vector<int>> out;
  for (const auto clause : cnf) {
    std::vector<int> c;
    for (const auto l : clause) c.push_back(l.dimacs());
    out.push_back(c);
  }
  return out;
}

// Smallest b with 2^b >= n, by counting (independent of the library's helper).
std::uint64_t ceil_log2(std::uint64_t n) {
  std::uint64_t b = 0;
  while ((std::uint64_t{1} << b) < n) ++b;
  return b;
}

std::uint64_t pairs(std::uint64_t s) { return s * (s - 1) / 2; }

}  // namespace

// ---------------------------------------------------------------------------
// Equivalence: the harness' cardinality suite (CaDiCaL, exhaustive).

// One test per method, so that CTest runs them in parallel. The suite also
// checks the constraints that normalise to constants and single clauses, so
// its count is at least the at-most-one shapes counted in SuiteShapes.
TEST(Ladder, ExhaustivelyEquivalent) { EXPECT_GE(cw_test::cardinality_suite(cw::method_id::ladder, 12), 164U); }
TEST(Bitwise, ExhaustivelyEquivalent) { EXPECT_GE(cw_test::cardinality_suite(cw::method_id::bitwise, 12), 164U); }
TEST(Commander, ExhaustivelyEquivalent) { EXPECT_GE(cw_test::cardinality_suite(cw::method_id::commander, 12), 164U); }
TEST(Product, ExhaustivelyEquivalent) { EXPECT_GE(cw_test::cardinality_suite(cw::method_id::product, 12), 164U); }
TEST(Bimander, ExhaustivelyEquivalent) { EXPECT_GE(cw_test::cardinality_suite(cw::method_id::bimander, 12), 164U); }

TEST(AtMostOne, SuiteShapes) {
  // n = 2..12: eq 1 from n = 2; le 1, ge n-1 and eq n-1 from n = 3; each
  // plain and negated, one-way and full: 4 + 10 * 16 = 164 constraints of the
  // suite reach the encoders as at-most-one or exactly-one.
  std::uint64_t shapes = 0;
  for (std::int32_t n = 1; n <= 12; ++n)
    for (std::int64_t k = 0; k <= n + 1; ++k)
      for (const auto rel : {relation::le, relation::ge, relation::eq})
        for (const bool negated : {false, true}) {
          const auto kind = cw_test::cardinality(n, rel, k, negated).normalized().kind;
          if (kind == cw::constraint_kind::at_most_one || kind == cw::constraint_kind::exactly_one) shapes += 2;
        }
  EXPECT_EQ(shapes, 164U);
}

// ---------------------------------------------------------------------------
// Ladder: Sinz 2005 (CP), the sequential counter with k = 1.

TEST(Ladder, SizeMatchesSinz2005) {
  // Sinz 2005 with k = 1: k(n-1) = n-1 variables, 2nk + n - 3k - 1 = 3n - 4
  // clauses. By hand: n = 3 gives 5 clauses (listed in HandDrawnSmallCase),
  // n = 4 gives 8: (~x1|s1), then for x2 and x3 three each, then (~x4|~s3).
  // Full equivalence adds one definition clause per register: 4n - 5.
  for (std::int32_t n = 3; n <= 80; ++n) {
    const auto n64 = static_cast<std::uint64_t>(n);
    const auto one_way = size_of(cw::method_id::ladder, n);
    EXPECT_EQ(one_way.variables, n64 - 1) << "n=" << n;
    EXPECT_EQ(one_way.clauses, 3 * n64 - 4) << "n=" << n;
    const auto full = size_of(cw::method_id::ladder, n, false, true);
    EXPECT_EQ(full.variables, n64 - 1) << "n=" << n;
    EXPECT_EQ(full.clauses, 4 * n64 - 5) << "n=" << n;
    // Exactly-one: the same plus the clause of all inputs.
    EXPECT_EQ(size_of(cw::method_id::ladder, n, true).clauses, 3 * n64 - 3) << "n=" << n;
  }
}

TEST(Ladder, HandDrawnSmallCase) {
  // n = 3, s1 = x4, s2 = x5, Sinz's clauses for k = 1:
  // (~x1|s1) (~x2|s2) (~s1|s2) (~x2|~s1) (~x3|~s2).
  cw::variable_pool pool(3);
  cw::cnf_buffer cnf;
  cw::encode_with(cw::method_id::ladder, cnf, pool, cw::normalize_cardinality(inputs(3), relation::le, 1));
  EXPECT_EQ(clauses_of(cnf), (std::vector<std::vector<int>>{{-1, 4}, {-2, 5}, {-4, 5}, {-2, -4}, {-3, -5}}));
  // n = 2 through the encoder itself (normalisation would make it a clause):
  // 3n - 4 = 2 clauses (~x1|s1) (~x2|~s1) over one register.
  cw::variable_pool pool2(2);
  cw::cnf_buffer two;
  cw::encode_ladder_at_most_one(two, pool2, inputs(2));
  EXPECT_EQ(clauses_of(two), (std::vector<std::vector<int>>{{-1, 3}, {-2, -3}}));
}

TEST(Ladder, FullRegistersArePrefixDisjunctions) {
  // Documented meaning of full equivalence: s_i <-> x1 | ... | xi, so under
  // any satisfying assignment of the inputs CaDiCaL's model has exactly those
  // register values and the opposite value of any register is unsatisfiable.
  for (std::int32_t n = 3; n <= 12; ++n) {
    cw::variable_pool pool(n);
    cw::cnf_buffer cnf;
    cw::encode_ladder_at_most_one(cnf, pool, inputs(n), true);
    CaDiCaL::Solver solver;
    cw_test::add_to_solver(solver, cnf);
    for (std::int32_t on = 0; on <= n; ++on) {  // on = 0: none true, else x_on alone
      for (std::int32_t i = 1; i < n; ++i) {
        const bool prefix = on != 0 && on <= i;
        for (std::int32_t v = 1; v <= n; ++v) solver.assume(v == on ? v : -v);
        solver.assume(prefix ? -(n + i) : n + i);
        EXPECT_EQ(solver.solve(), 20) << "n=" << n << " true input " << on << " register " << i;
      }
    }
  }
}

// ---------------------------------------------------------------------------
// Bitwise: Frisch et al. 2005; Prestwich 2007.

TEST(Bitwise, SizeMatchesBinaryEncoding) {
  // ceil(log2 n) bits and n * ceil(log2 n) clauses. By hand, n = 3: two bits,
  // six clauses (HandDrawnSmallCase); n = 5: three bits, 15 clauses.
  // Full equivalence adds one clause per bit.
  for (std::int32_t n = 3; n <= 130; ++n) {
    const auto n64 = static_cast<std::uint64_t>(n);
    const std::uint64_t bits = ceil_log2(n64);
    const auto one_way = size_of(cw::method_id::bitwise, n);
    EXPECT_EQ(one_way.variables, bits) << "n=" << n;
    EXPECT_EQ(one_way.clauses, n64 * bits) << "n=" << n;
    const auto full = size_of(cw::method_id::bitwise, n, false, true);
    EXPECT_EQ(full.variables, bits) << "n=" << n;
    EXPECT_EQ(full.clauses, n64 * bits + bits) << "n=" << n;
  }
}

TEST(Bitwise, HandDrawnSmallCase) {
  // n = 3, bits b0 = x4, b1 = x5; codes x1 = 00, x2 = 01, x3 = 10 (bit 0 first).
  cw::variable_pool pool(3);
  cw::cnf_buffer cnf;
  cw::encode_with(cw::method_id::bitwise, cnf, pool, cw::normalize_cardinality(inputs(3), relation::le, 1));
  EXPECT_EQ(clauses_of(cnf), (std::vector<std::vector<int>>{{-1, -4}, {-1, -5}, {-2, 4}, {-2, -5}, {-3, -4}, {-3, 5}}));
}

TEST(Bitwise, FullBitsAreTheCodeOfTheTrueInput) {
  // Documented meaning of full equivalence: the bits spell the index (from 0)
  // of the true input, and are all 0 when no input is true.
  for (std::int32_t n = 3; n <= 12; ++n) {
    cw::variable_pool pool(n);
    cw::cnf_buffer cnf;
    cw::encode_bitwise_at_most_one(cnf, pool, inputs(n), true);
    const auto bits = static_cast<std::int32_t>(ceil_log2(static_cast<std::uint64_t>(n)));
    CaDiCaL::Solver solver;
    cw_test::add_to_solver(solver, cnf);
    for (std::int32_t on = 0; on <= n; ++on) {
      const std::int32_t code = on == 0 ? 0 : on - 1;
      for (std::int32_t j = 0; j < bits; ++j) {
        const bool set = ((code >> j) & 1) != 0;
        for (std::int32_t v = 1; v <= n; ++v) solver.assume(v == on ? v : -v);
        solver.assume(set ? -(n + 1 + j) : n + 1 + j);
        EXPECT_EQ(solver.solve(), 20) << "n=" << n << " true input " << on << " bit " << j;
      }
    }
  }
}

// ---------------------------------------------------------------------------
// Commander: Klieber & Kwon 2007, groups of 3.

namespace {

struct size_pair {
  std::uint64_t variables = 0;
  std::uint64_t clauses = 0;
};

// The paper's construction counted: a group of s >= 2 inputs costs one
// commander, s(s-1)/2 pairwise clauses, s clauses ~x | c, and for exactly-one
// (or full equivalence) the clause ~c | x_1 | ... | x_s; a group of one input
// passes the input up. The commanders are constrained again until at most g
// are left, which get the pairwise clauses (and for exactly-one their clause).
size_pair commander_size(std::uint64_t n, std::uint64_t g, bool define, bool exactly_one) {
  size_pair total;
  while (n > g) {
    std::uint64_t groups = 0;
    for (std::uint64_t start = 0; start < n; start += g) {
      const std::uint64_t s = std::min(g, n - start);
      ++groups;
      if (s == 1) continue;
      total.variables += 1;
      total.clauses += pairs(s) + s + (define ? 1 : 0);
    }
    n = groups;
  }
  total.clauses += pairs(n) + (exactly_one ? 1 : 0);
  return total;
}

}  // namespace

TEST(Commander, PowersOfThreeMatchKlieberKwon) {
  // n = 3^t, worked out from the construction: every level of N inputs has
  // N/3 groups of 3, each 3 pairwise + 3 commander clauses (+1 for
  // exactly-one) and one commander, down to 3 commanders at the top (3
  // pairwise clauses, +1). Summing N = n, n/3, ..., 9: (n-3)/2 variables,
  // 3n - 6 clauses for at-most-one and 3.5n - 6.5 for exactly-one, the paper's
  // "about n/2 variables and 3.5n clauses". By hand, n = 9: 3 commanders,
  // 3 * 6 + 3 = 21 clauses; exactly-one 3 * 7 + 4 = 25.
  for (std::int32_t n = 9; n <= 729; n *= 3) {
    const auto n64 = static_cast<std::uint64_t>(n);
    const auto amo = size_of(cw::method_id::commander, n);
    EXPECT_EQ(amo.variables, (n64 - 3) / 2) << "n=" << n;
    EXPECT_EQ(amo.clauses, 3 * n64 - 6) << "n=" << n;
    const auto eo = size_of(cw::method_id::commander, n, true);
    EXPECT_EQ(eo.variables, (n64 - 3) / 2) << "n=" << n;
    EXPECT_EQ(2 * eo.clauses, 7 * n64 - 13) << "n=" << n;
  }
}

TEST(Commander, SizeFollowsTheConstructionAndStaysWithinThePaperBounds) {
  for (std::int32_t n = 3; n <= 1000; ++n) {
    const auto n64 = static_cast<std::uint64_t>(n);
    const auto amo = size_of(cw::method_id::commander, n);
    const auto full = size_of(cw::method_id::commander, n, false, true);
    const auto eo = size_of(cw::method_id::commander, n, true);
    const auto want_amo = commander_size(n64, 3, false, false);
    const auto want_full = commander_size(n64, 3, true, false);
    const auto want_eo = commander_size(n64, 3, true, true);
    ASSERT_EQ(amo.variables, want_amo.variables) << "n=" << n;
    ASSERT_EQ(amo.clauses, want_amo.clauses) << "n=" << n;
    ASSERT_EQ(full.variables, want_full.variables) << "n=" << n;
    ASSERT_EQ(full.clauses, want_full.clauses) << "n=" << n;
    ASSERT_EQ(eo.variables, want_eo.variables) << "n=" << n;
    ASSERT_EQ(eo.clauses, want_eo.clauses) << "n=" << n;
    // Klieber & Kwon's bounds for every n, not only powers of 3: about n/2
    // commanders (each level of N inputs adds at most (N+1)/3, so at most
    // half a variable per level over n/2), at most 3n clauses for
    // at-most-one and 3.5n for exactly-one.
    std::uint64_t levels = 0;
    for (std::uint64_t m = n64; m > 3; m = (m + 2) / 3) ++levels;
    EXPECT_LE(2 * amo.variables, n64 + levels) << "n=" << n;
    EXPECT_LE(amo.clauses, 3 * n64) << "n=" << n;
    EXPECT_LE(2 * eo.clauses, 7 * n64) << "n=" << n;
  }
}

TEST(Commander, HandDrawnSmallCase) {
  // n = 4: group {x1,x2,x3} with commander c = x5, group {x4} passes x4 up;
  // then the pairwise at-most-one of (x5, x4).
  cw::variable_pool pool(4);
  cw::cnf_buffer cnf;
  cw::encode_with(cw::method_id::commander, cnf, pool, cw::normalize_cardinality(inputs(4), relation::le, 1));
  EXPECT_EQ(clauses_of(cnf),
            (std::vector<std::vector<int>>{{-1, -2}, {-1, -3}, {-2, -3}, {5, -1}, {5, -2}, {5, -3}, {-5, -4}}));
  // Exactly-one adds the group's clause ~c | x1 | x2 | x3 and the top clause.
  cw::variable_pool pool_eo(4);
  cw::cnf_buffer eo;
  cw::encode_with(cw::method_id::commander, eo, pool_eo, cw::normalize_cardinality(inputs(4), relation::eq, 1));
  EXPECT_EQ(clauses_of(eo),
            (std::vector<std::vector<int>>{
                {-1, -2}, {-1, -3}, {-2, -3}, {-5, 1, 2, 3}, {5, -1}, {5, -2}, {5, -3}, {-5, -4}, {5, 4}}));
}

// ---------------------------------------------------------------------------
// Product: Chen 2010.

namespace {

// Chen's recursion with the grid of ceil(sqrt(n)) columns and ceil(n/columns)
// rows: 2n clauses and rows + columns variables, then the two smaller
// at-most-ones; pairwise at n <= 6. Full equivalence adds rows + columns
// definition clauses per level.
size_pair product_size(std::uint64_t n, bool full) {
  if (n <= 6) return {0, pairs(n)};
  auto columns = static_cast<std::uint64_t>(std::sqrt(static_cast<double>(n)));
  while (columns * columns < n) ++columns;
  while ((columns - 1) * (columns - 1) >= n) --columns;
  const std::uint64_t rows = (n + columns - 1) / columns;
  const size_pair a = product_size(rows, full);
  const size_pair b = product_size(columns, full);
  return {rows + columns + a.variables + b.variables, 2 * n + (full ? rows + columns : 0) + a.clauses + b.clauses};
}

}  // namespace

TEST(Product, SizeFollowsChen2010) {
  // By hand, n = 7: 3 x 3 grid, 6 variables, 14 + 3 + 3 = 20 clauses
  // (HandDrawnSmallCase); n = 10: 4 columns, 3 rows, 7 variables,
  // 20 + 3 + 6 = 29 clauses.
  EXPECT_EQ(size_of(cw::method_id::product, 10).variables, 7U);
  EXPECT_EQ(size_of(cw::method_id::product, 10).clauses, 29U);
  for (std::int32_t n = 3; n <= 3000; n += n < 200 ? 1 : 37) {
    const auto n64 = static_cast<std::uint64_t>(n);
    const auto got = size_of(cw::method_id::product, n);
    const auto want = product_size(n64, false);
    ASSERT_EQ(got.variables, want.variables) << "n=" << n;
    ASSERT_EQ(got.clauses, want.clauses) << "n=" << n;
    const auto full = size_of(cw::method_id::product, n, false, true);
    const auto want_full = product_size(n64, true);
    ASSERT_EQ(full.variables, want_full.variables) << "n=" << n;
    ASSERT_EQ(full.clauses, want_full.clauses) << "n=" << n;
  }
}

TEST(Product, AsymptoticBoundsOfChen2010) {
  // Chen 2010: 2*sqrt(n) + O(n^(1/4)) variables and 2n + 4*sqrt(n) +
  // O(n^(1/4)) clauses. Lower bounds: rows + columns >= 2*sqrt(rows*columns)
  // >= 2*sqrt(n), and 2n clauses at the first level. The O(n^(1/4)) terms
  // (4*n^(1/4) in the limit, plus the rounding of the grids at every level)
  // stay below 9*n^(1/4) and 13*n^(1/4) over this range.
  for (std::int32_t n = 7; n <= 100000; n += 1 + n / 50) {
    const double root = std::sqrt(static_cast<double>(n));
    const double fourth = std::sqrt(root);
    const auto s = product_size(static_cast<std::uint64_t>(n), false);
    const auto v = static_cast<double>(s.variables);
    const auto c = static_cast<double>(s.clauses);
    EXPECT_GE(v, 2 * root - 1e-9) << "n=" << n;
    EXPECT_LE(v, 2 * root + 9 * fourth) << "n=" << n;
    EXPECT_GE(c, 2.0 * n) << "n=" << n;
    EXPECT_LE(c, 2.0 * n + 4 * root + 13 * fourth) << "n=" << n;
  }
  // The recursion above is the encoder's (SizeFollowsChen2010), checked here
  // on a large case through the encoder itself.
  const auto big = size_of(cw::method_id::product, 20000);
  const auto want = product_size(20000, false);
  EXPECT_EQ(big.variables, want.variables);
  EXPECT_EQ(big.clauses, want.clauses);
}

TEST(Product, HandDrawnSmallCase) {
  // n = 7 on a 3 x 3 grid: rows u = x8, x9, x10, columns v = x11, x12, x13;
  // x_k sits in row (k-1)/3 and column (k-1)%3. Then pairwise on u and on v.
  cw::variable_pool pool(7);
  cw::cnf_buffer cnf;
  cw::encode_with(cw::method_id::product, cnf, pool, cw::normalize_cardinality(inputs(7), relation::le, 1));
  EXPECT_EQ(clauses_of(cnf),
            (std::vector<std::vector<int>>{{-1, 8},  {-1, 11},  {-2, 8},   {-2, 12},   {-3, 8},    {-3, 13},  {-4, 9},
                                           {-4, 11}, {-5, 9},   {-5, 12},  {-6, 9},    {-6, 13},   {-7, 10},  {-7, 11},
                                           {-8, -9}, {-8, -10}, {-9, -10}, {-11, -12}, {-11, -13}, {-12, -13}}));
}

// ---------------------------------------------------------------------------
// Bimander: Nguyen & Mai 2015, groups of 4.

namespace {

// Nguyen & Mai's construction: m = ceil(n/g) groups, pairwise inside each,
// ceil(log2 m) commander bits and n * ceil(log2 m) binary clauses; full
// equivalence adds one clause per bit.
size_pair bimander_size(std::uint64_t n, std::uint64_t g, bool full) {
  const std::uint64_t groups = (n + g - 1) / g;
  const std::uint64_t bits = ceil_log2(groups);
  std::uint64_t clauses = n * bits + (full ? bits : 0);
  for (std::uint64_t start = 0; start < n; start += g) clauses += pairs(std::min(g, n - start));
  return {bits, clauses};
}

}  // namespace

TEST(Bimander, SizeMatchesNguyenMai2015) {
  // By hand, n = 5: groups {x1..x4} and {x5}, one bit: 6 pairwise + 5 binary
  // clauses (HandDrawnSmallCase); n = 16: four groups, two bits,
  // 4 * 6 + 16 * 2 = 56 clauses.
  EXPECT_EQ(size_of(cw::method_id::bimander, 16).clauses, 56U);
  for (std::int32_t n = 3; n <= 300; ++n) {
    const auto n64 = static_cast<std::uint64_t>(n);
    const auto got = size_of(cw::method_id::bimander, n);
    const auto want = bimander_size(n64, cw::bimander_default_group_size, false);
    EXPECT_EQ(got.variables, want.variables) << "n=" << n;
    EXPECT_EQ(got.clauses, want.clauses) << "n=" << n;
    const auto full = size_of(cw::method_id::bimander, n, false, true);
    const auto want_full = bimander_size(n64, cw::bimander_default_group_size, true);
    EXPECT_EQ(full.clauses, want_full.clauses) << "n=" << n;
  }
  // Other group sizes through the encoder: g = 1 is the bitwise encoding and
  // g >= n the pairwise one (Nguyen & Mai's two extremes).
  for (std::uint64_t g = 1; g <= 9; ++g)
    for (std::int32_t n = 1; n <= 60; ++n) {
      cw::variable_pool pool(n);
      cw::counting_sink sink;
      cw::encode_bimander_at_most_one(sink, pool, inputs(n), g);
      const auto want = bimander_size(static_cast<std::uint64_t>(n), g, false);
      EXPECT_EQ(static_cast<std::uint64_t>(pool.auxiliary_variables()), want.variables) << "g=" << g << " n=" << n;
      EXPECT_EQ(sink.clauses(), want.clauses) << "g=" << g << " n=" << n;
      if (g == 1) {
        EXPECT_EQ(sink.clauses(), static_cast<std::uint64_t>(n) * ceil_log2(static_cast<std::uint64_t>(n)));
      }
      if (g >= static_cast<std::uint64_t>(n)) {
        EXPECT_EQ(sink.clauses(), pairs(static_cast<std::uint64_t>(n)));
      }
    }
}

TEST(Bimander, ClausesBetweenCommanderAndBitwise) {
  // REFERENCES.md: bimander sits between the binary and the commander
  // encodings. For clauses it does from n = 5 on (at n = 4 the bimander is
  // the pairwise encoding, 6 clauses, one fewer than the commander's 7). Its
  // auxiliary variables are fewer than both: two bits fewer than bitwise.
  for (std::int32_t n = 5; n <= 600; ++n) {
    const auto bimander = size_of(cw::method_id::bimander, n);
    const auto bitwise = size_of(cw::method_id::bitwise, n);
    const auto commander = size_of(cw::method_id::commander, n);
    EXPECT_LE(commander.clauses, bimander.clauses) << "n=" << n;
    EXPECT_LE(bimander.clauses, bitwise.clauses) << "n=" << n;
    EXPECT_LE(bimander.variables, bitwise.variables) << "n=" << n;
  }
}

TEST(Bimander, HandDrawnSmallCase) {
  // n = 5, g = 4: pairwise on {x1..x4}, one bit b = x6; group 0 gets ~x | ~b,
  // group 1 (x5 alone) gets ~x5 | b.
  cw::variable_pool pool(5);
  cw::cnf_buffer cnf;
  cw::encode_with(cw::method_id::bimander, cnf, pool, cw::normalize_cardinality(inputs(5), relation::le, 1));
  EXPECT_EQ(clauses_of(cnf), (std::vector<std::vector<int>>{{-1, -2},
                                                            {-1, -3},
                                                            {-1, -4},
                                                            {-2, -3},
                                                            {-2, -4},
                                                            {-3, -4},
                                                            {-1, -6},
                                                            {-2, -6},
                                                            {-3, -6},
                                                            {-4, -6},
                                                            {-5, 6}}));
}

// ---------------------------------------------------------------------------
// Across the family.

namespace {

using amo_encoder = std::function<void(cw::cnf_buffer&, cw::variable_pool&, std::span<const cw::literal>)>;

// Exhaustive check of an encoder called directly (for group sizes other than
// the method's default): equivalence with at-most-one / exactly-one by
// CaDiCaL over all 2^n assignments, and arc-consistency by the harness'
// unit propagation over all 3^n partial assignments (n <= 8). Inputs mix
// signs (every third negated). `add_at_least_one` appends the clause of all
// inputs, for encoders whose exactly-one is at-most-one plus that clause.
void check_encoder(const amo_encoder& encode, bool exactly_one, bool add_at_least_one, std::int32_t max_n,
                   const std::string& label) {
  for (std::int32_t n = 1; n <= max_n; ++n) {
    std::vector<cw::literal> x;
    for (std::int32_t v = 1; v <= n; ++v) x.push_back(lit(v % 3 == 0 ? -v : v));
    cw::variable_pool pool(n);
    cw::cnf_buffer cnf;
    encode(cnf, pool, x);
    if (add_at_least_one) cnf.add_clause(std::span<const cw::literal>(x));
    CaDiCaL::Solver solver;
    cw_test::add_to_solver(solver, cnf);
    for (std::uint32_t bits = 0; bits < (1U << n); ++bits) {
      for (std::int32_t i = 0; i < n; ++i) solver.assume(((bits >> i) & 1U) ? x[i].dimacs() : -x[i].dimacs());
      const int count = __builtin_popcount(bits);
      const bool want = exactly_one ? count == 1 : count <= 1;
      ASSERT_EQ(solver.solve(), want ? 10 : 20) << label << " n=" << n << " literal pattern " << bits;
    }
    if (n > 8) continue;
    cw_test::propagator up(cnf, std::max(pool.top(), cnf.max_variable()));
    std::uint32_t total = 1;
    for (std::int32_t i = 0; i < n; ++i) total *= 3;
    for (std::uint32_t code = 0; code < total; ++code) {
      std::vector<cw::literal> assumed;
      std::vector<int> state(static_cast<std::size_t>(n));
      int true_count = 0;
      int free_count = 0;
      std::uint32_t rest = code;
      for (std::int32_t i = 0; i < n; ++i, rest /= 3) {
        state[static_cast<std::size_t>(i)] = static_cast<int>(rest % 3) - 1;
        if (state[static_cast<std::size_t>(i)] == 1) ++true_count;
        if (state[static_cast<std::size_t>(i)] == 0) ++free_count;
        if (state[static_cast<std::size_t>(i)] != 0)
          assumed.push_back(state[static_cast<std::size_t>(i)] > 0 ? x[i] : ~x[i]);
      }
      const bool consistent = exactly_one ? true_count == 1 || (true_count == 0 && free_count > 0) : true_count <= 1;
      const bool no_conflict = up.run(assumed);
      ASSERT_EQ(no_conflict, consistent) << label << " n=" << n << " partial assignment " << code;
      if (!consistent) continue;
      for (std::int32_t i = 0; i < n; ++i) {
        if (state[static_cast<std::size_t>(i)] != 0) continue;
        if (true_count == 1) {
          EXPECT_LT(up.val(x[i]), 0) << label << " n=" << n << " partial " << code << " input " << i;
        }
        if (exactly_one && true_count == 0 && free_count == 1) {
          EXPECT_GT(up.val(x[i]), 0) << label << " n=" << n << " partial " << code << " input " << i;
        }
      }
    }
  }
}

}  // namespace

TEST(AtMostOne, OtherGroupSizesAreCorrectAndArcConsistent) {
  // REFERENCES.md leaves the bimander's propagation "depending on the group
  // size"; measured here, every group size is arc-consistent on the inputs.
  for (std::size_t g = 1; g <= 6; ++g)
    for (const bool full : {false, true})
      for (const bool eo : {false, true})
        check_encoder([&](auto& out, auto& pool, auto x) { cw::encode_bimander_at_most_one(out, pool, x, g, full); },
                      eo, eo, 10,
                      "bimander g=" + std::to_string(g) + (full ? " full" : "") + (eo ? " exactly-one" : ""));
  // The commander's exactly-one is its own construction (clauses per group
  // and at the top): checked as exactly-one with no clause appended.
  for (std::size_t g = 2; g <= 5; ++g)
    for (const bool full : {false, true})
      for (const bool eo : {false, true})
        check_encoder(
            [&](auto& out, auto& pool, auto x) { cw::encode_commander_at_most_one(out, pool, x, g, eo, full); }, eo,
            false, 10, "commander g=" + std::to_string(g) + (full ? " full" : "") + (eo ? " exactly-one" : ""));
}

TEST(AtMostOne, FullEquivalenceDefinesEveryAuxiliaryVariable) {
  // With full equivalence every auxiliary variable is a function of the
  // inputs: for each satisfying input assignment (at most one input true),
  // CaDiCaL finds a model, and flipping any one auxiliary variable from its
  // model value is unsatisfiable. One-way encodings need not have this.
  for (const auto method : amo_methods)
    for (const bool exactly_one : {false, true})
      for (std::int32_t n = exactly_one ? 2 : 3; n <= 12; ++n) {
        const auto c = cw_test::cardinality(n, exactly_one ? relation::eq : relation::le, 1);
        const auto e = cw_test::encode(c, method, cw::encode_options{true});
        CaDiCaL::Solver solver;
        cw_test::add_to_solver(solver, e.cnf);
        for (std::int32_t on = exactly_one ? 1 : 0; on <= n; ++on) {
          auto assume_inputs = [&] {
            for (std::int32_t v = 1; v <= n; ++v) solver.assume(v == on ? v : -v);
          };
          assume_inputs();
          ASSERT_EQ(solver.solve(), 10) << cw::info(method).name << " n=" << n << " true input " << on;
          std::vector<int> model;
          for (std::int32_t a = n + 1; a <= e.pool.top(); ++a) model.push_back(solver.val(a) > 0 ? a : -a);
          for (const int a : model) {
            assume_inputs();
            solver.assume(-a);
            EXPECT_EQ(solver.solve(), 20) << cw::info(method).name << (exactly_one ? " exactly-one" : "") << " n=" << n
                                          << " true input " << on << ": auxiliary " << a << " is not defined";
          }
        }
      }
}

TEST(AtMostOne, RejectsWhatItCannotEncode) {
  // Cardinality constraints are not at-most-one: the table says so, and the
  // encoders called directly say so with the constraint's position.
  const auto c = cw::normalize_cardinality(inputs(5), relation::le, 2, 7, "pick two");
  ASSERT_EQ(c.kind, cw::constraint_kind::cardinality);
  for (const auto method : amo_methods) {
    EXPECT_FALSE(cw::can_encode(method, c)) << cw::info(method).name;
    cw::variable_pool pool(5);
    cw::cnf_buffer cnf;
    try {
      cw::encode_with(method, cnf, pool, c);
      ADD_FAILURE() << cw::info(method).name << " accepted a cardinality constraint";
    } catch (const cw::error& e) {
      EXPECT_EQ(e.id(), cw::error_id::method_not_applicable) << cw::info(method).name;
      EXPECT_EQ(e.where().constraint, std::optional<std::size_t>(7)) << cw::info(method).name;
      EXPECT_EQ(e.where().constraint_name, "pick two") << cw::info(method).name;
    }
  }
  cw::variable_pool pool(5);
  cw::cnf_buffer cnf;
  auto expect_error = [&](auto&& call, cw::error_id id, const char* what) {
    try {
      call();
      ADD_FAILURE() << what << " did not throw";
    } catch (const cw::error& e) {
      EXPECT_EQ(e.id(), id) << what;
      if (id == cw::error_id::method_not_applicable) {
        EXPECT_EQ(e.where().constraint, std::optional<std::size_t>(7)) << what;
      }
    }
  };
  expect_error([&] { cw::encode_ladder(cnf, pool, c, {}); }, cw::error_id::method_not_applicable, "ladder");
  expect_error([&] { cw::encode_bitwise(cnf, pool, c, {}); }, cw::error_id::method_not_applicable, "bitwise");
  expect_error([&] { cw::encode_commander(cnf, pool, c, {}); }, cw::error_id::method_not_applicable, "commander");
  expect_error([&] { cw::encode_product(cnf, pool, c, {}); }, cw::error_id::method_not_applicable, "product");
  expect_error([&] { cw::encode_bimander(cnf, pool, c, {}); }, cw::error_id::method_not_applicable, "bimander");
  expect_error([&] { cw::encode_commander_at_most_one(cnf, pool, inputs(5), 1); }, cw::error_id::usage,
               "commander with groups of one");
  expect_error([&] { cw::encode_bimander_at_most_one(cnf, pool, inputs(5), 0); }, cw::error_id::usage,
               "bimander with empty groups");
  EXPECT_TRUE(cnf.empty()) << "a rejected constraint emits nothing";
  // The method names of the table select them.
  for (const char* name : {"ladder", "bitwise", "commander", "product", "bimander"})
    EXPECT_TRUE(cw::find_method(name).has_value()) << name;
}
