// Weighted rows over at-most-one groups: group-aware encodings against the
// group-blind methods on generated models (run from a Release build).
//
//   bench_groups [--timeout SECONDS] [--family scheduling|multimode|assignment|all] [--seed N]
//
// Families (fixed seeds, generated here):
//   scheduling   time-indexed: J jobs of duration 1..6 (two instances: 3..10)
//                and demand 1..5 per resource, start literals s(j,t) for
//                t = 0..H-d_j, exactly one start per job; for each resource
//                and time step tau, the row sum over jobs running at tau of
//                demand * s(j,t) <= capacity.
//   multimode    the same with 2 or 3 modes per job (duration and demand
//                traded off); one exactly-one over all (mode, start) pairs of
//                a job, so the coefficients inside a group differ.
//   assignment   T tasks on M machines, x(t,m) with exactly one machine per
//                task; a load row per machine (one literal per task: no
//                groups) and two budget rows over all task-machine pairs
//                (cost and energy, 1..10 each) whose groups are the tasks.
// The rows whose detected groups include one of two or more literals are the
// affected rows. For them the table prints the clauses and auxiliary
// variables of every group-blind method (bdd, adder, generalized-totalizer,
// sequential-weight-counter, through encode_with into a counting sink) and of
// every group-aware method; the best group-blind method is the one with the
// fewest clauses over the affected rows. For reference the table also prints
// the best group-blind method over one literal per group and coefficient
// (x -> y, then the row over the y: the simplest use of the groups). Then the
// whole model (exactly-ones
// by the ladder, unaffected rows by the best group-blind method, affected
// rows by the method compared) is solved by CaDiCaL, once with the best
// group-blind method and once with each group method: status and seconds.
#include <algorithm>
#include <array>
#include <cadical.hpp>
#include <chrono>
#include <clausewright/clausewright.hpp>
#include <clausewright/encodings/group_generalized_totalizer.hpp>
#include <clausewright/encodings/group_mdd.hpp>
#include <clausewright/encodings/group_sequential_weight_counter.hpp>
#include <clausewright/groups.hpp>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <optional>
#include <random>
#include <span>
#include <string>
#include <vector>

namespace cw = clausewright;

namespace {

struct row {
  std::vector<cw::term> terms;
  std::int64_t bound = 0;  // sum <= bound
};

struct model {
  std::string name;
  std::int32_t vars = 0;
  std::vector<std::vector<cw::literal>> exactly_one;
  std::vector<row> rows;
};

// Time-indexed scheduling; `modes` = 1 is the single-mode family.
model scheduling(int jobs, int horizon, int resources, int modes, std::uint64_t seed, int shortest = 1,
                 int longest = 6) {
  std::mt19937_64 rng(seed);
  auto pick = [&](int lo, int hi) { return lo + static_cast<int>(rng() % static_cast<std::uint64_t>(hi - lo + 1)); };
  model m;
  m.name = (modes == 1 ? "sched J=" : "multimode J=") + std::to_string(jobs) + " H=" + std::to_string(horizon) +
           " R=" + std::to_string(resources) + " d=" + std::to_string(shortest) + ".." + std::to_string(longest);
  struct start {
    int job;
    int time;
    int duration;
    std::vector<int> demand;
    cw::literal lit;
  };
  std::vector<start> starts;
  std::vector<double> work(static_cast<std::size_t>(resources), 0.0);
  std::vector<int> largest(static_cast<std::size_t>(resources), 1);
  for (int j = 0; j < jobs; ++j) {
    std::vector<cw::literal> choice;
    const int base_duration = pick(shortest, longest);
    std::vector<int> base_demand(static_cast<std::size_t>(resources));
    for (int& d : base_demand) d = pick(1, 5);
    std::vector<double> mode_work(static_cast<std::size_t>(resources), 0.0);
    for (int mode = 0; mode < modes; ++mode) {
      // Mode k: longer and lighter (duration + 2k, demand - k, at least 1).
      const int duration = base_duration + 2 * mode;
      std::vector<int> demand;
      for (int r = 0; r < resources; ++r) {
        demand.push_back(std::max(1, base_demand[static_cast<std::size_t>(r)] - mode));
        largest[static_cast<std::size_t>(r)] = std::max(largest[static_cast<std::size_t>(r)], demand.back());
        mode_work[static_cast<std::size_t>(r)] += static_cast<double>(duration * demand.back()) / modes;
      }
      for (int t = 0; t + duration <= horizon; ++t) {
        starts.push_back({j, t, duration, demand, cw::lit(++m.vars)});
        choice.push_back(starts.back().lit);
      }
    }
    for (int r = 0; r < resources; ++r) work[static_cast<std::size_t>(r)] += mode_work[static_cast<std::size_t>(r)];
    m.exactly_one.push_back(std::move(choice));
  }
  for (int r = 0; r < resources; ++r) {
    // Capacity: 1.3 times the average load, at least the largest demand.
    const auto capacity =
        std::max<std::int64_t>(largest[static_cast<std::size_t>(r)],
                               static_cast<std::int64_t>(1.3 * work[static_cast<std::size_t>(r)] / horizon) + 1);
    for (int tau = 0; tau < horizon; ++tau) {
      row w;
      w.bound = capacity;
      for (const start& s : starts)
        if (s.time <= tau && tau < s.time + s.duration)
          w.terms.push_back({s.demand[static_cast<std::size_t>(r)], s.lit});
      if (!w.terms.empty()) m.rows.push_back(std::move(w));
    }
  }
  return m;
}

model assignment(int tasks, int machines, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  auto pick = [&](int lo, int hi) { return lo + static_cast<int>(rng() % static_cast<std::uint64_t>(hi - lo + 1)); };
  model m;
  m.name = "assign T=" + std::to_string(tasks) + " M=" + std::to_string(machines);
  std::vector<std::vector<cw::literal>> x(static_cast<std::size_t>(tasks));
  for (int t = 0; t < tasks; ++t) {
    for (int k = 0; k < machines; ++k) x[static_cast<std::size_t>(t)].push_back(cw::lit(++m.vars));
    m.exactly_one.push_back(x[static_cast<std::size_t>(t)]);
  }
  // Load per machine: task sizes 1..5, capacity 1.15 times the even share.
  std::vector<int> size;
  std::int64_t total = 0;
  for (int t = 0; t < tasks; ++t) {
    size.push_back(pick(1, 5));
    total += size.back();
  }
  for (int k = 0; k < machines; ++k) {
    row w;
    w.bound = static_cast<std::int64_t>(1.15 * static_cast<double>(total) / machines) + 1;
    for (int t = 0; t < tasks; ++t)
      w.terms.push_back(
          {size[static_cast<std::size_t>(t)], x[static_cast<std::size_t>(t)][static_cast<std::size_t>(k)]});
    m.rows.push_back(std::move(w));
  }
  // Two budgets: each the cheapest choice per task plus half the way to the average.
  for (int b = 0; b < 2; ++b) {
    row w;
    double cheapest = 0;
    double average = 0;
    for (int t = 0; t < tasks; ++t) {
      int low = 10;
      int sum = 0;
      for (int k = 0; k < machines; ++k) {
        const int c = pick(1, 10);
        low = std::min(low, c);
        sum += c;
        w.terms.push_back({c, x[static_cast<std::size_t>(t)][static_cast<std::size_t>(k)]});
      }
      cheapest += low;
      average += static_cast<double>(sum) / machines;
    }
    w.bound = static_cast<std::int64_t>(cheapest + 0.5 * (average - cheapest));
    m.rows.push_back(std::move(w));
  }
  return m;
}

enum class group_method : std::uint8_t { mdd, totalizer, reduced_totalizer, weight_counter };
constexpr std::array group_methods{group_method::mdd, group_method::totalizer, group_method::reduced_totalizer,
                                   group_method::weight_counter};
const char* name(group_method g) {
  switch (g) {
    case group_method::mdd:
      return "group-mdd";
    case group_method::totalizer:
      return "group-generalized-totalizer";
    case group_method::reduced_totalizer:
      return "group-reduced-generalized-totalizer";
    case group_method::weight_counter:
      return "group-sequential-weight-counter";
  }
  return "?";
}
constexpr std::array blind_methods{cw::method_id::bdd, cw::method_id::adder, cw::method_id::generalized_totalizer,
                                   cw::method_id::sequential_weight_counter};

// How the affected rows are encoded: a group-blind method or a group method.
struct choice {
  bool grouped = false;
  cw::method_id blind = cw::method_id::bdd;
  group_method group = group_method::mdd;
  bool merged = false;  // a group-blind method over one literal per (group, coefficient)
  [[nodiscard]] std::string label() const {
    if (grouped) return name(group);
    return (merged ? "group literals + " : "") + std::string(cw::info(blind).name);
  }
};

struct prepared_row {
  cw::normalized_constraint normal;
  cw::grouped_constraint grouped;
  bool affected = false;
};

std::vector<prepared_row> prepare(const model& m) {
  std::vector<prepared_row> out;
  const cw::at_most_one_index index(m.exactly_one);
  for (std::size_t i = 0; i < m.rows.size(); ++i) {
    prepared_row p;
    p.normal = cw::normalize(m.rows[i].terms, cw::relation::le, m.rows[i].bound, i);
    p.grouped = cw::group_constraint(p.normal, index);
    for (const auto& g : p.grouped.groups) p.affected = p.affected || g.size() >= 2;
    out.push_back(std::move(p));
  }
  return out;
}

template <class Sink>
void encode_row(Sink& out, cw::variable_pool& pool, const prepared_row& r, const choice& c,
                cw::group_literal_cache& cache) {
  if (!c.grouped && !c.merged) {
    cw::encode_with(c.blind, out, pool, r.normal);
    return;
  }
  if (r.grouped.kind == cw::constraint_kind::constant_false) {
    out.add_clause(std::span<const cw::literal>());
    return;
  }
  for (const auto u : r.grouped.units) cw::emit(out, u);
  if (c.merged) {
    // The simplest use of the groups: x -> y for the literals of one group and
    // coefficient, then the group-blind method on the row over the y.
    if (r.grouped.kind == cw::constraint_kind::constant_true) return;
    std::vector<cw::term> terms;
    for (const auto& g : r.grouped.groups)
      for (const auto& t : cw::detail::merge_equal_coefficients(out, pool, g, cw::sides::upper, &cache))
        terms.push_back(t);
    cw::encode_with(c.blind, out, pool, cw::normalize(terms, cw::relation::le, r.grouped.bound));
    return;
  }
  switch (c.group) {
    case group_method::mdd:
      cw::encode_group_mdd(out, pool, r.grouped, {}, cw::default_bdd_node_budget, &cache);
      return;
    case group_method::totalizer:
      cw::encode_group_generalized_totalizer(out, pool, r.grouped, {}, cw::default_generalized_totalizer_output_budget,
                                             &cache);
      return;
    case group_method::reduced_totalizer:
      cw::encode_group_reduced_generalized_totalizer(out, pool, r.grouped, {},
                                                     cw::default_generalized_totalizer_output_budget, &cache);
      return;
    case group_method::weight_counter:
      cw::encode_group_sequential_weight_counter(out, pool, r.grouped, {}, &cache);
      return;
  }
}

struct size_result {
  bool ok = true;
  std::uint64_t clauses = 0;
  std::uint64_t variables = 0;
};

size_result affected_size(const model& m, const std::vector<prepared_row>& rows, const choice& c) {
  size_result s;
  cw::counting_sink sink;
  cw::variable_pool pool(m.vars);
  cw::group_literal_cache cache;  // one per formula: rows over the same sets share their literals
  try {
    for (const auto& r : rows)
      if (r.affected) encode_row(sink, pool, r, c, cache);
  } catch (const cw::error&) {
    s.ok = false;
    return s;
  }
  s.clauses = sink.clauses();
  s.variables = static_cast<std::uint64_t>(pool.auxiliary_variables());
  return s;
}

class deadline final : public CaDiCaL::Terminator {
 public:
  explicit deadline(std::chrono::steady_clock::time_point at) : at_(at) {}
  bool terminate() override { return std::chrono::steady_clock::now() >= at_; }

 private:
  std::chrono::steady_clock::time_point at_;
};

struct cadical_sink {
  CaDiCaL::Solver* solver;
  void add_clause(std::span<const cw::literal> clause) {
    for (const auto l : clause) solver->add(l.dimacs());
    solver->add(0);
  }
};

struct solve_result {
  int status = 0;  // 10 sat, 20 unsat, 0 timeout
  double seconds = 0;
};

solve_result solve(const model& m, const std::vector<prepared_row>& rows, const choice& affected, const choice& others,
                   double timeout) {
  CaDiCaL::Solver solver;
  solver.set("quiet", 1);
  cadical_sink sink{&solver};
  cw::variable_pool pool(m.vars);
  for (const auto& set : m.exactly_one)
    cw::encode_with(cw::method_id::ladder, sink, pool, cw::normalize_cardinality(set, cw::relation::eq, 1));
  cw::group_literal_cache cache;  // one per formula: rows over the same sets share their literals
  for (const auto& r : rows) encode_row(sink, pool, r, r.affected ? affected : others, cache);
  const auto start = std::chrono::steady_clock::now();
  deadline stop(
      start + std::chrono::duration_cast<std::chrono::steady_clock::duration>(std::chrono::duration<double>(timeout)));
  solver.connect_terminator(&stop);
  solve_result r;
  r.status = solver.solve();
  solver.disconnect_terminator();
  r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return r;
}

const char* status_name(int s) { return s == 10 ? "sat" : (s == 20 ? "unsat" : "timeout"); }

struct totals {
  int instances = 0;
  int faster = 0;    // solved, and sooner than the best group-blind method (or that one timed out)
  int both_out = 0;  // neither solved within the timeout
};

}  // namespace

int main(int argc, char** argv) {
  double timeout = 20;
  std::string family = "all";
  std::uint64_t seed = 1;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string a = argv[i];
    if (a == "--timeout")
      timeout = std::atof(argv[i + 1]);
    else if (a == "--family")
      family = argv[i + 1];
    else if (a == "--seed")
      seed = std::strtoull(argv[i + 1], nullptr, 10);
    else {
      std::fprintf(stderr, "unknown option %s\n", a.c_str());
      return 2;
    }
  }
  std::vector<model> models;
  if (family == "all" || family == "scheduling") {
    models.push_back(scheduling(10, 20, 1, 1, seed));
    models.push_back(scheduling(20, 40, 1, 1, seed + 1));
    models.push_back(scheduling(20, 40, 2, 1, seed + 2));
    models.push_back(scheduling(30, 60, 1, 1, seed + 3));
    models.push_back(scheduling(30, 60, 2, 1, seed + 4));
    // Longer jobs: more start literals per group in every row.
    models.push_back(scheduling(20, 40, 1, 1, seed + 5, 3, 10));
    models.push_back(scheduling(30, 60, 2, 1, seed + 6, 3, 10));
  }
  if (family == "all" || family == "multimode") {
    models.push_back(scheduling(10, 20, 1, 2, seed + 10));
    models.push_back(scheduling(20, 40, 1, 3, seed + 11));
    models.push_back(scheduling(20, 40, 2, 2, seed + 12));
    models.push_back(scheduling(30, 60, 1, 2, seed + 13));
  }
  if (family == "all" || family == "assignment") {
    models.push_back(assignment(30, 5, seed + 20));
    models.push_back(assignment(60, 8, seed + 21));
    models.push_back(assignment(100, 10, seed + 22));
  }
  if (models.empty()) {
    std::fprintf(stderr, "unknown family %s\n", family.c_str());
    return 2;
  }
  std::printf("solve timeout %.0f s; sizes are of the affected rows only\n", timeout);
  std::array<totals, group_methods.size()> tally{};
  for (const model& m : models) {
    const auto rows = prepare(m);
    std::size_t affected = 0;
    for (const auto& r : rows) affected += r.affected ? 1 : 0;
    std::printf("\n%s: %d variables, %zu rows (%zu affected)\n", m.name.c_str(), m.vars, rows.size(), affected);
    std::printf("  %-38s %12s %12s\n", "method", "clauses", "aux vars");
    std::optional<choice> best;
    size_result best_size;
    for (const auto id : blind_methods) {
      const choice c{false, id, {}};
      const size_result s = affected_size(m, rows, c);
      if (!s.ok) {
        std::printf("  %-38s %12s\n", c.label().c_str(), "over budget");
        continue;
      }
      std::printf("  %-38s %12llu %12llu\n", c.label().c_str(), static_cast<unsigned long long>(s.clauses),
                  static_cast<unsigned long long>(s.variables));
      if (!best || s.clauses < best_size.clauses) {
        best = c;
        best_size = s;
      }
    }
    if (!best) continue;
    // For reference, not in the comparison: the best group-blind method over group literals.
    std::optional<choice> best_merged;
    size_result best_merged_size;
    for (const auto id : blind_methods) {
      const choice c{false, id, {}, true};
      const size_result s = affected_size(m, rows, c);
      if (s.ok && (!best_merged || s.clauses < best_merged_size.clauses)) {
        best_merged = c;
        best_merged_size = s;
      }
    }
    if (best_merged)
      std::printf("  %-38s %12llu %12llu   (reference: the simplest use of the groups)\n", best_merged->label().c_str(),
                  static_cast<unsigned long long>(best_merged_size.clauses),
                  static_cast<unsigned long long>(best_merged_size.variables));
    std::vector<size_result> group_sizes;
    for (const auto g : group_methods) {
      const choice c{true, {}, g};
      const size_result s = affected_size(m, rows, c);
      group_sizes.push_back(s);
      if (!s.ok) {
        std::printf("  %-38s %12s\n", c.label().c_str(), "over budget");
        continue;
      }
      std::printf("  %-38s %12llu %12llu   clauses of %s / these: %.2f\n", c.label().c_str(),
                  static_cast<unsigned long long>(s.clauses), static_cast<unsigned long long>(s.variables),
                  best->label().c_str(),
                  s.clauses ? static_cast<double>(best_size.clauses) / static_cast<double>(s.clauses) : 0.0);
    }
    const solve_result base = solve(m, rows, *best, *best, timeout);
    std::printf("  solve with %-33s %8s %9.3f s\n", best->label().c_str(), status_name(base.status), base.seconds);
    for (std::size_t gi = 0; gi < group_methods.size(); ++gi) {
      if (!group_sizes[gi].ok) continue;
      const choice c{true, {}, group_methods[gi]};
      const solve_result r = solve(m, rows, c, *best, timeout);
      std::printf("  solve with %-33s %8s %9.3f s   time / time of %s: %.2f\n", c.label().c_str(),
                  status_name(r.status), r.seconds, best->label().c_str(),
                  base.seconds > 0 ? r.seconds / base.seconds : 0.0);
      if (base.status != 0 && r.status != 0 && base.status != r.status) {
        std::printf("  DISAGREEMENT: %s says %s, %s says %s\n", best->label().c_str(), status_name(base.status),
                    c.label().c_str(), status_name(r.status));
        return 1;
      }
      ++tally[gi].instances;
      const bool solved = r.status != 0;
      tally[gi].faster += solved && (base.status == 0 || r.seconds < base.seconds) ? 1 : 0;
      tally[gi].both_out += !solved && base.status == 0 ? 1 : 0;
    }
  }
  std::printf(
      "\nsolved sooner than the best group-blind method (whole-model solve; a timeout of both is not sooner):\n");
  for (std::size_t gi = 0; gi < group_methods.size(); ++gi)
    std::printf("  %-38s %d of %d instances (%d: both timed out)\n", name(group_methods[gi]), tally[gi].faster,
                tally[gi].instances, tally[gi].both_out);
  return 0;
}
