// The command-line tool, run as a program: exit codes, messages, files.
//
// Independent references: CaDiCaL (its own DIMACS parser in strict mode
// checks our headers and solves the formulas), brute force over the model's
// variables (evaluated here from the generator's own record of each
// constraint), a MaxSAT optimum found by a bound loop over CaDiCaL written
// here, counts of hand-written samples worked out by hand, and clause counts
// taken from the written files.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cadical.hpp>
#include <clausewright/methods.hpp>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <optional>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "tool_run.hpp"

namespace fs = std::filesystem;
namespace cw = clausewright;

namespace {

using tool_run::run_result;
using tool_run::read_file;
using tool_run::write_file;
using tool_run::quote;

const std::string tool = CLAUSEWRIGHT_TOOL_PATH;

// --- running the tool --------------------------------------------------------------

// A scratch directory per test (tests may run in parallel processes).
class cli : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() /
           ("clausewright-cli-" + std::to_string(::getpid()) + "-" + info->test_suite_name() + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  void TearDown() override {
    if (!HasFailure()) fs::remove_all(dir_);
  }

  fs::path file(const std::string& name) const { return dir_ / name; }
  fs::path write(const std::string& name, const std::string& text) const {
    write_file(file(name), text);
    return file(name);
  }

  // Runs `clausewright ARGS`, standard input from `input` when given.
  run_result run(const std::string& args, const std::string& input = {}) const {
    return tool_run::run_program(tool, args, dir_, input);
  }

  // Files in the directory other than the given ones (left-over temporaries).
  std::vector<std::string> stray_files(const std::set<std::string>& expected) const {
    std::vector<std::string> out;
    for (const auto& e : fs::directory_iterator(dir_)) {
      const std::string name = e.path().filename().string();
      if (name[0] != '.' && expected.count(name) == 0) out.push_back(name);
    }
    return out;
  }

  fs::path dir_;
};

// --- an independent DIMACS / WCNF reader ---------------------------------------------------

struct formula {
  std::int64_t header_variables = -1;
  std::int64_t header_clauses = -1;
  std::int64_t top = -1;  // older WCNF
  std::vector<std::vector<int>> hard;
  std::vector<std::vector<int>> soft;
  std::vector<std::int64_t> weights;
  std::uint64_t literals = 0;
  int max_var = 0;
  std::uint64_t comments = 0;
};

// Reads DIMACS CNF, current WCNF ("h" / weight lines) and older WCNF.
formula parse_formula(const std::string& text) {
  formula f;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    if (line[0] == 'c') {
      ++f.comments;
      continue;
    }
    std::istringstream ls(line);
    if (line[0] == 'p') {
      std::string p, kind;
      ls >> p >> kind >> f.header_variables >> f.header_clauses;
      if (kind == "wcnf") ls >> f.top;
      continue;
    }
    std::string first;
    ls >> first;
    bool is_hard = true;
    std::int64_t weight = 0;
    std::vector<int> clause;
    if (first == "h") {
      is_hard = true;
    } else if (f.top >= 0) {
      weight = std::stoll(first);
      is_hard = weight >= f.top;
    } else if (text.find("\nh ") != std::string::npos || text.rfind("h ", 0) == 0 ||
               text.find("p cnf") == std::string::npos) {
      // Current WCNF: a line not starting with h is soft, led by its weight.
      weight = std::stoll(first);
      is_hard = false;
    } else {
      const int l = std::stoi(first);
      if (l != 0) clause.push_back(l);
      if (l == 0) {
        f.hard.push_back(clause);
        continue;
      }
    }
    for (int l = 0; ls >> l && l != 0;) clause.push_back(l);
    for (const int l : clause) f.max_var = std::max(f.max_var, std::abs(l));
    f.literals += clause.size();
    if (is_hard) {
      f.hard.push_back(clause);
    } else {
      f.soft.push_back(clause);
      f.weights.push_back(weight);
    }
  }
  return f;
}

// --- generated models, with the generator's own record ----------------------------------------

struct recorded_term {
  std::int64_t coefficient;
  std::vector<int> factors;  // DIMACS literals; more than one: a product
};
struct recorded_constraint {
  std::vector<recorded_term> terms;
  std::string rel;
  std::int64_t bound;
  std::int64_t weight = 0;
};
struct generated_model {
  int variables = 0;
  std::vector<recorded_constraint> constraints;
  std::vector<recorded_term> objective;
  std::string opb;
  std::string json;
  std::string description;
};

bool literal_value(int l, std::uint32_t bits) {
  const bool v = ((bits >> (std::abs(l) - 1)) & 1U) != 0;
  return l < 0 ? !v : v;
}
std::int64_t sum_of(const std::vector<recorded_term>& terms, std::uint32_t bits) {
  std::int64_t s = 0;
  for (const auto& t : terms) {
    bool all = true;
    for (const int l : t.factors) all = all && literal_value(l, bits);
    if (all) s += t.coefficient;
  }
  return s;
}
bool holds(const recorded_constraint& c, std::uint32_t bits) {
  const std::int64_t s = sum_of(c.terms, bits);
  if (c.rel == "<=") return s <= c.bound;
  if (c.rel == ">=") return s >= c.bound;
  return s == c.bound;
}
bool hard_holds(const generated_model& g, std::uint32_t bits) {
  for (const auto& c : g.constraints)
    if (c.weight == 0 && !holds(c, bits)) return false;
  return true;
}

std::string term_text(const recorded_term& t) {
  std::string s = (t.coefficient >= 0 ? "+" : "") + std::to_string(t.coefficient);
  for (const int l : t.factors) s += (l < 0 ? " ~x" : " x") + std::to_string(std::abs(l));
  return s + " ";
}

generated_model generate(std::uint64_t seed, int n, int hard, int soft, bool products, bool objective) {
  std::mt19937_64 rng(seed);
  auto pick = [&](std::int64_t lo, std::int64_t hi) {
    return lo + static_cast<std::int64_t>(rng() % static_cast<std::uint64_t>(hi - lo + 1));
  };
  generated_model g;
  g.variables = n;
  auto random_term = [&](bool unit) {
    recorded_term t;
    t.coefficient = unit ? 1 : pick(-5, 7);
    const int v = static_cast<int>(pick(1, n));
    t.factors.push_back(rng() % 3 == 0 ? -v : v);
    if (products && rng() % 6 == 0) {
      const int w = static_cast<int>(pick(1, n));
      if (w != v) t.factors.push_back(rng() % 2 ? w : -w);
    }
    return t;
  };
  const char* rels[] = {"<=", ">=", "="};
  for (int i = 0; i < hard + soft; ++i) {
    recorded_constraint c;
    const bool unit = rng() % 2 == 0;
    const int size = static_cast<int>(pick(2, 6));
    std::int64_t spread = 0;
    for (int j = 0; j < size; ++j) {
      c.terms.push_back(random_term(unit));
      spread += std::abs(c.terms.back().coefficient);
    }
    // Bounds that leave room, so that about half the models are satisfiable.
    c.rel = rels[rng() % 3];
    if (c.rel == "<=") {
      c.bound = pick(0, spread);
    } else if (c.rel == ">=") {
      c.bound = pick(-spread / 2, spread / 2);
    } else {
      c.bound = pick(0, spread / 2);
    }
    c.weight = i >= hard ? pick(1, 9) : 0;
    g.constraints.push_back(c);
  }
  if (objective)
    for (int v = 1; v <= n; ++v)
      if (rng() % 2 == 0) g.objective.push_back({pick(-4, 6), {rng() % 2 ? v : -v}});

  // OPB
  std::ostringstream opb;
  opb << "* #variable= " << n << " #constraint= " << g.constraints.size() << "\n";
  opb << "* generated, seed " << seed << "\n";
  if (objective) {
    opb << "min: ";
    for (const auto& t : g.objective) opb << term_text(t);
    opb << ";\n";
  }
  for (const auto& c : g.constraints) {
    if (c.weight != 0) opb << "[" << c.weight << "] ";
    for (const auto& t : c.terms) opb << term_text(t);
    opb << c.rel << " " << c.bound << " ;\n";
  }
  g.opb = opb.str();
  g.description = "seed " + std::to_string(seed) + ":\n" + g.opb;

  // JSON, when there are no products (JSON has none); variables v1..vn.
  nlohmann::json j;
  j["variables"] = nlohmann::json::array();
  for (int v = 1; v <= n; ++v) j["variables"].push_back("v" + std::to_string(v));
  auto lit_name = [](int l) { return (l < 0 ? "~v" : "v") + std::to_string(std::abs(l)); };
  j["constraints"] = nlohmann::json::array();
  for (const auto& c : g.constraints) {
    nlohmann::json jc;
    jc["type"] = "linear";
    jc["terms"] = nlohmann::json::array();
    for (const auto& t : c.terms) jc["terms"].push_back({t.coefficient, lit_name(t.factors[0])});
    jc["relation"] = c.rel;
    jc["bound"] = c.bound;
    if (c.weight != 0) jc["weight"] = c.weight;
    j["constraints"].push_back(jc);
  }
  if (objective) {
    j["objective"] = nlohmann::json::array();
    for (const auto& t : g.objective) j["objective"].push_back({t.coefficient, lit_name(t.factors[0])});
  }
  g.json = products ? std::string() : j.dump(1);
  return g;
}

// Values of variables 1..n from a CaDiCaL model, as an answer file.
std::string answer_text(CaDiCaL::Solver& s, int n, std::uint32_t& bits) {
  std::string v = "s SATISFIABLE\nv";
  bits = 0;
  for (int i = 1; i <= n; ++i) {
    const bool t = s.val(i) > 0;
    if (t) bits |= 1U << (i - 1);
    v += ' ';
    v += std::to_string(t ? i : -i);
  }
  return v + " 0\n";
}

std::string bits_answer(int n, std::uint32_t bits) {
  std::string v = "v";
  for (int i = 1; i <= n; ++i) {
    v += ' ';  // appended apart: g++ 12 warns falsely (-Wrestrict) on " " + to_string
    v += std::to_string(literal_value(i, bits) ? i : -i);
  }
  return v + " 0\n";
}

// The optimum of a WCNF: a bound loop over CaDiCaL. Each soft clause gets a
// selector b (clause or b); after a model of cost c, every set of selectors
// whose weights add up to c or more is forbidden from being all true (one
// clause per set, written out here: fine for the dozen soft clauses of these
// models). Unsatisfiable hard part: -1.
std::int64_t wcnf_optimum(const formula& f, std::vector<int>* best_model, int n) {
  CaDiCaL::Solver s;
  s.set("quiet", 1);
  int top = std::max<int>(f.max_var, static_cast<int>(f.header_variables));
  for (const auto& c : f.hard) {
    for (const int l : c) s.add(l);
    s.add(0);
  }
  std::vector<int> selector;
  for (const auto& c : f.soft) {
    selector.push_back(++top);
    for (const int l : c) s.add(l);
    s.add(selector.back());
    s.add(0);
  }
  EXPECT_LE(f.soft.size(), 16U) << "too many soft clauses for the subset loop";
  std::int64_t best = -1;
  while (s.solve() == 10) {
    std::int64_t cost = 0;
    for (std::size_t i = 0; i < f.soft.size(); ++i) {
      bool satisfied = false;
      for (const int l : f.soft[i]) satisfied = satisfied || s.val(l) > 0;
      if (!satisfied) cost += f.weights[i];
    }
    best = cost;
    if (best_model != nullptr) {
      best_model->clear();
      for (int v = 1; v <= n; ++v) best_model->push_back(s.val(v) > 0 ? v : -v);
    }
    if (cost == 0) break;
    for (std::uint32_t set = 1; set < (1U << f.soft.size()); ++set) {
      std::int64_t w = 0;
      for (std::size_t i = 0; i < f.soft.size(); ++i)
        if ((set >> i) & 1U) w += f.weights[i];
      if (w < cost) continue;
      for (std::size_t i = 0; i < f.soft.size(); ++i)
        if ((set >> i) & 1U) s.add(-selector[i]);
      s.add(0);
    }
  }
  return best;
}

std::string first_line(const std::string& s) { return s.substr(0, s.find('\n')); }

}  // namespace

// --- the tool itself ------------------------------------------------------------------------------

TEST_F(cli, VersionHelpAndUsage) {
  const auto v = run("--version");
  EXPECT_EQ(v.code, 0);
  EXPECT_NE(v.out.find("clausewright 0.1.0"), std::string::npos) << v.out;
  for (const char* command : {"encode", "decode", "stats", "methods"}) {
    const auto h = run(std::string(command) + " --help");
    EXPECT_EQ(h.code, 0) << command;
    EXPECT_NE(h.out.find("Usage"), std::string::npos) << command << ": " << h.out;
  }
  EXPECT_NE(run("encode --help").out.find("--objective-bound"), std::string::npos);
  EXPECT_NE(run("stats --help").out.find("--pick"), std::string::npos);
  EXPECT_EQ(run("").code, 2);             // a command is required
  EXPECT_EQ(run("frobnicate").code, 2);   // unknown command
  EXPECT_EQ(run("encode").code, 2);       // MODEL missing
  EXPECT_EQ(run("decode only-one").code, 2);
  EXPECT_EQ(run("encode --no-such-option x.opb").code, 2);
#ifndef CLAUSEWRIGHT_TOOL_HAS_SOLVE
  const auto solve = run("solve model.opb");
  EXPECT_EQ(solve.code, 2);
  EXPECT_NE(solve.err.find("not available"), std::string::npos) << solve.err;
#endif
}

TEST_F(cli, MethodsJsonIsTheTable) {
  const auto r = run("methods --json");
  ASSERT_EQ(r.code, 0) << r.err;
  const auto j = nlohmann::json::parse(r.out);
  ASSERT_TRUE(j.is_array());
  ASSERT_EQ(j.size(), cw::method_table.size());
  const std::set<std::string> kinds{"at-most-one", "cardinality", "linear"};
  for (std::size_t i = 0; i < j.size(); ++i) {
    const auto& m = cw::method_table[i];
    EXPECT_EQ(j[i]["name"].get<std::string>(), m.name);
    // arc_consistent as the table states it; test_method_table measures the table.
    EXPECT_EQ(j[i]["arc_consistent"].get<bool>(), m.arc_consistent) << m.name;
    ASSERT_TRUE(j[i]["applies_to"].is_array());
    EXPECT_FALSE(j[i]["applies_to"].empty());
    for (const auto& k : j[i]["applies_to"]) EXPECT_EQ(kinds.count(k.get<std::string>()), 1U) << k;
    EXPECT_EQ(j[i]["applies_to"].size(), static_cast<std::size_t>(__builtin_popcount(m.applies_to)));
  }
  const auto text = run("methods");
  EXPECT_EQ(text.code, 0);
  EXPECT_NE(text.out.find("sequential-counter"), std::string::npos);
}

// --- hand-written samples, counts worked out by hand ------------------------------------------------------

TEST_F(cli, HandWrittenSamples) {
  // At most one of three, pairwise: n(n-1)/2 = 3 binary clauses (folklore),
  // no auxiliary variables: p cnf 3 3.
  const auto amo = write("amo.opb", "* #variable= 3 #constraint= 1\n+1 x1 +1 x2 +1 x3 <= 1 ;\n");
  ASSERT_EQ(run("encode " + quote(amo) + " --method pairwise -o " + quote(file("amo.cnf"))).code, 0);
  formula f = parse_formula(read_file(file("amo.cnf")));
  EXPECT_EQ(f.header_variables, 3);
  EXPECT_EQ(f.header_clauses, 3);
  EXPECT_EQ(f.hard.size(), 3U);
  EXPECT_EQ(f.literals, 6U);

  // The same with the sequential counter, Sinz 2005 for k = 1, n = 3:
  // (~x1 s1), (~x2 s2), (~s1 s2), (~x2 ~s1), (~x3 ~s2): 5 clauses,
  // k(n-1) = 2 auxiliary variables (2nk + n - 3k - 1 = 6 + 3 - 3 - 1 = 5).
  ASSERT_EQ(run("encode " + quote(amo) + " --method sequential-counter -o " + quote(file("seq.cnf"))).code, 0);
  f = parse_formula(read_file(file("seq.cnf")));
  EXPECT_EQ(f.header_variables, 5);
  EXPECT_EQ(f.header_clauses, 5);
  EXPECT_EQ(f.hard.size(), 5U);

  // A product: x1 x2 >= 1 makes x3 = x1 & x2, defined both ways by
  // (~x3 x1), (~x3 x2), (x3 ~x1 ~x2), then the unit (x3): 4 clauses, 3 variables.
  const auto product = write("product.opb", "* #variable= 2 #constraint= 1\n+1 x1 x2 >= 1 ;\n");
  ASSERT_EQ(run("encode " + quote(product) + " -o " + quote(file("product.cnf"))).code, 0);
  f = parse_formula(read_file(file("product.cnf")));
  EXPECT_EQ(f.header_variables, 3);
  EXPECT_EQ(f.header_clauses, 4);
  ASSERT_EQ(f.hard.size(), 4U);
  EXPECT_EQ(f.hard.back(), std::vector<int>{3});

  // An objective in WCNF, current form: min 3 x1 - 2 x2 with x1 + x2 >= 1.
  // Hard: "h 1 2 0"; soft: x1 costs 3, so "3 -1 0"; -2 x2 = -2 + 2 ~x2, so
  // "2 2 0" (offset -2). No p line.
  const auto obj = write("obj.opb", "* #variable= 2 #constraint= 1\nmin: +3 x1 -2 x2 ;\n+1 x1 +1 x2 >= 1 ;\n");
  ASSERT_EQ(run("encode " + quote(obj) + " --format wcnf -o " + quote(file("obj.wcnf"))).code, 0);
  const std::string current = "\n" + read_file(file("obj.wcnf"));
  EXPECT_EQ(current.find("p "), std::string::npos) << current;
  EXPECT_NE(current.find("\nh 1 2 0\n"), std::string::npos) << current;
  EXPECT_NE(current.find("\n3 -1 0\n"), std::string::npos) << current;
  EXPECT_NE(current.find("\n2 2 0\n"), std::string::npos) << current;
  // Older form: TOP = 3 + 2 + 1 = 6 above the soft weights, 3 clauses, 2 variables.
  ASSERT_EQ(run("encode " + quote(obj) + " --older-wcnf -o " + quote(file("old.wcnf"))).code, 0);
  const std::string older = read_file(file("old.wcnf"));
  EXPECT_EQ(first_line(older), "p wcnf 2 3 6");
  EXPECT_NE(older.find("\n6 1 2 0\n"), std::string::npos) << older;

  // A soft constraint: [5] x1 + x2 >= 2 forces both; with relaxation x3:
  // (x1 ~x3), (x2 ~x3) hard and "5 3 0" soft.
  const auto soft = write("soft.opb", "* #variable= 2 #constraint= 1\n[5] +1 x1 +1 x2 >= 2 ;\n");
  ASSERT_EQ(run("encode " + quote(soft) + " --format wcnf -o " + quote(file("soft.wcnf"))).code, 0);
  f = parse_formula(read_file(file("soft.wcnf")));
  EXPECT_EQ(f.hard.size(), 2U);
  ASSERT_EQ(f.soft.size(), 1U);
  EXPECT_EQ(f.soft[0], std::vector<int>{3});
  EXPECT_EQ(f.weights[0], 5);
  // CNF output drops it and says so.
  const auto cnf = run("encode " + quote(soft));
  EXPECT_EQ(cnf.code, 0);
  EXPECT_EQ(first_line(cnf.out), "p cnf 2 0");
  EXPECT_NE(cnf.err.find("soft"), std::string::npos);
}

// --- round trips: OPB / JSON -> CNF -> CaDiCaL -> decode ---------------------------------------------------

TEST_F(cli, RoundTripsThroughCadicalAndDecode) {
  const std::vector<std::string> methods{"", "--method sequential-counter", "--method bdd",
                                         "--method adder --method ladder", "--pick smallest"};
  int satisfiable = 0;
  int unsatisfiable = 0;
  for (std::uint64_t seed = 1; seed <= 24; ++seed) {
    const int n = 6 + static_cast<int>(seed % 4);
    const generated_model g = generate(seed, n, 5, 0, seed % 3 == 0, seed % 2 == 0);
    const std::string format = g.json.empty() || seed % 2 == 0 ? "opb" : "json";
    const auto model = write("m." + format, format == "opb" ? g.opb : g.json);
    bool any = false;
    for (std::uint32_t bits = 0; bits < (1U << n); ++bits) any = any || hard_holds(g, bits);
    const std::string& how = methods[seed % methods.size()];
    const auto cnf = file("m.cnf");
    const auto r = run("encode " + quote(model) + " " + how + " -o " + quote(cnf));
    ASSERT_EQ(r.code, 0) << r.err << g.description;
    // Nothing on standard error but warnings about constraints that can
    // never hold (some random rows are; an impossible row makes the model
    // unsatisfiable, which brute force confirms below).
    std::istringstream err_lines(r.err);
    for (std::string line; std::getline(err_lines, line);) {
      EXPECT_NE(line.find("can never hold"), std::string::npos) << line;
      EXPECT_FALSE(any) << line << g.description;
    }
    // CaDiCaL's parser, strict: the header must match the body.
    CaDiCaL::Solver solver;
    solver.set("quiet", 1);
    int vars = 0;
    const char* problem = solver.read_dimacs(cnf.c_str(), vars, 1);
    ASSERT_EQ(problem, nullptr) << problem << g.description;
    const int status = solver.solve();
    ASSERT_EQ(status == 10, any) << how << " " << g.description;
    if (status != 10) {
      ++unsatisfiable;
      const auto d = run("decode " + quote(model) + " " + quote(write("unsat.txt", "s UNSATISFIABLE\n")));
      EXPECT_EQ(d.code, 1);
      EXPECT_NE(d.out.find("unsatisfiable"), std::string::npos);
      continue;
    }
    ++satisfiable;
    std::uint32_t bits = 0;
    const auto answer = write("answer.txt", answer_text(solver, n, bits));
    ASSERT_TRUE(hard_holds(g, bits)) << "CaDiCaL's model violates the model: " << g.description;
    const auto d = run("decode " + quote(model) + " " + quote(answer));
    ASSERT_EQ(d.code, 0) << d.out << d.err << g.description;
    for (int v = 1; v <= n; ++v) {
      std::string name = format == "opb" ? "x" : "v";
      name += std::to_string(v);
      // Appended, not a chain of operator+: g++ 12 warns falsely (-Wrestrict) on that.
      std::string line = name;
      line += literal_value(v, bits) ? " = 1\n" : " = 0\n";
      EXPECT_NE(d.out.find(line), std::string::npos) << name << "\n" << d.out;
    }
    if (!g.objective.empty()) {
      EXPECT_NE(d.out.find("objective " + std::to_string(sum_of(g.objective, bits)) + "\n"), std::string::npos)
          << d.out;
    }
    // An assignment that violates some constraints: decode names exactly
    // those (brute force finds it) and exits 1.
    for (std::uint32_t wrong = 0; wrong < (1U << n); ++wrong) {
      if (hard_holds(g, wrong)) continue;
      const auto bad = write("bad.txt", bits_answer(n, wrong));
      const auto w = run("decode " + quote(model) + " " + quote(bad));
      EXPECT_EQ(w.code, 1) << w.out;
      for (std::size_t i = 0; i < g.constraints.size(); ++i) {
        const bool named = w.out.find("violated: #" + std::to_string(i) + " at ") != std::string::npos;
        EXPECT_EQ(named, !holds(g.constraints[i], wrong)) << "constraint " << i << "\n" << w.out;
      }
      break;
    }
  }
  // The seeds give both answers.
  EXPECT_GT(satisfiable, 3);
  EXPECT_GT(unsatisfiable, 0);
}

TEST_F(cli, StandardInputAndOutput) {
  const generated_model g = generate(99, 7, 6, 0, true, false);
  const auto model = write("m.opb", g.opb);
  // From standard input to standard output: the header comes from a dry run.
  const auto r = run("encode - --format cnf", model.string());
  ASSERT_EQ(r.code, 0) << r.err;
  const auto cnf = write("out.cnf", r.out);
  CaDiCaL::Solver solver;
  solver.set("quiet", 1);
  int vars = 0;
  ASSERT_EQ(solver.read_dimacs(cnf.c_str(), vars, 1), nullptr);
  // The same bytes as written to a file (apart from the header's padding).
  ASSERT_EQ(run("encode " + quote(model) + " -o " + quote(file("file.cnf"))).code, 0);
  const formula a = parse_formula(r.out);
  const formula b = parse_formula(read_file(file("file.cnf")));
  EXPECT_EQ(a.hard, b.hard);
  EXPECT_EQ(a.header_variables, b.header_variables);
  EXPECT_EQ(a.header_clauses, b.header_clauses);
  // Through a pipe too (standard input that cannot seek).
  const std::string piped = "cat " + quote(model) + " | " + quote(tool) + " encode - > " + quote(file("piped.cnf"));
  ASSERT_EQ(std::system(piped.c_str()), 0);
  EXPECT_EQ(parse_formula(read_file(file("piped.cnf"))).hard, b.hard);
}

// --- WCNF optimum against brute force ------------------------------------------------------------------------

TEST_F(cli, WcnfOptimumEqualsBruteForce) {
  int feasible = 0;
  for (std::uint64_t seed = 40; seed < 56; ++seed) {
    const int n = 5 + static_cast<int>(seed % 3);
    const generated_model g = generate(seed, n, 2, 3, seed % 4 == 0, true);
    const auto model = write("m.opb", g.opb);
    // Brute force over the original variables: objective plus the weights
    // of the soft constraints that fail, over assignments meeting every hard one.
    std::optional<std::int64_t> best;
    for (std::uint32_t bits = 0; bits < (1U << n); ++bits) {
      if (!hard_holds(g, bits)) continue;
      std::int64_t cost = sum_of(g.objective, bits);
      for (const auto& c : g.constraints)
        if (c.weight != 0 && !holds(c, bits)) cost += c.weight;
      if (!best || cost < *best) best = cost;
    }
    // A WCNF cost leaves out the constant of negative objective terms.
    std::int64_t offset = 0;
    for (const auto& t : g.objective) offset += std::min<std::int64_t>(t.coefficient, 0);
    for (const bool older : {false, true}) {
      const auto out = file(older ? "old.wcnf" : "m.wcnf");
      const auto r = run("encode " + quote(model) + (older ? " --older-wcnf" : " --format wcnf") + " -o " + quote(out));
      ASSERT_EQ(r.code, 0) << r.err;
      const formula f = parse_formula(read_file(out));
      if (older) {
        ASSERT_GT(f.top, 0);
        EXPECT_EQ(static_cast<std::size_t>(f.header_clauses), f.hard.size() + f.soft.size());
      } else {
        EXPECT_EQ(f.header_clauses, -1);  // no p line
      }
      std::vector<int> model_values;
      const std::int64_t optimum = wcnf_optimum(f, &model_values, n);
      if (!best) {
        EXPECT_EQ(optimum, -1) << g.description;
        continue;
      }
      ASSERT_EQ(optimum, *best - offset) << (older ? "older " : "") << g.description;
      if (older) continue;
      ++feasible;
      // Decode the optimal assignment: its objective and the check.
      std::string v = "s OPTIMUM FOUND\no " + std::to_string(optimum) + "\nv";
      std::uint32_t bits = 0;
      for (const int l : model_values) {
        v += ' ';
        v += std::to_string(l);
        if (l > 0) bits |= 1U << (l - 1);
      }
      const auto d = run("decode " + quote(model) + " " + quote(write("opt.txt", v + " 0\n")));
      EXPECT_EQ(d.code, 0) << d.out;
      EXPECT_NE(d.out.find("objective " + std::to_string(sum_of(g.objective, bits)) + "\n"), std::string::npos)
          << d.out;
    }
  }
  EXPECT_GT(feasible, 8);  // most seeds have assignments meeting the hard constraints
}

// --- bad input: one positioned message, exit 2, no output file --------------------------------------------------

TEST_F(cli, BadInputGetsOneMessageAndNoOutput) {
  struct bad_case {
    std::string name;
    std::string file;
    std::string text;
    std::string position;  // file:line:column
    std::string part;      // in the message
  };
  std::string long_line;
  while (long_line.size() < 10'000'000) long_line += "+1 x1 +1 x2 ";
  const std::string h = "* #variable= 3 #constraint= 1\n";
  const std::vector<bad_case> cases{
      {"truncated", "t.opb", h + "+1 x1 +1", "t.opb:2:9:", "end of the file"},
      {"missing ;", "s.opb", h + "+1 x1 +1 x2 >= 1\n", "s.opb:2:17:", "expected ';'"},
      {"relation", "r.opb", h + "+1 x1 +1 x2 =< 1 ;\n", "r.opb:2:13:", "unknown relation"},
      {"overflow", "o.opb", h + "+1 x1 +18446744073709551616 x2 >= 1 ;\n", "o.opb:2:7:", "64 bits"},
      {"undeclared", "u.opb", h + "+1 x1 +1 x4 >= 1 ;\n", "u.opb:2:10:", "not declared"},
      {"malformed name", "n.opb", h + "+1 x1 +1 x_2 >= 1 ;\n", "n.opb:2:10:", "malformed variable name"},
      {"garbage", "g.opb", std::string("\x7f" "ELF\x02\x01\x01\0\0\0", 10), "g.opb:1:1:", "byte 0x7f"},
      {"empty", "e.opb", "", "e.opb:1:1:", "empty"},
      {"empty json", "e.json", "  \n", "e.json:1:1:", "empty"},
      {"10 MB line", "l.opb", h + long_line + "\n", "l.opb:2:" + std::to_string(long_line.size() + 1) + ":",
       "expected"},
      {"header", "c.opb", "* #variable= 3 #constraint= 2\n+1 x1 >= 1 ;\n", "c.opb:1:29:", "#constraint= 2"},
      {"json syntax", "j.json", "{\"constraints\": [\n  {\"type\": \"clause\" \"literals\": []}]}", "j.json:2:21:",
       "not valid JSON"},
      {"json type", "k.json", "{\"constraints\": [{\"type\": \"at-most\", \"k\": true, \"literals\": []}]}",
       "k.json:1:43:", "expected an integer"},
      {"json name", "m.json", "{\"variables\": [\"a\"], \"constraints\": [{\"type\": \"clause\", \"literals\": [\"b\"]}]}",
       "m.json:1:70:", "not declared"},
      {"json overflow", "v.json", "{\"objective\": [[-9223372036854775809, \"a\"]]}", "v.json:1:17:", "64 bits"},
      {"json method", "w.json",
       "{\"constraints\": [{\"type\": \"at-most\", \"k\": 2, \"literals\": [\"a\", \"b\", \"c\", \"d\"], "
       "\"method\": \"pairwise\"}]}",
       "w.json:1:18:", "cannot encode"},
  };
  for (const auto& c : cases) {
    const auto model = write(c.file, c.text);
    // An older output file must survive a failed run untouched.
    write("out.cnf", "old contents\n");
    const auto r = run("encode " + quote(model) + " -o " + quote(file("out.cnf")));
    EXPECT_EQ(r.code, 2) << c.name;
    EXPECT_NE(r.err.find(model.string() + c.position.substr(c.file.size())), std::string::npos)
        << c.name << ": " << r.err;
    EXPECT_NE(r.err.find(c.part), std::string::npos) << c.name << ": " << r.err;
    EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << c.name << ": " << r.err;
    EXPECT_TRUE(r.out.empty()) << c.name;
    EXPECT_EQ(read_file(file("out.cnf")), "old contents\n") << c.name;
    EXPECT_EQ(stray_files({c.file, "out.cnf"}), std::vector<std::string>{}) << c.name;
    fs::remove(file("out.cnf"));
    // And with no older file, none appears (WCNF as well).
    const auto w = run("encode " + quote(model) + " --format wcnf -o " + quote(file("out.wcnf")));
    EXPECT_EQ(w.code, 2) << c.name;
    EXPECT_FALSE(fs::exists(file("out.wcnf"))) << c.name;
    EXPECT_EQ(stray_files({c.file}), std::vector<std::string>{}) << c.name;
    // The other commands reject the file the same way.
    EXPECT_EQ(run("stats " + quote(model)).code, 2) << c.name;
    fs::remove(model);
  }
  // Usage errors: unknown methods and policies list the valid ones.
  const auto ok = write("ok.opb", h + "+1 x1 +1 x2 +1 x3 <= 1 ;\n");
  const auto m = run("encode " + quote(ok) + " --method fastest -o " + quote(file("x.cnf")));
  EXPECT_EQ(m.code, 2);
  EXPECT_NE(m.err.find("valid methods: pairwise"), std::string::npos) << m.err;
  const auto p = run("stats " + quote(ok) + " --pick fastest");
  EXPECT_EQ(p.code, 2);
  EXPECT_NE(p.err.find("smallest-arc-consistent"), std::string::npos) << p.err;
  EXPECT_EQ(run("encode " + quote(ok) + " --objective-bound 3").code, 2);  // no objective
  EXPECT_EQ(run("encode " + quote(file("missing.opb"))).code, 2);
  EXPECT_FALSE(fs::exists(file("x.cnf")));
}

TEST_F(cli, DecodeReadsTheAnswerForms) {
  // x1 + x2 + x3 = 1 over three variables; the answers below hold it or not.
  const auto model = write("m.opb", "* #variable= 3 #constraint= 1\n+1 x1 +1 x2 +1 x3 = 1 ;\n");
  const auto check = [&](const std::string& answer, int code) {
    auto r = run("decode " + quote(model) + " " + quote(write("a.txt", answer)));
    EXPECT_EQ(r.code, code) << answer << "\n" << r.out << r.err;
    return r;
  };
  EXPECT_NE(check("s SATISFIABLE\nv -1 2\nv -3 0\n", 0).out.find("x2 = 1"), std::string::npos);
  check("c a comment\ns SATISFIABLE\nv -1 -2 3 0\n", 0);
  check("-1 2 -3\n", 0);            // a bare list
  check("1 2 -3 0\n", 1);           // two true
  check("s OPTIMUM FOUND\no 0\nv 010\n", 0);  // the MaxSAT Evaluation's 0/1 string
  check("v 110\n", 1);
  check("s UNSATISFIABLE\n", 1);
  const auto garbage = check("s SATISFIABLE\nv 1 two 3\n", 2);
  EXPECT_NE(garbage.err.find("a.txt:2:5:"), std::string::npos) << garbage.err;
  check("", 2);
  check("s MAYBE\n", 2);
  check("v 1 -1 0\n", 2);  // both values
  // A missing value is taken as false, with a note.
  const auto partial = check("v 2 0\n", 0);
  EXPECT_NE(partial.err.find("taken as false"), std::string::npos);
}

// --- stats: its numbers are what encode --method writes ---------------------------------------------------------

TEST_F(cli, StatsNumbersEqualWhatEncodeWrites) {
  // One constraint per model, so each method's numbers can be compared with
  // the file `encode --method NAME` writes.
  const std::vector<std::pair<std::string, int>> shapes{
      {"+1 x1 +1 x2 +1 x3 +1 x4 +1 x5 <= 1 ;", 5},
      {"+1 x1 +1 x2 +1 x3 +1 x4 +1 ~x5 +1 x6 = 1 ;", 6},
      {"+1 x1 +1 x2 +1 x3 +1 x4 +1 x5 +1 x6 <= 2 ;", 6},
      {"+1 x1 +1 ~x2 +1 x3 +1 x4 +1 x5 >= 3 ;", 5},
      {"+1 x1 +1 x2 +1 x3 +1 x4 +1 x5 +1 x6 +1 x7 = 4 ;", 7},
      {"+3 x1 +5 x2 +2 ~x3 +7 x4 +4 x5 <= 11 ;", 5},
      {"+3 x1 -5 x2 +2 x3 +6 x4 >= 4 ;", 4},
      {"+2 x1 +3 x2 +4 x3 +5 x4 = 7 ;", 4},
  };
  int compared = 0;
  for (std::size_t s = 0; s < shapes.size(); ++s) {
    const auto& [text, n] = shapes[s];
    const auto model = write("one.opb", "* #variable= " + std::to_string(n) + " #constraint= 1\n" + text + "\n");
    const auto st = run("stats --json " + quote(model));
    ASSERT_EQ(st.code, 0) << st.err;
    const auto j = nlohmann::json::parse(st.out);
    ASSERT_EQ(j["constraints"].size(), 1U);
    const auto& c = j["constraints"][0];
    ASSERT_FALSE(c["methods"].empty()) << text;
    std::set<std::string> names;
    for (const auto& m : c["methods"]) {
      const std::string name = m["name"];
      names.insert(name);
      const auto out = file("one.cnf");
      const auto e = run("encode " + quote(model) + " --method " + name + " -o " + quote(out));
      ASSERT_EQ(e.code, 0) << name << ": " << e.err;
      const formula f = parse_formula(read_file(out));
      EXPECT_EQ(m["clauses"].get<std::uint64_t>(), f.hard.size()) << name << " on " << text;
      EXPECT_EQ(m["clauses"].get<std::int64_t>(), f.header_clauses) << name << " on " << text;
      EXPECT_EQ(m["vars"].get<std::int64_t>(), f.header_variables - n) << name << " on " << text;
      EXPECT_EQ(m["literals"].get<std::uint64_t>(), f.literals) << name << " on " << text;
      EXPECT_FALSE(m["over_budget"].get<bool>());
      ++compared;
    }
    EXPECT_EQ(names.count(c["picked"].get<std::string>()), 1U);
    // Every method that can encode this constraint is listed, and no other:
    // encode --method NAME uses NAME exactly when it is listed (checked with
    // the comment lines, which name the method used).
    for (const auto& m : cw::method_table) {
      const auto e = run("encode " + quote(model) + " --comments --method " + std::string(m.name));
      ASSERT_EQ(e.code, 0);
      const bool used = e.out.find("method " + std::string(m.name) + ",") != std::string::npos;
      EXPECT_EQ(used, names.count(std::string(m.name)) == 1) << m.name << " on " << text;
    }
  }
  EXPECT_GT(compared, 40);
}

TEST_F(cli, StatsTotalsEqualWhatEncodeWrites) {
  for (std::uint64_t seed = 300; seed < 306; ++seed) {
    const generated_model g = generate(seed, 8, 6, 2, seed % 2 == 0, true);
    const auto model = write("m.opb", g.opb);
    for (const std::string pick : {"balanced", "smallest", "smallest-arc-consistent"}) {
      const auto st = run("stats --json --pick " + pick + " " + quote(model));
      ASSERT_EQ(st.code, 0) << st.err;
      const auto j = nlohmann::json::parse(st.out);
      EXPECT_EQ(j["policy"].get<std::string>(), pick);
      // The picked totals are what encode --pick writes, in CNF and WCNF.
      ASSERT_EQ(run("encode --pick " + pick + " " + quote(model) + " -o " + quote(file("p.cnf"))).code, 0);
      const formula cnf = parse_formula(read_file(file("p.cnf")));
      EXPECT_EQ(j["totals"]["picked"]["cnf"]["clauses"].get<std::int64_t>(), cnf.header_clauses) << pick;
      EXPECT_EQ(static_cast<std::size_t>(cnf.header_clauses), cnf.hard.size());
      EXPECT_EQ(j["totals"]["picked"]["cnf"]["variables"].get<std::int64_t>(), cnf.header_variables) << pick;
      ASSERT_EQ(run("encode --older-wcnf --pick " + pick + " " + quote(model) + " -o " + quote(file("p.wcnf"))).code, 0);
      const formula wcnf = parse_formula(read_file(file("p.wcnf")));
      EXPECT_EQ(j["totals"]["picked"]["wcnf"]["clauses"].get<std::int64_t>(), wcnf.header_clauses) << pick;
      EXPECT_EQ(j["totals"]["picked"]["wcnf"]["variables"].get<std::int64_t>(), wcnf.header_variables) << pick;
      // "smallest" picks, per constraint, fewest clauses then fewest variables.
      for (const auto& c : j["constraints"]) {
        const auto& ms = c["methods"];
        std::uint64_t fewest = UINT64_MAX;
        for (const auto& m : ms) fewest = std::min<std::uint64_t>(fewest, m["clauses"]);
        for (const auto& m : ms) {
          if (m["name"] == c["picked"] && pick == "smallest") {
            EXPECT_EQ(m["clauses"].get<std::uint64_t>(), fewest);
          }
        }
      }
    }
    // Under each single method: what encode --method NAME writes.
    const auto st = run("stats --json " + quote(model));
    const auto j = nlohmann::json::parse(st.out);
    for (const auto& t : j["totals"]["by_method"]) {
      const std::string name = t["name"];
      ASSERT_EQ(run("encode --method " + name + " " + quote(model) + " -o " + quote(file("m.cnf"))).code, 0);
      const formula f = parse_formula(read_file(file("m.cnf")));
      EXPECT_EQ(t["cnf"]["clauses"].get<std::int64_t>(), f.header_clauses) << name;
      EXPECT_EQ(t["cnf"]["variables"].get<std::int64_t>(), f.header_variables) << name;
    }
  }
}

TEST_F(cli, StatsBudgetAndTable) {
  // At most 3 of 12: the at-most-one methods do not apply, the counters
  // do; a budget of 70 clauses stops the bigger ones (the sequential
  // counter, 2nk + n - 3k - 1 = 74 clauses by Sinz 2005, among them).
  std::string terms;
  for (int v = 1; v <= 12; ++v) terms += "+1 x" + std::to_string(v) + " ";
  const auto model = write("m.opb", "* #variable= 12 #constraint= 1\n" + terms + "<= 3 ;\n");
  const auto st = run("stats --json --budget 70 " + quote(model));
  ASSERT_EQ(st.code, 0) << st.err;
  const auto j = nlohmann::json::parse(st.out);
  int over = 0;
  int within = 0;
  for (const auto& m : j["constraints"][0]["methods"]) {
    if (m["over_budget"].get<bool>()) {
      ++over;
      EXPECT_NE(m["name"], j["constraints"][0]["picked"]);
    } else {
      ++within;
      EXPECT_LE(m["clauses"].get<std::uint64_t>(), 70U);
    }
  }
  EXPECT_GT(over, 0);
  EXPECT_GT(within, 0);
  for (const auto& m : j["constraints"][0]["methods"]) {
    if (m["name"] == "sequential-counter") {
      EXPECT_TRUE(m["over_budget"].get<bool>());
    }
  }
  // A budget nothing fits in: reported, not an error.
  const auto none = run("stats --json --budget 10 " + quote(model));
  ASSERT_EQ(none.code, 0) << none.err;
  const auto k = nlohmann::json::parse(none.out);
  EXPECT_TRUE(k["constraints"][0]["picked"].is_null());
  EXPECT_TRUE(k["totals"]["picked"]["over_budget"].get<bool>());
  const auto table = run("stats " + quote(model));
  EXPECT_EQ(table.code, 0);
  EXPECT_NE(table.out.find("cardinality"), std::string::npos) << table.out;
  EXPECT_NE(table.out.find("picked"), std::string::npos) << table.out;
}

// --- limits: every method obeys the clause budget ------------------------------------------------------------------

TEST_F(cli, ForcedMethodOverTheBudgetIsRefusedBeforeAnyOutput) {
  // At most 50 of 100: the totalizer's root alone joins two halves of 50
  // outputs into 51 (Bailleux & Boufkhad 2003), over 1300 clauses; the
  // sequential counter needs 2nk + n - 3k - 1 = 9949 (Sinz 2005). Both are
  // past a budget of 1000 before anything is written.
  std::string terms;
  for (int v = 1; v <= 100; ++v) terms += "+1 x" + std::to_string(v) + " ";
  const auto model = write("m.opb", "* #variable= 100 #constraint= 2\n+1 x1 +1 x2 <= 1 ;\n" + terms + "<= 50 ;\n");
  for (const std::string method : {"totalizer", "sequential-counter", "generalized-totalizer"}) {
    const auto out = file("out.cnf");
    const auto r = run("encode " + quote(model) + " --method " + method + " --budget 1000 -o " + quote(out));
    EXPECT_EQ(r.code, 2) << method << ": " << r.err;
    EXPECT_FALSE(fs::exists(out)) << method;
    EXPECT_TRUE(stray_files({"m.opb"}).empty()) << method;
    // The message names the method, the budget, and where the constraint is.
    EXPECT_NE(r.err.find("m.opb:3:1"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find(method), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("budget of 1000"), std::string::npos) << r.err;
    // To standard output nothing either.
    const auto piped = run("encode " + quote(model) + " --method " + method + " --budget 1000");
    EXPECT_EQ(piped.code, 2);
    EXPECT_TRUE(piped.out.empty()) << method;
  }
  // Pairwise on an at-most-one of 2000: n(n-1)/2 = 1999000 clauses (folklore).
  std::string many;
  for (int v = 1; v <= 2000; ++v) many += "+1 x" + std::to_string(v) + " ";
  const auto amo = write("amo.opb", "* #variable= 2000 #constraint= 1\n" + many + "<= 1 ;\n");
  const auto r = run("encode " + quote(amo) + " --method pairwise --budget 1000000 -o " + quote(file("amo.cnf")));
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("1999000"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(file("amo.cnf")));
  // Within the budget the same method is written.
  EXPECT_EQ(run("encode " + quote(amo) + " --method pairwise -o " + quote(file("amo.cnf"))).code, 0);
}

TEST_F(cli, StatsShowsAStoppedMethodAsMoreThan) {
  // At most 50 of 100 with a budget of 1000: the sequential counter's 9949
  // clauses (Sinz 2005) are past it; stats reports it as more than a
  // positive number, never as 0, and its total as a lower bound.
  std::string terms;
  for (int v = 1; v <= 100; ++v) terms += "+1 x" + std::to_string(v) + " ";
  const auto model = write("m.opb", "* #variable= 100 #constraint= 1\n" + terms + "<= 50 ;\n");
  const auto st = run("stats --json --budget 1000 " + quote(model));
  ASSERT_EQ(st.code, 0) << st.err;
  const auto j = nlohmann::json::parse(st.out);
  bool seen = false;
  for (const auto& m : j["constraints"][0]["methods"]) {
    if (m["name"] != "sequential-counter") continue;
    seen = true;
    EXPECT_TRUE(m["over_budget"].get<bool>());
    EXPECT_EQ(m["clauses"].get<std::uint64_t>(), 9949U);
  }
  EXPECT_TRUE(seen);
  for (const auto& t : j["totals"]["by_method"])
    if (t["name"] == "sequential-counter") {
      EXPECT_TRUE(t["over_budget"].get<bool>());
      EXPECT_GT(t["clauses"].get<std::uint64_t>(), 0U);
    }
  const auto table = run("stats --wide --budget 1000 " + quote(model));
  ASSERT_EQ(table.code, 0) << table.err;
  EXPECT_NE(table.out.find(">9949"), std::string::npos) << table.out;
  EXPECT_NE(table.out.find("more than"), std::string::npos) << table.out;
}

TEST_F(cli, OutOfVariablesNamesTheConstraintAndStatsGoesOn) {
  // The model's variables reach to 20 below the largest variable (2^30 - 1);
  // the sequential counter of at most 2 of 20 needs k(n-1) = 38 auxiliary
  // variables (Sinz 2005), the ladder of an at-most-one of 20 needs 19.
  const std::int64_t top = (std::int64_t{1} << 30) - 1;
  std::string terms;
  for (std::int64_t v = top - 19; v <= top; ++v) terms += "+1 x" + std::to_string(v) + " ";
  const auto model = write("m.opb", "* #variable= " + std::to_string(top) + " #constraint= 1\n" + terms +
                                        "<= 2 ;\n");
  const auto r = run("encode " + quote(model) + " --method sequential-counter -o " + quote(file("o.cnf")));
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("out of variables"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("m.opb:2:1"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(file("o.cnf")));
  const auto st = run("stats --json " + quote(model));
  ASSERT_EQ(st.code, 0) << st.err;
  const auto j = nlohmann::json::parse(st.out);
  bool over = false;
  for (const auto& m : j["constraints"][0]["methods"])
    if (m["name"] == "sequential-counter") over = m["over_budget"].get<bool>();
  EXPECT_TRUE(over) << st.out;
}

// --- per-constraint methods ------------------------------------------------------------------------------------------

TEST_F(cli, MethodPerConstraintName) {
  const auto model = write("m.json", R"({"variables": ["a", "b", "c", "d"],
   "constraints": [
     {"type": "linear", "terms": [[3, "a"], [4, "b"], [5, "c"]], "relation": "<=", "bound": 7, "name": "cap1"},
     {"type": "linear", "terms": [[2, "b"], [3, "c"], [4, "d"]], "relation": "<=", "bound": 6, "name": "cap2"},
     {"type": "exactly-one", "literals": ["a", "b", "c", "d"], "name": "one"}]})");
  const auto r = run("encode --comments " + quote(model) + " --method 'cap*=adder' --method one=bimander");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("cap1: linear, method adder,"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("cap2: linear, method adder,"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("one: exactly-one, method bimander,"), std::string::npos) << r.out;
  // A rule beats the whole-model method; the rest follow the whole-model one.
  const auto mixed = run("encode --comments " + quote(model) + " --method cap2=generalized-totalizer --method bdd");
  ASSERT_EQ(mixed.code, 0) << mixed.err;
  EXPECT_NE(mixed.out.find("cap1: linear, method bdd,"), std::string::npos) << mixed.out;
  EXPECT_NE(mixed.out.find("cap2: linear, method generalized-totalizer,"), std::string::npos) << mixed.out;
  // The same choices in stats.
  const auto st = run("stats --json " + quote(model) + " --method 'cap*=adder'");
  ASSERT_EQ(st.code, 0) << st.err;
  const auto j = nlohmann::json::parse(st.out);
  EXPECT_EQ(j["constraints"][0]["picked"], "adder");
  EXPECT_EQ(j["constraints"][1]["picked"], "adder");
  // A name whose method cannot encode it is an error naming the constraint.
  const auto bad = run("encode " + quote(model) + " --method cap1=ladder");
  EXPECT_EQ(bad.code, 2);
  EXPECT_NE(bad.err.find("cap1"), std::string::npos) << bad.err;
  EXPECT_NE(bad.err.find("ladder"), std::string::npos) << bad.err;
  // An unknown method after '=' is an error listing the valid ones.
  const auto unknown = run("encode " + quote(model) + " --method cap1=fastest");
  EXPECT_EQ(unknown.code, 2);
  EXPECT_NE(unknown.err.find("valid methods"), std::string::npos) << unknown.err;
}

// --- comments, progress ------------------------------------------------------------------------------------------

TEST_F(cli, CommentsAndProgress) {
  const auto model = write("m.json",
                           R"({"variables": ["red", "green", "blue"],
   "constraints": [{"type": "exactly-one", "literals": ["red", "green", "blue"], "name": "one colour"}]})");
  const auto r = run("encode --comments " + quote(model) + " -o " + quote(file("c.cnf")));
  ASSERT_EQ(r.code, 0) << r.err;
  const std::string text = read_file(file("c.cnf"));
  EXPECT_NE(text.find("c variable green 2\n"), std::string::npos) << text;
  EXPECT_NE(text.find("one colour"), std::string::npos) << text;
  // Comment lines between clauses are still DIMACS to CaDiCaL's strict parser.
  CaDiCaL::Solver solver;
  solver.set("quiet", 1);
  int vars = 0;
  EXPECT_EQ(solver.read_dimacs(file("c.cnf").c_str(), vars, 1), nullptr);
  // Progress: nothing on a pipe unless asked.
  EXPECT_TRUE(r.err.empty()) << r.err;
  const auto asked = run("encode --progress " + quote(model) + " -o " + quote(file("p.cnf")));
  EXPECT_EQ(asked.code, 0);
  EXPECT_NE(asked.err.find("1 of 1 constraints"), std::string::npos) << asked.err;
}
