// clausewright: measuring encodings and choosing between them.
//
// The size of an encoding is known exactly before it is written: from a
// closed form where the structure allows one (predict.hpp), else by a dry run
// into a counting sink with a scratch copy of the variable pool. A budget
// stops a dry run that grows past it, so a method that would explode is
// reported as over budget ("more than N clauses") instead of exhausting time
// or memory; a cheap lower bound past the budget (predict.hpp) skips the dry
// run altogether.
//
// Choosing is cheap because a policy rarely needs every size: the methods are
// measured in order of expected size, and each dry run is stopped as soon as
// it can no longer win under the policy (its budget is what it must beat).
// The pick is the one full measurement would give (tests/test_model.cpp).
#pragma once

#include <algorithm>
#include <array>
#include <chrono>
#include <cstdint>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "methods.hpp"
#include "predict.hpp"
#include "sink.hpp"

namespace clausewright {

// A counting sink that throws error_id::over_budget once it passes `limit`
// clauses.
class budget_sink {
 public:
  explicit budget_sink(std::uint64_t clause_limit) : limit_(clause_limit) {}
  void add_clause(std::span<const literal> clause) {
    if (count_.clauses() >= limit_)
      throw error(error_id::over_budget, "encoding passed its budget of " + std::to_string(limit_) + " clauses");
    count_.add_clause(clause);
  }
  [[nodiscard]] const counting_sink& counts() const noexcept { return count_; }

 private:
  counting_sink count_;
  std::uint64_t limit_;
};

inline constexpr std::uint64_t default_clause_budget = 50'000'000;

struct method_measurement {
  method_id method;
  encoding_size size;        // exact; when over_budget, a lower bound ("more than size.clauses")
  bool over_budget = false;  // stopped (or never started) past its budget
  double seconds = 0;        // time of the dry run (0: a closed form or a bound decided)
};

// Dry run of one method: its encoder into a counting sink, up to the budget.
// Does not change `pool`. A run out of variables counts as over budget.
[[nodiscard]] inline method_measurement dry_run(method_id id, const variable_pool& pool, const normalized_constraint& c,
                                                const encode_options& options = {},
                                                std::uint64_t clause_budget = default_clause_budget) {
  method_measurement m{id, {}, false, 0};
  variable_pool scratch = pool;
  budget_sink sink(clause_budget);
  const auto start = std::chrono::steady_clock::now();
  try {
    encode_with(id, sink, scratch, c, options);
  } catch (const error& e) {
    if (e.id() != error_id::over_budget && e.id() != error_id::overflow) throw;
    m.over_budget = true;
  }
  m.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  m.size = sink.counts().size(static_cast<std::uint64_t>(scratch.top() - pool.top()));
  return m;
}

// The size of one method on `c`: its closed form where one is known
// (predict.hpp, tested equal to the dry run), else "more than the budget"
// when a cheap lower bound passes it, else the dry run.
[[nodiscard]] inline method_measurement measure(method_id id, const variable_pool& pool, const normalized_constraint& c,
                                                const encode_options& options = {},
                                                std::uint64_t clause_budget = default_clause_budget) {
  method_measurement m{id, {}, false, 0};
  if (const auto predicted = predict_size(id, c, options)) {
    m.size = *predicted;
    // Past the budget, or out of variables (as the dry run would be).
    m.over_budget = predicted->clauses > clause_budget ||
                    predicted->variables > static_cast<std::uint64_t>(max_variable - pool.top());
    return m;
  }
  if (const std::uint64_t least = clause_lower_bound(id, c, options, clause_budget); least > clause_budget) {
    m.size.clauses = least;
    m.over_budget = true;
    return m;
  }
  return dry_run(id, pool, c, options, clause_budget);
}

// Dry runs of every method that applies to `c`, in table order, each up to
// the budget.
[[nodiscard]] inline std::vector<method_measurement> measure_all(const variable_pool& pool,
                                                                 const normalized_constraint& c,
                                                                 const encode_options& options = {},
                                                                 std::uint64_t clause_budget = default_clause_budget) {
  std::vector<method_measurement> out;
  for (const auto& m : method_table)
    if (can_encode(m.id, c)) out.push_back(measure(m.id, pool, c, options, clause_budget));
  return out;
}

enum class selection_policy : std::uint8_t {
  smallest,                 // fewest clauses, then fewest auxiliary variables
  smallest_arc_consistent,  // the same among arc-consistent methods (falls back to smallest)
  balanced,                 // smallest arc-consistent unless it is more than
                            // `balanced_factor` times the clauses of the smallest
  propagating,              // default: balanced for at-most-one and cardinality; a weighted
                            // constraint keeps an arc-consistent method up to
                            // `propagating_allowance` clauses however small the smallest
                            // method is, the BDD first (the sequential weight counter first
                            // on rows of `long_row` inputs or more)
};

inline constexpr std::uint64_t balanced_factor = 4;
// The clauses a weighted constraint may spend on an arc-consistent encoding
// (in absolute terms) before the policy falls back to the smallest method.
// README "Choosing an encoding" gives the solve figures behind it.
inline constexpr std::uint64_t propagating_allowance = 1'000'000;
// From this many inputs on, a weighted row prefers the sequential weight
// counter to the BDD (README "Choosing an encoding").
inline constexpr std::size_t long_row = 100;

inline constexpr selection_policy default_policy = selection_policy::propagating;

[[nodiscard]] constexpr std::string_view to_string(selection_policy p) noexcept {
  switch (p) {
    case selection_policy::smallest:
      return "smallest";
    case selection_policy::smallest_arc_consistent:
      return "smallest-arc-consistent";
    case selection_policy::balanced:
      return "balanced";
    case selection_policy::propagating:
      return "propagating";
  }
  return "?";
}

inline constexpr std::array all_policies{selection_policy::smallest, selection_policy::smallest_arc_consistent,
                                         selection_policy::balanced, selection_policy::propagating};

[[nodiscard]] inline std::optional<selection_policy> find_policy(std::string_view name) noexcept {
  for (const auto p : all_policies)
    if (to_string(p) == name) return p;
  return std::nullopt;
}

namespace detail {
[[nodiscard]] inline bool smaller(const method_measurement& a, const method_measurement& b) noexcept {
  if (a.over_budget != b.over_budget) return !a.over_budget;
  if (a.size.clauses != b.size.clauses) return a.size.clauses < b.size.clauses;
  return a.size.variables < b.size.variables;
}

// The most clauses an arc-consistent method may have and still be preferred
// to the smallest method of `smallest` clauses.
[[nodiscard]] constexpr std::uint64_t arc_consistent_limit(selection_policy policy, const normalized_constraint& c,
                                                           std::uint64_t smallest) noexcept {
  const std::uint64_t base = smallest == 0 ? 1 : smallest;
  const std::uint64_t factor_limit = base > std::numeric_limits<std::uint64_t>::max() / balanced_factor
                                         ? std::numeric_limits<std::uint64_t>::max()
                                         : balanced_factor * base;
  switch (policy) {
    case selection_policy::smallest:
      return 0;
    case selection_policy::smallest_arc_consistent:
      return std::numeric_limits<std::uint64_t>::max();
    case selection_policy::balanced:
      return factor_limit;
    case selection_policy::propagating:
      return c.kind == constraint_kind::linear ? std::max(factor_limit, propagating_allowance) : factor_limit;
  }
  return factor_limit;
}
}  // namespace detail

namespace detail {
// The arc-consistent methods the policy prefers for `c`, in order (none:
// the smallest arc-consistent one).
[[nodiscard]] inline std::span<const method_id> preferred_methods(selection_policy policy,
                                                                  const normalized_constraint& c) noexcept {
  static constexpr std::array short_rows{method_id::bdd, method_id::sequential_weight_counter};
  static constexpr std::array long_rows{method_id::sequential_weight_counter, method_id::bdd};
  if (policy != selection_policy::propagating || c.kind != constraint_kind::linear) return {};
  return c.size() >= long_row ? std::span<const method_id>(long_rows) : std::span<const method_id>(short_rows);
}
}  // namespace detail

namespace detail {
// The policy's pick among the measurements `use` accepts.
template <class Use>
[[nodiscard]] const method_measurement* pick_among(std::span<const method_measurement> measured,
                                                   selection_policy policy, const normalized_constraint& c, Use&& use) {
  const method_measurement* best = nullptr;
  const method_measurement* best_ac = nullptr;
  for (const auto& m : measured) {
    if (m.over_budget || !use(m.method)) continue;
    if (best == nullptr || detail::smaller(m, *best)) best = &m;
    if (info(m.method).arc_consistent && (best_ac == nullptr || detail::smaller(m, *best_ac))) best_ac = &m;
  }
  if (best == nullptr) return nullptr;
  const std::uint64_t limit = detail::arc_consistent_limit(policy, c, best->size.clauses);
  for (const method_id preferred : detail::preferred_methods(policy, c))
    for (const auto& m : measured)
      if (m.method == preferred && !m.over_budget && m.size.clauses <= limit) return &m;
  if (best_ac != nullptr && best_ac->size.clauses <= limit) return best_ac;
  return best;
}

// Whether `policy` weighs the group methods against the group-blind pick
// (propagating) rather than as methods like the others.
[[nodiscard]] constexpr bool upgrades_to_groups(selection_policy policy) noexcept {
  return policy == selection_policy::propagating;
}

// The group method that wins against the group-blind pick `blind` (none:
// every group-blind method over budget): fewer clauses, and arc-consistent
// when the blind pick is; the smallest such. Null when none wins.
[[nodiscard]] inline const method_measurement* group_upgrade(std::span<const method_measurement> measured,
                                                             const method_measurement* blind) {
  const method_measurement* best = nullptr;
  for (const auto& m : measured) {
    if (m.over_budget || !info(m.method).needs_groups) continue;
    if (blind != nullptr) {
      if (m.size.clauses >= blind->size.clauses) continue;
      if (info(blind->method).arc_consistent && !info(m.method).arc_consistent) continue;
    }
    if (best == nullptr || detail::smaller(m, *best)) best = &m;
  }
  return best;
}
}  // namespace detail

// Picks from measurements by the policy. Throws when every method is over
// budget (or none applies). `propagating` picks among the group-blind methods
// first, then takes a group method (groups.hpp) where one wins: fewer
// clauses than that pick and arc-consistent when it is (README "Choosing an
// encoding"); the other policies weigh the group methods as any other.
[[nodiscard]] inline method_id pick(std::span<const method_measurement> measured, selection_policy policy,
                                    const normalized_constraint& c) {
  if (measured.empty())
    throw error(error_id::method_not_applicable,
                "no method in the table encodes a " + std::string(to_string(c.kind)) + " constraint", c.where());
  const method_measurement* chosen = nullptr;
  if (detail::upgrades_to_groups(policy)) {
    const method_measurement* blind =
        detail::pick_among(measured, policy, c, [](method_id id) { return !info(id).needs_groups; });
    const method_measurement* group = detail::group_upgrade(measured, blind);
    chosen = group != nullptr ? group : blind;
  } else {
    chosen = detail::pick_among(measured, policy, c, [](method_id) { return true; });
  }
  if (chosen == nullptr)
    throw error(error_id::over_budget, "every applicable method is over its budget for this constraint", c.where());
  return chosen->method;
}

// Measures every applicable method, in order of expected size, each stopped
// where it can no longer win under `policy` (but not before `floor` clauses,
// for statistics that want more than the pick). Returns them in table order;
// pick() on the result gives what it gives on measure_all().
[[nodiscard]] inline std::vector<method_measurement> measure_for_policy(
    const variable_pool& pool, const normalized_constraint& c, selection_policy policy,
    const encode_options& options = {}, std::uint64_t clause_budget = default_clause_budget, std::uint64_t floor = 0) {
  struct candidate {
    method_id id;
    std::optional<encoding_size> exact;
    std::uint64_t least;
    std::size_t row;
  };
  std::vector<candidate> order;
  std::vector<std::size_t> group_rows;  // measured after the others (propagating)
  bool any_ac = false;
  for (std::size_t row = 0; row < method_table.size(); ++row) {
    const method_info& m = method_table[row];
    if (!can_encode(m.id, c)) continue;
    if (m.needs_groups && detail::upgrades_to_groups(policy)) {
      group_rows.push_back(row);
      continue;
    }
    candidate k{m.id, predict_size(m.id, c, options), 0, row};
    k.least = k.exact ? k.exact->clauses : 0;  // the others in table order; their bounds when measured
    any_ac = any_ac || m.arc_consistent;
    order.push_back(k);
  }
  // Closed forms first (free), smallest first.
  std::stable_sort(order.begin(), order.end(), [](const candidate& a, const candidate& b) {
    if (a.exact.has_value() != b.exact.has_value()) return a.exact.has_value();
    return a.least < b.least;
  });
  std::vector<std::pair<std::size_t, method_measurement>> done;
  done.reserve(order.size());
  std::optional<std::uint64_t> best;     // clauses of the smallest measured in full
  std::optional<std::uint64_t> best_ac;  // the same among arc-consistent methods
  for (const candidate& k : order) {
    const bool ac = info(k.id).arc_consistent;
    std::uint64_t cut = clause_budget;
    if (policy == selection_policy::smallest_arc_consistent && !ac && any_ac && best_ac) {
      cut = 0;  // an arc-consistent method fits: this one cannot win
    } else if (ac && policy != selection_policy::smallest) {
      const auto preferred = detail::preferred_methods(policy, c);
      // A preferred method wins within the limit however big the others are.
      if (best_ac && std::find(preferred.begin(), preferred.end(), k.id) == preferred.end())
        cut = std::min(cut, *best_ac);
      if (best) cut = std::min(cut, detail::arc_consistent_limit(policy, c, *best));
    } else if (best) {
      cut = std::min(cut, *best);
    }
    const std::uint64_t budget = std::min(clause_budget, std::max(cut, floor));
    method_measurement m = measure(k.id, pool, c, options, budget);
    if (!m.over_budget) {
      best = best ? std::min(*best, m.size.clauses) : m.size.clauses;
      if (ac) best_ac = best_ac ? std::min(*best_ac, m.size.clauses) : m.size.clauses;
    }
    done.emplace_back(k.row, m);
  }
  if (!group_rows.empty()) {
    // A group method wins only below the group-blind pick's clauses.
    std::vector<method_measurement> blind;
    blind.reserve(done.size());
    for (const auto& d : done) blind.push_back(d.second);
    const method_measurement* p = detail::pick_among(blind, policy, c, [](method_id) { return true; });
    const std::uint64_t cut = p != nullptr ? p->size.clauses : clause_budget;
    const std::uint64_t budget = std::min(clause_budget, std::max(cut, floor));
    for (const std::size_t row : group_rows)
      done.emplace_back(row, measure(method_table[row].id, pool, c, options, budget));
  }
  std::sort(done.begin(), done.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
  std::vector<method_measurement> out;
  out.reserve(done.size());
  for (auto& d : done) out.push_back(d.second);
  return out;
}

[[nodiscard]] inline method_id select_method(const variable_pool& pool, const normalized_constraint& c,
                                             selection_policy policy = default_policy,
                                             const encode_options& options = {},
                                             std::uint64_t clause_budget = default_clause_budget) {
  const auto measured = measure_for_policy(pool, c, policy, options, clause_budget);
  return pick(measured, policy, c);
}

}  // namespace clausewright
