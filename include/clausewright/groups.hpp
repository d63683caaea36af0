// clausewright: weighted sums whose literals fall into at-most-one groups.
//
// A model often says more about the literals of a weighted row than the row
// itself: a job starts at exactly one time, a task goes to exactly one
// machine. Inside such a row, the literals covered by one at-most-one set
// contribute one of their coefficients or nothing. The encodings of
// encodings/group_*.hpp (Bofill, Coll, Suy, Villaret 2017/2020; Bofill, Coll,
// Nightingale, Suy, Ulrich-Oltean, Villaret 2022) count per group instead of
// per literal, and are correct only together with the at-most-one
// constraints the groups come from: the caller keeps those in the formula.
//
// grouped_constraint is the normalised row (normalize() of constraint.hpp:
// positive coefficients, units taken out, gcd divided) with its literals
// partitioned into groups. group_constraint() finds the partition from the
// model's at-most-one sets (at-most-one, exactly-one, or cardinality <= 1,
// each given as its list of literals):
//   - only a literal with the same polarity as in the set counts as covered:
//     normalisation turns a*x with a < 0 into |a|*~x, and ~x is not in the
//     set, so that term stays alone (a singleton group);
//   - greedy: repeatedly take the set that covers the most literals of the
//     row not yet grouped (ties: the earlier set), as long as it covers at
//     least two; those literals form a group and leave the pool; every
//     literal left over is a singleton group. A literal joins at most one
//     group, so the groups partition the row's literals;
//   - literals normalisation forced (for <=, a coefficient above the bound)
//     are in `units`, not in a group;
//   - a row the groups show constant (for <=, the largest coefficients of the
//     groups sum to at most the bound; for >= and =, to less than it) gets
//     kind constant_true or constant_false and no groups.
// Inside a group the coefficients may differ. group_terms() takes the groups
// explicitly (the caller promises at most one literal of each is true).
#pragma once

#include <algorithm>
#include <cstdint>
#include <limits>
#include <map>
#include <numeric>
#include <queue>
#include <span>
#include <string>
#include <string_view>
#include <unordered_map>
#include <utility>
#include <vector>

#include "constraint.hpp"
#include "encodings/common.hpp"
#include "error.hpp"
#include "literal.hpp"

namespace clausewright {

// sum over groups of (the coefficient of the group's true literal, or 0)
// rel bound, with every coefficient positive.
struct grouped_constraint {
  // constant_true, constant_false, or linear (anything with terms left).
  constraint_kind kind = constraint_kind::constant_true;
  relation rel = relation::le;
  std::int64_t bound = 0;
  std::vector<std::vector<term>> groups;  // each non-empty; at most one literal of each is true
  std::vector<literal> units;             // literals normalisation forced true
  std::size_t index = 0;                  // constraint index, for messages
  std::string name;                       // constraint name, for messages

  [[nodiscard]] bool is_constant() const noexcept {
    return kind == constraint_kind::constant_true || kind == constraint_kind::constant_false;
  }
  [[nodiscard]] std::size_t literal_count() const noexcept {
    std::size_t n = 0;
    for (const auto& g : groups) n += g.size();
    return n;
  }
  // The largest value the sum can take: the largest coefficient of each group.
  [[nodiscard]] std::int64_t maximum_sum() const {
    std::int64_t s = 0;
    for (const auto& g : groups) s = detail::checked_add(s, group_maximum(g), where(), "the sum of the group maxima");
    return s;
  }
  [[nodiscard]] static std::int64_t group_maximum(const std::vector<term>& g) noexcept {
    std::int64_t m = 0;
    for (const term& t : g) m = std::max(m, t.coefficient);
    return m;
  }
  [[nodiscard]] error_position where() const { return at_constraint(index, name); }
};

// The literals of a constraint that says "at most one of them": at-most-one,
// exactly-one (a cardinality <= 1 normalises to at-most-one). Empty for any
// other kind.
[[nodiscard]] inline std::vector<literal> at_most_one_literals(const normalized_constraint& c) {
  if (c.kind == constraint_kind::at_most_one || c.kind == constraint_kind::exactly_one) return c.literals;
  return {};
}

// The model's at-most-one sets by literal, built once for all its rows.
class at_most_one_index {
 public:
  at_most_one_index() = default;
  explicit at_most_one_index(std::span<const std::vector<literal>> sets) {
    for (const auto& set : sets) add(set);
  }
  // Adds one more set (after the others in the greedy's order of ties).
  void add(std::span<const literal> set) {
    if (sets_ >= std::numeric_limits<std::uint32_t>::max() - 1)
      throw error(error_id::over_budget, "too many at-most-one sets to index");
    const std::uint32_t s = sets_++;
    for (const literal l : set) {
      auto& list = by_literal_[l.dimacs()];
      if (list.empty() || list.back() != s) list.push_back(s);
    }
  }
  [[nodiscard]] std::uint32_t size() const noexcept { return sets_; }
  // The sets holding literal l (with that polarity), in the given order.
  [[nodiscard]] std::span<const std::uint32_t> sets_of(literal l) const {
    const auto it = by_literal_.find(l.dimacs());
    if (it == by_literal_.end()) return {};
    return it->second;
  }

 private:
  std::unordered_map<std::int32_t, std::vector<std::uint32_t>> by_literal_;
  std::uint32_t sets_ = 0;
};

namespace detail {

// The groups of the literals of `c` by the indexed at-most-one sets (rule
// above): the group of each position, the greedy groups first (numbered in
// the order taken), then the singletons in position order. Empty when no set
// covers two literals of the row. Time: the row's literals times the sets
// holding each, times log of that.
[[nodiscard]] inline std::vector<std::uint32_t> group_ids(const normalized_constraint& c,
                                                          const at_most_one_index& index) {
  if (c.is_constant() || c.kind == constraint_kind::clause || c.size() < 2) return {};
  // For each set touching the row, the row positions it covers; for each
  // position, the sets covering it.
  std::unordered_map<std::uint32_t, std::size_t> local;  // set -> index into covers
  std::vector<std::uint32_t> set_id;
  std::vector<std::vector<std::size_t>> covers;
  std::vector<std::vector<std::size_t>> sets_at(c.size());
  for (std::size_t i = 0; i < c.size(); ++i)
    for (const std::uint32_t s : index.sets_of(c.literals[i])) {
      auto [it, fresh] = local.try_emplace(s, covers.size());
      if (fresh) {
        covers.emplace_back();
        set_id.push_back(s);
      }
      covers[it->second].push_back(i);  // positions increase: no repeats
      sets_at[i].push_back(it->second);
    }
  // Greedy with a lazy max-heap on (literals not yet grouped, earlier set first).
  std::vector<std::size_t> live(covers.size());
  using entry = std::pair<std::size_t, std::int64_t>;  // (live, -set id)
  std::priority_queue<entry> heap;
  for (std::size_t k = 0; k < covers.size(); ++k) {
    live[k] = covers[k].size();
    if (live[k] >= 2) heap.emplace(live[k], -static_cast<std::int64_t>(set_id[k]));
  }
  if (heap.empty()) return {};
  constexpr std::uint32_t none = std::numeric_limits<std::uint32_t>::max();
  std::vector<std::uint32_t> ids(c.size(), none);
  std::uint32_t next = 0;
  while (!heap.empty()) {
    const auto [n, minus_id] = heap.top();
    heap.pop();
    const std::size_t k = local.at(static_cast<std::uint32_t>(-minus_id));
    if (n != live[k]) continue;  // stale
    for (const std::size_t i : covers[k]) {
      if (ids[i] != none) continue;
      ids[i] = next;
      for (const std::size_t other : sets_at[i]) {
        --live[other];
        if (other != k && live[other] >= 2) heap.emplace(live[other], -static_cast<std::int64_t>(set_id[other]));
      }
    }
    ++next;
  }
  for (std::uint32_t& id : ids)
    if (id == none) id = next++;
  return ids;
}

}  // namespace detail

// The grouped form of `c` by its own groups (c.group_of; none: every literal
// a singleton). The groups may show the row constant: a group contributes at
// most its largest coefficient, so the sum never passes the sum of those
// maxima.
[[nodiscard]] inline grouped_constraint grouped_view(const normalized_constraint& c) {
  grouped_constraint g;
  g.rel = c.rel;
  g.bound = c.bound;
  g.units = c.units;
  g.index = c.index;
  g.name = c.name;
  if (c.is_constant()) {
    g.kind = c.kind;
    return g;
  }
  g.kind = constraint_kind::linear;
  const bool grouped = c.group_of.size() == c.size();
  std::size_t count = 0;
  for (std::size_t i = 0; i < c.size(); ++i)
    count = std::max<std::size_t>(count, grouped ? std::size_t{c.group_of[i]} + 1 : i + 1);
  g.groups.resize(count);
  for (std::size_t i = 0; i < c.size(); ++i)
    g.groups[grouped ? c.group_of[i] : i].push_back(term{c.coefficients[i], c.literals[i]});
  g.groups.erase(std::remove_if(g.groups.begin(), g.groups.end(), [](const auto& x) { return x.empty(); }),
                 g.groups.end());
  const std::int64_t most = g.maximum_sum();
  if (g.rel == relation::le && most <= g.bound) {
    g.kind = constraint_kind::constant_true;
    g.groups.clear();
  } else if (g.rel != relation::le && most < g.bound) {
    g.kind = constraint_kind::constant_false;
    g.groups.clear();
  }
  return g;
}

// Finds the groups of a cardinality or linear row by the indexed at-most-one
// sets (rule above) and records them in c.group_of; other kinds, and rows no
// set covers twice, keep none.
inline void assign_groups(normalized_constraint& c, const at_most_one_index& index) {
  c.group_of.clear();
  if (c.kind != constraint_kind::cardinality && c.kind != constraint_kind::linear) return;
  c.group_of = detail::group_ids(c, index);
}

// Partitions the literals of `c` into groups by the indexed at-most-one sets
// (rule above). A constant `c` gives a constant grouped constraint.
[[nodiscard]] inline grouped_constraint group_constraint(const normalized_constraint& c,
                                                         const at_most_one_index& index) {
  normalized_constraint grouped = c;
  grouped.group_of = detail::group_ids(c, index);
  return grouped_view(grouped);
}

// The same with the sets given as lists of literals (indexed on the fly; for
// many rows of one model, build the at_most_one_index once).
[[nodiscard]] inline grouped_constraint group_constraint(const normalized_constraint& c,
                                                         std::span<const std::vector<literal>> amos) {
  return group_constraint(c, at_most_one_index(amos));
}

// A row stated with its groups: the terms of each group (coefficients of any
// sign; at most one literal of each group is true). Normalises the whole row
// and partitions its literals by the given groups (a term whose literal
// normalisation negates becomes a singleton).
[[nodiscard]] inline grouped_constraint group_terms(std::span<const std::vector<term>> groups, relation rel,
                                                    std::int64_t bound, std::size_t index = 0, std::string name = {}) {
  std::vector<term> all;
  std::vector<std::vector<literal>> sets;
  for (const auto& group : groups) {
    std::vector<literal> set;
    for (const term& t : group) {
      all.push_back(t);
      set.push_back(t.lit);
    }
    sets.push_back(std::move(set));
  }
  const normalized_constraint c = normalize(all, rel, bound, index, std::move(name));
  return group_constraint(c, sets);
}

// The same row normalised for the pipeline, its groups in group_of (for
// encode_with, the encoder and the method table's group methods).
[[nodiscard]] inline normalized_constraint normalize_groups(std::span<const std::vector<term>> groups, relation rel,
                                                            std::int64_t bound, std::size_t index = 0,
                                                            std::string name = {}) {
  std::vector<term> all;
  at_most_one_index sets;
  std::vector<literal> set;
  for (const auto& group : groups) {
    set.clear();
    for (const term& t : group) {
      all.push_back(t);
      set.push_back(t.lit);
    }
    sets.add(set);
  }
  normalized_constraint c = normalize(all, rel, bound, index, std::move(name));
  assign_groups(c, sets);
  return c;
}

// One literal y per set of literals of one group and one coefficient, shared
// by every row encoded with the same cache: x -> y for each x of the set,
// and, once some row needs the lower side, y -> (some x of the set). Rows of
// one model often sum the same set: in a schedule with two resources, the
// starts of a job that keep it running at time t appear in both resource
// rows of t. Use one cache per formula (the clauses defining y went to the
// sink of the row that made it).
class group_literal_cache {
 public:
  template <class Sink>
  [[nodiscard]] literal get(Sink& out, variable_pool& pool, std::span<const literal> set, bool lower) {
    key_.clear();
    for (const literal l : set) key_.push_back(l.dimacs());
    std::sort(key_.begin(), key_.end());
    auto [it, fresh] = map_.try_emplace(key_, entry{});
    if (fresh) {
      it->second.y = pool.fresh();
      for (const literal l : set) emit(out, ~l, it->second.y);
    }
    if (lower && !it->second.lower) {
      it->second.lower = true;
      std::vector<literal> some;
      some.reserve(set.size() + 1);
      some.push_back(~it->second.y);
      some.insert(some.end(), set.begin(), set.end());
      out.add_clause(std::span<const literal>(some));
    }
    return it->second.y;
  }
  [[nodiscard]] std::size_t size() const noexcept { return map_.size(); }

 private:
  struct entry {
    literal y;
    bool lower = false;
  };
  std::map<std::vector<std::int32_t>, entry> map_;
  std::vector<std::int32_t> key_;
};

namespace detail {

// The "<=" form of a ">=" row over groups, for the encodings that count up to
// the bound. sum_g v_g >= K with v_g in {0} u {a_i} is
//     sum_g (M_g - v_g) <= sum_g M_g - K,      M_g = the largest a_i of g,
// and M_g - v_g is M_g - a_i when x_i is the group's true literal and M_g when
// none is. A singleton {a x} becomes {a ~x}. A larger group gets a fresh
// literal n_g for "none of the group", defined by  x_1 | ... | x_m | n_g  and
// ~n_g | ~x_i (so {x_i, n_g} is again an at-most-one set, enforced here), and
// becomes {(M_g - a_i) x_i : a_i < M_g} u {M_g n_g}. Coefficients above the
// new bound force their literal false (emitted), as normalisation does.
// Emits the empty clause and returns nullopt-like constant kinds when the
// result is trivial.
template <class Sink>
[[nodiscard]] grouped_constraint at_most_form(Sink& out, variable_pool& pool, const grouped_constraint& c) {
  CLAUSEWRIGHT_ASSERT(c.rel == relation::ge, "at_most_form takes a >= row");
  grouped_constraint le;
  le.kind = constraint_kind::linear;
  le.rel = relation::le;
  le.index = c.index;
  le.name = c.name;
  const std::int64_t total = c.maximum_sum();
  le.bound = total - c.bound;
  if (le.bound < 0) {
    le.kind = constraint_kind::constant_false;
    return le;
  }
  for (const auto& group : c.groups) {
    const std::int64_t m = grouped_constraint::group_maximum(group);
    std::vector<term> flipped;
    if (group.size() == 1) {
      flipped.push_back({group[0].coefficient, ~group[0].lit});
    } else {
      const literal none = pool.fresh();
      for (const term& t : group) emit(out, ~none, ~t.lit);
      // The clause x_1 | ... | x_m | n_g, built once per group (not a hot path).
      std::vector<literal> some;
      some.reserve(group.size() + 1);
      for (const term& t : group) some.push_back(t.lit);
      some.push_back(none);
      out.add_clause(std::span<const literal>(some));
      for (const term& t : group)
        if (t.coefficient < m) flipped.push_back({m - t.coefficient, t.lit});
      flipped.push_back({m, none});
    }
    std::vector<term> kept;
    for (const term& t : flipped) {
      if (t.coefficient > le.bound)
        emit(out, ~t.lit);
      else
        kept.push_back(t);
    }
    if (!kept.empty()) le.groups.push_back(std::move(kept));
  }
  if (le.groups.empty() || le.maximum_sum() <= le.bound) le.kind = constraint_kind::constant_true;
  return le;
}

// The literal standing for "one of `set` is true" (a set of literals of one
// group with one coefficient, two or more): from the cache when there is one,
// else a fresh y with x -> y for each x, and y -> (some x) for the lower side.
template <class Sink>
[[nodiscard]] literal group_literal(Sink& out, variable_pool& pool, std::span<const literal> set, bool lower,
                                    group_literal_cache* cache) {
  if (cache != nullptr) return cache->get(out, pool, set, lower);
  const literal y = pool.fresh();
  for (const literal l : set) emit(out, ~l, y);
  if (lower) {
    std::vector<literal> some;
    some.reserve(set.size() + 1);
    some.push_back(~y);
    some.insert(some.end(), set.begin(), set.end());
    out.add_clause(std::span<const literal>(some));
  }
  return y;
}

// Literals of one group that share a coefficient share one literal y
// (group_literal): x -> y for each of them (always: the upper side needs it
// to count x, the lower side to propagate from x), and y -> the disjunction
// of them (lower side: y must not count a literal that is not there). A
// counter then takes one input per distinct coefficient of the group instead
// of one per literal; the y of one group stay in an at-most-one relation as
// long as the group's literals are. Returns the group with one term per
// distinct coefficient (a single literal stays itself), in decreasing
// coefficient order.
template <class Sink>
[[nodiscard]] std::vector<term> merge_equal_coefficients(Sink& out, variable_pool& pool, const std::vector<term>& group,
                                                         sides which, group_literal_cache* cache = nullptr) {
  std::vector<term> sorted = group;
  std::stable_sort(sorted.begin(), sorted.end(),
                   [](const term& a, const term& b) { return a.coefficient > b.coefficient; });
  std::vector<term> merged;
  std::vector<literal> set;
  for (std::size_t i = 0; i < sorted.size();) {
    std::size_t j = i + 1;
    while (j < sorted.size() && sorted[j].coefficient == sorted[i].coefficient) ++j;
    if (j - i == 1) {
      merged.push_back(sorted[i]);
    } else {
      set.clear();
      for (std::size_t k = i; k < j; ++k) set.push_back(sorted[k].lit);
      merged.push_back({sorted[i].coefficient, group_literal(out, pool, set, has_lower(which), cache)});
    }
    i = j;
  }
  return merged;
}

// Runs `encode(le)` on the "<=" rows a grouped constraint needs: the row
// itself for <=, its at_most_form for >=, both for =. Constants are handled
// here (the empty clause for an impossible row). Units are the caller's, as
// for every encoding (encode_with emits them).
template <class Sink, class Encode>
void encode_groups_as_at_most(Sink& out, variable_pool& pool, const grouped_constraint& c, Encode&& encode) {
  if (c.kind == constraint_kind::constant_false) {
    out.add_clause(std::span<const literal>());
    return;
  }
  if (c.kind == constraint_kind::constant_true) return;
  auto run = [&](const grouped_constraint& le) {
    if (le.kind == constraint_kind::constant_false) {
      out.add_clause(std::span<const literal>());
    } else if (le.kind != constraint_kind::constant_true) {
      if (le.bound == 0) {
        for (const auto& group : le.groups)
          for (const term& t : group) emit(out, ~t.lit);
      } else {
        encode(le);
      }
    }
  };
  if (c.rel != relation::ge) {
    grouped_constraint le = c;
    le.rel = relation::le;
    // Coefficients above the bound (possible in a hand-built row) force their literal false.
    for (auto& group : le.groups) {
      std::vector<term> kept;
      for (const term& t : group) {
        if (t.coefficient <= 0)
          throw error(error_id::usage, "grouped constraints take positive coefficients (a normalised row)", c.where());
        if (t.coefficient > le.bound)
          emit(out, ~t.lit);
        else
          kept.push_back(t);
      }
      group.swap(kept);
    }
    le.groups.erase(std::remove_if(le.groups.begin(), le.groups.end(), [](const auto& g) { return g.empty(); }),
                    le.groups.end());
    if (le.bound < 0)
      le.kind = constraint_kind::constant_false;
    else if (le.groups.empty() || le.maximum_sum() <= le.bound)
      le.kind = constraint_kind::constant_true;
    run(le);
  }
  if (c.rel != relation::le) {
    grouped_constraint ge = c;
    ge.rel = relation::ge;
    run(at_most_form(out, pool, ge));
  }
}

}  // namespace detail

}  // namespace clausewright
