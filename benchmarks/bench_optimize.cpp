// The optimiser on instances of our own with independently computed optima
// (benchmarks/families.hpp, namespace optimize): one row per instance with the best
// value found, the time to within 1 % of the optimum, the time to the proof,
// and the lower bound when the search ended. Values are the minimised ones
// (for the knapsacks: the value left behind); the gap is measured on the
// scenario's own value (for the knapsacks: the value packed).
//
// Run: bench_optimize [--time-limit SECONDS] [--search linear|binary|core-guided|core-boosted]
//                     [--bound METHOD] [--rows METHOD] [--only SUBSTRING] [--no-relaxation]
// (--rows: the method of the model's weighted rows; default: the encoder's pick)
// A row marked WRONG claims an optimum that differs from the reference.
#include <chrono>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <clausewright/cadical.hpp>
#include <clausewright/lp_bound.hpp>
#include <clausewright/optimize.hpp>

#include "families.hpp"

namespace {

namespace cw = clausewright;
namespace oi = clausewright::bench::optimize;

struct settings {
  double time_limit = 10;
  cw::search_strategy search = cw::search_strategy::core_boosted;
  std::string only;
  bool relaxation = true;
  cw::bound_method bound = cw::bound_method::automatic;
  std::optional<cw::method_id> weighted;  // for the model's weighted rows
};

double gap_percent(const oi::instance& m, std::int64_t value) {
  if (!m.optimum) return NAN;
  const double reference = static_cast<double>(m.natural(*m.optimum));
  const double found = static_cast<double>(m.natural(value));
  return 100.0 * std::fabs(found - reference) / std::max(1.0, std::fabs(reference));
}

bool run(const oi::instance& m, const settings& s) {
  cw::cadical_solver solver;
  cw::variable_pool pool(m.variables);
  oi::encode(m, solver, pool, s.weighted);
  cw::optimize_options options;
  options.search = s.search;
  options.time_limit = std::chrono::duration<double>(s.time_limit);
  options.rows = m.rows;
  options.bound.method = s.bound;
  if (s.relaxation) options.relax = cw::clp_relaxation;
  std::optional<double> within;  // seconds to within 1 % of the optimum
  options.on_solution = [&](const cw::improving_solution& found) {
    if (!within && m.optimum && gap_percent(m, found.objective) <= 1.0) within = found.seconds;
  };
  const cw::objective goal(m.objective);
  const cw::optimize_result r = cw::minimize(solver, pool, goal, options);
  const bool has = r.objective.has_value();
  bool wrong = r.status == cw::optimize_status::optimal && m.optimum && *r.objective != *m.optimum;
  if (has && (!m.feasible(r.values) || m.value(r.values) != *r.objective)) wrong = true;
  if (m.optimum && r.status != cw::optimize_status::unsatisfiable && r.lower_bound > *m.optimum) wrong = true;
  char best[32] = "-";
  char gap[32] = "-";
  char near[32] = "-";
  char proof[32] = "-";
  char reference[32] = "?";
  if (has) std::snprintf(best, sizeof best, "%lld", static_cast<long long>(*r.objective));
  if (has && m.optimum) std::snprintf(gap, sizeof gap, "%.2f", gap_percent(m, *r.objective));
  if (within) std::snprintf(near, sizeof near, "%.2f", *within);
  if (r.status == cw::optimize_status::optimal) std::snprintf(proof, sizeof proof, "%.2f", r.seconds);
  if (m.optimum) std::snprintf(reference, sizeof reference, "%lld", static_cast<long long>(*m.optimum));
  std::printf("%-26s %10s %-12s %10s %8s %10s %10s %10s %-14s %8llu %10llu %-22s %s\n", m.name.c_str(), reference,
              m.reference.c_str(), best, gap, near, proof, std::to_string(r.lower_bound).c_str(),
              std::string(cw::to_string(r.status)).c_str(), static_cast<unsigned long long>(r.solves),
              static_cast<unsigned long long>(r.conflicts), std::string(cw::to_string(r.bound)).c_str(),
              wrong ? "WRONG" : "");
  std::fflush(stdout);
  return !wrong;
}

}  // namespace

int main(int argc, char** argv) {
  settings s;
  for (int i = 1; i < argc; ++i) {
    const std::string_view a = argv[i];
    const bool has_value = i + 1 < argc;
    if (a == "--time-limit" && has_value) {
      s.time_limit = std::strtod(argv[++i], nullptr);
    } else if (a == "--search" && has_value) {
      const auto found = cw::find_search_strategy(argv[++i]);
      if (!found) {
        std::fprintf(stderr, "unknown search '%s'\n", argv[i]);
        return 2;
      }
      s.search = *found;
    } else if (a == "--only" && has_value) {
      s.only = argv[++i];
    } else if (a == "--bound" && has_value) {
      const auto found = cw::find_bound_method(argv[++i]);
      if (!found) {
        std::fprintf(stderr, "unknown bound method '%s'\n", argv[i]);
        return 2;
      }
      s.bound = *found;
    } else if (a == "--rows" && has_value) {
      const auto found = cw::find_method(argv[++i]);
      if (!found) {
        std::fprintf(stderr, "unknown method '%s'\n", argv[i]);
        return 2;
      }
      s.weighted = *found;
    } else if (a == "--no-relaxation") {
      s.relaxation = false;
    } else {
      std::fprintf(stderr,
                   "usage: bench_optimize [--time-limit SECONDS] [--search STRATEGY] [--only SUBSTRING] "
                   "[--no-relaxation]\n");
      return 2;
    }
  }
  std::printf("search %s, time limit %.1f s, relaxation %s\n", std::string(cw::to_string(s.search)).c_str(),
              s.time_limit, s.relaxation ? "CLP" : "none");
  std::printf("%-26s %10s %-12s %10s %8s %10s %10s %10s %-14s %8s %10s %-22s\n", "instance", "optimum", "reference",
              "best", "gap %", "1% at s", "proved s", "lower", "status", "calls", "conflicts", "objective bound");
  using generator = oi::instance (*)();
  const std::vector<std::pair<std::string, generator>> instances{
      {"knapsack n=30", [] { return oi::knapsack(30, 30); }},
      {"knapsack n=50", [] { return oi::knapsack(50, 50); }},
      {"knapsack n=100", [] { return oi::knapsack(100, 100); }},
      {"knapsack n=200", [] { return oi::knapsack(200, 200); }},
      {"multi-knapsack n=30", [] { return oi::multi_knapsack(30, 7); }},
      {"bin packing 40 items", [] { return oi::bin_packing(10, 4, 40); }},
      {"bin packing 120 items", [] { return oi::bin_packing(30, 4, 120); }},
      {"assignment 30x5", [] { return oi::assignment(30, 5, 305); }},
      {"assignment 60x8", [] { return oi::assignment(60, 8, 608); }},
      {"rota 10 staff", [] { return oi::rota(10, 2, 4, 10); }},
  };
  bool all_right = true;
  for (const auto& [name, make] : instances) {
    if (!s.only.empty() && name.find(s.only) == std::string::npos) continue;
    all_right = run(make(), s) && all_right;
  }
  return all_right ? 0 : 1;
}
