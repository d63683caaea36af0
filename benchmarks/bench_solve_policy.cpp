// Which encoding the solver does best with: every instance of the generated
// families (families.hpp) encoded into CaDiCaL once per method and solved
// with a time limit. At-most-one and exactly-one rows always take the
// default policy's pick; the cardinality and weighted rows take the column's
// method (where it does not apply, the default's pick), or the pick of the
// default policy (balanced), or the rule proposed below.
//
// Every answer is checked: a model must satisfy the original rows (evaluated
// here on the user's terms), and an instance whose status is known by
// construction (see families.hpp for each argument) must get that answer.
//
// Printed: a table per instance (clauses, variables, encode and solve
// seconds, the answer), and per family and overall the geometric mean of the
// solve seconds per method (floored at 0.01 s; a timeout counts at the limit)
// with its ratio to the best single method in hindsight, and the instances
// where a method times out while another solves them in under a second.
// Seconds are processor time of the benchmark's thread (the machine may be
// shared; the wall time of each solve is printed beside it), and the limit is
// processor time too, with a wall-clock backstop (--wall-factor, default 4
// times the limit). A column whose formula equals an earlier column's (the
// same method on every row) reuses that run.
//
// Run: bench_solve_policy [--limit SECONDS] [--family NAME] [--quick]
//                         [--json FILE] [--seed N] [--write-opb DIR] [--list]
//                         [--columns NAME,...] [--rule VARIANT] [--wall-factor F]
//   --quick       two instances per family, limit 2 s (a smoke run, under a
//                 minute on an idle machine)
//   --seed N      shifts every generator seed (a fresh sample of each family)
//   --write-opb   writes every instance as DIR/NAME.opb (for the tool)
//   --columns     runs only the named columns (method names, default, proposed)
//   --rule        a variant of the proposed rule measured on the way (below)
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include <time.h>

#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>

#include "families.hpp"

namespace cw = clausewright;
namespace cb = clausewright::bench;

namespace {

using seconds_clock = std::chrono::steady_clock;

double since(seconds_clock::time_point start) {
  return std::chrono::duration<double>(seconds_clock::now() - start).count();
}

// Processor time of this thread: the machine is shared, so wall time would
// measure the other processes as much as the solver.
double thread_seconds() {
  timespec now{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &now);
  return static_cast<double>(now.tv_sec) + static_cast<double>(now.tv_nsec) * 1e-9;
}

// Stops CaDiCaL (through its terminate callback) when this thread has used
// `limit` seconds of processor time, or a wall-clock backstop has passed.
class processor_limit final : public CaDiCaL::Terminator {
 public:
  processor_limit(double limit, double wall_factor)
      : deadline_(thread_seconds() + limit),
        wall_deadline_(seconds_clock::now() + std::chrono::duration_cast<seconds_clock::duration>(
                                                  std::chrono::duration<double>(limit * wall_factor))) {}
  bool terminate() override { return thread_seconds() >= deadline_ || seconds_clock::now() >= wall_deadline_; }

 private:
  double deadline_;
  seconds_clock::time_point wall_deadline_;
};

const cw::method_measurement* find_measurement(std::span<const cw::method_measurement> measured, cw::method_id id) {
  for (const auto& m : measured)
    if (m.method == id && !m.over_budget) return &m;
  return nullptr;
}

// The rule proposed for the default policy, from the figures of this
// benchmark (written up beside it). `measured` are the dry runs of every
// applicable method. Weighted rows only; every other kind keeps the
// balanced pick, which was within 1.1x of the best on the cardinality rows.
//   - Never the adder while an arc-consistent method is within budget: its
//     missing propagation cost 5-30x in solve time on the knapsack rows,
//     where the balanced policy picked it for being 4-8x smaller.
//   - The sequential weight counter for a long row (n >= 100) with many
//     distinct coefficients (>= 10), when it is at most 4x the BDD's clauses:
//     it keeps the input order, and on the assignment cost row (each task's
//     machines adjacent, each with its own cost) that order is what solves;
//     the same counter over the BDD's order (decreasing coefficients) timed
//     out like the BDD.
//   - Otherwise the BDD (fastest on the knapsack, bin and resource rows).
// `--rule` selects the variants measured on the way (bdd, swc-long,
// swc-short, swc-long-sorted).
std::string rule_variant = "final";

cw::method_id proposed_pick(const cw::normalized_constraint& c, std::span<const cw::method_measurement> measured) {
  const auto balanced = cw::pick(measured, cw::selection_policy::balanced, c);
  if (c.kind != cw::constraint_kind::linear) return balanced;
  const auto* bdd = find_measurement(measured, cw::method_id::bdd);
  const auto* swc = find_measurement(measured, cw::method_id::sequential_weight_counter);
  const auto* gt = find_measurement(measured, cw::method_id::generalized_totalizer);
  if (rule_variant == "bdd") return bdd != nullptr ? cw::method_id::bdd : balanced;
  if (rule_variant == "swc-long" || rule_variant == "swc-long-sorted")
    return c.size() >= 100 ? cw::method_id::sequential_weight_counter : cw::method_id::bdd;
  if (rule_variant == "swc-short")
    return c.size() >= 100 ? cw::method_id::bdd : cw::method_id::sequential_weight_counter;

  std::vector<std::int64_t> distinct(c.coefficients);
  std::sort(distinct.begin(), distinct.end());
  distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
  if (swc != nullptr && c.size() >= 100 && distinct.size() >= 10 &&
      (bdd == nullptr || swc->size.clauses <= 4 * bdd->size.clauses))
    return cw::method_id::sequential_weight_counter;
  if (bdd != nullptr) return cw::method_id::bdd;
  // The BDD over budget: the smaller of the other arc-consistent ones.
  if (swc != nullptr && (gt == nullptr || swc->size.clauses <= gt->size.clauses))
    return cw::method_id::sequential_weight_counter;
  if (gt != nullptr) return cw::method_id::generalized_totalizer;
  return balanced;
}

enum class column_kind : std::uint8_t { single, default_policy, proposed };

struct column {
  std::string name;
  column_kind kind = column_kind::single;
  cw::method_id method = cw::method_id::bdd;
};

std::vector<column> all_columns() {
  std::vector<column> out;
  for (const auto id : {cw::method_id::bdd, cw::method_id::adder, cw::method_id::generalized_totalizer,
                        cw::method_id::sequential_weight_counter, cw::method_id::totalizer,
                        cw::method_id::cardinality_network, cw::method_id::sequential_counter})
    out.push_back({std::string(cw::info(id).name), column_kind::single, id});
  out.push_back({"default", column_kind::default_policy, cw::method_id::bdd});
  out.push_back({"proposed", column_kind::proposed, cw::method_id::bdd});
  return out;
}

enum class outcome : std::uint8_t { sat, unsat, timeout, too_large, not_applicable };

const char* to_string(outcome o) {
  switch (o) {
    case outcome::sat:
      return "SAT";
    case outcome::unsat:
      return "UNSAT";
    case outcome::timeout:
      return "timeout";
    case outcome::too_large:
      return "too-large";
    case outcome::not_applicable:
      return "n/a";
  }
  return "?";
}

struct run_result {
  outcome result = outcome::not_applicable;
  std::uint64_t clauses = 0;
  std::int64_t variables = 0;
  double encode_seconds = 0;
  double solve_seconds = 0;        // processor time
  double solve_wall_seconds = 0;   // wall time, for comparison
  bool checked = true;             // the answer passed every check
  std::string picks;               // methods used on the non-group rows
  std::size_t same_as = SIZE_MAX;  // result copied from this column (same formula)
};

struct instance_result {
  const cb::family_instance* instance = nullptr;
  std::string shape;
  double select_seconds = 0;
  std::vector<run_result> runs;  // one per column
};

struct options {
  double limit = 5;
  std::string family;
  bool quick = false;
  std::string json;
  std::uint64_t seed = 0;
  std::string opb_dir;
  std::string columns;  // comma-separated column names to run (empty: all)
  bool list = false;
  double wall_factor = 4;                 // wall-clock backstop: this many times the limit
  std::uint64_t clause_cap = 20'000'000;  // larger formulas are not solved (counted at the limit)
};

// A modest set: each instance solvable in a few seconds by some method.
// `seed` shifts every generator seed, for a second sample.
std::vector<cb::family_instance> benchmark_set(bool quick, std::uint64_t seed) {
  std::vector<cb::family_instance> out;
  // Bin packing: exactly filled bins (SAT), one unit over the volume (UNSAT),
  // and the bins-used objective bounded at the optimum and one below.
  for (const std::uint64_t s : {1, 2}) {
    const std::uint64_t seed_s = s + seed;
    out.push_back(cb::bin_packing({3, 100, 5, 0, 0, seed_s}));
    out.push_back(cb::bin_packing({3, 100, 5, 0, 1, seed_s}));
    if (quick) break;
    out.push_back(cb::bin_packing({4, 60, 4, 0, 0, seed_s}));
    out.push_back(cb::bin_packing({4, 60, 4, 0, 1, seed_s}));
  }
  if (!quick) {
    const auto opt = cb::bin_packing({3, 80, 4, 1, 0, 3 + seed});
    out.push_back(cb::with_objective_bound(opt, 3));
    out.push_back(cb::with_objective_bound(opt, 2));
  }
  // Multi-knapsack at the optimum (SAT) and one above (UNSAT); the last pair
  // has one capacity row and large coefficients (where a BDD grows).
  for (const auto& [n, m, max_weight, max_value] :
       {std::tuple<std::int64_t, std::int64_t, std::int64_t, std::int64_t>{18, 2, 30, 60},
        {24, 2, 30, 60},
        {24, 3, 20, 60},
        {30, 2, 30, 60},
        {26, 1, 5000, 5000}}) {
    for (const std::int64_t offset : {0, 1}) {
      cb::knapsack_params p;
      p.items = n;
      p.rows = m;
      p.max_weight = max_weight;
      p.max_value = max_value;
      p.target_offset = offset;
      p.seed = static_cast<std::uint64_t>(n) + seed;
      out.push_back(cb::multi_knapsack(p));
    }
    if (quick) break;
  }
  // Rota: the least feasible working-day limit (SAT) and one less (UNSAT).
  // The UNSAT side is a counting argument, hard for a SAT solver beyond a
  // dozen people, so the larger ones are SAT only.
  enum which : std::uint8_t { both, sat_only, unsat_only };
  const auto offsets = [](which w, std::int64_t unsat) {
    if (w == both) return std::vector<std::int64_t>{0, unsat};
    if (w == sat_only) return std::vector<std::int64_t>{0};
    return std::vector<std::int64_t>{unsat};
  };
  for (const auto& [people, days, shifts, demand, eo, w] :
       {std::tuple<std::int64_t, std::int64_t, std::int64_t, std::int64_t, bool, which>{10, 7, 2, 2, false, both},
        {12, 7, 2, 2, false, both},
        {9, 10, 2, 2, true, both},
        {14, 7, 3, 2, false, sat_only},
        {12, 14, 2, 2, true, sat_only},
        {20, 7, 3, 3, false, sat_only}}) {
    for (const std::int64_t offset : offsets(w, -1)) {
      cb::rota_params p;
      p.people = people;
      p.days = days;
      p.shifts = shifts;
      p.demand = demand;
      p.max_days = 0;
      p.max_days_offset = offset;
      p.off_variable = eo;
      p.seed = static_cast<std::uint64_t>(people + days) + seed;
      out.push_back(cb::rota(p));
    }
    if (quick) break;
  }
  // Time-indexed scheduling at the exact horizon (SAT) and one step shorter
  // (UNSAT by energy, again hard beyond a dozen jobs).
  for (const auto& [jobs, horizon, capacity, w] :
       {std::tuple<std::int64_t, std::int64_t, std::int64_t, which>{10, 20, 5, both},
        {12, 24, 5, unsat_only},
        {14, 30, 6, both},
        {20, 40, 8, sat_only},
        {26, 60, 8, sat_only}}) {
    for (const std::int64_t offset : offsets(w, -1)) {
      cb::scheduling_params p;
      p.jobs = jobs;
      p.horizon = horizon;
      p.capacity = capacity;
      p.horizon_offset = offset;
      p.seed = static_cast<std::uint64_t>(jobs) + seed;
      out.push_back(cb::scheduling(p));
    }
    if (quick) break;
  }
  // Weighted assignment: budget at the optimum (SAT) and one below (UNSAT).
  for (const auto& [tasks, machines, slack, w] :
       {std::tuple<std::int64_t, std::int64_t, std::int64_t, which>{30, 5, 10, both},
        {40, 5, 20, both},
        {50, 6, 5, both},
        {60, 6, 20, sat_only}}) {
    for (const std::int64_t offset : offsets(w, -1)) {
      cb::assignment_params p;
      p.tasks = tasks;
      p.machines = machines;
      p.capacity_slack = slack;
      p.budget_offset = offset;
      p.seed = static_cast<std::uint64_t>(tasks) + seed;
      out.push_back(cb::weighted_assignment(p));
    }
    if (quick) break;
  }
  return out;
}

// "15 exactly-one, 3 linear (n 15, a 1..60, k 100)" and so on.
std::string describe_shape(const std::vector<cw::normalized_constraint>& rows) {
  struct stats {
    std::size_t count = 0;
    std::size_t n_min = SIZE_MAX, n_max = 0;
    std::int64_t a_min = INT64_MAX, a_max = 0, k_min = INT64_MAX, k_max = 0;
  };
  std::map<std::string, stats> by_kind;
  for (const auto& c : rows) {
    if (c.kind == cw::constraint_kind::constant_true) continue;
    auto& s = by_kind[std::string(cw::to_string(c.kind)) + " " + std::string(cw::to_string(c.rel))];
    ++s.count;
    s.n_min = std::min(s.n_min, c.size());
    s.n_max = std::max(s.n_max, c.size());
    for (const auto a : c.coefficients) {
      s.a_min = std::min(s.a_min, a);
      s.a_max = std::max(s.a_max, a);
    }
    s.k_min = std::min(s.k_min, c.bound);
    s.k_max = std::max(s.k_max, c.bound);
  }
  std::string out;
  for (const auto& [kind, s] : by_kind) {
    if (!out.empty()) out += "; ";
    out += std::to_string(s.count) + " " + kind + " (n " + std::to_string(s.n_min);
    if (s.n_max != s.n_min) out += ".." + std::to_string(s.n_max);
    if (kind.rfind("linear", 0) == 0) out += ", a " + std::to_string(s.a_min) + ".." + std::to_string(s.a_max);
    if (kind.rfind("linear", 0) == 0 || kind.rfind("cardinality", 0) == 0) {
      out += ", k " + std::to_string(s.k_min);
      if (s.k_max != s.k_min) out += ".." + std::to_string(s.k_max);
    }
    out += ")";
  }
  return out;
}

bool is_group(const cw::normalized_constraint& c) {
  return c.kind == cw::constraint_kind::at_most_one || c.kind == cw::constraint_kind::exactly_one;
}
bool row_needs_method(const cw::normalized_constraint& c) {
  return c.kind == cw::constraint_kind::at_most_one || c.kind == cw::constraint_kind::exactly_one ||
         c.kind == cw::constraint_kind::cardinality || c.kind == cw::constraint_kind::linear;
}

instance_result run_instance(const cb::family_instance& f, const std::vector<column>& columns, const options& opt,
                             int& failures) {
  instance_result out;
  out.instance = &f;
  std::vector<cw::normalized_constraint> rows;
  rows.reserve(f.rows.size());
  for (std::size_t i = 0; i < f.rows.size(); ++i)
    rows.push_back(cw::normalize(f.rows[i].terms, f.rows[i].rel, f.rows[i].bound, i, f.rows[i].label));
  out.shape = describe_shape(rows);
  const cw::model as_model = cb::to_model(f);

  // Dry runs of every applicable method per row: the default and the
  // proposed rule choose from them, and they give each column's size before
  // anything is solved.
  const cw::variable_pool start_pool(f.variables);
  std::vector<std::vector<cw::method_measurement>> measured(rows.size());
  std::vector<cw::method_id> default_pick(rows.size(), cw::method_id::pairwise);
  std::vector<cw::method_id> proposed(rows.size(), cw::method_id::pairwise);
  const double select_start = thread_seconds();
  for (std::size_t i = 0; i < rows.size(); ++i) {
    if (!row_needs_method(rows[i])) continue;
    measured[i] = cw::measure_all(start_pool, rows[i]);
    default_pick[i] = cw::pick(measured[i], cw::selection_policy::balanced, rows[i]);
    proposed[i] = proposed_pick(rows[i], measured[i]);
  }
  out.select_seconds = thread_seconds() - select_start;

  std::vector<std::vector<cw::method_id>> assignment;
  for (const column& col : columns) {
    std::vector<cw::method_id> a(rows.size(), cw::method_id::pairwise);
    bool applies = col.kind != column_kind::single;
    for (std::size_t i = 0; i < rows.size(); ++i) {
      if (!row_needs_method(rows[i])) continue;
      a[i] = default_pick[i];
      if (col.kind == column_kind::proposed) a[i] = proposed[i];
      if (col.kind == column_kind::single && !is_group(rows[i]) && cw::can_encode(col.method, rows[i])) {
        a[i] = col.method;
        applies = true;
      }
    }
    if (!applies) a.clear();
    assignment.push_back(std::move(a));
  }

  for (std::size_t k = 0; k < columns.size(); ++k) {
    run_result r;
    if (assignment[k].empty()) {
      out.runs.push_back(r);
      continue;
    }
    std::map<std::string, int> picks;
    std::uint64_t predicted = 0;
    bool over = false;
    for (std::size_t i = 0; i < rows.size(); ++i) {
      if (!row_needs_method(rows[i])) continue;
      if (!is_group(rows[i])) ++picks[std::string(cw::info(assignment[k][i]).name)];
      const auto* m = find_measurement(measured[i], assignment[k][i]);
      if (m == nullptr)
        over = true;
      else
        predicted += m->size.clauses;
    }
    for (const auto& [name, count] : picks) {
      if (!r.picks.empty()) r.picks += ' ';
      r.picks += name + "x" + std::to_string(count);
    }
    for (std::size_t j = 0; j < k; ++j)
      if (assignment[j] == assignment[k] && out.runs[j].same_as == SIZE_MAX) {
        const std::string picks_k = r.picks;
        r = out.runs[j];
        r.picks = picks_k;
        r.same_as = j;
        break;
      }
    if (r.same_as != SIZE_MAX) {
      out.runs.push_back(r);
      continue;
    }
    if (over || predicted > opt.clause_cap) {
      r.result = outcome::too_large;
      r.clauses = predicted;
      out.runs.push_back(r);
      continue;
    }
    cw::cadical_solver solver;
    cw::variable_pool pool(f.variables);
    const double encode_start = thread_seconds();
    for (std::size_t i = 0; i < rows.size(); ++i) {
      if (columns[k].kind == column_kind::proposed && rule_variant == "swc-long-sorted" && rows[i].size() >= 100) {
        // Experiment: the counter over the inputs in decreasing coefficient
        // order (the BDD's order) instead of the input order.
        cw::normalized_constraint sorted = rows[i];
        std::vector<std::size_t> order(sorted.size());
        for (std::size_t j = 0; j < order.size(); ++j) order[j] = j;
        std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
          return rows[i].coefficients[a] > rows[i].coefficients[b];
        });
        for (std::size_t j = 0; j < order.size(); ++j) {
          sorted.literals[j] = rows[i].literals[order[j]];
          sorted.coefficients[j] = rows[i].coefficients[order[j]];
        }
        cw::encode_with(assignment[k][i], solver, pool, sorted);
        continue;
      }
      cw::encode_with(assignment[k][i], solver, pool, rows[i]);
    }
    r.encode_seconds = thread_seconds() - encode_start;
    if (columns[k].kind != column_kind::single) r.encode_seconds += out.select_seconds;
    r.clauses = solver.statistics().clauses;
    r.variables = pool.top();
    processor_limit stop(opt.limit, opt.wall_factor);
    solver.native().connect_terminator(&stop);
    const auto wall_start = seconds_clock::now();
    const double solve_start = thread_seconds();
    const cw::solve_result answer = solver.solve();
    r.solve_seconds = thread_seconds() - solve_start;
    r.solve_wall_seconds = since(wall_start);
    solver.native().disconnect_terminator();
    if (answer == cw::solve_result::satisfiable) {
      r.result = outcome::sat;
      const std::vector<bool> values = solver.model(f.variables);
      std::size_t bad = 0;
      if (!cb::satisfies(f, values, &bad)) {
        r.checked = false;
        std::printf("CHECK FAILED: %s with %s: the model violates row %zu (%s)\n", f.name.c_str(),
                    columns[k].name.c_str(), bad, f.rows[bad].label.c_str());
      }
      // The same answer through the cw::model writer (the tool's evaluation).
      const auto violated = as_model.check([&](std::int32_t v) { return values.at(static_cast<std::size_t>(v)); });
      if (!violated.empty()) {
        r.checked = false;
        std::printf("CHECK FAILED: %s with %s: the cw::model of the instance has %zu violated rows\n", f.name.c_str(),
                    columns[k].name.c_str(), violated.size());
      }
      if (f.status == cb::known_status::unsat) r.checked = false;
    } else if (answer == cw::solve_result::unsatisfiable) {
      r.result = outcome::unsat;
      if (f.status == cb::known_status::sat) r.checked = false;
    } else {
      r.result = outcome::timeout;
    }
    if (!r.checked) {
      ++failures;
      std::printf("CHECK FAILED: %s with %s answered %s, expected %s\n", f.name.c_str(), columns[k].name.c_str(),
                  to_string(r.result), cb::to_string(f.status));
    }
    out.runs.push_back(r);
  }
  return out;
}

bool solved(const run_result& r) { return r.result == outcome::sat || r.result == outcome::unsat; }

// Solve seconds for the means: floored at 0.01 s, the limit when unsolved.
double scored(const run_result& r, double limit) { return solved(r) ? std::max(r.solve_seconds, 0.01) : limit; }
double scored_total(const run_result& r, double limit) {
  return solved(r) ? std::max(r.solve_seconds + r.encode_seconds, 0.01) : limit;
}

void print_instance(const instance_result& ir, const std::vector<column>& columns) {
  const cb::family_instance& f = *ir.instance;
  std::printf("\n%s  [%s, expected %s, %d variables, %zu rows; dry runs %.3f s]\n  %s\n", f.name.c_str(),
              f.family.c_str(), cb::to_string(f.status), f.variables, f.rows.size(), ir.select_seconds,
              ir.shape.c_str());
  std::printf("  %-26s %10s %9s %8s %8s %8s  %-9s %s\n", "method", "clauses", "vars", "enc s", "solve s", "wall s",
              "result", "picks");
  for (std::size_t k = 0; k < columns.size(); ++k) {
    const run_result& r = ir.runs[k];
    if (r.result == outcome::not_applicable) continue;
    std::string note = r.picks;
    if (r.same_as != SIZE_MAX) note += " (same formula as " + columns[r.same_as].name + ")";
    if (!r.checked) note += " WRONG";
    std::printf("  %-26s %10llu %9lld %8.3f %8.3f %8.3f  %-9s %s\n", columns[k].name.c_str(),
                static_cast<unsigned long long>(r.clauses), static_cast<long long>(r.variables), r.encode_seconds,
                r.solve_seconds, r.solve_wall_seconds, to_string(r.result), note.c_str());
  }
  std::fflush(stdout);
}

struct summary_line {
  std::string name;
  std::size_t instances = 0;
  std::size_t solved = 0;
  double geo_solve = 0;
  double geo_total = 0;
  bool all_applicable = true;
};

std::vector<summary_line> summarize(const std::vector<const instance_result*>& set, const std::vector<column>& columns,
                                    double limit) {
  std::vector<summary_line> out;
  for (std::size_t k = 0; k < columns.size(); ++k) {
    summary_line s;
    s.name = columns[k].name;
    double log_solve = 0;
    double log_total = 0;
    for (const auto* ir : set) {
      const run_result& r = ir->runs[k];
      if (r.result == outcome::not_applicable) {
        s.all_applicable = false;
        continue;
      }
      ++s.instances;
      if (solved(r)) ++s.solved;
      log_solve += std::log(scored(r, limit));
      log_total += std::log(scored_total(r, limit));
    }
    if (s.instances > 0) {
      s.geo_solve = std::exp(log_solve / static_cast<double>(s.instances));
      s.geo_total = std::exp(log_total / static_cast<double>(s.instances));
    }
    out.push_back(s);
  }
  return out;
}

void print_summary(const std::string& title, const std::vector<const instance_result*>& set,
                   const std::vector<column>& columns, double limit) {
  const auto lines = summarize(set, columns, limit);
  double best_solve = 0;
  double best_total = 0;
  std::string best_solve_name;
  std::string best_total_name;
  for (std::size_t k = 0; k < columns.size(); ++k) {
    const auto& s = lines[k];
    if (columns[k].kind != column_kind::single || !s.all_applicable || s.instances == 0) continue;
    if (best_solve_name.empty() || s.geo_solve < best_solve) {
      best_solve = s.geo_solve;
      best_solve_name = s.name;
    }
    if (best_total_name.empty() || s.geo_total < best_total) {
      best_total = s.geo_total;
      best_total_name = s.name;
    }
  }
  std::printf("\n== %s: %zu instances; geometric mean seconds (floor 0.01, unsolved = %.1f)\n", title.c_str(),
              set.size(), limit);
  std::printf("   best single method: %s (solve), %s (encode + solve)\n", best_solve_name.c_str(),
              best_total_name.c_str());
  std::printf("   %-26s %6s %7s %9s %7s %11s %7s\n", "method", "inst", "solved", "solve", "ratio", "enc+solve",
              "ratio");
  for (const auto& s : lines) {
    if (s.instances == 0) continue;
    std::printf("   %-26s %6zu %7zu %9.3f %7.2f %11.3f %7.2f%s\n", s.name.c_str(), s.instances, s.solved, s.geo_solve,
                best_solve > 0 ? s.geo_solve / best_solve : 0.0, s.geo_total,
                best_total > 0 ? s.geo_total / best_total : 0.0, s.all_applicable ? "" : "  (where it applies)");
  }
}

void print_misses(const std::vector<instance_result>& results, const std::vector<column>& columns) {
  std::printf("\n== unsolved by a method while another solves it in under 1 s\n");
  bool any = false;
  for (const auto& ir : results) {
    const run_result* fastest = nullptr;
    std::size_t fastest_k = 0;
    for (std::size_t k = 0; k < columns.size(); ++k) {
      const auto& r = ir.runs[k];
      if (solved(r) && (fastest == nullptr || r.solve_seconds < fastest->solve_seconds)) {
        fastest = &r;
        fastest_k = k;
      }
    }
    if (fastest == nullptr || fastest->solve_seconds >= 1.0) continue;
    for (std::size_t k = 0; k < columns.size(); ++k) {
      const auto& r = ir.runs[k];
      if (r.result != outcome::timeout && r.result != outcome::too_large) continue;
      any = true;
      std::printf("   %-28s %-26s %-9s (%s: %.3f s)\n", ir.instance->name.c_str(), columns[k].name.c_str(),
                  to_string(r.result), columns[fastest_k].name.c_str(), fastest->solve_seconds);
    }
  }
  if (!any) std::printf("   none\n");
}

void write_json(const std::string& path, const std::vector<instance_result>& results,
                const std::vector<column>& columns, const options& opt) {
  std::FILE* out = std::fopen(path.c_str(), "w");
  if (out == nullptr) {
    std::fprintf(stderr, "bench_solve_policy: cannot write %s\n", path.c_str());
    return;
  }
  std::fprintf(out, "{\"limit\": %g, \"seed\": %llu, \"instances\": [\n", opt.limit,
               static_cast<unsigned long long>(opt.seed));
  for (std::size_t i = 0; i < results.size(); ++i) {
    const auto& ir = results[i];
    std::fprintf(out, "  {\"name\": \"%s\", \"family\": \"%s\", \"expected\": \"%s\", \"shape\": \"%s\", \"runs\": [",
                 ir.instance->name.c_str(), ir.instance->family.c_str(), cb::to_string(ir.instance->status),
                 ir.shape.c_str());
    bool first = true;
    for (std::size_t k = 0; k < columns.size(); ++k) {
      const auto& r = ir.runs[k];
      if (r.result == outcome::not_applicable) continue;
      std::fprintf(out,
                   "%s\n    {\"method\": \"%s\", \"clauses\": %llu, \"variables\": %lld, \"encode_seconds\": %.6f, "
                   "\"solve_seconds\": %.6f, \"solve_wall_seconds\": %.6f, \"result\": \"%s\", \"checked\": %s, "
                   "\"picks\": \"%s\"}",
                   first ? "" : ",", columns[k].name.c_str(), static_cast<unsigned long long>(r.clauses),
                   static_cast<long long>(r.variables), r.encode_seconds, r.solve_seconds, r.solve_wall_seconds,
                   to_string(r.result), r.checked ? "true" : "false", r.picks.c_str());
      first = false;
    }
    std::fprintf(out, "]}%s\n", i + 1 < results.size() ? "," : "");
  }
  std::fprintf(out, "]}\n");
  std::fclose(out);
}

int usage() {
  std::fprintf(stderr,
               "usage: bench_solve_policy [--limit SECONDS] [--family NAME] [--quick] [--json FILE] [--seed N]\n"
               "                          [--write-opb DIR] [--list] [--columns NAME,...] [--rule VARIANT]\n"
               "                          [--wall-factor F]\n"
               "families: bin-packing, multi-knapsack, rota, scheduling, assignment\n");
  return 2;
}

}  // namespace

int main(int argc, char** argv) {
  options opt;
  for (int i = 1; i < argc; ++i) {
    const std::string_view a = argv[i];
    const bool has_value = i + 1 < argc;
    if (a == "--limit" && has_value)
      opt.limit = std::strtod(argv[++i], nullptr);
    else if (a == "--family" && has_value)
      opt.family = argv[++i];
    else if (a == "--json" && has_value)
      opt.json = argv[++i];
    else if (a == "--seed" && has_value)
      opt.seed = std::strtoull(argv[++i], nullptr, 10);
    else if (a == "--write-opb" && has_value)
      opt.opb_dir = argv[++i];
    else if (a == "--rule" && has_value)
      rule_variant = argv[++i];
    else if (a == "--columns" && has_value)
      opt.columns = argv[++i];
    else if (a == "--wall-factor" && has_value)
      opt.wall_factor = std::strtod(argv[++i], nullptr);
    else if (a == "--quick")
      opt.quick = true;
    else if (a == "--list")
      opt.list = true;
    else
      return usage();
  }
  if (!(opt.limit > 0) || !(opt.wall_factor >= 1)) return usage();
  if (opt.quick) opt.limit = std::min(opt.limit, 2.0);

  std::vector<cb::family_instance> instances = benchmark_set(opt.quick, opt.seed);
  if (!opt.family.empty()) {
    std::erase_if(instances, [&](const cb::family_instance& f) { return f.family != opt.family; });
    if (instances.empty()) {
      std::fprintf(stderr, "bench_solve_policy: no family named %s\n", opt.family.c_str());
      return usage();
    }
  }
  if (!opt.opb_dir.empty()) {
    for (const auto& f : instances) {
      const std::string path = opt.opb_dir + "/" + f.name + ".opb";
      std::FILE* out = std::fopen(path.c_str(), "w");
      if (out == nullptr) {
        std::fprintf(stderr, "bench_solve_policy: cannot write %s\n", path.c_str());
        return 1;
      }
      const std::string text = cb::to_opb(f);
      std::fwrite(text.data(), 1, text.size(), out);
      std::fclose(out);
    }
  }
  if (opt.list) {
    for (const auto& f : instances)
      std::printf("%-32s %-15s %-8s %6d variables %5zu rows  %s\n", f.name.c_str(), f.family.c_str(),
                  cb::to_string(f.status), f.variables, f.rows.size(), f.why.c_str());
    return 0;
  }

  std::vector<column> columns = all_columns();
  if (!opt.columns.empty()) {
    const std::string wanted = "," + opt.columns + ",";
    std::erase_if(columns, [&](const column& c) { return wanted.find("," + c.name + ",") == std::string::npos; });
    if (columns.empty()) return usage();
  }
  std::printf("bench_solve_policy: %zu instances, limit %.1f s per run, CaDiCaL, seed offset %llu\n", instances.size(),
              opt.limit, static_cast<unsigned long long>(opt.seed));
  std::vector<instance_result> results;
  int failures = 0;
  for (const auto& f : instances) {
    results.push_back(run_instance(f, columns, opt, failures));
    print_instance(results.back(), columns);
  }

  std::map<std::string, std::vector<const instance_result*>> by_family;
  std::vector<const instance_result*> everything;
  for (const auto& ir : results) {
    by_family[ir.instance->family].push_back(&ir);
    everything.push_back(&ir);
  }
  for (const auto& [name, set] : by_family) print_summary(name, set, columns, opt.limit);
  if (by_family.size() > 1) print_summary("all families", everything, columns, opt.limit);
  print_misses(results, columns);
  if (!opt.json.empty()) write_json(opt.json, results, columns, opt);
  std::printf("\nchecks: %s\n", failures == 0 ? "every answer agrees" : "FAILURES (see above)");
  return failures == 0 ? 0 : 1;
}
