// The OPB reader (Pseudo-Boolean Competition input format, Roussel &
// Manquinho): hand-written samples with their expected contents stated
// beside them, products of literals, streaming across block boundaries, and
// one positioned error per malformed input.
#include <gtest/gtest.h>

#include <clausewright/model.hpp>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "input.hpp"
#include "model_file.hpp"
#include "opb.hpp"
#include "read_errors.hpp"

namespace cw = clausewright;
namespace cwt = clausewright::tool;
using cw::lit;

namespace {

cw::model read(const std::string& text, const std::string& name = "sample.opb") {
  cwt::memory_source in(text, name);
  cw::model m;
  cwt::model_builder builder(m);
  cwt::read_opb(in, builder);
  return m;
}

cw_test::failure read_error(const std::string& text) {
  return cw_test::capture_read_error([](const std::string& t) { (void)read(t, "bad.opb"); }, text, "bad.opb");
}

// Ten million copies of one character: a 10 MB line.
std::string repeated(char c) {
  std::string s;
  s.resize(10'000'000, c);
  return s;
}

}  // namespace

TEST(OpbReader, HandWrittenSample) {
  // 4 variables, 3 constraints, an objective, one product (x3 x4).
  const cw::model m = read(
      "* #variable= 4 #constraint= 3\n"
      "* comment lines anywhere\n"
      "min: +2 x1 -3 ~x2 +1 x3 x4 ;\n"
      "+1 x1 +1 x2 +1 x3 +1 x4 >= 2 ;\n"
      "\n"
      "+1 x1 +1 x2 +1 x3 <= 1 ;\n"
      "-2 x1 +3 ~x2 = -2 ;\n");
  EXPECT_EQ(m.variables(), 4);
  EXPECT_EQ(m.products(), 1U);
  EXPECT_EQ(m.top(), 5);  // the product variable comes after x4
  ASSERT_EQ(m.constraints(), 3U);
  ASSERT_TRUE(m.has_objective());
  ASSERT_EQ(m.objective().size(), 3U);
  EXPECT_EQ(m.objective()[1].coefficient, -3);
  EXPECT_EQ(m.objective()[1].lit, lit(-2));
  EXPECT_EQ(m.objective()[2].lit, lit(5));
  ASSERT_EQ(m.product_factors(0).size(), 2U);
  EXPECT_EQ(m.product_factors(0)[0], lit(3));
  EXPECT_EQ(m.product_factors(0)[1], lit(4));

  const cw::constraint_view c0 = m.constraint(0);
  EXPECT_EQ(c0.terms.size(), 4U);
  EXPECT_EQ(c0.rel, cw::relation::ge);
  EXPECT_EQ(c0.bound, 2);
  EXPECT_EQ(c0.position.line, 4U);
  EXPECT_EQ(c0.position.column, 1U);
  const cw::constraint_view c1 = m.constraint(1);
  EXPECT_EQ(c1.rel, cw::relation::le);
  EXPECT_EQ(c1.position.line, 6U);
  const cw::constraint_view c2 = m.constraint(2);
  EXPECT_EQ(c2.rel, cw::relation::eq);
  EXPECT_EQ(c2.bound, -2);
  ASSERT_EQ(c2.terms.size(), 2U);
  EXPECT_EQ(c2.terms[0].coefficient, -2);
  EXPECT_EQ(c2.terms[1].lit, lit(-2));

  // x1 = x2 = x3 = 1, x4 = 0: constraint 0 holds (3 >= 2), constraint 1 is
  // violated (3 <= 1 fails), constraint 2: -2 + 0 = -2 holds. Objective:
  // 2 - 0 + (x3 x4 = 0) = 2.
  const auto value = [](std::int32_t v) { return v != 4; };
  const auto violated = m.check(value);
  ASSERT_EQ(violated.size(), 1U);
  EXPECT_EQ(violated[0].index, 1U);
  EXPECT_EQ(cw::to_string(violated[0].left_side), "3");
  EXPECT_EQ(cw::to_string(m.objective_value(value)), "2");
  // All true: the product x3 x4 is 1, objective 2 + 0 + 1 = 3.
  EXPECT_EQ(cw::to_string(m.objective_value([](std::int32_t) { return true; })), "3");
}

TEST(OpbReader, DistinctProductsGetOneVariableEach) {
  // x1 x2, x2 x1 and x1 x1 x2 are one product; ~x1 x2 is another; x3 x3 is
  // just x3. 3 user variables, 2 products.
  const cw::model m = read(
      "* #variable= 3 #constraint= 2\n"
      "+1 x1 x2 +1 x2 x1 +2 x3 x3 >= 1 ;\n"
      "+1 x1 x1 x2 +1 ~x1 x2 <= 1 ;\n");
  EXPECT_EQ(m.products(), 2U);
  const cw::constraint_view a = m.constraint(0);
  const cw::constraint_view b = m.constraint(1);
  EXPECT_EQ(a.terms[0].lit, lit(4));
  EXPECT_EQ(a.terms[1].lit, lit(4));
  EXPECT_EQ(a.terms[2].lit, lit(3));
  EXPECT_EQ(b.terms[0].lit, lit(4));
  EXPECT_EQ(b.terms[1].lit, lit(5));
}

TEST(OpbReader, WithoutHeaderTheLargestVariableCounts) {
  // No header: the file is read twice, the first time for the largest variable (x9).
  const cw::model m = read("+3 x1 +5 x9 <= 6 ; +1 x2 >= 1 ;\n+1 x1 x2 >= 1 ;");
  EXPECT_EQ(m.variables(), 9);
  EXPECT_EQ(m.constraints(), 3U);
  EXPECT_EQ(m.products(), 1U);
  EXPECT_EQ(m.top(), 10);
}

TEST(OpbReader, SoftConstraintsAndLineEndings) {
  // Weighted (WBO-style) soft constraints, CRLF line ends, tabs, two
  // statements on one line.
  const cw::model m = read(
      "* #variable= 3 #constraint= 3\r\n"
      "soft: 100 ;\r\n"
      "[4] +1 x1\t+1 x2 >= 2 ;\r\n"
      "+1 x1 +1 x2 +1 x3 = 1 ; [7] +1 ~x3 >= 1 ;\r\n");
  ASSERT_EQ(m.constraints(), 3U);
  EXPECT_EQ(m.soft_constraints(), 2U);
  EXPECT_EQ(m.constraint(0).weight, 4);
  EXPECT_EQ(m.constraint(1).weight, 0);
  EXPECT_EQ(m.constraint(2).weight, 7);
  EXPECT_EQ(m.constraint(2).position.line, 4U);
  EXPECT_EQ(m.constraint(2).position.column, 25U);
}

TEST(OpbReader, ExtremeCoefficientsAreRead) {
  const cw::model m = read(
      "* #variable= 2 #constraint= 1\n"
      "+9223372036854775807 x1 -9223372036854775808 x2 >= -1 ;\n");
  EXPECT_EQ(m.constraint(0).terms[0].coefficient, INT64_MAX);
  EXPECT_EQ(m.constraint(0).terms[1].coefficient, INT64_MIN);
}

TEST(OpbReader, StreamsAcrossBlocks) {
  // Far more text than one read block, with constraints cut at block
  // boundaries; every constraint is checked against the generator.
  std::mt19937_64 rng(12345);
  std::string text = "* #variable= 50 #constraint= 30000\n";
  std::vector<std::vector<cw::term>> expected;
  for (int i = 0; i < 30000; ++i) {
    std::vector<cw::term> terms;
    const int n = 1 + static_cast<int>(rng() % 6);
    for (int j = 0; j < n; ++j) {
      const auto a = static_cast<std::int64_t>(rng() % 2001) - 1000;
      const auto v = static_cast<std::int32_t>(1 + rng() % 50);
      const bool negative = rng() % 2 == 0;
      terms.push_back({a, lit(negative ? -v : v)});
      // Appended piece by piece: g++ 12 warns falsely (-Wrestrict) on "+" + to_string(a).
      if (a >= 0) text += '+';
      text += std::to_string(a);
      text += negative ? " ~x" : " x";
      text += std::to_string(v);
      text += ' ';
    }
    text += ">= " + std::to_string(i % 7) + " ;\n";
    expected.push_back(terms);
  }
  ASSERT_GT(text.size(), std::size_t{3} << 18);
  const cw::model m = read(text);
  ASSERT_EQ(m.constraints(), expected.size());
  for (std::size_t i = 0; i < expected.size(); ++i) {
    const auto c = m.constraint(i);
    ASSERT_EQ(c.terms.size(), expected[i].size()) << "constraint " << i;
    for (std::size_t j = 0; j < c.terms.size(); ++j) {
      ASSERT_EQ(c.terms[j].coefficient, expected[i][j].coefficient) << "constraint " << i << " term " << j;
      ASSERT_EQ(c.terms[j].lit, expected[i][j].lit) << "constraint " << i << " term " << j;
    }
    ASSERT_EQ(c.bound, static_cast<std::int64_t>(i % 7));
  }
}

// --- malformed input: one error, its position, what was expected ---------------------

TEST(OpbErrors, MissingSemicolon) {
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x2 >= 1\n", 2, 17, "expected ';'");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x2 >= 1", 2, 17, "expected ';'");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\nmin: +1 x1\n+1 x2 >= 1 ;\n", 2, 11, "';'");
}

TEST(OpbErrors, TruncatedLines) {
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +", 2, 8, "end of the file");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1\n", 2, 9, "variable");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 >=\n", 2, 9, "bound");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 ~\n", 2, 5, "variable");
}

TEST(OpbErrors, UnknownRelations) {
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x2 > 1 ;\n", 2, 13, "unknown relation '>'");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x2 => 1 ;\n", 2, 13, "unknown relation '=>'");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x2 != 1 ;\n", 2, 13, "expected >=, <= or =");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x2 ;\n", 2, 13, "expected a relation");
}

TEST(OpbErrors, CoefficientsBeyond64Bits) {
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +9223372036854775808 x2 >= 1 ;\n", 2, 7, "64 bits");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n-9223372036854775809 x2 >= 1 ;\n", 2, 1, "64 bits");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 >= 99999999999999999999999 ;\n", 2, 10, "64 bits");
  // A coefficient of ten million digits stops at the first digit too many.
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+" + repeated('7') + " x1 >= 1 ;\n", 2, 1, "does not fit in 64 bits");
}

TEST(OpbErrors, UndeclaredAndMalformedVariables) {
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x3 >= 1 ;\n", 2, 10, "not declared");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 y2 >= 1 ;\n", 2, 10, "expected a variable");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x2a >= 1 ;\n", 2, 10, "malformed variable name 'x2a'");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x0 >= 1 ;\n", 2, 4, "numbered from x1");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 xx >= 1 ;\n", 2, 4, "malformed variable name");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 +1 x99999999999 >= 1 ;\n", 2, 10, "beyond the largest");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\nx1 >= 1 ;\n", 2, 1, "coefficient before the variable");
}

TEST(OpbErrors, BinaryGarbageAndEmptyFiles) {
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+1 x1 \x01\x02 >= 1 ;\n", 2, 7, "byte 0x01");
  EXPECT_ERROR_AT(std::string("\0\0\0\xff", 4), 1, 1, "byte 0x00");
  EXPECT_ERROR_AT("", 1, 1, "found the end of the file");
  EXPECT_ERROR_AT("* only a comment\n\n", 3, 1, "OPB header");
  EXPECT_ERROR_AT("* #variable= 1 #constraint= 1\nhello world ;\n", 2, 1, "found 'hello'");
}

TEST(OpbErrors, HugeLines) {
  // A 10 MB line of terms without its ';' is read and rejected at its end.
  std::string terms;
  while (terms.size() < 10'000'000) terms += "+1 x1 +2 x2 ";
  const std::string text = "* #variable= 2 #constraint= 1\n" + terms + ">= 3\n";
  EXPECT_ERROR_AT(text, 2, terms.size() + 5, "expected ';'");
  // A 10 MB line of garbage is rejected at its first character.
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n" + repeated('q') + "\n", 2, 1, "expected a term");
}

TEST(OpbErrors, HeaderDisagreesWithBody) {
  // One constraint where the header says two: reported at the count in the header.
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 2\n+1 x1 >= 1 ;\n", 1, 29, "#constraint= 2");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 0\n+1 x1 >= 1 ;\n", 1, 29, "the file has 1 constraints");
  EXPECT_ERROR_AT("* #variable= two #constraint= 1\n+1 x1 >= 1 ;\n", 1, 14, "expected a number");
}

TEST(OpbErrors, OtherStatements) {
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 0\nmax: +1 x1 ;\n", 2, 1, "no 'max:'");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 0\nmin: +1 x1 ;\nmin: +1 x2 ;\n", 3, 1, "second objective");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 0\nmin: +1 x1 >= 1 ;\n", 2, 12, "objective");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n[0] +1 x1 >= 1 ;\n", 2, 2, "must be positive");
  EXPECT_ERROR_AT("* #variable= 2 #constraint= 1\n+ 1 x1 >= 1 ;\n", 2, 2, "right after its sign");
}
