// The JSON model format (docs/model-format.md): every constraint type, the
// numbering of named variables, soft constraints, methods, and one
// positioned error for every malformed input.
#include <gtest/gtest.h>

#include <clausewright/model.hpp>
#include <cstdint>
#include <fstream>
#include <sstream>
#include <string>

#include "json_model.hpp"
#include "read_errors.hpp"

namespace cw = clausewright;
namespace cwt = clausewright::tool;
using cw::lit;

namespace {

cw_test::failure read_error(const std::string& text) {
  return cw_test::capture_read_error([](const std::string& t) { (void)cwt::parse_json_model(t, "bad.json"); }, text,
                                     "bad.json");
}

}  // namespace

TEST(JsonModel, EveryConstraintType) {
  // 5 variables a..e declared in this order; 7 constraints, one soft.
  const cw::model m = cwt::parse_json_model(R"({
  "format": "clausewright-model", "version": 1,
  "variables": ["a", "b", "c", "d", "e"],
  "constraints": [
    {"type": "at-most-one", "literals": ["a", "~b", "c"], "name": "amo"},
    {"type": "exactly-one", "literals": ["a", "b"]},
    {"type": "at-most", "k": 2, "literals": ["a", "b", "c", "d"], "method": "totalizer"},
    {"type": "at-least", "k": 1, "literals": ["d", "e"]},
    {"type": "exactly", "k": 3, "literals": ["a", "b", "c", "d", "e"]},
    {"type": "clause", "literals": ["~a", "e"], "weight": 5},
    {"type": "linear", "terms": [[3, "a"], {"coefficient": -2, "literal": "~d"}], "relation": ">=", "bound": 1}
  ],
  "objective": [[1, "a"], [-2, "~e"]]
})",
                                            "model.json");
  EXPECT_EQ(m.variables(), 5);
  EXPECT_EQ(m.name_of(4), "d");
  ASSERT_EQ(m.constraints(), 7U);
  EXPECT_EQ(m.soft_constraints(), 1U);
  const auto amo = m.constraint(0);
  EXPECT_EQ(amo.name, "amo");
  EXPECT_EQ(amo.form, cw::constraint_form::at_most_one);
  EXPECT_EQ(amo.rel, cw::relation::le);
  EXPECT_EQ(amo.bound, 1);
  ASSERT_EQ(amo.terms.size(), 3U);
  EXPECT_EQ(amo.terms[1].lit, lit(-2));
  EXPECT_EQ(amo.position.line, 5U);
  EXPECT_EQ(amo.position.column, 5U);
  EXPECT_EQ(m.constraint(1).rel, cw::relation::eq);
  EXPECT_EQ(m.constraint(2).bound, 2);
  ASSERT_TRUE(m.constraint(2).method.has_value());
  EXPECT_EQ(cw::info(*m.constraint(2).method).name, "totalizer");
  EXPECT_EQ(m.constraint(3).rel, cw::relation::ge);
  EXPECT_EQ(m.constraint(4).rel, cw::relation::eq);
  EXPECT_EQ(m.constraint(4).bound, 3);
  EXPECT_EQ(m.constraint(5).form, cw::constraint_form::clause);
  EXPECT_EQ(m.constraint(5).weight, 5);
  const auto linear = m.constraint(6);
  ASSERT_EQ(linear.terms.size(), 2U);
  EXPECT_EQ(linear.terms[1].coefficient, -2);
  EXPECT_EQ(linear.terms[1].lit, lit(-4));
  ASSERT_EQ(m.objective().size(), 2U);
  // a = 1, e = 0: objective 1 + (-2)(~e = 1) = -1.
  EXPECT_EQ(cw::to_string(m.objective_value([](std::int32_t v) { return v == 1; })), "-1");
}

TEST(JsonModel, UndeclaredNamesAreNumberedByFirstAppearance) {
  // No "variables": the objective comes first in the text, so q is 1.
  const cw::model m = cwt::parse_json_model(R"({"objective": [[1, "q"]],
     "constraints": [{"type": "at-least", "k": 1, "literals": ["x[2]", "shift.mon-1", "q", "_t(3):a"]}]})",
                                            "m.json");
  EXPECT_EQ(m.variables(), 4);
  EXPECT_EQ(m.name_of(1), "q");
  EXPECT_EQ(m.name_of(2), "x[2]");
  EXPECT_EQ(m.name_of(3), "shift.mon-1");
  EXPECT_EQ(m.name_of(4), "_t(3):a");
}

TEST(JsonModel, EmptyModelIsValid) {
  const cw::model m = cwt::parse_json_model("{}", "m.json");
  EXPECT_EQ(m.variables(), 0);
  EXPECT_EQ(m.constraints(), 0U);
  EXPECT_FALSE(m.has_objective());
}

TEST(JsonModel, DocumentedExamplesRead) {
  // The examples in docs/ must stay valid models.
  for (const char* name : {"model-example.json", "model-example-soft.json"}) {
    std::ifstream in(std::string(CLAUSEWRIGHT_DOCS_DIR) + "/" + name);
    ASSERT_TRUE(in) << name;
    std::stringstream text;
    text << in.rdbuf();
    EXPECT_NO_THROW((void)cwt::parse_json_model(text.str(), name)) << name;
  }
}

TEST(JsonErrors, SyntaxErrors) {
  EXPECT_ERROR_AT("{\"constraints\": [}", 1, 18, "not valid JSON");
  EXPECT_ERROR_AT("{\"constraints\": [\n  {\"type\": \"clause\",\n   \"literals\": [\"a\"]\n", 4, 1, "not valid JSON");
  EXPECT_ERROR_AT("", 1, 1, "not valid JSON");
  EXPECT_ERROR_AT("{\"a\": \x01}", 1, 7, "not valid JSON");
  EXPECT_ERROR_AT("{\"constraints\": [], }", 1, 21, "not valid JSON");
}

TEST(JsonErrors, WrongTypes) {
  EXPECT_ERROR_AT("[1, 2]", 1, 1, "expected a JSON object");
  EXPECT_ERROR_AT("{\"constraints\": {}}", 1, 17, "expected an array of constraints");
  EXPECT_ERROR_AT("{\"constraints\": [3]}", 1, 18, "expected a constraint");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"at-most\", \"k\": \"2\", \"literals\": [\"a\"]}]}", 1, 43,
                  "expected an integer bound k, found a string");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"at-most\", \"k\": 2.5, \"literals\": [\"a\"]}]}", 1, 43,
                  "expected an integer");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"a\", true]}]}", 1, 55,
                  "expected a literal");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": 7}]}", 1, 27, "expected the type as a string");
  EXPECT_ERROR_AT("{\"variables\": \"a\"}", 1, 15, "expected an array of variable names");
  EXPECT_ERROR_AT("{\"objective\": [[1]]}", 1, 16, "expected a term [coefficient, literal]");
  EXPECT_ERROR_AT("{\"objective\": [[\"1\", \"a\"]]}", 1, 17, "expected an integer coefficient");
}

TEST(JsonErrors, CoefficientsBeyond64Bits) {
  EXPECT_ERROR_AT("{\"objective\": [[9223372036854775808, \"a\"]]}", 1, 17, "does not fit in 64 bits");
  EXPECT_ERROR_AT("{\"objective\": [[-99999999999999999999, \"a\"]]}", 1, 17, "does not fit in 64 bits");
  EXPECT_ERROR_AT("{\"objective\": [[1e400, \"a\"]]}", 1, 17, "does not fit in 64 bits");
}

TEST(JsonErrors, UndeclaredAndMalformedNames) {
  EXPECT_ERROR_AT("{\"variables\": [\"a\"],\n \"constraints\": [{\"type\": \"clause\", \"literals\": [\"a\", \"b\"]}]}",
                  2, 55, "\"b\" is not declared");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"1a\"]}]}", 1, 50, "malformed literal");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"a b\"]}]}", 1, 50, "malformed literal");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"~\"]}]}", 1, 50, "malformed literal");
  EXPECT_ERROR_AT("{\"variables\": [\"a\", \"a\"]}", 1, 21, "declared twice");
  EXPECT_ERROR_AT("{\"variables\": [\"\"]}", 1, 16, "malformed variable name");
}

TEST(JsonErrors, UnknownKeysTypesRelationsAndMethods) {
  EXPECT_ERROR_AT("{\"constraint\": []}", 1, 2, "unknown key \"constraint\"");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"at-most\", \"k\": 1, \"literals\": [], \"wieght\": 3}]}", 1, 62,
                  "\"wieght\" does not belong");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"at-most-two\", \"literals\": []}]}", 1, 27,
                  "unknown constraint type");
  EXPECT_ERROR_AT(
      "{\"constraints\": [{\"type\": \"linear\", \"terms\": [[1, \"a\"]], \"relation\": \"<\", \"bound\": 0}]}", 1, 70,
      "unknown relation \"<\"");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"a\"], \"method\": \"fastest\"}]}", 1, 66,
                  "valid methods: pairwise");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"linear\", \"terms\": []}]}", 1, 18, "needs \"relation\"");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"at-most\", \"literals\": [\"a\"]}]}", 1, 18, "needs \"k\"");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"at-most\", \"k\": -1, \"literals\": [\"a\"]}]}", 1, 43,
                  "expected k >= 0");
  EXPECT_ERROR_AT("{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"a\"], \"weight\": 0}]}", 1, 66,
                  "must be positive");
  EXPECT_ERROR_AT("{\"format\": \"other\"}", 1, 12, "clausewright-model");
  EXPECT_ERROR_AT("{\"version\": 2}", 1, 13, "version");
}
