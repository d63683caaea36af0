// clausewright: the constraint pipeline, the one path from a normalised
// constraint to clauses in a sink.
//
//   choose:  the method asked for (checked: it must apply), else the
//            selection policy's pick, cached by the shape of the constraint;
//   check:   a method whose predicted size (or cheap lower bound) already
//            passes the clause budget is refused before its first clause;
//   encode:  hard, or guarded by a literal (soft constraints, reification),
//            through a sink that counts what passes, stops at the clause
//            budget and at the deadline (checked every few thousand
//            clauses), and names the constraint in every error raised;
//   count:   what the constraint added (clauses, literals, variables).
//
// The encoder (encoder.hpp), the model encoder (model.hpp), soft constraints
// and re-encoded objective bounds (objective.hpp), and the tool's encode,
// stats and solve commands all go through it.
//
// The cache keys on the shape of a constraint: kind, relation, bound, the
// number of inputs and of forced literals, and a hash of the multiset of its
// coefficients (two independent 64-bit sums of mixed coefficients, so order
// does not matter and nothing of the size of the constraint is stored),
// the group structure (a multiset hash of the groups' coefficient multisets,
// so rows that differ in grouping never share a pick), plus the settings. Models repeat shapes (one exactly-one per
// item, one capacity per bin), so each shape is measured once.
#pragma once

#include <algorithm>
#include <chrono>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <unordered_map>
#include <vector>

#include "constraint.hpp"
#include "error.hpp"
#include "methods.hpp"
#include "pool.hpp"
#include "predict.hpp"
#include "select.hpp"
#include "sink.hpp"

namespace clausewright {

using pipeline_clock = std::chrono::steady_clock;

// How the pipeline chooses and encodes.
struct choice_settings {
  selection_policy policy = default_policy;
  encode_options options;
  // Clauses one constraint may have, picked or forced; dry runs stop there.
  std::uint64_t clause_budget = default_clause_budget;
  // Encoding stops with error_id::time_limit once this passes.
  std::optional<pipeline_clock::time_point> deadline;
};

// --- the shape of a constraint ------------------------------------------------

struct constraint_shape {
  std::uint64_t coefficients_a = 0;  // multiset hashes of the coefficients
  std::uint64_t coefficients_b = 0;
  std::uint64_t order = 0;   // hash of the coefficients in order (0 when unordered)
  std::uint64_t groups = 0;  // multiset hash of the groups' coefficient multisets (0: no groups)
  std::int64_t bound = 0;
  std::uint64_t inputs = 0;
  std::uint64_t units = 0;
  std::uint64_t budget = 0;
  std::uint64_t floor = 0;
  constraint_kind kind = constraint_kind::constant_true;
  relation rel = relation::le;
  selection_policy policy = default_policy;
  bool full_equivalence = false;

  friend bool operator==(const constraint_shape&, const constraint_shape&) = default;
};

namespace detail {

[[nodiscard]] constexpr std::uint64_t mix64(std::uint64_t x) noexcept {  // splitmix64's finaliser
  x += 0x9E3779B97F4A7C15ULL;
  x = (x ^ (x >> 30U)) * 0xBF58476D1CE4E5B9ULL;
  x = (x ^ (x >> 27U)) * 0x94D049BB133111EBULL;
  return x ^ (x >> 31U);
}

struct shape_hash {
  std::size_t operator()(const constraint_shape& s) const noexcept {
    std::uint64_t h = s.coefficients_a;
    for (const std::uint64_t x : {s.coefficients_b, s.order, s.groups, static_cast<std::uint64_t>(s.bound), s.inputs,
                                  s.units, s.budget, s.floor,
                                  static_cast<std::uint64_t>(s.kind) | (static_cast<std::uint64_t>(s.rel) << 8U) |
                                      (static_cast<std::uint64_t>(s.policy) << 16U) |
                                      (s.full_equivalence ? std::uint64_t{1} << 24U : std::uint64_t{0})})
      h = mix64(h ^ x);
    return static_cast<std::size_t>(h);
  }
};

// The group structure of `c` as a multiset hash: per group, a multiset hash
// of its coefficients; over the groups, a multiset hash of those. Rows that
// differ in grouping (or only one of which has groups) get different values.
[[nodiscard]] inline std::uint64_t group_shape(const normalized_constraint& c) {
  if (!c.has_groups()) return 0;
  std::size_t count = 0;
  for (const std::uint32_t g : c.group_of) count = std::max<std::size_t>(count, std::size_t{g} + 1);
  std::vector<std::uint64_t> per_group(count, 0);
  for (std::size_t i = 0; i < c.size(); ++i)
    per_group[c.group_of[i]] += mix64(static_cast<std::uint64_t>(c.coefficients[i]) ^ 0x5851F42D4C957F2DULL);
  std::uint64_t h = 0x2545F4914F6CDD1DULL;
  for (const std::uint64_t g : per_group) h += mix64(g);
  return h;
}

}  // namespace detail

// The shape of `c` under `s`; `ordered` also keys on the coefficients' order
// (sizes of the tree encodings depend on it; the pick hardly does).
[[nodiscard]] inline constraint_shape shape_of(const normalized_constraint& c, const choice_settings& s,
                                               bool ordered = false, std::uint64_t floor = 0) {
  constraint_shape k;
  for (const std::int64_t a : c.coefficients) {
    const auto u = static_cast<std::uint64_t>(a);
    k.coefficients_a += detail::mix64(u);
    k.coefficients_b += detail::mix64(u ^ 0xD6E8FEB86659FD93ULL);
    if (ordered) k.order = detail::mix64(k.order ^ u);
  }
  k.groups = detail::group_shape(c);
  k.bound = c.bound;
  k.inputs = c.size();
  k.units = c.units.size();
  k.budget = s.clause_budget;
  k.floor = floor;
  k.kind = c.kind;
  k.rel = c.rel;
  k.policy = s.policy;
  k.full_equivalence = s.options.full_equivalence;
  return k;
}

// --- choosing ------------------------------------------------------------------

// Whether `c` needs a method at all (constants and single clauses do not).
[[nodiscard]] inline bool needs_method(const normalized_constraint& c) noexcept {
  return !c.is_constant() && c.kind != constraint_kind::clause;
}

// Refuses `id` on `c` when its size is known (exactly or as a lower bound)
// to pass the clause budget: before anything is written.
inline void require_within_budget(method_id id, const normalized_constraint& c, const choice_settings& s,
                                  const error_position& where) {
  const std::uint64_t least = clause_lower_bound(id, c, s.options, s.clause_budget);
  if (least > s.clause_budget)
    throw error(error_id::over_budget,
                "method " + std::string(info(id).name) + " needs " +
                    (predict_size(id, c, s.options) ? std::string() : std::string("at least ")) +
                    std::to_string(least) + " clauses for this " + std::string(to_string(c.kind)) +
                    " constraint, more than the clause budget of " + std::to_string(s.clause_budget),
                where);
}

// The one chooser: a method asked for, or the policy's pick from a cache of
// shapes. Also keeps the measurements statistics show, by exact shape.
class method_chooser {
 public:
  // The method for `c`: none when it needs none; `asked` when given (an
  // error when it cannot encode `c`); else the policy's pick.
  [[nodiscard]] std::optional<method_id> choose(const variable_pool& pool, const normalized_constraint& c,
                                                std::optional<method_id> asked, const choice_settings& s) {
    if (!needs_method(c)) return std::nullopt;
    if (asked) {
      require_applicable(*asked, c);
      return asked;
    }
    return pick(pool, c, s);
  }

  // The policy's pick for `c` (which needs a method).
  [[nodiscard]] method_id pick(const variable_pool& pool, const normalized_constraint& c, const choice_settings& s) {
    const constraint_shape key = shape_of(c, s);
    if (const auto it = picks_.find(key); it != picks_.end()) return it->second;
    const method_id m = select_method(pool, c, s.policy, s.options, s.clause_budget);
    if (picks_.size() >= max_entries) picks_.clear();
    picks_.emplace(key, m);
    return m;
  }

  // Every applicable method measured as measure_for_policy() does with
  // `floor` (cached by the shape with its order).
  [[nodiscard]] const std::vector<method_measurement>& measurements(const variable_pool& pool,
                                                                    const normalized_constraint& c,
                                                                    const choice_settings& s, std::uint64_t floor) {
    const constraint_shape key = shape_of(c, s, true, floor);
    if (const auto it = measured_.find(key); it != measured_.end()) {
      last_cached_ = true;
      return it->second;
    }
    last_cached_ = false;
    if (measured_.size() >= max_entries) measured_.clear();
    return measured_.emplace(key, measure_for_policy(pool, c, s.policy, s.options, s.clause_budget, floor))
        .first->second;
  }
  // Whether the last measurements() came from the cache.
  [[nodiscard]] bool last_cached() const noexcept { return last_cached_; }

 private:
  static constexpr std::size_t max_entries = 4096;
  std::unordered_map<constraint_shape, method_id, detail::shape_hash> picks_;
  std::unordered_map<constraint_shape, std::vector<method_measurement>, detail::shape_hash> measured_;
  bool last_cached_ = false;
};

// --- counting DIMACS bytes -----------------------------------------------------------

// Decimal characters of a DIMACS literal, its sign included: arithmetic, no
// formatting (the bytes a writer would produce for it).
[[nodiscard]] constexpr std::uint64_t dimacs_literal_width(std::int64_t v) noexcept {
  std::uint64_t width = v < 0 ? 2 : 1;
  std::uint64_t magnitude = v < 0 ? static_cast<std::uint64_t>(-(v + 1)) + 1 : static_cast<std::uint64_t>(v);
  while (magnitude >= 10) {
    magnitude /= 10;
    ++width;
  }
  return width;
}

// The pipeline's counting sink with the DIMACS bytes: clauses, literals and
// the bytes of the clause lines a DIMACS writer writes for them ("1 -2 0\n":
// each literal and a space, then "0\n"). A soft clause counts as its clause
// alone (the line of CNF; WCNF adds the weight). Exact at any size: nothing
// is formatted, so statistics need no cut-off.
class dimacs_counting_sink {
 public:
  void add_clause(std::span<const literal> clause) noexcept {
    count_.add_clause(clause);
    bytes_ += 2;
    for (const literal l : clause) bytes_ += dimacs_literal_width(l.dimacs()) + 1;
  }
  void add_soft_clause(std::int64_t /*weight*/, std::span<const literal> clause) noexcept { add_clause(clause); }
  [[nodiscard]] const counting_sink& counts() const noexcept { return count_; }
  [[nodiscard]] std::uint64_t bytes() const noexcept { return bytes_; }

 private:
  counting_sink count_;
  std::uint64_t bytes_ = 0;
};

// --- encoding --------------------------------------------------------------------

// Forwards clauses, counting them; stops at the clause budget and at the
// deadline (looked at every 4096 clauses).
template <class Sink>
class limited_sink {
 public:
  limited_sink(Sink& inner, const choice_settings& s) : inner_(inner), limit_(s.clause_budget), deadline_(s.deadline) {}
  void add_clause(std::span<const literal> clause) {
    if (count_.clauses() >= limit_)
      throw error(error_id::over_budget, "the encoding passed the clause budget of " + std::to_string(limit_));
    if (deadline_ && (count_.clauses() & 4095U) == 4095U) check_deadline(*deadline_);
    count_.add_clause(clause);
    inner_.add_clause(clause);
  }
  [[nodiscard]] const counting_sink& counts() const noexcept { return count_; }

  static void check_deadline(pipeline_clock::time_point deadline) {
    if (pipeline_clock::now() >= deadline) throw error(error_id::time_limit, "the time limit passed while encoding");
  }

 private:
  Sink& inner_;
  counting_sink count_;
  std::uint64_t limit_;
  std::optional<pipeline_clock::time_point> deadline_;
};

namespace detail {

// Errors raised inside an encoding name the constraint: `where` fills in
// what the error does not say.
[[noreturn]] inline void rethrow_at(const error& e, const error_position& where) {
  error_position p = e.where();
  if (p.file.empty() && p.line == 0) {
    p.file = where.file;
    p.line = where.line;
    p.column = where.column;
  }
  if (!p.constraint) {
    p.constraint = where.constraint;
    p.constraint_name = where.constraint_name;
  }
  throw error(e.id(), e.detail(), p);
}

}  // namespace detail

// Encodes `c` with `method` (none for constants and single clauses) into
// `out`, each clause extended by `guards` (none: hard). `checked`: the
// method was measured within the budget already (the policy's pick), else
// its predicted size is checked first. Returns what it added.
template <class Sink>
encoding_size encode_constraint(Sink& out, variable_pool& pool, const normalized_constraint& c,
                                std::optional<method_id> method, const choice_settings& s, const error_position& where,
                                std::span<const literal> guards = {}, bool checked = false) {
  static_assert(check_clause_sink<Sink>());
  if (s.deadline) limited_sink<Sink>::check_deadline(*s.deadline);
  const std::int32_t top_before = pool.top();
  limited_sink<Sink> limited(out, s);
  try {
    if (method && !checked) require_within_budget(*method, c, s, where);
    if (guards.empty()) {
      encode_with(method, limited, pool, c, s.options);
    } else {
      guarded_sink<limited_sink<Sink>> guarded(limited, guards);
      encode_with(method, guarded, pool, c, s.options);
    }
  } catch (const error& e) {
    detail::rethrow_at(e, where);
  }
  return limited.counts().size(static_cast<std::uint64_t>(pool.top() - top_before));
}

}  // namespace clausewright
