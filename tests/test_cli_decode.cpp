// `clausewright decode --json` and `--true-only`, run as a program.
//
// Independent references: CaDiCaL (its own DIMACS parser reads the formula
// the tool wrote and finds the assignment the answer carries), and a direct
// evaluation here of every constraint and of the objective from the
// generator's own record of the terms (not from the tool's model).
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cadical.hpp>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "tool_run.hpp"

namespace fs = std::filesystem;
using json = nlohmann::json;

namespace {

using tool_run::quote;
using tool_run::read_file;
using tool_run::run_result;
using tool_run::with_number;

const std::string tool = CLAUSEWRIGHT_TOOL_PATH;

// --- a generated model, kept on our side for the evaluation --------------------------

struct gen_term {
  std::int64_t coefficient = 0;
  int var = 0;
  bool negated = false;
};

struct gen_constraint {
  std::vector<gen_term> terms;
  std::string rel;  // "<=", ">=", "="
  std::int64_t bound = 0;
  std::int64_t weight = 0;  // 0: hard
  std::string name;         // empty: unnamed
  int line = 0;             // line of the file it is written on
};

struct gen_model {
  int variables = 0;
  std::vector<gen_constraint> constraints;
  std::vector<gen_term> objective;
  std::string text;
};

bool truth(const gen_term& t, const std::vector<bool>& values) {
  const bool v = values[static_cast<std::size_t>(t.var)];
  return t.negated ? !v : v;
}

std::int64_t sum_of(const std::vector<gen_term>& terms, const std::vector<bool>& values) {
  std::int64_t s = 0;
  for (const gen_term& t : terms)
    if (truth(t, values)) s += t.coefficient;
  return s;
}

bool holds(const gen_constraint& c, const std::vector<bool>& values) {
  const std::int64_t s = sum_of(c.terms, values);
  if (c.rel == "<=") return s <= c.bound;
  if (c.rel == ">=") return s >= c.bound;
  return s == c.bound;
}

std::string term_json(const gen_term& t) {
  return with_number("[", t.coefficient) + ", \"" + (t.negated ? "~" : "") + with_number("v", t.var) + "\"]";
}

// One constraint per line, so the line of each is known here. Every third
// constraint is soft when `soft` is set; every other one has a name.
gen_model generate(std::uint64_t seed, bool soft) {
  std::mt19937_64 rng(seed);
  const auto pick = [&rng](int lo, int hi) { return std::uniform_int_distribution<int>(lo, hi)(rng); };
  gen_model g;
  g.variables = pick(5, 8);
  const int count = pick(3, 6);
  const char* relations[] = {"<=", ">=", "="};
  std::string text = "{\n\"format\": \"clausewright-model\",\n\"version\": 1,\n\"variables\": [";
  for (int v = 1; v <= g.variables; ++v) {
    text += with_number(v > 1 ? ", \"v" : "\"v", v);
    text += '"';
  }
  text += "],\n\"constraints\": [\n";
  int line = 6;
  for (int i = 0; i < count; ++i) {
    gen_constraint c;
    const int size = pick(2, g.variables);
    std::set<int> used;
    while (static_cast<int>(c.terms.size()) < size) {
      const int var = pick(1, g.variables);
      if (!used.insert(var).second) continue;
      int coefficient = pick(-3, 4);
      if (coefficient == 0) coefficient = 1;
      c.terms.push_back({coefficient, var, pick(0, 3) == 0});
    }
    c.rel = relations[pick(0, 2)];
    c.bound = pick(-1, 4);
    const int weight = pick(1, 9);  // drawn either way: the soft model has the hard one's terms
    if (soft && i % 3 == 2) c.weight = weight;
    if (i % 2 == 0) c.name = with_number("c", i);
    c.line = line++;
    text += "  {";
    if (!c.name.empty()) text += "\"name\": \"" + c.name + "\", ";
    text += "\"type\": \"linear\", \"terms\": [";
    for (std::size_t t = 0; t < c.terms.size(); ++t) text += (t ? ", " : "") + term_json(c.terms[t]);
    text += "], \"relation\": \"" + c.rel + "\", \"bound\": ";
    text += std::to_string(c.bound);
    if (c.weight != 0) text += with_number(", \"weight\": ", c.weight);
    text += i + 1 < count ? "},\n" : "}\n";
    g.constraints.push_back(std::move(c));
  }
  text += "],\n\"objective\": [";
  for (int v = 1; v <= g.variables; ++v) {
    if (pick(0, 1) == 0 && v > 1) continue;
    g.objective.push_back({pick(-2, 5), v, pick(0, 2) == 0});
    text += (g.objective.size() > 1 ? ", " : "") + term_json(g.objective.back());
  }
  text += "]\n}\n";
  g.text = text;
  return g;
}

class decode_cli : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() / ("clausewright-decode-" + std::to_string(::getpid()) + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  void TearDown() override {
    if (!HasFailure()) fs::remove_all(dir_);
  }

  fs::path write(const std::string& name, const std::string& text) const {
    std::ofstream out(dir_ / name, std::ios::binary);
    out << text;
    return dir_ / name;
  }

  run_result run(const std::string& args) const { return tool_run::run_program(tool, args, dir_); }

  fs::path dir_;
};

std::string answer_of(const std::vector<bool>& values, const char* status = "s SATISFIABLE\n") {
  std::string text = status;
  text += "v";
  for (std::size_t v = 1; v < values.size(); ++v) {
    text += values[v] ? " " : " -";
    text += std::to_string(v);
  }
  return text + " 0\n";
}

// Checks decode --json's report of `values` against the evaluation here.
void check_report(const gen_model& g, const std::vector<bool>& values, const json& doc, const fs::path& model,
                  const std::string& context) {
  SCOPED_TRACE(context);
  ASSERT_TRUE(doc.contains("assignment")) << doc.dump();
  for (int v = 1; v <= g.variables; ++v)
    EXPECT_EQ(doc["assignment"].at(with_number("v", v)).get<bool>(), values[static_cast<std::size_t>(v)]) << "v" << v;
  EXPECT_EQ(doc["assignment"].size(), static_cast<std::size_t>(g.variables));
  EXPECT_EQ(doc["objective"].get<std::int64_t>(), sum_of(g.objective, values));
  std::size_t hard = 0;
  std::size_t hard_violated = 0;
  std::size_t soft = 0;
  std::size_t soft_unsatisfied = 0;
  std::int64_t soft_cost = 0;
  std::vector<std::size_t> expected;
  for (std::size_t i = 0; i < g.constraints.size(); ++i) {
    const gen_constraint& c = g.constraints[i];
    (c.weight != 0 ? soft : hard) += 1;
    if (holds(c, values)) continue;
    expected.push_back(i);
    if (c.weight != 0) {
      ++soft_unsatisfied;
      soft_cost += c.weight;
    } else {
      ++hard_violated;
    }
  }
  EXPECT_EQ(doc["hard_constraints"].get<std::size_t>(), hard);
  EXPECT_EQ(doc["hard_violated"].get<std::size_t>(), hard_violated);
  if (soft != 0) {
    EXPECT_EQ(doc["soft_cost"].get<std::int64_t>(), soft_cost);
    EXPECT_EQ(doc["soft_unsatisfied"].get<std::size_t>(), soft_unsatisfied);
  } else {
    EXPECT_FALSE(doc.contains("soft_cost"));
  }
  // The total, in the words solve uses: the objective function's value plus
  // the soft cost, both computed here from the generator's record.
  EXPECT_EQ(doc["total"].get<std::int64_t>(), sum_of(g.objective, values) + soft_cost);
  const json& violated = doc["violated"];
  ASSERT_EQ(violated.size(), expected.size()) << doc.dump(2);
  for (std::size_t k = 0; k < expected.size(); ++k) {
    const gen_constraint& c = g.constraints[expected[k]];
    const json& e = violated[k];
    EXPECT_EQ(e["index"].get<std::size_t>(), expected[k]);
    if (c.name.empty())
      EXPECT_TRUE(e["name"].is_null());
    else
      EXPECT_EQ(e["name"].get<std::string>(), c.name);
    EXPECT_EQ(e["file"].get<std::string>(), model.string());
    EXPECT_EQ(e["line"].get<int>(), c.line);
    EXPECT_TRUE(e["column"].is_number_integer());
    EXPECT_EQ(e["kind"].get<std::string>(), c.weight != 0 ? "soft" : "hard");
    EXPECT_EQ(e["weight"].get<std::int64_t>(), c.weight);
    EXPECT_EQ(e["relation"].get<std::string>(), c.rel);
    EXPECT_EQ(e["bound"].get<std::int64_t>(), c.bound);
    const std::int64_t left = sum_of(c.terms, values);
    EXPECT_EQ(e["left_side"].get<std::int64_t>(), left);
    const std::int64_t off = c.rel == "<="   ? left - c.bound
                             : c.rel == ">=" ? c.bound - left
                                             : std::llabs(left - c.bound);
    EXPECT_GT(off, 0);
    EXPECT_EQ(e["amount"].get<std::int64_t>(), off);
  }
}

// The hard model encoded by the tool, solved by CaDiCaL from the file, its
// answer decoded: the values are the solver's; then every single flip of
// that assignment, with soft constraints in the model, against the
// evaluation here.
TEST_F(decode_cli, JsonAgreesWithCadicalAndWithTheEvaluation) {
  int solved = 0;
  int refuted = 0;
  int flips_with_violations = 0;
  for (std::uint64_t seed = 1; seed <= 60; ++seed) {
    SCOPED_TRACE(with_number("seed ", seed));
    const gen_model g = generate(seed, false);
    const fs::path model = write("m.json", g.text);
    const fs::path cnf = dir_ / "m.cnf";
    const run_result e = run("encode " + quote(model.string()) + " -o " + quote(cnf.string()));
    ASSERT_EQ(e.code, 0) << e.err;
    CaDiCaL::Solver solver;
    solver.set("quiet", 1);
    int vars = 0;
    const char* problem = solver.read_dimacs(cnf.c_str(), vars, 1);
    ASSERT_EQ(problem, nullptr) << problem;
    const int status = solver.solve();
    if (status == 20) {
      ++refuted;
      // Brute force agrees: no assignment satisfies every constraint.
      for (std::uint32_t bits = 0; bits < (1U << g.variables); ++bits) {
        std::vector<bool> all(static_cast<std::size_t>(g.variables) + 1, false);
        for (int v = 1; v <= g.variables; ++v) all[static_cast<std::size_t>(v)] = ((bits >> (v - 1)) & 1U) != 0;
        bool every = true;
        for (const gen_constraint& c : g.constraints) every = every && holds(c, all);
        ASSERT_FALSE(every) << "CaDiCaL answered unsatisfiable, but assignment " << bits << " satisfies the model";
      }
      const run_result d =
          run("decode --json " + quote(model.string()) + " " + quote(write("unsat.txt", "s UNSATISFIABLE\n").string()));
      EXPECT_EQ(d.code, 1);
      const json doc = json::parse(d.out);
      EXPECT_EQ(doc["status"].get<std::string>(), "unsatisfiable");
      EXPECT_TRUE(doc["assignment"].is_null());
      continue;
    }
    ASSERT_EQ(status, 10);
    ++solved;
    std::vector<bool> values(static_cast<std::size_t>(g.variables) + 1, false);
    for (int v = 1; v <= g.variables; ++v) values[static_cast<std::size_t>(v)] = solver.val(v) > 0;
    const fs::path answer = write("answer.txt", answer_of(values));
    const run_result d = run("decode --json " + quote(model.string()) + " " + quote(answer.string()));
    ASSERT_EQ(d.code, 0) << d.out << d.err;
    const json doc = json::parse(d.out);
    EXPECT_EQ(doc["status"].get<std::string>(), "satisfiable");
    check_report(g, values, doc, model, "the solver's assignment");
    EXPECT_TRUE(doc["violated"].empty());

    // --true-only: the names set true, in JSON and as plain lines.
    std::vector<std::string> true_names;
    for (int v = 1; v <= g.variables; ++v)
      if (values[static_cast<std::size_t>(v)]) true_names.push_back(with_number("v", v));
    const run_result t = run("decode --json --true-only " + quote(model.string()) + " " + quote(answer.string()));
    ASSERT_EQ(t.code, 0) << t.err;
    const json tdoc = json::parse(t.out);
    EXPECT_FALSE(tdoc.contains("assignment"));
    EXPECT_EQ(tdoc["true_variables"].get<std::vector<std::string>>(), true_names);
    const run_result p = run("decode --true-only " + quote(model.string()) + " " + quote(answer.string()));
    ASSERT_EQ(p.code, 0) << p.err;
    std::string lines;
    for (const std::string& n : true_names) lines += n + "\n";
    EXPECT_EQ(p.out, lines);
    EXPECT_NE(p.err.find("constraints hold"), std::string::npos) << p.err;

    // The same constraints with some soft, every single flip of the answer.
    const gen_model gs = generate(seed, true);
    const fs::path soft_model = write("s.json", gs.text);
    for (int flip = 1; flip <= gs.variables; ++flip) {
      std::vector<bool> flipped = values;
      flipped[static_cast<std::size_t>(flip)] = !flipped[static_cast<std::size_t>(flip)];
      const fs::path bad = write("bad.txt", answer_of(flipped, ""));
      const run_result w = run("decode --json " + quote(soft_model.string()) + " " + quote(bad.string()));
      bool hard_broken = false;
      for (const gen_constraint& c : gs.constraints) hard_broken = hard_broken || (c.weight == 0 && !holds(c, flipped));
      EXPECT_EQ(w.code, hard_broken ? 1 : 0) << w.out << w.err;
      const json wdoc = json::parse(w.out);
      EXPECT_TRUE(wdoc["status"].is_null());  // no s line
      check_report(gs, flipped, wdoc, soft_model, with_number("flip of v", flip));
      if (!wdoc["violated"].empty()) ++flips_with_violations;
    }
  }
  // The seeds exercise both answers and violated constraints.
  EXPECT_GT(solved, 10);
  EXPECT_GT(refuted, 0);
  EXPECT_GT(flips_with_violations, 20);
}

TEST_F(decode_cli, JsonForUnknownAndOptimumAnswers) {
  const gen_model g = generate(7, true);
  const fs::path model = write("m.json", g.text);
  const run_result u =
      run("decode --json " + quote(model.string()) + " " + quote(write("u.txt", "s UNKNOWN\nv 1 2 0\n").string()));
  EXPECT_EQ(u.code, 3);
  const json udoc = json::parse(u.out);
  EXPECT_EQ(udoc["status"].get<std::string>(), "unknown");
  EXPECT_TRUE(udoc["assignment"].is_null());
  EXPECT_TRUE(udoc["violated"].is_null());

  std::vector<bool> values(static_cast<std::size_t>(g.variables) + 1, true);
  const run_result o = run("decode --json " + quote(model.string()) + " " +
                           quote(write("o.txt", answer_of(values, "s OPTIMUM FOUND\n")).string()));
  const json odoc = json::parse(o.out);
  EXPECT_EQ(odoc["status"].get<std::string>(), "optimal");
  check_report(g, values, odoc, model, "all true");
  EXPECT_EQ(o.code, odoc["hard_violated"].get<std::size_t>() == 0 ? 0 : 1);
}

}  // namespace
