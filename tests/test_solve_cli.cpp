// `clausewright solve`, run as a program on the bundled example models and
// on generated ones.
//
// Independent references, named again beside the checks:
// - an evaluator of the JSON model format written here (every constraint
//   type, soft weights, the objective) checks each reported assignment and
//   recomputes its value;
// - brute force over all assignments with that evaluator for small models;
// - a knapsack dynamic program over the weights and values read from the
//   model file;
// - counting arguments stated in comments (capacity and fragile limits) for
//   the lower bounds of the bundled packing models.
// Random models use fixed seeds and print them on failure.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <optional>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "tool_run.hpp"

namespace fs = std::filesystem;
using json = nlohmann::ordered_json;

namespace {

using tool_run::quote;
using tool_run::read_file;
using tool_run::run_result;

const std::string tool = CLAUSEWRIGHT_TOOL_PATH;
const fs::path models = fs::path(CLAUSEWRIGHT_EXAMPLES_DIR) / "models";

// --- an evaluator of the JSON model format, independent of the library ----------

struct model_eval {
  json doc;
  std::vector<std::string> names;  // by first appearance (the format's numbering)

  explicit model_eval(json d) : doc(std::move(d)) {
    auto see = [&](std::string name) {
      if (!name.empty() && name[0] == '~') name.erase(0, 1);
      if (std::find(names.begin(), names.end(), name) == names.end()) names.push_back(name);
    };
    if (doc.contains("variables"))
      for (const auto& n : doc["variables"]) see(n.get<std::string>());
    for (const auto& [key, value] : doc.items()) {
      if (key == "constraints") {
        for (const auto& c : value) {
          if (c.contains("literals"))
            for (const auto& l : c["literals"]) see(l.get<std::string>());
          if (c.contains("terms"))
            for (const auto& t : c["terms"]) see(t[1].get<std::string>());
        }
      }
      if (key == "objective")
        for (const auto& t : value) see(t[1].get<std::string>());
    }
  }

  template <class Truth>
  static bool literal_true(const std::string& l, const Truth& truth) {
    return l[0] == '~' ? !truth(l.substr(1)) : truth(l);
  }
  // Whether constraint c holds.
  template <class Truth>
  static bool holds(const json& c, const Truth& truth) {
    const std::string type = c["type"].get<std::string>();
    std::int64_t sum = 0;
    if (c.contains("literals"))
      for (const auto& l : c["literals"]) sum += literal_true(l.get<std::string>(), truth) ? 1 : 0;
    if (type == "clause") return sum >= 1;
    if (type == "at-most-one") return sum <= 1;
    if (type == "exactly-one") return sum == 1;
    if (type == "at-most") return sum <= c["k"].get<std::int64_t>();
    if (type == "at-least") return sum >= c["k"].get<std::int64_t>();
    if (type == "exactly") return sum == c["k"].get<std::int64_t>();
    for (const auto& t : c["terms"])
      if (literal_true(t[1].get<std::string>(), truth)) sum += t[0].get<std::int64_t>();
    const std::string rel = c["relation"].get<std::string>();
    const std::int64_t bound = c["bound"].get<std::int64_t>();
    return rel == "<=" ? sum <= bound : rel == ">=" ? sum >= bound : sum == bound;
  }
  // The value minimised (objective terms plus the weights of soft
  // constraints not satisfied), or nullopt when a hard constraint fails.
  template <class Truth>
  std::optional<std::int64_t> value(const Truth& truth) const {
    std::int64_t total = 0;
    for (const auto& c : doc["constraints"]) {
      const bool ok = holds(c, truth);
      if (c.contains("weight")) {
        if (!ok) total += c["weight"].get<std::int64_t>();
      } else if (!ok) {
        return std::nullopt;
      }
    }
    if (doc.contains("objective"))
      for (const auto& t : doc["objective"])
        if (literal_true(t[1].get<std::string>(), truth)) total += t[0].get<std::int64_t>();
    return total;
  }
  std::optional<std::int64_t> value_of(const json& assignment) const {
    return value([&](const std::string& name) { return assignment.at(name).get<bool>(); });
  }
  [[nodiscard]] bool optimising() const {
    if (doc.contains("objective")) return true;
    for (const auto& c : doc["constraints"])
      if (c.contains("weight")) return true;
    return false;
  }
  // Brute force over every assignment (at most 16 variables).
  [[nodiscard]] std::optional<std::int64_t> brute_force() const {
    EXPECT_LE(names.size(), 16U);
    std::optional<std::int64_t> best;
    for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << names.size()); ++bits) {
      const auto v = value([&](const std::string& name) {
        const auto i = static_cast<std::size_t>(std::find(names.begin(), names.end(), name) - names.begin());
        return ((bits >> i) & 1U) != 0;
      });
      if (v && (!best || *v < *best)) best = v;
    }
    return best;
  }
};

// A scratch directory per test.
class solve_cli : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() / ("clausewright-solve-" + std::to_string(::getpid()) + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  void TearDown() override {
    if (!HasFailure()) fs::remove_all(dir_);
  }

  fs::path write(const std::string& name, const std::string& text) const {
    std::ofstream(dir_ / name, std::ios::binary) << text;
    return dir_ / name;
  }
  run_result run(const std::string& args) const { return tool_run::run_program(tool, args, dir_); }
  // `solve --json`: the parsed result, after checking what every result has.
  json solve_json(const fs::path& model, const std::string& options = {}) const {
    const run_result r = run("solve " + quote(model.string()) + " --json " + options);
    EXPECT_TRUE(r.code == 0 || r.code == 1 || r.code == 3 || r.code == 4) << r.err;
    json j;
    try {
      j = json::parse(r.out);
    } catch (const json::exception& e) {
      ADD_FAILURE() << "not JSON: " << e.what() << "\n" << r.out;
      return json::object();
    }
    EXPECT_TRUE(j.contains("status") && j.contains("objective") && j.contains("total") && j.contains("assignment"))
        << r.out;
    const std::string status = j.value("status", "");
    EXPECT_TRUE(status == "optimal" || status == "satisfiable" || status == "unsatisfiable" || status == "unknown")
        << status;
    // Exit codes (src/commands.hpp): 1 unsatisfiable, 3 unknown, 4 a solution
    // of an optimisation not proved optimal (it has a lower bound), else 0.
    const bool optimising = j.contains("lower_bound") && !j["lower_bound"].is_null();
    const int expected = status == "unsatisfiable"               ? 1
                         : status == "unknown"                   ? 3
                         : status == "satisfiable" && optimising ? 4
                                                                 : 0;
    EXPECT_EQ(r.code, expected) << "exit code for " << status;
    return j;
  }
  // The reported assignment satisfies the hard constraints and has the
  // reported value (the evaluator above).
  static void expect_consistent(const model_eval& m, const json& j) {
    if (j["assignment"].is_null()) return;
    ASSERT_EQ(j["assignment"].size(), m.names.size()) << "every variable of the model has a value";
    const auto v = m.value_of(j["assignment"]);
    ASSERT_TRUE(v.has_value()) << "the assignment breaks a hard constraint";
    if (m.optimising()) {
      EXPECT_EQ(j["total"].get<std::int64_t>(), *v) << "the total is the assignment's value";
      // total = objective + soft cost, each labelled on its own.
      const std::int64_t objective = j["objective"].is_null() ? 0 : j["objective"].get<std::int64_t>();
      const std::int64_t soft = j.contains("soft_cost") ? j["soft_cost"].get<std::int64_t>() : 0;
      EXPECT_EQ(j["total"].get<std::int64_t>(), objective + soft) << j;
    } else {
      EXPECT_TRUE(j["total"].is_null());
    }
  }

  fs::path dir_;
};

model_eval load(const fs::path& p) { return model_eval(json::parse(read_file(p))); }

// --- the bundled examples ------------------------------------------------------------

TEST_F(solve_cli, KnapsackExampleMatchesTheDynamicProgram) {
  const fs::path path = models / "knapsack.json";
  const model_eval m = load(path);
  // The textbook 0/1 knapsack DP over the weights (the constraint's terms)
  // and values (the objective's terms, on ~take) read from the file.
  const json& load_terms = m.doc["constraints"][0]["terms"];
  const std::int64_t capacity = m.doc["constraints"][0]["bound"].get<std::int64_t>();
  std::vector<std::int64_t> best(static_cast<std::size_t>(capacity) + 1, 0);
  std::int64_t all = 0;
  for (std::size_t i = 0; i < load_terms.size(); ++i) {
    const std::int64_t w = load_terms[i][0].get<std::int64_t>();
    const std::int64_t v = m.doc["objective"][i][0].get<std::int64_t>();
    all += v;
    for (std::int64_t c = capacity; c >= w; --c)
      best[static_cast<std::size_t>(c)] =
          std::max(best[static_cast<std::size_t>(c)], best[static_cast<std::size_t>(c - w)] + v);
  }
  const std::int64_t expected = all - best[static_cast<std::size_t>(capacity)];
  for (const std::string search : {"linear", "binary"}) {
    const json j = solve_json(path, "--search " + search);
    EXPECT_EQ(j["status"], "optimal");
    EXPECT_EQ(j["total"], expected);
    EXPECT_EQ(j["lower_bound"], expected);
    expect_consistent(m, j);
  }
}

TEST_F(solve_cli, PackingExamplesReachTheirCountingLowerBounds) {
  // bin_packing.json: 116 GB of folders on 25 GB discs need at least
  // ceil(116/25) = 5 discs. demo.json: six fragile parcels at most two per
  // van need at least 3 vans (and 44 of load at most 20 per van, 3 too).
  // Reaching the bound proves the optimum independently of the solver.
  for (const auto& [file, bound] : {std::pair<std::string, std::int64_t>{"bin_packing.json", 5}, {"demo.json", 3}}) {
    SCOPED_TRACE(file);
    const model_eval m = load(models / file);
    for (const std::string search : {"linear", "binary"}) {
      const json j = solve_json(models / file, "--search " + search);
      EXPECT_EQ(j["status"], "optimal");
      EXPECT_EQ(j["total"], bound);
      expect_consistent(m, j);
    }
  }
}

TEST_F(solve_cli, RotaExampleAgreesAcrossSearchesAndBounds) {
  const fs::path path = models / "staff_rota.json";
  const model_eval m = load(path);
  std::optional<std::int64_t> optimum;
  for (const std::string options :
       {"", "--search binary", "--bound generalized-totalizer", "--bound adder --search binary", "--bound reencode",
        "--bound sequential-weight-counter", "--method totalizer --method pairwise"}) {
    SCOPED_TRACE(options);
    const json j = solve_json(path, options);
    ASSERT_EQ(j["status"], "optimal");
    expect_consistent(m, j);
    if (!optimum) optimum = j["total"].get<std::int64_t>();
    EXPECT_EQ(j["total"], *optimum);
    EXPECT_EQ(j["soft_cost"], *optimum);  // no objective terms: the total is the soft cost
    EXPECT_TRUE(j["objective"].is_null()) << "no objective function, no objective value";
  }
  // Every soft constraint satisfied is impossible (the search proves some
  // weight must be given up); the value agrees with the library example.
  EXPECT_GT(*optimum, 0);
}

// --- generated models against brute force and the DP ------------------------------------

json random_model(std::mt19937_64& rng, int round) {
  json doc = {{"format", "clausewright-model"}, {"version", 1}};
  json constraints = json::array();
  std::uniform_int_distribution<int> coin(0, 3);
  if (round % 3 == 0) {
    // A knapsack with a second, cardinality limit.
    const int n = 5 + round % 6;
    std::uniform_int_distribution<std::int64_t> weight(1, 9), value(-3, 12);
    json terms = json::array(), objective = json::array(), names = json::array();
    std::int64_t total = 0;
    for (int i = 0; i < n; ++i) {
      const std::string x = "item" + std::to_string(i);
      const std::int64_t w = weight(rng);
      total += w;
      terms.push_back({w, x});
      objective.push_back({value(rng), "~" + x});
      names.push_back(x);
    }
    constraints.push_back({{"type", "linear"}, {"terms", terms}, {"relation", "<="}, {"bound", total / 2}});
    constraints.push_back({{"type", "at-most"}, {"literals", names}, {"k", n / 2}});
    doc["objective"] = objective;
  } else {
    // A small rota: cover, limits, unwanted shifts as soft clauses, a soft cardinality.
    const int people = 3, shifts = 3 + round % 2;
    auto w = [](int p, int s) { return "w." + std::to_string(p) + "." + std::to_string(s); };
    for (int s = 0; s < shifts; ++s) {
      json staff = json::array();
      for (int p = 0; p < people; ++p) staff.push_back(w(p, s));
      constraints.push_back(
          {{"type", round % 2 ? "exactly" : "at-least"}, {"literals", staff}, {"k", 1 + coin(rng) % 2}});
    }
    for (int p = 0; p < people; ++p) {
      json week = json::array();
      for (int s = 0; s < shifts; ++s) week.push_back(w(p, s));
      constraints.push_back({{"type", "at-most"}, {"literals", week}, {"k", shifts - 1 - coin(rng) % 2}});
      for (int s = 0; s < shifts; ++s)
        if (coin(rng) <= 1)
          constraints.push_back({{"type", "clause"}, {"literals", {"~" + w(p, s)}}, {"weight", 1 + coin(rng)}});
    }
    constraints.push_back({{"type", "linear"},
                           {"terms", {{2, w(0, 0)}, {3, w(1, 0)}, {1, w(2, shifts - 1)}}},
                           {"relation", ">="},
                           {"bound", 3},
                           {"weight", 4}});
    if (round % 4 == 1) doc["objective"] = json::array({{1, w(0, 1)}, {-2, w(2, 0)}});
  }
  doc["constraints"] = constraints;
  return doc;
}

TEST_F(solve_cli, GeneratedModelsMatchBruteForce) {
  const std::uint64_t seed = 9101;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 16; ++round) {
    const json doc = random_model(rng, round);
    SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + "\n" + doc.dump());
    const fs::path path = write("model" + std::to_string(round) + ".json", doc.dump(1));
    const model_eval m(doc);
    const auto expected = m.brute_force();  // brute force with the evaluator
    for (const std::string search : {"linear", "binary"}) {
      const json j = solve_json(path, "--search " + search);
      if (!expected) {
        EXPECT_EQ(j["status"], "unsatisfiable");
        EXPECT_TRUE(j["total"].is_null());
        continue;
      }
      EXPECT_EQ(j["status"], "optimal");
      EXPECT_EQ(j["total"], *expected);
      expect_consistent(m, j);
    }
  }
}

TEST_F(solve_cli, OpbObjectivesIncludingNegativeCoefficients) {
  // min 3x1 + 2x2 + 4x3 + x4 with at least two of x1..x3 and x3 | x4: the
  // candidates by hand are {x1,x2,x4} = 6, {x2,x3} = 6, {x1,x3} = 7: optimum 6.
  const auto a = write("a.opb",
                       "* #variable= 4 #constraint= 2\nmin: +3 x1 +2 x2 +4 x3 +1 x4 ;\n"
                       "+1 x1 +1 x2 +1 x3 >= 2 ;\n+1 x3 +1 x4 >= 1 ;\n");
  // min -5x1 + 2x2 with x1 -> x2 (x1 + ~x2 <= 1): x1 = x2 = 1 gives -3, the
  // others 0 or 2: optimum -3.
  const auto b = write("b.opb", "* #variable= 2 #constraint= 1\nmin: -5 x1 +2 x2 ;\n+1 x1 +1 ~x2 <= 1 ;\n");
  for (const auto& [path, expected] : {std::pair<fs::path, std::int64_t>{a, 6}, {b, -3}}) {
    SCOPED_TRACE(path.string());
    for (const std::string search : {"linear", "binary"}) {
      const json j = solve_json(path, "--search " + search);
      EXPECT_EQ(j["status"], "optimal");
      EXPECT_EQ(j["total"], expected);
    }
  }
  const run_result text = run("solve " + quote(b.string()));
  EXPECT_EQ(text.code, 0);
  EXPECT_NE(text.out.find("status optimal\nobjective -3\n"), std::string::npos) << text.out;
  EXPECT_NE(text.out.find("x1 = 1\nx2 = 1\n"), std::string::npos) << text.out;
}

TEST_F(solve_cli, SatisfiabilityUnsatisfiabilityAndImprovingSolutions) {
  // No objective: a question of satisfiability.
  const auto sat = write("sat.json", R"({"constraints": [{"type": "exactly", "literals": ["a", "b", "c"], "k": 2},
                                        {"type": "clause", "literals": ["~a"]}]})");
  const json s = solve_json(sat);
  EXPECT_EQ(s["status"], "satisfiable");
  EXPECT_TRUE(s["total"].is_null());
  EXPECT_EQ(s["assignment"], json({{"a", false}, {"b", true}, {"c", true}}));  // the only solution, by hand
  // Three people cannot cover a shift that needs four (by hand).
  const auto unsat = write("unsat.json", R"({"constraints": [{"type": "at-least", "literals": ["p", "q", "r"], "k": 4},
                                            {"type": "clause", "literals": ["p"], "weight": 3}]})");
  const json u = solve_json(unsat);
  EXPECT_EQ(u["status"], "unsatisfiable");
  EXPECT_TRUE(u["total"].is_null());
  EXPECT_TRUE(u["assignment"].is_null());
  const run_result text = run("solve " + quote(unsat.string()));
  EXPECT_EQ(text.code, 1);
  // The answer names the constraint that can never hold (constraint 0, at
  // least 4 of 3), in text and in JSON.
  EXPECT_EQ(text.out.rfind("status unsatisfiable\ncan never hold: " + unsat.string() + ":", 0), 0U) << text.out;
  EXPECT_NE(text.out.find("constraint 0"), std::string::npos) << text.out;
  ASSERT_EQ(u["never_hold"].size(), 1U) << u;
  EXPECT_EQ(u["never_hold"][0]["index"], 0);
  // Each improving solution on standard error, strictly better, the last the optimum.
  const run_result k = run("solve " + quote((models / "knapsack.json").string()));
  ASSERT_EQ(k.code, 0) << k.err;
  std::vector<long long> values;
  std::istringstream lines(k.err);
  for (std::string line; std::getline(lines, line);) {
    const auto at = line.find(": total ");
    if (line.rfind("clausewright: solution ", 0) == 0 && at != std::string::npos)
      values.push_back(std::stoll(line.substr(at + 8)));
  }
  ASSERT_FALSE(values.empty()) << k.err;
  for (std::size_t i = 1; i < values.size(); ++i) EXPECT_LT(values[i], values[i - 1]);
  EXPECT_NE(k.out.find("objective " + std::to_string(values.back()) + "\n"), std::string::npos);
}

// Twelve pigeons, eleven holes, and a pigeon may stay out at cost 1: a
// solution comes at once, proving that one pigeon out is best is the
// pigeonhole principle (hard for CDCL solvers).
// Names built by appending: g++ 12 warns wrongly (-Wrestrict) on "p" + std::to_string(p).
std::string name_of(const char* prefix, int a, int b = -1) {
  std::string name(prefix);
  name += std::to_string(a);
  if (b >= 0) {
    name += 'h';
    name += std::to_string(b);
  }
  return name;
}

std::string pigeons_with_an_exit() {
  json constraints = json::array();
  json objective = json::array();
  for (int p = 0; p < 12; ++p) {
    json where = json::array();
    for (int h = 0; h < 11; ++h) where.push_back(name_of("p", p, h));
    where.push_back(name_of("out", p));
    constraints.push_back({{"type", "exactly-one"}, {"literals", where}, {"method", "pairwise"}});
    objective.push_back({1, name_of("out", p)});
  }
  for (int h = 0; h < 11; ++h) {
    json hole = json::array();
    for (int p = 0; p < 12; ++p) hole.push_back(name_of("p", p, h));
    constraints.push_back({{"type", "at-most-one"}, {"literals", hole}, {"method", "pairwise"}});
  }
  return json({{"constraints", constraints}, {"objective", objective}}).dump();
}

TEST_F(solve_cli, TimeLimitReportsTheBestSoFar) {
  const auto path = write("pigeons.json", pigeons_with_an_exit());
  const model_eval m = load(path);
  for (const std::string search : {"linear", "binary"}) {
    SCOPED_TRACE(search);
    const auto start = std::chrono::steady_clock::now();
    const json j = solve_json(path, "--time-limit 0.5 --search " + search);
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    EXPECT_LT(seconds, 10.0) << "the search stops near its limit";
    const std::string status = j.value("status", "");
    ASSERT_TRUE(status == "satisfiable" || status == "optimal") << status;
    EXPECT_GE(j["total"].get<std::int64_t>(), 1);  // some pigeon must stay out
    if (status == "optimal") {
      EXPECT_EQ(j["total"], 1);
    }
    expect_consistent(m, j);
  }
  const json none = solve_json(path, "--time-limit 0");
  EXPECT_EQ(none["status"], "unknown");
  EXPECT_TRUE(none["total"].is_null());
}

TEST_F(solve_cli, BadUsageAndInputExitTwo) {
  const std::string demo = quote((models / "demo.json").string());
  const std::vector<std::string> bad{"solve " + demo + " --time-limit -1",
                                     "solve " + demo + " --time-limit soon",
                                     "solve " + demo + " --search sideways",
                                     "solve " + demo + " --bound magic",
                                     "solve " + demo + " --method nothing",
                                     "solve " + demo + " --pick luck",
                                     "solve - --stats",
                                     "solve " + quote((dir_ / "missing.json").string()),
                                     "solve"};
  for (const std::string& args : bad) {
    SCOPED_TRACE(args);
    const run_result r = run(args);
    EXPECT_EQ(r.code, 2) << r.out << r.err;
    EXPECT_FALSE(r.err.empty());
  }
  const auto broken = write("broken.json", R"({"constraints": [{"type": "at-most", "literals": ["a"]}]})");
  const run_result r = run("solve " + quote(broken.string()));
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("broken.json:1:"), std::string::npos) << r.err;  // file:line:column
}

TEST_F(solve_cli, StatsTableComesFirst) {
  const run_result r = run("solve " + quote((models / "demo.json").string()) + " --stats");
  ASSERT_EQ(r.code, 0) << r.err;
  const auto table = r.out.find("picked");
  const auto status = r.out.find("status optimal");
  ASSERT_NE(table, std::string::npos) << r.out;
  ASSERT_NE(status, std::string::npos) << r.out;
  EXPECT_LT(table, status);
  EXPECT_NE(r.out.find("van1-load"), std::string::npos);
  EXPECT_NE(r.out.find("objective 3\n"), std::string::npos);
  // With --json the table goes to standard error and standard output stays JSON.
  const run_result j = run("solve " + quote((models / "demo.json").string()) + " --stats --json");
  ASSERT_EQ(j.code, 0) << j.err;
  EXPECT_TRUE(json::accept(j.out)) << j.out;
  EXPECT_NE(j.err.find("picked"), std::string::npos);
}

}  // namespace
