// `clausewright stats`: the grouped table fits a screen and its groups add
// up to the per-constraint numbers of `stats --json`; the DIMACS bytes it
// reports are the bytes `encode` writes; constraints that can never hold are
// named.
//
// Independent references: the files `encode` writes (their sizes, counted
// here), the per-constraint entries of `stats --json` (summed here), and
// for the impossible constraints the counting argument in the comments.
#include <gtest/gtest.h>
#include <unistd.h>

#include <cstdint>
#include <filesystem>
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
using json = nlohmann::json;
using tool_run::contains;
using tool_run::quote;
using tool_run::read_file;
using tool_run::run_result;
using tool_run::write_file;

namespace {

const std::string tool = CLAUSEWRIGHT_TOOL_PATH;

class stats_cli : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() / ("clausewright-stats-" + std::to_string(::getpid()) + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  void TearDown() override {
    if (!HasFailure()) fs::remove_all(dir_);
  }
  [[nodiscard]] fs::path write(const std::string& name, const std::string& text) const {
    write_file(dir_ / name, text);
    return dir_ / name;
  }
  [[nodiscard]] run_result run(const std::string& args) const { return tool_run::run_program(tool, args, dir_); }
  fs::path dir_;
};

// Bin packing in OPB (a scenario of our own): ITEMS items of weight 1..1000
// (seeded), each in exactly one of BINS bins, each bin's load at most its
// capacity.
std::string bin_packing(int items, int bins, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<int> weight(1, 1000);
  std::vector<int> w(static_cast<std::size_t>(items));
  std::int64_t sum = 0;
  for (int& x : w) sum += (x = weight(rng));
  // Streamed, not "x" + to_string(n): g++ 12 warns falsely (-Wrestrict) on that.
  const auto var = [bins](std::ostream& out, int i, int b) -> std::ostream& { return out << 'x' << i * bins + b + 1; };
  std::ostringstream out;
  out << "* #variable= " << items * bins << " #constraint= " << items + bins << "\n";
  for (int i = 0; i < items; ++i) {
    for (int b = 0; b < bins; ++b) var(out << "+1 ", i, b) << " ";
    out << "= 1 ;\n";
  }
  for (int b = 0; b < bins; ++b) {
    for (int i = 0; i < items; ++i) var(out << "+" << w[static_cast<std::size_t>(i)] << " ", i, b) << " ";
    out << "<= " << sum / bins + 200 << " ;\n";
  }
  return out.str();
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) out.push_back(line);
  return out;
}

// The entry of the method a constraint is written with (a constant or a
// single clause: any, they are alike).
const json& used_entry(const json& c) {
  if (c["picked"].is_null()) return c["methods"][0];
  for (const json& m : c["methods"])
    if (m["name"] == c["picked"]) return m;
  throw std::runtime_error("picked method without an entry");
}

TEST_F(stats_cli, ThreeThousandConstraintsFitOneScreenAndTheGroupsAddUp) {
  const fs::path model = write("bins.opb", bin_packing(3000, 12, 20261202));
  const run_result table = run("stats " + quote(model.string()));
  ASSERT_EQ(table.code, 0) << table.err;
  const std::vector<std::string> lines = lines_of(table.out);
  EXPECT_LE(lines.size(), 60U) << table.out;
  for (const std::string& line : lines) EXPECT_LE(line.size(), 120U) << line;

  const run_result st = run("stats --json " + quote(model.string()));
  ASSERT_EQ(st.code, 0) << st.err;
  const json j = json::parse(st.out);
  const json& constraints = j["constraints"];
  ASSERT_EQ(constraints.size(), 3012U);
  // Every constraint in exactly one group; the groups' sums are the sums of
  // their members' entries.
  std::set<std::uint64_t> seen;
  std::uint64_t clauses = 0;
  for (const json& g : j["groups"]) {
    ASSERT_EQ(g["count"].get<std::size_t>(), g["constraints"].size());
    std::uint64_t group_clauses = 0;
    std::uint64_t group_vars = 0;
    std::map<std::string, std::uint64_t> per_method;
    for (const json& index : g["constraints"]) {
      EXPECT_TRUE(seen.insert(index.get<std::uint64_t>()).second) << index;
      const json& c = constraints[index.get<std::size_t>()];
      EXPECT_EQ(c["kind"], g["kind"]);
      EXPECT_EQ(c["bound"], g["bound"]);
      EXPECT_EQ(c["picked"], g["picked"]);
      group_clauses += used_entry(c)["clauses"].get<std::uint64_t>();
      group_vars += used_entry(c)["vars"].get<std::uint64_t>();
      for (const json& m : c["methods"]) per_method[m["name"]] += m["clauses"].get<std::uint64_t>();
    }
    EXPECT_EQ(g["clauses"].get<std::uint64_t>(), group_clauses);
    EXPECT_EQ(g["vars"].get<std::uint64_t>(), group_vars);
    for (const json& m : g["methods"]) EXPECT_EQ(m["clauses"].get<std::uint64_t>(), per_method.at(m["name"]));
    clauses += group_clauses;
    // The group's count and clauses are in the table.
    std::string count(1, ' ');  // appended: g++ 12 warns falsely (-Wrestrict) on " " + to_string(n)
    count += std::to_string(g["count"].get<std::size_t>());
    count += ' ';
    EXPECT_TRUE(contains(table.out, count)) << g["count"];
    EXPECT_TRUE(contains(table.out, std::to_string(group_clauses))) << group_clauses;
  }
  EXPECT_EQ(seen.size(), constraints.size());
  EXPECT_EQ(clauses, j["totals"]["picked"]["clauses"].get<std::uint64_t>());
  // 3000 exactly-one rows and 12 capacity rows: two shapes.
  ASSERT_EQ(j["groups"].size(), 2U);
  std::multiset<std::size_t> counts;
  for (const json& g : j["groups"]) counts.insert(g["count"].get<std::size_t>());
  EXPECT_EQ(counts, (std::multiset<std::size_t>{12, 3000}));
  // Stand-ins: an at-most-one method cannot encode the 12 capacity rows;
  // the table says how many constraints others stand in for.
  EXPECT_TRUE(contains(table.out, "stand-ins")) << table.out;
  for (const json& t : j["totals"]["by_method"])
    if (t["name"] == "ladder") {
      EXPECT_EQ(t["fallbacks"].get<std::uint64_t>(), 12U);
    }
}

TEST_F(stats_cli, WideShowsEveryMethodPerGroup) {
  const fs::path model = write("m.opb",
                               "* #variable= 6 #constraint= 3\n+1 x1 +1 x2 +1 x3 <= 1 ;\n+1 x4 +1 x5 +1 x6 <= 1 ;\n"
                               "+2 x1 +3 x4 +4 x6 <= 5 ;\n");
  const run_result wide = run("stats --wide " + quote(model.string()));
  ASSERT_EQ(wide.code, 0) << wide.err;
  const json j = json::parse(run("stats --json " + quote(model.string())).out);
  for (const json& g : j["groups"])
    for (const json& m : g["methods"]) {
      EXPECT_TRUE(contains(wide.out, m["name"].get<std::string>())) << m["name"];
      if (!m["over_budget"].get<bool>()) {
        std::string cell = std::to_string(m["clauses"].get<std::uint64_t>());
        cell += '/';
        cell += std::to_string(m["vars"].get<std::uint64_t>());
        EXPECT_TRUE(contains(wide.out, cell)) << m;
      }
    }
}

// The bytes after the header line ("p cnf V C", padded or not) of a CNF file.
std::uint64_t body_bytes(const fs::path& cnf) {
  const std::string text = read_file(cnf);
  const std::size_t header = text.find('\n');
  EXPECT_EQ(text.rfind("p cnf", 0), 0U);
  return text.size() - (header + 1);
}

TEST_F(stats_cli, DimacsBytesAreTheBytesEncodeWrites) {
  // Above 65 536 clauses (the 3000 x 12 bin packing has over a million),
  // with OPB products, and small: for the picked methods and each method
  // alone, the CNF bytes stats reports are the size of encode's output
  // past its header line.
  const std::vector<fs::path> models{
      write("bins.opb", bin_packing(3000, 12, 7)),
      write("products.opb",
            "* #variable= 8 #constraint= 3\n+1 x1 x2 +2 x3 +1 ~x4 x5 <= 2 ;\n"
            "+1 x5 +1 x6 +1 x7 +1 x8 >= 2 ;\n+3 x1 +2 x6 x7 +4 ~x8 >= 3 ;\n"),
      write("small.opb", "* #variable= 5 #constraint= 2\n+1 x1 +1 x2 +1 x3 +1 x4 <= 2 ;\n+1 x1 +1 x5 >= 1 ;\n")};
  for (const fs::path& model : models) {
    const run_result st = run("stats --json " + quote(model.string()));
    ASSERT_EQ(st.code, 0) << st.err;
    const json j = json::parse(st.out);
    const fs::path out = dir_ / "out.cnf";
    ASSERT_EQ(run("encode " + quote(model.string()) + " -o " + quote(out.string())).code, 0);
    ASSERT_TRUE(j["totals"]["picked"]["cnf"]["bytes"].is_number()) << model;
    EXPECT_EQ(j["totals"]["picked"]["cnf"]["bytes"].get<std::uint64_t>(), body_bytes(out)) << model;
    for (const json& t : j["totals"]["by_method"]) {
      const std::string method = t["name"];
      if (t["over_budget"].get<bool>()) {
        EXPECT_TRUE(t["cnf"]["bytes"].is_null()) << method;
        continue;
      }
      if (method != "ladder" && method != "sequential-counter" && method != "totalizer" && method != "adder" &&
          method != "bdd")
        continue;
      const run_result e =
          run("encode " + quote(model.string()) + " --method " + method + " -o " + quote(out.string()));
      ASSERT_EQ(e.code, 0) << e.err;
      EXPECT_EQ(t["cnf"]["bytes"].get<std::uint64_t>(), body_bytes(out)) << model << " " << method;
    }
  }
}

TEST_F(stats_cli, ASingleClauseNeedsNoMethodInTheTableAndInJson) {
  const fs::path model =
      write("m.opb", "* #variable= 3 #constraint= 2\n+1 x1 +1 x2 >= 1 ;\n+1 x1 +1 x2 +1 x3 <= 1 ;\n");
  const json j = json::parse(run("stats --json " + quote(model.string())).out);
  EXPECT_EQ(j["constraints"][0]["kind"], "clause");
  EXPECT_TRUE(j["constraints"][0]["picked"].is_null());
  EXPECT_FALSE(j["constraints"][0]["needs_method"].get<bool>());
  EXPECT_TRUE(j["constraints"][1]["picked"].is_string());
  const run_result table = run("stats " + quote(model.string()));
  EXPECT_TRUE(contains(table.out, "(none)")) << table.out;
  EXPECT_FALSE(contains(table.out, "(any)")) << table.out;
}

TEST_F(stats_cli, AConstraintThatCanNeverHoldIsNamed) {
  // At least 4 of 3 literals: no assignment has more than 3 true.
  const fs::path model =
      write("m.opb", "* #variable= 3 #constraint= 2\n+1 x1 +1 x2 <= 1 ;\n+1 x1 +1 x2 +1 x3 >= 4 ;\n");
  std::string where = model.string();
  where += ":3:1";
  const run_result st = run("stats " + quote(model.string()));
  EXPECT_EQ(st.code, 0) << st.err;
  EXPECT_TRUE(contains(st.err, "warning")) << st.err;
  EXPECT_TRUE(contains(st.err, where)) << st.err;
  EXPECT_TRUE(contains(st.err, "constraint 1")) << st.err;
  const run_result enc = run("encode " + quote(model.string()) + " -o " + quote((dir_ / "m.cnf").string()));
  EXPECT_EQ(enc.code, 0) << enc.err;
  EXPECT_TRUE(contains(enc.err, where)) << enc.err;
  EXPECT_TRUE(contains(enc.err, "never hold")) << enc.err;
#ifdef CLAUSEWRIGHT_TOOL_HAS_SOLVE
  const run_result solved = run("solve " + quote(model.string()));
  EXPECT_EQ(solved.code, 1) << solved.err;
  EXPECT_TRUE(contains(solved.out, "unsatisfiable")) << solved.out;
  EXPECT_TRUE(contains(solved.out + solved.err, where)) << solved.out << solved.err;
#endif
  // A model without such a constraint: no warning.
  const fs::path fine = write("fine.opb", "* #variable= 3 #constraint= 1\n+1 x1 +1 x2 +1 x3 >= 3 ;\n");
  EXPECT_FALSE(contains(run("stats " + quote(fine.string())).err, "warning"));
}

// --- encode --format opb ---------------------------------------------------------------

struct small_term {
  std::int64_t coefficient;
  int var;
  bool negated;
};
struct small_row {
  std::vector<small_term> terms;
  std::string relation;
  std::int64_t bound;
};
struct small_model {
  int variables = 8;
  std::vector<small_row> rows;
  std::vector<small_term> objective;
  std::string opb;
};

// Seeded OPB models with what normalisation must handle: negative
// coefficients, repeated and complementary literals, forced literals,
// constraints always true or never true, an objective.
small_model small_random(std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  const auto pick = [&rng](int lo, int hi) { return std::uniform_int_distribution<int>(lo, hi)(rng); };
  small_model m;
  const auto term_text = [](const small_term& t) {
    std::string text = t.coefficient >= 0 ? "+" : "";
    text += std::to_string(t.coefficient);
    text += t.negated ? " ~x" : " x";
    text += std::to_string(t.var);
    return text;
  };
  const int rows = pick(2, 5);
  for (int r = 0; r < rows; ++r) {
    small_row row;
    const int n = pick(2, 6);
    for (int k = 0; k < n; ++k) row.terms.push_back({pick(-5, 6), pick(1, m.variables), pick(0, 3) == 0});
    row.relation = pick(0, 2) == 0 ? ">=" : pick(0, 1) == 0 ? "<=" : "=";
    row.bound = pick(-4, 9);
    m.rows.push_back(row);
  }
  for (int k = 0; k < 4; ++k) m.objective.push_back({pick(-3, 5), pick(1, m.variables), pick(0, 2) == 0});
  std::string text = "* #variable= " + std::to_string(m.variables) + " #constraint= " + std::to_string(rows) + "\nmin:";
  for (const auto& t : m.objective) text += " " + term_text(t);
  text += " ;\n";
  for (const auto& row : m.rows) {
    for (const auto& t : row.terms) text += term_text(t) + " ";
    text += row.relation + " " + std::to_string(row.bound) + " ;\n";
  }
  m.opb = text;
  return m;
}

std::int64_t sum_under(const std::vector<small_term>& terms, unsigned bits) {
  std::int64_t s = 0;
  for (const auto& t : terms) {
    const bool v = ((bits >> (t.var - 1)) & 1U) != 0;
    if (t.negated ? !v : v) s += t.coefficient;
  }
  return s;
}

// The least objective over the assignments that satisfy every row (brute
// force), none when no assignment does.
std::optional<std::int64_t> brute_optimum(const small_model& m) {
  std::optional<std::int64_t> best;
  for (unsigned bits = 0; bits < (1U << m.variables); ++bits) {
    bool ok = true;
    for (const auto& row : m.rows) {
      const std::int64_t s = sum_under(row.terms, bits);
      ok = ok && (row.relation == ">=" ? s >= row.bound : row.relation == "<=" ? s <= row.bound : s == row.bound);
    }
    if (!ok) continue;
    const std::int64_t v = sum_under(m.objective, bits);
    if (!best || v < *best) best = v;
  }
  return best;
}

// A CNF file without its comment lines.
std::string without_comments(const std::string& text) {
  std::string out;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);)
    if (line.empty() || line[0] != 'c') out += line + "\n";
  return out;
}

TEST_F(stats_cli, OpbOutputReadsBackToTheSameCnf) {
  for (std::uint64_t seed = 1; seed <= 30; ++seed) {
    SCOPED_TRACE("seed " + std::to_string(seed));
    const small_model m = small_random(seed);
    const fs::path model = write("m.opb", m.opb);
    const fs::path normalised = dir_ / "n.opb";
    const run_result w = run("encode --format opb " + quote(model.string()) + " -o " + quote(normalised.string()));
    ASSERT_EQ(w.code, 0) << w.err;
    const std::string how = seed % 3 == 0   ? "--method sequential-counter --method adder"
                            : seed % 3 == 1 ? ""
                                            : "--pick smallest";
    const fs::path a = dir_ / "a.cnf";
    const fs::path b = dir_ / "b.cnf";
    ASSERT_EQ(run("encode " + how + " " + quote(model.string()) + " -o " + quote(a.string())).code, 0);
    const run_result again = run("encode " + how + " " + quote(normalised.string()) + " -o " + quote(b.string()));
    ASSERT_EQ(again.code, 0) << again.err << read_file(normalised);
    EXPECT_EQ(without_comments(read_file(a)), without_comments(read_file(b))) << m.opb << read_file(normalised);
#ifdef CLAUSEWRIGHT_TOOL_HAS_SOLVE
    // The normalised model has the optimum brute force finds for the
    // original (solve: the embedded CaDiCaL).
    const std::optional<std::int64_t> best = brute_optimum(m);
    const run_result solved = run("solve --json " + quote(normalised.string()));
    const json j = json::parse(solved.out);
    if (best) {
      EXPECT_EQ(j["status"], "optimal") << m.opb;
      EXPECT_EQ(j["total"], *best) << m.opb << read_file(normalised);
    } else {
      EXPECT_EQ(j["status"], "unsatisfiable") << m.opb;
    }
#endif
  }
}

}  // namespace
