// Weighted rows over at-most-one groups: the group methods of the table
// against the group-blind ones, on the group families of families.hpp, all
// through the library's model encoder and pipeline (run from a Release build).
//
//   bench_groups [--timeout SECONDS] [--family scheduling|multimode|assignment|all] [--sizes-only]
//
// Affected rows: those with a group of two literals or more (the resource
// rows of scheduling, the budget rows of assignment). For them it prints the
// clauses and auxiliary variables of the whole model's affected rows under
// each group-blind weighted method and each group method (asked for by
// `NAME=METHOD` rules, as `--method` does), under the default policy without
// groups (model_encoding_settings::find_groups = false) and with them, and
// which methods the default picked. Then CaDiCaL on the whole model, for the
// decision (solver.solve()) and the optimisation of the objective
// (cw::minimize with default options, as `clausewright solve`), with the
// affected rows by the best group-blind method, by the default policy without
// groups, and by the default policy with groups: status and seconds. Every
// answer is checked against the rows.
#include <cadical.hpp>
#include <chrono>
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "families.hpp"

namespace cw = clausewright;
namespace bench = clausewright::bench;

namespace {

struct configuration {
  std::string label;
  std::optional<cw::method_id> method;  // for the affected rows; none: the policy
  bool groups = true;
};

// The labels of the rows with groups, found as the model encoder finds them.
std::vector<bool> affected_rows(const bench::family_instance& f) {
  cw::at_most_one_index sets;
  std::vector<bool> out;
  for (const auto& r : f.rows) {
    cw::normalized_constraint c = cw::normalize(r.terms, r.rel, r.bound);
    if (r.group != bench::row_group::none) {
      sets.add(c.literals);
      out.push_back(false);
      continue;
    }
    cw::assign_groups(c, sets);
    out.push_back(c.has_groups());
  }
  return out;
}

cw::model_encoding_settings settings_for(const bench::family_instance& f, const std::vector<bool>& hit,
                                         const configuration& c) {
  cw::model_encoding_settings s;
  s.find_groups = c.groups;
  if (c.method)
    for (std::size_t i = 0; i < f.rows.size(); ++i)
      if (hit[i]) s.method_rules.push_back({f.rows[i].label, *c.method});
  return s;
}

struct sizes {
  std::uint64_t clauses = 0;
  std::uint64_t variables = 0;
  bool failed = false;
  std::map<std::string, int> picks;
};

sizes affected_size(const bench::family_instance& f, const cw::model& m, const std::vector<bool>& hit,
                    const configuration& c) {
  sizes out;
  cw::counting_sink sink;
  cw::variable_pool pool;
  try {
    cw::encode_model(m, sink, pool, settings_for(f, hit, c), [&](const cw::constraint_outcome& o) {
      if (!hit[o.index]) return;
      out.clauses += o.size.clauses;
      out.variables += o.size.variables;
      ++out.picks[o.method ? std::string(cw::info(*o.method).name) : "none"];
    });
  } catch (const cw::error&) {
    out.failed = true;
  }
  return out;
}

class solving_sink {
 public:
  solving_sink(cw::cadical_solver& solver, cw::objective* cost) : solver_(solver), cost_(cost) {}
  void add_clause(std::span<const cw::literal> clause) { solver_.add_clause(clause); }
  void add_objective_term(std::int64_t coefficient, cw::literal l) {
    if (cost_ != nullptr) cost_->add(coefficient, l);
  }

 private:
  cw::cadical_solver& solver_;
  cw::objective* cost_;
};

struct solved {
  std::string status;
  double seconds = 0;
  std::optional<std::int64_t> value;
};

double since(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

std::vector<bool> values_of(const cw::optimize_result& r, std::int32_t n) {
  std::vector<bool> v(static_cast<std::size_t>(n) + 1, false);
  for (std::int32_t i = 1; i <= n; ++i) v[static_cast<std::size_t>(i)] = r.value(cw::literal(i));
  return v;
}

solved decide(const bench::family_instance& f, const cw::model& m, const std::vector<bool>& hit, const configuration& c,
              double timeout) {
  const auto start = std::chrono::steady_clock::now();
  cw::cadical_solver solver;
  cw::variable_pool pool;
  solving_sink sink(solver, nullptr);
  cw::encode_model(m, sink, pool, settings_for(f, hit, c));
  solver.set_time_limit(std::chrono::duration<double>(timeout));
  const cw::solve_result r = solver.solve();
  solved s;
  s.seconds = since(start);
  if (r == cw::solve_result::satisfiable) {
    std::vector<bool> v(static_cast<std::size_t>(f.variables) + 1, false);
    for (std::int32_t i = 1; i <= f.variables; ++i) v[static_cast<std::size_t>(i)] = solver.value(cw::literal(i));
    s.status = bench::satisfies(f, v) ? "SAT" : "WRONG";
  } else {
    s.status = r == cw::solve_result::unsatisfiable ? "UNSAT" : "timeout";
  }
  return s;
}

solved optimise(const bench::family_instance& f, const cw::model& m, const std::vector<bool>& hit,
                const configuration& c, double timeout) {
  const auto start = std::chrono::steady_clock::now();
  cw::cadical_solver solver;
  cw::variable_pool pool;
  cw::objective cost;
  solving_sink sink(solver, &cost);
  cw::encode_model(m, sink, pool, settings_for(f, hit, c));
  cw::optimize_options options;
  options.time_limit =
      std::chrono::duration_cast<std::chrono::steady_clock::duration>(std::chrono::duration<double>(timeout));
  const cw::optimize_result r = cw::minimize(solver, pool, cost, options);
  solved s;
  s.seconds = since(start);
  if (r.objective) {
    const std::vector<bool> v = values_of(r, f.variables);
    const bool ok = bench::satisfies(f, v) && bench::objective_value(f, v) == *r.objective;
    s.status = !ok ? "WRONG" : (r.status == cw::optimize_status::optimal ? "optimal" : "feasible");
    s.value = r.objective;
  } else {
    s.status = r.status == cw::optimize_status::unsatisfiable ? "UNSAT" : "timeout";
  }
  return s;
}

std::string cell(const solved& s) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%s %.2fs", s.status.c_str(), s.seconds);
  std::string out = buf;
  if (s.value) out += " =" + std::to_string(*s.value);
  return out;
}

}  // namespace

int main(int argc, char** argv) {
  double timeout = 10;
  std::string family = "all";
  bool solve = true;
  for (int i = 1; i < argc; ++i) {
    const std::string_view a = argv[i];
    if (a == "--timeout" && i + 1 < argc) {
      timeout = std::atof(argv[++i]);
    } else if (a == "--sizes-only") {
      solve = false;
    } else if (a == "--family" && i + 1 < argc) {
      family = argv[++i];
    } else {
      std::fprintf(
          stderr,
          "usage: bench_groups [--timeout SECONDS] [--family scheduling|multimode|assignment|all] [--sizes-only]\n");
      return 2;
    }
  }
  std::vector<bench::family_instance> instances;
  if (family == "all" || family == "scheduling") {
    // jobs, horizon, resources, shortest and longest duration, capacity (% of the average load)
    const int shapes[][6] = {{10, 20, 1, 1, 6, 130}, {15, 30, 1, 1, 6, 130},  {20, 40, 1, 1, 6, 130},
                             {20, 40, 2, 1, 6, 130}, {25, 50, 1, 1, 6, 130},  {30, 60, 1, 1, 6, 130},
                             {30, 60, 2, 1, 6, 130}, {15, 30, 1, 1, 6, 105},  {20, 40, 2, 1, 6, 105},
                             {30, 60, 1, 1, 6, 105}, {20, 40, 1, 3, 10, 130}, {30, 60, 2, 3, 10, 130},
                             {25, 50, 1, 3, 10, 105}};
    std::uint64_t seed = 1;
    for (const auto& p : shapes)
      instances.push_back(bench::group_scheduling(p[0], p[1], p[2], 1, seed++, p[3], p[4], p[5]));
  }
  if (family == "all" || family == "multimode") {
    const int shapes[][4] = {{10, 30, 1, 2}, {15, 40, 1, 3}, {20, 50, 2, 2}};
    std::uint64_t seed = 11;
    for (const auto& p : shapes) instances.push_back(bench::group_scheduling(p[0], p[1], p[2], p[3], seed++));
  }
  if (family == "all" || family == "assignment") {
    const int shapes[][2] = {{30, 5}, {60, 8}, {100, 10}};
    std::uint64_t seed = 21;
    for (const auto& p : shapes) instances.push_back(bench::group_assignment(p[0], p[1], seed++));
  }
  const std::vector<cw::method_id> blind{cw::method_id::bdd, cw::method_id::adder, cw::method_id::generalized_totalizer,
                                         cw::method_id::sequential_weight_counter};
  struct tally {
    int instances = 0;
    double decision[3] = {0, 0, 0};  // seconds per configuration
    int optimal[3] = {0, 0, 0};
    std::int64_t best[3] = {0, 0, 0};  // sum of the best objective values reached
    int faster = 0;                    // decision + optimisation: default with groups no slower than both others
    double ratio_low = 1e9;
    double ratio_high = 0;
  };
  std::map<std::string, tally> tallies;
  for (const auto& f : instances) {
    const cw::model m = bench::to_model(f);
    const std::vector<bool> hit = affected_rows(f);
    int rows = 0;
    for (const bool h : hit) rows += h ? 1 : 0;
    std::printf("\n== %s: %d variables, %zu rows, %d affected\n", f.name.c_str(), f.variables, f.rows.size(), rows);
    std::printf("  %-40s %12s %12s\n", "affected rows by", "clauses", "aux vars");
    std::optional<cw::method_id> best;
    std::uint64_t best_clauses = 0;
    auto show = [&](const std::string& label, const sizes& s) {
      if (s.failed)
        std::printf("  %-40s %12s\n", label.c_str(), "over budget");
      else
        std::printf("  %-40s %12llu %12llu\n", label.c_str(), static_cast<unsigned long long>(s.clauses),
                    static_cast<unsigned long long>(s.variables));
    };
    for (const auto& i : cw::method_table) {
      const bool is_blind = std::find(blind.begin(), blind.end(), i.id) != blind.end();
      if (!is_blind && !i.needs_groups) continue;
      const sizes s = affected_size(f, m, hit, {std::string(i.name), i.id, true});
      show(std::string(i.name), s);
      if (is_blind && !s.failed && (!best || s.clauses < best_clauses)) {
        best = i.id;
        best_clauses = s.clauses;
      }
    }
    const sizes no_groups = affected_size(f, m, hit, {"default", std::nullopt, false});
    const sizes with_groups = affected_size(f, m, hit, {"default", std::nullopt, true});
    show("default policy, no groups", no_groups);
    show("default policy, groups", with_groups);
    std::string picked;
    for (const auto& [name, n] : with_groups.picks) picked += " " + name + " x" + std::to_string(n);
    std::printf("  default picks:%s\n", picked.c_str());
    tally& t = tallies[f.family];
    ++t.instances;
    if (best && with_groups.clauses != 0) {
      const double ratio = static_cast<double>(best_clauses) / static_cast<double>(with_groups.clauses);
      std::printf(
          "  best group-blind (%s) / default with groups: %.2fx clauses; default without / with groups: %.2fx\n",
          cw::info(*best).name.data(), ratio,
          static_cast<double>(no_groups.clauses) / static_cast<double>(with_groups.clauses));
      t.ratio_low = std::min(t.ratio_low, ratio);
      t.ratio_high = std::max(t.ratio_high, ratio);
    }
    if (!solve) continue;
    const std::vector<configuration> runs{
        {"best group-blind " + std::string(best ? cw::info(*best).name : "?"), best, false},
        {"default, no groups", std::nullopt, false},
        {"default, groups", std::nullopt, true}};
    std::printf("  %-40s %-24s %-30s\n", "CaDiCaL", "decision", "optimisation (minimize)");
    double total[3] = {0, 0, 0};
    for (std::size_t k = 0; k < runs.size(); ++k) {
      const solved d = decide(f, m, hit, runs[k], timeout);
      const solved o = optimise(f, m, hit, runs[k], timeout);
      total[k] = d.seconds + o.seconds;
      t.decision[k] += d.seconds;
      t.optimal[k] += o.status == "optimal" ? 1 : 0;
      t.best[k] += o.value.value_or(0);
      std::printf("  %-40s %-24s %-30s\n", runs[k].label.c_str(), cell(d).c_str(), cell(o).c_str());
      std::fflush(stdout);
    }
    if (total[2] <= std::min(total[0], total[1])) ++t.faster;
  }
  if (!solve) return 0;
  std::printf(
      "\nper family: best group-blind / default with groups (clauses of the affected rows); CaDiCaL over "
      "[best group-blind, default without groups, default with groups]\n");
  for (const auto& [fam, t] : tallies)
    std::printf(
        "%-11s %2d instances: clauses %.2fx..%.2fx; decision %.2f/%.2f/%.2f s; optimal %d/%d/%d; sum of best "
        "objectives %lld/%lld/%lld; with groups fastest in total on %d of %d\n",
        fam.c_str(), t.instances, t.ratio_low, t.ratio_high, t.decision[0], t.decision[1], t.decision[2], t.optimal[0],
        t.optimal[1], t.optimal[2], static_cast<long long>(t.best[0]), static_cast<long long>(t.best[1]),
        static_cast<long long>(t.best[2]), t.faster, t.instances);
  return 0;
}
