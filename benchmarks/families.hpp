// Generated model families of our own scenarios, for the benchmarks that
// compare encodings under a solver.
//
// Each generator takes its parameters and a seed and returns a plain
// family_instance: the number of variables, the hard rows as
// (coefficient, literal) terms with a relation and a bound, the rows that are
// at-most-one or exactly-one groups marked as such, an optional objective
// (minimised), and whether the instance is satisfiable by construction,
// unsatisfiable by a cheap argument, or unknown. Where the status or the
// optimum is claimed, the argument is beside the generator, and it is
// independent of the library:
//   - bin packing: bins filled exactly, then shuffled (a packing exists; the
//     volume bound, total weight / capacity, is met, so fewer bins or one more
//     unit of weight cannot fit);
//   - multi-knapsack: a dynamic program over the capacities gives the optimum
//     value, so `value >= optimum` is satisfiable and `>= optimum + 1` is not;
//   - rota and cover: a maximum flow (people -> person-days -> day-shifts)
//     decides feasibility exactly, since coverage, one shift a day and the
//     working-day limit are the capacities of that network;
//   - time-indexed scheduling: jobs cut from a horizon x capacity rectangle
//     by guillotine cuts, so the jobs fill it exactly (satisfiable at that
//     horizon, unsatisfiable one step shorter by the energy bound);
//   - weighted assignment: every task on its cheapest machine is feasible
//     (capacities are set from it), and no assignment costs less than the sum
//     of cheapest costs, so that sum is the optimum.
// The optimisation instances (namespace optimize, before the writers) carry
// their reference optima: knapsack DPs, the volume bound, GLPK's MIP optimum.
// The data are invented, from a fixed-seed generator (std::mt19937_64, whose
// output the standard fixes; the ranges are taken by our own modulo, so the
// instances are the same with every standard library).
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <deque>
#include <limits>
#include <numeric>
#include <optional>
#include <random>
#include <span>
#include <string>
#include <utility>
#include <vector>

#include <clausewright/constraint.hpp>
#include <clausewright/literal.hpp>
#include <clausewright/model.hpp>
#include <clausewright/optimize.hpp>
#if __has_include(<glpk.h>)
#include <glpk.h>
#endif

namespace clausewright::bench {

enum class row_group : std::uint8_t { none, at_most_one, exactly_one };
enum class known_status : std::uint8_t { sat, unsat, unknown };

[[nodiscard]] constexpr const char* to_string(known_status s) noexcept {
  switch (s) {
    case known_status::sat:
      return "SAT";
    case known_status::unsat:
      return "UNSAT";
    case known_status::unknown:
      return "unknown";
  }
  return "?";
}

struct model_row {
  std::vector<term> terms;
  relation rel = relation::le;
  std::int64_t bound = 0;
  row_group group = row_group::none;
  std::string label;  // what the row means, e.g. "capacity bin 3"
};

struct family_instance {
  std::string family;
  std::string name;
  std::int32_t variables = 0;
  std::vector<model_row> rows;
  std::vector<term> objective;  // minimised; empty when there is none
  known_status status = known_status::unknown;
  std::optional<std::int64_t> optimum;  // of the objective, when known
  std::string why;                      // how the status is known
};

// Whether every row holds; values[v] is the truth of variable v (1-based).
[[nodiscard]] inline bool satisfies(const family_instance& f, const std::vector<bool>& values,
                                    std::size_t* failed_row = nullptr) {
  for (std::size_t i = 0; i < f.rows.size(); ++i) {
    const model_row& r = f.rows[i];
    const bool ok = holds(std::span<const term>(r.terms), r.rel, r.bound,
                          [&](std::int32_t v) { return values.at(static_cast<std::size_t>(v)); });
    if (!ok) {
      if (failed_row != nullptr) *failed_row = i;
      return false;
    }
  }
  return true;
}

[[nodiscard]] inline std::int64_t objective_value(const family_instance& f, const std::vector<bool>& values) {
  std::int64_t sum = 0;
  for (const term& t : f.objective) {
    const bool v = values.at(static_cast<std::size_t>(t.lit.var()));
    if (t.lit.negative() ? !v : v) sum += t.coefficient;
  }
  return sum;
}

// The decision version `objective <= bound` (satisfiable exactly when the
// optimum is at most the bound; status follows from a known optimum).
[[nodiscard]] inline family_instance with_objective_bound(family_instance f, std::int64_t bound) {
  model_row r;
  r.terms = f.objective;
  r.rel = relation::le;
  r.bound = bound;
  r.label = "objective <= " + std::to_string(bound);
  f.rows.push_back(std::move(r));
  if (f.optimum) {
    f.status = *f.optimum <= bound ? known_status::sat : known_status::unsat;
    f.why += *f.optimum <= bound ? "; the optimum meets the bound" : "; the bound is below the optimum";
  } else {
    f.status = known_status::unknown;
  }
  f.name += "-obj" + std::to_string(bound);
  return f;
}

namespace detail {

class seeded_rng {
 public:
  explicit seeded_rng(std::uint64_t seed) : engine_(seed) {}
  // Uniform in lo..hi (inclusive); the modulo bias is irrelevant here.
  std::int64_t between(std::int64_t lo, std::int64_t hi) {
    const auto span = static_cast<std::uint64_t>(hi - lo) + 1;
    return lo + static_cast<std::int64_t>(engine_() % span);
  }
  bool chance(int percent) { return between(0, 99) < percent; }
  template <class T>
  void shuffle(std::vector<T>& v) {  // Fisher-Yates with our own ranges
    for (std::size_t i = v.size(); i > 1; --i)
      std::swap(v[i - 1], v[static_cast<std::size_t>(between(0, static_cast<std::int64_t>(i) - 1))]);
  }

 private:
  std::mt19937_64 engine_;
};

inline model_row group_row(std::vector<literal> lits, row_group g, std::string label) {
  model_row r;
  for (const literal l : lits) r.terms.push_back({1, l});
  r.rel = g == row_group::exactly_one ? relation::eq : relation::le;
  r.bound = 1;
  r.group = g;
  r.label = std::move(label);
  return r;
}

// Splits `total` into `parts` positive parts at distinct random cut points.
inline std::vector<std::int64_t> split(seeded_rng& rng, std::int64_t total, std::int64_t parts) {
  std::vector<std::int64_t> cuts;
  while (static_cast<std::int64_t>(cuts.size()) < parts - 1) {
    const std::int64_t c = rng.between(1, total - 1);
    if (std::find(cuts.begin(), cuts.end(), c) == cuts.end()) cuts.push_back(c);
  }
  std::sort(cuts.begin(), cuts.end());
  std::vector<std::int64_t> out;
  std::int64_t previous = 0;
  for (const auto c : cuts) {
    out.push_back(c - previous);
    previous = c;
  }
  out.push_back(total - previous);
  return out;
}

// Maximum flow by shortest augmenting paths (Edmonds-Karp). Small networks.
class max_flow {
 public:
  explicit max_flow(std::size_t nodes) : adjacency_(nodes) {}
  void edge(std::size_t from, std::size_t to, std::int64_t capacity) {
    adjacency_[from].push_back(edges_.size());
    edges_.push_back({to, capacity});
    adjacency_[to].push_back(edges_.size());
    edges_.push_back({from, 0});
  }
  std::int64_t run(std::size_t source, std::size_t sink) {
    std::int64_t total = 0;
    for (;;) {
      std::vector<std::size_t> via(adjacency_.size(), none);
      std::deque<std::size_t> queue{source};
      std::vector<bool> seen(adjacency_.size(), false);
      seen[source] = true;
      while (!queue.empty() && !seen[sink]) {
        const std::size_t u = queue.front();
        queue.pop_front();
        for (const std::size_t e : adjacency_[u]) {
          const std::size_t v = edges_[e].to;
          if (edges_[e].capacity > 0 && !seen[v]) {
            seen[v] = true;
            via[v] = e;
            queue.push_back(v);
          }
        }
      }
      if (!seen[sink]) return total;
      std::int64_t push = std::numeric_limits<std::int64_t>::max();
      for (std::size_t v = sink; v != source; v = edges_[via[v] ^ 1U].to)
        push = std::min(push, edges_[via[v]].capacity);
      for (std::size_t v = sink; v != source; v = edges_[via[v] ^ 1U].to) {
        edges_[via[v]].capacity -= push;
        edges_[via[v] ^ 1U].capacity += push;
      }
      total += push;
    }
  }

 private:
  static constexpr std::size_t none = std::numeric_limits<std::size_t>::max();
  struct arc {
    std::size_t to;
    std::int64_t capacity;
  };
  std::vector<std::vector<std::size_t>> adjacency_;
  std::vector<arc> edges_;
};

}  // namespace detail

// ---------------------------------------------------------------------------
// Bin packing near capacity. Bins are filled exactly (each bin's capacity cut
// into pieces), the pieces shuffled: `bins` bins hold them (satisfiable), and
// the volume bound says no fewer can. Variable x(i, b) = item i in bin b.
//   extra_bins > 0: that many more bins, a used-bin literal per bin, and the
//   objective "bins used" with optimum `bins` (volume bound met).
//   overweight > 0: one item heavier by that much, so the total weight passes
//   bins * capacity: unsatisfiable by volume (only with extra_bins == 0).
struct bin_packing_params {
  std::int64_t bins = 3;
  std::int64_t capacity = 100;
  std::int64_t items_per_bin = 5;
  std::int64_t extra_bins = 0;
  std::int64_t overweight = 0;
  std::uint64_t seed = 1;
};

[[nodiscard]] inline family_instance bin_packing(const bin_packing_params& p) {
  detail::seeded_rng rng(p.seed);
  std::vector<std::int64_t> weights;
  for (std::int64_t b = 0; b < p.bins; ++b)
    for (const auto w : detail::split(rng, p.capacity, p.items_per_bin)) weights.push_back(w);
  rng.shuffle(weights);
  if (p.overweight > 0) weights[0] += p.overweight;
  const auto n = static_cast<std::int64_t>(weights.size());
  const std::int64_t k = p.bins + p.extra_bins;
  family_instance f;
  f.family = "bin-packing";
  f.name = "bp-b" + std::to_string(p.bins) + "-n" + std::to_string(n) + "-c" + std::to_string(p.capacity) +
           (p.extra_bins > 0 ? "-opt" : "") + (p.overweight > 0 ? "-over" + std::to_string(p.overweight) : "") + "-s" +
           std::to_string(p.seed);
  const auto x = [&](std::int64_t i, std::int64_t b) { return literal(static_cast<std::int32_t>(i * k + b + 1)); };
  const auto used = [&](std::int64_t b) { return literal(static_cast<std::int32_t>(n * k + b + 1)); };
  f.variables = static_cast<std::int32_t>(n * k + (p.extra_bins > 0 ? k : 0));
  for (std::int64_t i = 0; i < n; ++i) {
    std::vector<literal> one;
    for (std::int64_t b = 0; b < k; ++b) one.push_back(x(i, b));
    f.rows.push_back(detail::group_row(one, row_group::exactly_one, "item " + std::to_string(i)));
  }
  for (std::int64_t b = 0; b < k; ++b) {
    model_row r;
    for (std::int64_t i = 0; i < n; ++i) r.terms.push_back({weights[static_cast<std::size_t>(i)], x(i, b)});
    if (p.extra_bins > 0) r.terms.push_back({-p.capacity, used(b)});  // an unused bin holds nothing
    r.rel = relation::le;
    r.bound = p.extra_bins > 0 ? 0 : p.capacity;
    r.label = "capacity bin " + std::to_string(b);
    f.rows.push_back(std::move(r));
  }
  if (p.extra_bins > 0) {
    for (std::int64_t b = 0; b < k; ++b) f.objective.push_back({1, used(b)});
    f.optimum = p.bins;
  }
  const std::int64_t total = std::accumulate(weights.begin(), weights.end(), std::int64_t{0});
  if (total > p.bins * p.capacity && p.extra_bins == 0) {
    f.status = known_status::unsat;
    f.why = "total weight " + std::to_string(total) + " > bins x capacity " + std::to_string(p.bins * p.capacity);
  } else {
    f.status = p.overweight > 0 ? known_status::unknown : known_status::sat;
    f.why = "bins filled exactly by construction";
  }
  return f;
}

// ---------------------------------------------------------------------------
// Multi-knapsack feasibility: `rows` capacity rows, a value row
// `value >= target` with the target `optimum + target_offset`, the optimum
// found by a dynamic program over the capacities (below). The objective is the
// value left out (sum v_i * ~x_i), whose optimum is total value - optimum.
struct knapsack_params {
  std::int64_t items = 20;
  std::int64_t rows = 2;
  std::int64_t max_weight = 30;
  std::int64_t max_value = 60;
  std::int64_t capacity_percent = 40;  // of the row's total weight
  std::int64_t target_offset = 0;      // 0: at the optimum (SAT); 1: just above (UNSAT)
  std::uint64_t seed = 1;
};

// Best value within the capacities: dp over the product of the capacities
// (state = remaining capacity per row in mixed radix), items one at a time,
// states in decreasing order so each item is taken at most once.
[[nodiscard]] inline std::int64_t knapsack_optimum(const std::vector<std::vector<std::int64_t>>& weight,
                                                   const std::vector<std::int64_t>& capacity,
                                                   const std::vector<std::int64_t>& value) {
  const std::size_t m = capacity.size();
  std::vector<std::size_t> stride(m);
  std::size_t states = 1;
  for (std::size_t r = 0; r < m; ++r) {
    stride[r] = states;
    states *= static_cast<std::size_t>(capacity[r] + 1);
  }
  std::vector<std::int64_t> best(states, 0);
  std::vector<std::size_t> digit(m);
  for (std::size_t i = 0; i < value.size(); ++i) {
    std::size_t offset = 0;
    for (std::size_t r = 0; r < m; ++r) offset += static_cast<std::size_t>(weight[r][i]) * stride[r];
    for (std::size_t s = states; s-- > 0;) {
      std::size_t rest = s;
      bool fits = true;
      for (std::size_t r = m; r-- > 0;) {
        digit[r] = rest / stride[r];
        rest %= stride[r];
        if (static_cast<std::int64_t>(digit[r]) < weight[r][i]) fits = false;
      }
      if (fits) best[s] = std::max(best[s], best[s - offset] + value[i]);
    }
  }
  return best[states - 1];
}

[[nodiscard]] inline family_instance multi_knapsack(const knapsack_params& p) {
  detail::seeded_rng rng(p.seed);
  const auto n = static_cast<std::size_t>(p.items);
  std::vector<std::vector<std::int64_t>> weight(static_cast<std::size_t>(p.rows), std::vector<std::int64_t>(n));
  std::vector<std::int64_t> capacity;
  std::vector<std::int64_t> value(n);
  for (auto& row : weight) {
    for (auto& w : row) w = rng.between(1, p.max_weight);
    capacity.push_back(std::accumulate(row.begin(), row.end(), std::int64_t{0}) * p.capacity_percent / 100);
  }
  for (auto& v : value) v = rng.between(1, p.max_value);
  const std::int64_t best = knapsack_optimum(weight, capacity, value);
  family_instance f;
  f.family = "multi-knapsack";
  f.name = "mk-n" + std::to_string(p.items) + "-m" + std::to_string(p.rows) + "-w" + std::to_string(p.max_weight) +
           "-v" + std::to_string(p.max_value) + (p.target_offset >= 0 ? "+" : "") + std::to_string(p.target_offset) +
           "-s" + std::to_string(p.seed);
  f.variables = static_cast<std::int32_t>(n);
  for (std::size_t r = 0; r < weight.size(); ++r) {
    model_row row;
    for (std::size_t i = 0; i < n; ++i) row.terms.push_back({weight[r][i], literal(static_cast<std::int32_t>(i + 1))});
    row.rel = relation::le;
    row.bound = capacity[r];
    row.label = "capacity " + std::to_string(r);
    f.rows.push_back(std::move(row));
  }
  model_row target;
  for (std::size_t i = 0; i < n; ++i) target.terms.push_back({value[i], literal(static_cast<std::int32_t>(i + 1))});
  target.rel = relation::ge;
  target.bound = best + p.target_offset;
  target.label = "value";
  f.rows.push_back(std::move(target));
  const std::int64_t total = std::accumulate(value.begin(), value.end(), std::int64_t{0});
  for (std::size_t i = 0; i < n; ++i) f.objective.push_back({value[i], ~literal(static_cast<std::int32_t>(i + 1))});
  f.optimum = total - best;
  f.status = p.target_offset <= 0 ? known_status::sat : known_status::unsat;
  f.why = "dynamic program: best value " + std::to_string(best);
  return f;
}

// ---------------------------------------------------------------------------
// Rota and cover: people x days x shifts. A person is available on a day with
// probability available_percent and qualified for a shift with
// qualified_percent; a variable exists only for an available, qualified
// (person, day, shift). Rows: at most one shift per person-day (exactly one
// with an "off" variable when off_variable), coverage >= demand per
// day-shift, at most max_days working days per person. Feasibility by maximum
// flow: source -> person (max_days) -> person-day (1) -> day-shift (1, when
// allowed) -> sink (demand); satisfiable exactly when the flow reaches
// days x shifts x demand. The objective counts unwanted shifts (optimum not
// known).
struct rota_params {
  std::int64_t people = 12;
  std::int64_t days = 7;
  std::int64_t shifts = 3;
  std::int64_t demand = 2;
  std::int64_t max_days = 5;  // 0: the least value that is feasible (+ max_days_offset)
  std::int64_t max_days_offset = 0;
  std::int64_t available_percent = 85;
  std::int64_t qualified_percent = 75;
  bool off_variable = false;
  std::uint64_t seed = 1;
};

[[nodiscard]] inline family_instance rota(const rota_params& p) {
  detail::seeded_rng rng(p.seed);
  const auto P = static_cast<std::size_t>(p.people);
  const auto D = static_cast<std::size_t>(p.days);
  const auto S = static_cast<std::size_t>(p.shifts);
  std::vector<bool> available(P * D);
  std::vector<bool> qualified(P * S);
  for (std::size_t i = 0; i < available.size(); ++i) available[i] = rng.chance(static_cast<int>(p.available_percent));
  for (std::size_t i = 0; i < qualified.size(); ++i) qualified[i] = rng.chance(static_cast<int>(p.qualified_percent));
  std::vector<std::int64_t> preference(P * D * S);
  for (auto& c : preference) c = rng.chance(20) ? rng.between(1, 5) : 0;

  const auto feasible = [&](std::int64_t max_days) {
    const std::size_t source = 0;
    const std::size_t sink = 1;
    const std::size_t person0 = 2;
    const std::size_t person_day0 = person0 + P;
    const std::size_t slot0 = person_day0 + P * D;
    detail::max_flow net(slot0 + D * S);
    for (std::size_t q = 0; q < P; ++q) {
      net.edge(source, person0 + q, max_days);
      for (std::size_t d = 0; d < D; ++d) {
        if (!available[q * D + d]) continue;
        net.edge(person0 + q, person_day0 + q * D + d, 1);
        for (std::size_t s = 0; s < S; ++s)
          if (qualified[q * S + s]) net.edge(person_day0 + q * D + d, slot0 + d * S + s, 1);
      }
    }
    for (std::size_t slot = 0; slot < D * S; ++slot) net.edge(slot0 + slot, sink, p.demand);
    return net.run(source, sink) == p.demand * static_cast<std::int64_t>(D * S);
  };
  std::int64_t max_days = p.max_days;
  if (max_days == 0) {
    max_days = static_cast<std::int64_t>(D);
    if (feasible(max_days)) {
      while (max_days > 0 && feasible(max_days - 1)) --max_days;
    } else {
      max_days = static_cast<std::int64_t>(D) + 1;  // even every day is not enough
    }
    max_days += p.max_days_offset;
  }

  family_instance f;
  f.family = "rota";
  f.name = "rota-p" + std::to_string(p.people) + "-d" + std::to_string(p.days) + "-s" + std::to_string(p.shifts) +
           "-r" + std::to_string(p.demand) + "-k" + std::to_string(max_days) + (p.off_variable ? "-eo" : "") + "-s" +
           std::to_string(p.seed);
  std::vector<std::int32_t> var(P * D * S, 0);
  std::int32_t next = 0;
  for (std::size_t q = 0; q < P; ++q)
    for (std::size_t d = 0; d < D; ++d)
      for (std::size_t s = 0; s < S; ++s)
        if (available[q * D + d] && qualified[q * S + s]) var[(q * D + d) * S + s] = ++next;
  for (std::size_t q = 0; q < P; ++q)
    for (std::size_t d = 0; d < D; ++d) {
      std::vector<literal> day;
      for (std::size_t s = 0; s < S; ++s)
        if (var[(q * D + d) * S + s] != 0) day.emplace_back(var[(q * D + d) * S + s]);
      if (p.off_variable) {
        day.emplace_back(++next);
        f.rows.push_back(detail::group_row(day, row_group::exactly_one, "person-day"));
      } else if (day.size() > 1) {
        f.rows.push_back(detail::group_row(day, row_group::at_most_one, "person-day"));
      }
    }
  for (std::size_t d = 0; d < D; ++d)
    for (std::size_t s = 0; s < S; ++s) {
      model_row r;
      for (std::size_t q = 0; q < P; ++q)
        if (var[(q * D + d) * S + s] != 0) r.terms.push_back({1, literal(var[(q * D + d) * S + s])});
      r.rel = relation::ge;
      r.bound = p.demand;
      r.label = "cover day " + std::to_string(d) + " shift " + std::to_string(s);
      f.rows.push_back(std::move(r));
    }
  for (std::size_t q = 0; q < P; ++q) {
    model_row r;
    for (std::size_t i = 0; i < D * S; ++i)
      if (var[q * D * S + i] != 0) r.terms.push_back({1, literal(var[q * D * S + i])});
    r.rel = relation::le;
    r.bound = max_days;
    r.label = "working days person " + std::to_string(q);
    f.rows.push_back(std::move(r));
  }
  for (std::size_t i = 0; i < var.size(); ++i)
    if (var[i] != 0 && preference[i] != 0) f.objective.push_back({preference[i], literal(var[i])});
  f.variables = next;
  f.status = feasible(max_days) ? known_status::sat : known_status::unsat;
  f.why = "maximum flow";
  return f;
}

// ---------------------------------------------------------------------------
// Time-indexed scheduling: jobs cut from the rectangle horizon x capacity by
// guillotine cuts (each cut splits a piece in time or in resource), so the
// jobs fill it exactly. Variable s(j, t) = job j starts at t, for
// t = 0..horizon - duration_j; exactly one start per job; a resource row per
// time step (the demands of the jobs running then) <= capacity. Satisfiable
// at horizon_offset >= 0 (the cut positions are a schedule); unsatisfiable at
// -1 (energy: sum duration x demand = horizon x capacity > (horizon - 1) x
// capacity). The objective is the sum of start times (optimum not known).
struct scheduling_params {
  std::int64_t jobs = 12;
  std::int64_t horizon = 24;
  std::int64_t capacity = 6;
  std::int64_t horizon_offset = 0;
  std::uint64_t seed = 1;
};

[[nodiscard]] inline family_instance scheduling(const scheduling_params& p) {
  detail::seeded_rng rng(p.seed);
  struct piece {
    std::int64_t duration;
    std::int64_t demand;
  };
  // The first cut is in time with both sides >= 2, so no job spans the
  // horizon (which would leave it no start one step shorter).
  const std::int64_t first = rng.between(2, p.horizon - 2);
  std::vector<piece> pieces{{first, p.capacity}, {p.horizon - first, p.capacity}};
  int attempts = 0;
  while (static_cast<std::int64_t>(pieces.size()) < p.jobs && attempts < 100000) {
    ++attempts;
    const auto i = static_cast<std::size_t>(rng.between(0, static_cast<std::int64_t>(pieces.size()) - 1));
    const piece c = pieces[i];
    const bool in_time = rng.chance(50);
    if (in_time && c.duration >= 2) {
      const std::int64_t cut = rng.between(1, c.duration - 1);
      pieces[i] = {cut, c.demand};
      pieces.push_back({c.duration - cut, c.demand});
    } else if (!in_time && c.demand >= 2) {
      const std::int64_t cut = rng.between(1, c.demand - 1);
      pieces[i] = {c.duration, cut};
      pieces.push_back({c.duration, c.demand - cut});
    }
  }
  rng.shuffle(pieces);
  const std::int64_t horizon = p.horizon + p.horizon_offset;
  family_instance f;
  f.family = "scheduling";
  f.name = "sched-j" + std::to_string(pieces.size()) + "-h" + std::to_string(horizon) + "-c" +
           std::to_string(p.capacity) + "-s" + std::to_string(p.seed);
  std::vector<std::int32_t> first_var(pieces.size());
  std::int32_t next = 0;
  for (std::size_t j = 0; j < pieces.size(); ++j) {
    first_var[j] = next + 1;
    const std::int64_t starts = horizon - pieces[j].duration + 1;
    std::vector<literal> one;
    for (std::int64_t t = 0; t < starts; ++t) one.emplace_back(++next);
    f.rows.push_back(detail::group_row(one, row_group::exactly_one, "start job " + std::to_string(j)));
    for (std::int64_t t = 1; t < starts; ++t)
      f.objective.push_back({t, literal(first_var[j] + static_cast<std::int32_t>(t))});
  }
  for (std::int64_t t = 0; t < horizon; ++t) {
    model_row r;
    for (std::size_t j = 0; j < pieces.size(); ++j) {
      const std::int64_t last_start = horizon - pieces[j].duration;
      for (std::int64_t s = std::max<std::int64_t>(0, t - pieces[j].duration + 1); s <= std::min(t, last_start); ++s)
        r.terms.push_back({pieces[j].demand, literal(first_var[j] + static_cast<std::int32_t>(s))});
    }
    r.rel = relation::le;
    r.bound = p.capacity;
    r.label = "resource at " + std::to_string(t);
    f.rows.push_back(std::move(r));
  }
  f.variables = next;
  f.status = p.horizon_offset >= 0 ? known_status::sat : known_status::unsat;
  f.why = p.horizon_offset >= 0 ? "guillotine cuts are a schedule" : "energy exceeds (horizon) x capacity";
  return f;
}

// ---------------------------------------------------------------------------
// Weighted assignment: tasks on machines, exactly one machine per task, a
// load row per machine (machine-dependent loads) <= its capacity, and the
// cost row <= budget. Capacities are the loads of "every task on its
// cheapest machine" plus capacity_slack percent, so that assignment is
// feasible; no assignment costs less than the sum of cheapest costs, which is
// therefore the optimum. budget_offset 0 is satisfiable, -1 unsatisfiable.
struct assignment_params {
  std::int64_t tasks = 40;
  std::int64_t machines = 6;
  std::int64_t max_cost = 20;
  std::int64_t max_load = 10;
  std::int64_t capacity_slack = 0;  // percent
  std::int64_t budget_offset = 0;
  bool cost_row = true;  // false: only the objective, no budget row
  std::uint64_t seed = 1;
};

[[nodiscard]] inline family_instance weighted_assignment(const assignment_params& p) {
  detail::seeded_rng rng(p.seed);
  const auto T = static_cast<std::size_t>(p.tasks);
  const auto M = static_cast<std::size_t>(p.machines);
  std::vector<std::int64_t> cost(T * M);
  std::vector<std::int64_t> load(T * M);
  for (auto& c : cost) c = rng.between(1, p.max_cost);
  for (auto& l : load) l = rng.between(1, p.max_load);
  std::vector<std::int64_t> used(M, 0);
  std::int64_t optimum = 0;
  for (std::size_t t = 0; t < T; ++t) {
    std::size_t best = 0;
    for (std::size_t m = 1; m < M; ++m)
      if (cost[t * M + m] < cost[t * M + best]) best = m;
    used[best] += load[t * M + best];
    optimum += cost[t * M + best];
  }
  const auto x = [&](std::size_t t, std::size_t m) { return literal(static_cast<std::int32_t>(t * M + m + 1)); };
  family_instance f;
  f.family = "assignment";
  f.name = "asg-t" + std::to_string(p.tasks) + "-m" + std::to_string(p.machines) + "-sl" +
           std::to_string(p.capacity_slack) + (p.budget_offset >= 0 ? "+" : "") + std::to_string(p.budget_offset) +
           "-s" + std::to_string(p.seed);
  f.variables = static_cast<std::int32_t>(T * M);
  for (std::size_t t = 0; t < T; ++t) {
    std::vector<literal> one;
    for (std::size_t m = 0; m < M; ++m) one.push_back(x(t, m));
    f.rows.push_back(detail::group_row(one, row_group::exactly_one, "task " + std::to_string(t)));
  }
  for (std::size_t m = 0; m < M; ++m) {
    model_row r;
    for (std::size_t t = 0; t < T; ++t) r.terms.push_back({load[t * M + m], x(t, m)});
    r.rel = relation::le;
    r.bound = used[m] + used[m] * p.capacity_slack / 100;
    r.label = "load machine " + std::to_string(m);
    f.rows.push_back(std::move(r));
  }
  for (std::size_t t = 0; t < T; ++t)
    for (std::size_t m = 0; m < M; ++m) f.objective.push_back({cost[t * M + m], x(t, m)});
  f.optimum = optimum;
  if (p.cost_row) {
    model_row r;
    r.terms = f.objective;
    r.rel = relation::le;
    r.bound = optimum + p.budget_offset;
    r.label = "budget";
    f.rows.push_back(std::move(r));
    f.status = p.budget_offset >= 0 ? known_status::sat : known_status::unsat;
  } else {
    f.status = known_status::sat;
  }
  f.why = "cheapest machine per task is feasible and a lower bound";
  return f;
}

// ===========================================================================
// Optimisation instances with reference optima (bench_optimize,
// test_optimize_bounds). Each instance carries every constraint as a linear
// row (the optimiser's relaxation reads them) and its optimum computed
// independently of the optimiser: dynamic programs for the knapsacks (below,
// beside the generators), the volume bound for bin packing built to meet it,
// GLPK's MIP solver (branch and cut) for assignment and rota models. Needs
// GLPK's header (Debian's libglpk-dev) and, where glpk_optimum is used, the
// library; the seeds are fixed (std::mt19937_64 and the standard's
// distributions, as these instances have been measured with).
#if __has_include(<glpk.h>)
namespace optimize {

namespace cw = clausewright;

struct instance {
  std::string name;
  std::int32_t variables = 0;
  std::vector<cw::linear_row> rows;  // every constraint of the model
  std::vector<cw::term> objective;   // minimised
  std::optional<std::int64_t> optimum;
  std::string reference;  // where the optimum comes from
  // The value as the scenario states it: packed value for the knapsacks
  // (sign -1: the optimiser minimises the value left behind), else the same.
  std::int64_t natural_offset = 0;
  std::int64_t natural_sign = 1;
  [[nodiscard]] std::int64_t natural(std::int64_t minimised) const { return natural_offset + natural_sign * minimised; }

  // Whether an assignment (index 0 unused) satisfies every row, and its value.
  [[nodiscard]] bool feasible(const std::vector<bool>& x) const {
    return std::all_of(rows.begin(), rows.end(), [&](const cw::linear_row& r) {
      const std::int64_t s = sum(r.terms, x);
      return r.rel == cw::relation::le ? s <= r.bound : r.rel == cw::relation::ge ? s >= r.bound : s == r.bound;
    });
  }
  [[nodiscard]] std::int64_t value(const std::vector<bool>& x) const { return sum(objective, x); }
  static std::int64_t sum(const std::vector<cw::term>& terms, const std::vector<bool>& x) {
    std::int64_t s = 0;
    for (const cw::term& t : terms) {
      const bool v = static_cast<std::size_t>(t.lit.var()) < x.size() && x[static_cast<std::size_t>(t.lit.var())];
      if (t.lit.negative() ? !v : v) s += t.coefficient;
    }
    return s;
  }
};

inline cw::literal var(std::int32_t v) { return cw::literal(v); }

// --- references -------------------------------------------------------------

// The optimum of the model as a 0-1 integer programme, by GLPK's branch and
// cut; nothing when GLPK does not prove it within the time limit.
inline std::optional<std::int64_t> glpk_optimum(const instance& m, int seconds = 60) {
  glp_prob* lp = glp_create_prob();
  glp_set_obj_dir(lp, GLP_MIN);
  glp_add_cols(lp, m.variables);
  double constant = 0;
  std::vector<double> cost(static_cast<std::size_t>(m.variables) + 1, 0.0);
  for (const cw::term& t : m.objective) {
    const auto c = static_cast<double>(t.coefficient);
    if (t.lit.negative()) {
      constant += c;
      cost[static_cast<std::size_t>(t.lit.var())] -= c;
    } else {
      cost[static_cast<std::size_t>(t.lit.var())] += c;
    }
  }
  for (int j = 1; j <= m.variables; ++j) {
    glp_set_col_kind(lp, j, GLP_BV);
    glp_set_obj_coef(lp, j, cost[static_cast<std::size_t>(j)]);
  }
  glp_set_obj_coef(lp, 0, constant);
  glp_add_rows(lp, static_cast<int>(m.rows.size()));
  std::vector<int> ia{0};
  std::vector<int> ja{0};
  std::vector<double> ar{0.0};
  int row = 0;
  for (const cw::linear_row& r : m.rows) {
    ++row;
    double shift = 0;
    for (const cw::term& t : r.terms) {
      ia.push_back(row);
      ja.push_back(t.lit.var());
      ar.push_back(t.lit.negative() ? -static_cast<double>(t.coefficient) : static_cast<double>(t.coefficient));
      if (t.lit.negative()) shift += static_cast<double>(t.coefficient);
    }
    const double rhs = static_cast<double>(r.bound) - shift;
    glp_set_row_bnds(lp, row,
                     r.rel == cw::relation::le   ? GLP_UP
                     : r.rel == cw::relation::ge ? GLP_LO
                                                 : GLP_FX,
                     rhs, rhs);
  }
  glp_load_matrix(lp, static_cast<int>(ia.size()) - 1, ia.data(), ja.data(), ar.data());
  glp_iocp parameters;
  glp_init_iocp(&parameters);
  parameters.presolve = GLP_ON;
  parameters.msg_lev = GLP_MSG_OFF;
  parameters.tm_lim = seconds * 1000;
  const int code = glp_intopt(lp, &parameters);
  std::optional<std::int64_t> out;
  if (code == 0 && glp_mip_status(lp) == GLP_OPT) out = std::llround(glp_mip_obj_val(lp));
  glp_delete_prob(lp);
  return out;
}

// --- generators ------------------------------------------------------------

// Weights and values 1..1000, capacity half the weight sum; minimise the
// value left behind. Reference: the DP (knapsack_optimum above).
inline instance knapsack(int n, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> d(1, 1000);
  std::vector<std::int64_t> w(static_cast<std::size_t>(n));
  std::vector<std::int64_t> v(static_cast<std::size_t>(n));
  instance m;
  m.name = "knapsack n=" + std::to_string(n);
  m.variables = n;
  cw::linear_row cap;
  std::int64_t total_value = 0;
  for (int i = 0; i < n; ++i) {
    w[static_cast<std::size_t>(i)] = d(rng);
    v[static_cast<std::size_t>(i)] = d(rng);
    cap.terms.push_back({w[static_cast<std::size_t>(i)], var(i + 1)});
    m.objective.push_back({v[static_cast<std::size_t>(i)], ~var(i + 1)});
    total_value += v[static_cast<std::size_t>(i)];
  }
  cap.bound = std::accumulate(w.begin(), w.end(), std::int64_t{0}) / 2;
  m.rows.push_back(cap);
  m.optimum = total_value - knapsack_optimum({w}, {cap.bound}, v);
  m.reference = "DP";
  m.natural_offset = total_value;
  m.natural_sign = -1;
  return m;
}

// Two capacity rows, weights 1..60 and values 1..1000. Reference: the DP.
inline instance multi_knapsack(int n, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> dw(1, 60);
  std::uniform_int_distribution<std::int64_t> dv(1, 1000);
  std::vector<std::int64_t> w1;
  std::vector<std::int64_t> w2;
  std::vector<std::int64_t> v;
  instance m;
  m.name = "multi-knapsack n=" + std::to_string(n);
  m.variables = n;
  cw::linear_row r1;
  cw::linear_row r2;
  for (int i = 0; i < n; ++i) {
    w1.push_back(dw(rng));
    w2.push_back(dw(rng));
    v.push_back(dv(rng));
    r1.terms.push_back({w1.back(), var(i + 1)});
    r2.terms.push_back({w2.back(), var(i + 1)});
    m.objective.push_back({v.back(), ~var(i + 1)});
  }
  r1.bound = std::accumulate(w1.begin(), w1.end(), std::int64_t{0}) / 2;
  r2.bound = std::accumulate(w2.begin(), w2.end(), std::int64_t{0}) / 2;
  m.rows = {r1, r2};
  const std::int64_t total = std::accumulate(v.begin(), v.end(), std::int64_t{0});
  m.optimum = total - knapsack_optimum({w1, w2}, {r1.bound, r2.bound}, v);
  m.reference = "DP";
  m.natural_offset = total;
  m.natural_sign = -1;
  return m;
}

// `bins` bins of capacity 100, each cut into `per_bin` items: the items fill
// exactly `bins` bins, so the optimum is the volume bound. The model offers
// a few bins more. x(i,j) item i in bin j, y(j) bin j used; bins in order.
inline instance bin_packing(int bins, int per_bin, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  constexpr std::int64_t capacity = 100;
  std::vector<std::int64_t> size;
  for (int b = 0; b < bins; ++b) {
    std::vector<std::int64_t> cuts{0, capacity};
    std::uniform_int_distribution<std::int64_t> d(1, capacity - 1);
    while (static_cast<int>(cuts.size()) < per_bin + 1) {
      const std::int64_t c = d(rng);
      if (std::find(cuts.begin(), cuts.end(), c) == cuts.end()) cuts.push_back(c);
    }
    std::sort(cuts.begin(), cuts.end());
    for (std::size_t k = 1; k < cuts.size(); ++k) size.push_back(cuts[k] - cuts[k - 1]);
  }
  std::shuffle(size.begin(), size.end(), rng);
  const int items = static_cast<int>(size.size());
  const int offered = bins + std::max(2, bins / 10);
  instance m;
  m.name = "bin packing " + std::to_string(items) + " items";
  auto x = [&](int i, int j) { return var(i * offered + j + 1); };
  auto y = [&](int j) { return var(items * offered + j + 1); };
  m.variables = items * offered + offered;
  for (int i = 0; i < items; ++i) {
    cw::linear_row one{{}, cw::relation::eq, 1};
    for (int j = 0; j < offered; ++j) one.terms.push_back({1, x(i, j)});
    m.rows.push_back(one);
  }
  for (int j = 0; j < offered; ++j) {
    cw::linear_row load{{}, cw::relation::le, 0};
    for (int i = 0; i < items; ++i) load.terms.push_back({size[static_cast<std::size_t>(i)], x(i, j)});
    load.terms.push_back({-capacity, y(j)});
    m.rows.push_back(load);
    if (j + 1 < offered) m.rows.push_back({{{1, y(j)}, {-1, y(j + 1)}}, cw::relation::ge, 0});
    m.objective.push_back({1, y(j)});
  }
  m.optimum = bins;
  m.reference = "volume bound";
  return m;
}

// Tasks to machines: each task on one machine, machine capacities, costs
// 10..50 and resources 5..25 per pair. Reference: GLPK.
inline instance assignment(int tasks, int machines, std::uint64_t seed, bool with_reference = true) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> dc(10, 50);
  std::uniform_int_distribution<std::int64_t> dr(5, 25);
  instance m;
  m.name = "assignment " + std::to_string(tasks) + "x" + std::to_string(machines);
  m.variables = tasks * machines;
  auto x = [&](int t, int k) { return var(t * machines + k + 1); };
  std::vector<std::vector<std::int64_t>> r(static_cast<std::size_t>(tasks));
  for (int t = 0; t < tasks; ++t) {
    cw::linear_row one{{}, cw::relation::eq, 1};
    for (int k = 0; k < machines; ++k) {
      one.terms.push_back({1, x(t, k)});
      m.objective.push_back({dc(rng), x(t, k)});
      r[static_cast<std::size_t>(t)].push_back(dr(rng));
    }
    m.rows.push_back(one);
  }
  for (int k = 0; k < machines; ++k) {
    cw::linear_row load{{}, cw::relation::le, 0};
    std::int64_t sum = 0;
    for (int t = 0; t < tasks; ++t) {
      load.terms.push_back({r[static_cast<std::size_t>(t)][static_cast<std::size_t>(k)], x(t, k)});
      sum += r[static_cast<std::size_t>(t)][static_cast<std::size_t>(k)];
    }
    load.bound = sum * 3 / (2 * machines);  // half again the fair share: tight, not too tight
    m.rows.push_back(load);
  }
  if (with_reference) {
    m.optimum = glpk_optimum(m);
    m.reference = "GLPK MIP";
  }
  return m;
}

// A rota: `staff` people, 7 days, 2 shifts a day each needing `need`
// people, at most one shift a day and `most` a week per person, a dislike
// 0..5 per person and shift. Reference: GLPK.
inline instance rota(int staff, int need, int most, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> dislike(0, 5);
  constexpr int days = 7;
  constexpr int shifts = 2;
  instance m;
  m.name = "rota " + std::to_string(staff) + " staff";
  m.variables = staff * days * shifts;
  auto x = [&](int p, int d, int s) { return var((p * days + d) * shifts + s + 1); };
  for (int d = 0; d < days; ++d)
    for (int s = 0; s < shifts; ++s) {
      cw::linear_row cover{{}, cw::relation::eq, need};
      for (int p = 0; p < staff; ++p) cover.terms.push_back({1, x(p, d, s)});
      m.rows.push_back(cover);
    }
  for (int p = 0; p < staff; ++p) {
    cw::linear_row week{{}, cw::relation::le, most};
    for (int d = 0; d < days; ++d) {
      m.rows.push_back({{{1, x(p, d, 0)}, {1, x(p, d, 1)}}, cw::relation::le, 1});
      if (d + 1 < days) m.rows.push_back({{{1, x(p, d, 1)}, {1, x(p, d + 1, 0)}}, cw::relation::le, 1});
      for (int s = 0; s < shifts; ++s) {
        week.terms.push_back({1, x(p, d, s)});
        const std::int64_t w = dislike(rng);
        if (w != 0) m.objective.push_back({w, x(p, d, s)});
      }
    }
    m.rows.push_back(week);
  }
  m.optimum = glpk_optimum(m);
  m.reference = "GLPK MIP";
  return m;
}

// Encodes the instance into the solver (every row through the encoder;
// rows with weights other than 1 by `weighted` when given and small enough).
template <class Solver>
void encode(const instance& m, Solver& solver, cw::variable_pool& pool, std::optional<cw::method_id> weighted = {}) {
  cw::encoder enc(solver, pool);
  for (const cw::linear_row& r : m.rows) {
    const bool unit = std::all_of(r.terms.begin(), r.terms.end(), [](const cw::term& t) { return t.coefficient == 1; });
    // A diagram has at most terms x (bound + 1) nodes: beyond a million the
    // encoder's pick is taken instead.
    std::int64_t reach = r.bound + 1;
    for (const cw::term& t : r.terms) reach += t.coefficient < 0 ? -t.coefficient : 0;
    const bool small = static_cast<double>(r.terms.size()) * static_cast<double>(reach) <= 1e6;
    if (!unit && weighted && small) {
      // A diagram over its node budget leaves only its own node literals
      // constrained: the encoder's pick takes over.
      try {
        enc.linear(r.terms, r.rel, r.bound, weighted);
        continue;
      } catch (const cw::error& e) {
        if (e.id() != cw::error_id::over_budget) throw;
      }
    }
    enc.linear(r.terms, r.rel, r.bound);
  }
}

}  // namespace optimize
#endif  // __has_include(<glpk.h>)
// ===========================================================================

// ---------------------------------------------------------------------------
// Writers.

// OPB (the Pseudo-Boolean Competition input format): "<=" rows are written
// as ">=" with the signs turned, negated literals as ~x.
[[nodiscard]] inline std::string to_opb(const family_instance& f) {
  std::string out = "* #variable= " + std::to_string(f.variables) + " #constraint= " + std::to_string(f.rows.size()) +
                    "\n* " + f.family + " " + f.name + " (" + to_string(f.status) + ": " + f.why + ")\n";
  const auto put_term = [&](std::int64_t a, literal l) {
    if (a >= 0) out += '+';
    out += std::to_string(a);
    out += l.negative() ? " ~x" : " x";
    out += std::to_string(l.var());
    out += ' ';
  };
  if (!f.objective.empty()) {
    out += "min: ";
    for (const term& t : f.objective) put_term(t.coefficient, t.lit);
    out += ";\n";
  }
  for (const model_row& r : f.rows) {
    const std::int64_t sign = r.rel == relation::le ? -1 : 1;
    for (const term& t : r.terms) put_term(sign * t.coefficient, t.lit);
    out += r.rel == relation::eq ? "= " : ">= ";
    out += std::to_string(sign * r.bound);
    out += " ;\n";
  }
  return out;
}

// A cw::model with the groups marked as at-most-one / exactly-one.
[[nodiscard]] inline model to_model(const family_instance& f) {
  model m;
  m.reserve_variables(f.variables);
  for (const model_row& r : f.rows) {
    constraint_settings s;
    s.name = r.label;
    if (r.group == row_group::at_most_one) s.form = constraint_form::at_most_one;
    if (r.group == row_group::exactly_one) s.form = constraint_form::exactly_one;
    m.add_constraint(r.terms, r.rel, r.bound, s);
  }
  if (!f.objective.empty()) m.set_objective(f.objective);
  return m;
}

}  // namespace clausewright::bench

// ===========================================================================
// At-most-one group families (bench_groups, tests/test_groups.cpp).
//
// Rows whose literals fall into the model's exactly-one sets; the
// exactly-ones come first, so a streaming reader knows them before the rows.
// Status unknown (no claim is made); the benchmark checks every answer
// against the rows.
//   - scheduling: J jobs of duration 1..6 (or shortest..longest) and demand
//     1..5 per resource,
//     start literals s(j,t) for t = 0..H-d_j, exactly one start per job
//     ("job j"); per resource and time step tau the row "res R t TAU": sum
//     over the starts running at tau of demand * s(j,t) <= capacity (130%,
//     or capacity_percent, of the average load, at least the largest
//     demand); objective: the
//     total start time, sum t * s(j,t) (the groups are the jobs again).
//     `modes` > 1: each job has modes k = 0.. (duration + 2k, demand - k, at
//     least 1), one exactly-one over all (mode, start) pairs of the job, so
//     the coefficients inside a group differ.
//   - assignment: T tasks on M machines, x(t,m), exactly one machine per
//     task ("task t"); a load row per machine (sizes 1..5, capacity 1.15
//     times the even share: one literal per task, no groups); two budget rows
//     "budget B" over all pairs (costs 1..10, bound the cheapest choice per
//     task plus half the way to the average); objective: a third cost 1..10.
// ===========================================================================

namespace clausewright::bench {

[[nodiscard]] inline family_instance group_scheduling(int jobs, int horizon, int resources, int modes,
                                                      std::uint64_t seed, int shortest = 1, int longest = 6,
                                                      int capacity_percent = 130) {
  detail::seeded_rng rng(seed);
  family_instance f;
  f.family = modes == 1 ? "scheduling" : "multimode";
  f.name = f.family + " J=" + std::to_string(jobs) + " H=" + std::to_string(horizon) +
           " R=" + std::to_string(resources) + (modes > 1 ? " modes=" + std::to_string(modes) : std::string()) +
           " d=" + std::to_string(shortest) + ".." + std::to_string(longest) +
           " cap=" + std::to_string(capacity_percent) + "%";
  struct start {
    int time;
    int duration;
    std::vector<std::int64_t> demand;
    literal lit;
  };
  const auto r_count = static_cast<std::size_t>(resources);
  std::vector<start> starts;
  std::vector<double> work(r_count, 0.0);
  std::vector<std::int64_t> largest(r_count, 1);
  for (int j = 0; j < jobs; ++j) {
    std::vector<literal> choice;
    const auto base_duration = static_cast<int>(rng.between(shortest, longest));
    std::vector<std::int64_t> base_demand(r_count);
    for (auto& d : base_demand) d = rng.between(1, 5);
    for (int mode = 0; mode < modes; ++mode) {
      const int duration = base_duration + 2 * mode;
      std::vector<std::int64_t> demand;
      for (std::size_t r = 0; r < r_count; ++r) {
        demand.push_back(std::max<std::int64_t>(1, base_demand[r] - mode));
        largest[r] = std::max(largest[r], demand.back());
        work[r] += static_cast<double>(duration * demand.back()) / modes;
      }
      for (int t = 0; t + duration <= horizon; ++t) {
        starts.push_back({t, duration, demand, literal(++f.variables)});
        choice.push_back(starts.back().lit);
        f.objective.push_back({t, starts.back().lit});
      }
    }
    f.rows.push_back(detail::group_row(std::move(choice), row_group::exactly_one, "job " + std::to_string(j)));
  }
  for (std::size_t r = 0; r < r_count; ++r) {
    const auto capacity = std::max<std::int64_t>(
        largest[r], static_cast<std::int64_t>(capacity_percent * work[r] / (100.0 * horizon)) + 1);
    for (int tau = 0; tau < horizon; ++tau) {
      model_row w;
      w.bound = capacity;
      w.label = "res " + std::to_string(r) + " t " + std::to_string(tau);
      for (const start& s : starts)
        if (s.time <= tau && tau < s.time + s.duration) w.terms.push_back({s.demand[r], s.lit});
      if (!w.terms.empty()) f.rows.push_back(std::move(w));
    }
  }
  f.why = "no claim (generated; answers are checked against the rows)";
  return f;
}

[[nodiscard]] inline family_instance group_assignment(int tasks, int machines, std::uint64_t seed) {
  detail::seeded_rng rng(seed);
  family_instance f;
  f.family = "assignment";
  f.name = "assignment T=" + std::to_string(tasks) + " M=" + std::to_string(machines);
  std::vector<std::vector<literal>> x(static_cast<std::size_t>(tasks));
  for (auto& row : x) {
    for (int k = 0; k < machines; ++k) row.push_back(literal(++f.variables));
    f.rows.push_back(detail::group_row(row, row_group::exactly_one, "task " + std::to_string(&row - x.data())));
  }
  std::vector<std::int64_t> size;
  std::int64_t total = 0;
  for (int t = 0; t < tasks; ++t) {
    size.push_back(rng.between(1, 5));
    total += size.back();
  }
  for (int k = 0; k < machines; ++k) {
    model_row w;
    w.bound = static_cast<std::int64_t>(1.15 * static_cast<double>(total) / machines) + 1;
    w.label = "load " + std::to_string(k);
    for (std::size_t t = 0; t < x.size(); ++t) w.terms.push_back({size[t], x[t][static_cast<std::size_t>(k)]});
    f.rows.push_back(std::move(w));
  }
  for (int b = 0; b < 3; ++b) {
    std::vector<term> terms;
    double cheapest = 0;
    double average = 0;
    for (const auto& row : x) {
      std::int64_t low = 10;
      std::int64_t sum = 0;
      for (const literal l : row) {
        const std::int64_t c = rng.between(1, 10);
        low = std::min(low, c);
        sum += c;
        terms.push_back({c, l});
      }
      cheapest += static_cast<double>(low);
      average += static_cast<double>(sum) / machines;
    }
    if (b == 2) {
      f.objective = std::move(terms);
      break;
    }
    model_row w;
    w.terms = std::move(terms);
    w.bound = static_cast<std::int64_t>(cheapest + 0.5 * (average - cheapest));
    w.label = "budget " + std::to_string(b);
    f.rows.push_back(std::move(w));
  }
  f.why = "no claim (generated; answers are checked against the rows)";
  return f;
}

}  // namespace clausewright::bench
