// clausewright: measuring encodings by dry run and choosing between them.
//
// The size of an encoding is measured exactly by running it into a counting
// sink with a scratch copy of the variable pool: nothing is stored. A budget
// stops a dry run that grows past it, so a method that would explode is
// reported as over budget instead of exhausting time or memory. Where a
// closed form predicts a size past the budget (predict.hpp), the dry run is
// not started at all, and the measurement carries the predicted size.
#pragma once

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
  encoding_size size;
  bool over_budget = false;
  double seconds = 0;  // time of the dry run
};

// Dry run of one method. Does not change `pool`.
[[nodiscard]] inline method_measurement measure(method_id id, const variable_pool& pool,
                                                const normalized_constraint& c, const encode_options& options = {},
                                                std::uint64_t clause_budget = default_clause_budget) {
  method_measurement m{id, {}, false, 0};
  if (const auto predicted = predict_size(id, c, options); predicted && predicted->clauses > clause_budget) {
    m.size = *predicted;
    m.over_budget = true;
    return m;
  }
  variable_pool scratch = pool;
  budget_sink sink(clause_budget);
  const auto start = std::chrono::steady_clock::now();
  try {
    encode_with(id, sink, scratch, c, options);
  } catch (const error& e) {
    if (e.id() != error_id::over_budget) throw;
    m.over_budget = true;
  }
  m.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  m.size = sink.counts().size(static_cast<std::uint64_t>(scratch.top() - pool.top()));
  return m;
}

// Dry runs of every method that applies to `c`, in table order.
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
  balanced,                 // default: smallest arc-consistent unless it is more than
                            // `balanced_factor` times the clauses of the smallest
};

inline constexpr std::uint64_t balanced_factor = 4;

[[nodiscard]] constexpr std::string_view to_string(selection_policy p) noexcept {
  switch (p) {
    case selection_policy::smallest: return "smallest";
    case selection_policy::smallest_arc_consistent: return "smallest-arc-consistent";
    case selection_policy::balanced: return "balanced";
  }
  return "?";
}

[[nodiscard]] inline std::optional<selection_policy> find_policy(std::string_view name) noexcept {
  for (auto p : {selection_policy::smallest, selection_policy::smallest_arc_consistent, selection_policy::balanced})
    if (to_string(p) == name) return p;
  return std::nullopt;
}

namespace detail {
[[nodiscard]] inline bool smaller(const method_measurement& a, const method_measurement& b) noexcept {
  if (a.over_budget != b.over_budget) return !a.over_budget;
  if (a.size.clauses != b.size.clauses) return a.size.clauses < b.size.clauses;
  return a.size.variables < b.size.variables;
}
}  // namespace detail

// Picks from measurements by the policy. Throws when every method is over
// budget (or none applies).
[[nodiscard]] inline method_id pick(std::span<const method_measurement> measured, selection_policy policy,
                                    const normalized_constraint& c) {
  const method_measurement* best = nullptr;
  const method_measurement* best_ac = nullptr;
  for (const auto& m : measured) {
    if (m.over_budget) continue;
    if (best == nullptr || detail::smaller(m, *best)) best = &m;
    if (info(m.method).arc_consistent && (best_ac == nullptr || detail::smaller(m, *best_ac))) best_ac = &m;
  }
  if (measured.empty())
    throw error(error_id::method_not_applicable,
                "no method in the table encodes a " + std::string(to_string(c.kind)) + " constraint", c.where());
  if (best == nullptr)
    throw error(error_id::over_budget, "every applicable method is over its budget for this constraint", c.where());
  switch (policy) {
    case selection_policy::smallest: return best->method;
    case selection_policy::smallest_arc_consistent: return (best_ac != nullptr ? best_ac : best)->method;
    case selection_policy::balanced:
      if (best_ac != nullptr && best_ac->size.clauses <= balanced_factor * std::max<std::uint64_t>(best->size.clauses, 1))
        return best_ac->method;
      return best->method;
  }
  return best->method;
}

[[nodiscard]] inline method_id select_method(const variable_pool& pool, const normalized_constraint& c,
                                             selection_policy policy = selection_policy::balanced,
                                             const encode_options& options = {},
                                             std::uint64_t clause_budget = default_clause_budget) {
  const auto measured = measure_all(pool, c, options, clause_budget);
  return pick(measured, policy, c);
}

}  // namespace clausewright
