// Group generalized totalizer: the generalized totalizer of Joshi, Martins,
// Manquinho 2015 (CP) with at-most-one groups as its leaves, after Bofill,
// Coll, Nightingale, Suy, Ulrich-Oltean, Villaret 2022, "SAT encodings for
// pseudo-Boolean constraints together with at-most-one constraints"
// (Artificial Intelligence 302, 103604).
//
// A balanced binary tree over the groups (left half floor(n/2)). A leaf is a
// group: since at most one of its literals is true, its outputs are its
// literals themselves, each standing for its coefficient (literals sharing a
// coefficient first share one fresh literal, detail::merge_equal_coefficients,
// so a leaf has one output per distinct coefficient). An inner node joins its
// children exactly as in encodings/generalized_totalizer.hpp: one output per
// distinct sum, sums of cap = K+1 and above collapsed into cap, and for every
// pair (u, v) of child outputs, the empty one (value 0) included,
//     l_u & r_v -> o_min(u+v, cap);
// sum <= K is then ~o_cap at the root. A node joining children of p and q
// outputs has (p+1)(q+1)-1 clauses; a leaf with m literals over d distinct
// coefficients costs m clauses and d fresh literals when m > d. Against the
// group-blind tree, a leaf no longer makes the sums of two literals of one
// group, which is where the size goes down (Bofill et al. 2022).
//
// The reduced form (encode_group_reduced_generalized_totalizer; the reduced
// generalized totalizer of the same paper, construction as recalled): a
// node's outputs are classes of sums rather than sums. Two sums are one class
// when no sum the other groups can reach tells them apart against K; the
// class of 0 needs no output. The root then has one output (sum > K), and an
// inner node at most as many as the distinct sums of the rest of the tree
// (at most K+1). A leaf's literals of one class share one literal.
// Computing the classes costs the sum sets of every subtree and of its rest
// (O(K^2) per node, checked against a budget); bounds up to 2^24.
//
// The clauses are correct only together with the at-most-one constraints of
// the groups. Relations: <= builds the upper side (as published); >= goes
// through detail::at_most_form (a "none" literal per group, the row over the
// complements), = through both; full_equivalence builds both sides of every
// join (detail::weighted_joiner) over order-encoded leaves, so every output
// is defined in both directions; the reduced form then builds the unreduced
// tree (its classes are defined one way only).
// Propagation (with the groups' at-most-one clauses, pairwise, when the
// at-most-one sets are exactly the groups): arc-consistent for <=, both forms
// (measured in tests/test_groups.cpp); >= and = not in general (measured).
#pragma once

#include <algorithm>
#include <cstdint>
#include <span>
#include <string>
#include <unordered_map>
#include <utility>
#include <vector>

#include "../groups.hpp"
#include "common.hpp"
#include "descriptor.hpp"
#include "generalized_totalizer.hpp"

namespace clausewright {

namespace detail {

// The tree over the groups; the joins are the generalized totalizer's
// (detail::weighted_joiner). A leaf's outputs: for the upper side alone, the
// group's literals (after merging equal coefficients), each standing for its
// coefficient; with the lower side (full_equivalence), outputs that mean
// "the group's value >= a" for each distinct coefficient a, as the join's
// lower side needs of its children: fresh y_a with x -> y_(a_x), the chain
// y_a -> y_a' for consecutive a' < a, and y_a -> (the x with a_x >= a), so
// y_a <-> "some x with a_x >= a" (a single literal stays itself).
template <class Sink>
class group_totalizer_builder {
 public:
  group_totalizer_builder(Sink& out, variable_pool& pool, const std::vector<std::vector<term>>& leaves,
                          std::int64_t cap, sides which, std::uint64_t output_budget, error_position where)
      : out_(out),
        pool_(pool),
        leaves_(leaves),
        which_(which),
        joiner_(out, pool, cap, which, output_budget, std::move(where), "group generalized totalizer") {}

  // Outputs of the subtree over leaves [first, last), sorted by value.
  std::vector<weighted_output> build(std::size_t first, std::size_t last) {
    if (last - first == 1) return leaf(leaves_[first]);
    const std::size_t middle = first + (last - first) / 2;
    const std::vector<weighted_output> left = build(first, middle);
    const std::vector<weighted_output> right = build(middle, last);
    return joiner_.join(left, right);
  }

  [[nodiscard]] std::uint64_t outputs_made() const noexcept { return joiner_.outputs_made(); }

 private:
  std::vector<weighted_output> leaf(const std::vector<term>& group) {
    const std::int64_t cap = joiner_.cap();
    std::vector<weighted_output> outputs;
    outputs.reserve(group.size());
    for (const term& t : group) outputs.push_back({std::min(t.coefficient, cap), t.lit});
    std::sort(outputs.begin(), outputs.end(),
              [](const weighted_output& a, const weighted_output& b) { return a.value < b.value; });
    if (!has_lower(which_) || outputs.size() == 1) return outputs;
    // Order-encoded outputs, one per distinct value (increasing).
    std::vector<weighted_output> ordered;
    for (std::size_t i = 0; i < outputs.size();) {
      std::size_t j = i + 1;
      while (j < outputs.size() && outputs[j].value == outputs[i].value) ++j;
      const literal y = pool_.fresh();
      for (std::size_t k = i; k < j; ++k) emit(out_, ~outputs[k].lit, y);  // x -> y_(a_x)
      if (!ordered.empty()) emit(out_, ~y, ordered.back().lit);            // y_a -> y_a'
      some_.clear();
      some_.push_back(~y);
      for (std::size_t k = i; k < outputs.size(); ++k) some_.push_back(outputs[k].lit);
      out_.add_clause(std::span<const literal>(some_));  // y_a -> some x with a_x >= a
      ordered.push_back({outputs[i].value, y});
      i = j;
    }
    return ordered;
  }

  Sink& out_;
  variable_pool& pool_;
  const std::vector<std::vector<term>>& leaves_;
  sides which_;
  weighted_joiner<Sink> joiner_;
  std::vector<literal> some_;
};

// The reduced form: at a node, two sums s < s' are the same output when no
// sum r the other groups can reach tells them apart against the bound
// (s + r <= K exactly when s' + r <= K). The class of s is the number of
// reachable r with s + r <= K; the class of 0 needs no output (it is the
// empty one), and a node keeps one output per other class. The reachable sums
// of each subtree are computed first (bottom up, cut at K+1), the sums of
// the rest of the tree top down: the rest of a child is the rest of its
// parent plus the sums of its sibling. Joining uses any member of a class
// for it (all give the parent the same class), here the smallest.
template <class Sink>
class reduced_group_totalizer_builder {
 public:
  reduced_group_totalizer_builder(Sink& out, variable_pool& pool, const std::vector<std::vector<term>>& leaves,
                                  std::int64_t bound, std::uint64_t output_budget, error_position where,
                                  group_literal_cache* cache = nullptr)
      : out_(out),
        pool_(pool),
        leaves_(leaves),
        bound_(bound),
        cap_(bound + 1),
        budget_(output_budget),
        where_(std::move(where)),
        cache_(cache) {
    if (cap_ > (std::int64_t{1} << 24))
      throw error(error_id::over_budget, "the reduced group generalized totalizer takes bounds up to 2^24", where_);
    mark_.assign(static_cast<std::size_t>(cap_) + 1, 0);
  }

  // Builds the tree and returns the root's outputs (at most one: sums above K).
  std::vector<weighted_output> build() {
    const std::size_t root = make(0, leaves_.size());
    return emit_node(root, std::vector<std::int64_t>{0});
  }

 private:
  struct tree_node {
    std::size_t first;
    std::size_t last;
    std::size_t left = 0;
    std::size_t right = 0;
    std::vector<std::int64_t> sums;  // reachable sums of the subtree, cut at cap, sorted
  };

  // Sums of a and b (sorted, cut at cap), sorted.
  std::vector<std::int64_t> plus(const std::vector<std::int64_t>& a, const std::vector<std::int64_t>& b) {
    work_ += static_cast<std::uint64_t>(a.size()) * b.size();
    if (work_ > work_budget)
      throw error(error_id::over_budget, "the reduced group generalized totalizer passed its budget of sum pairs",
                  where_);
    std::vector<std::int64_t> r;
    for (const std::int64_t x : a)
      for (const std::int64_t y : b) {
        const auto s = static_cast<std::size_t>(std::min(x + y, cap_));
        if (mark_[s] == 0) {
          mark_[s] = 1;
          r.push_back(static_cast<std::int64_t>(s));
        }
      }
    for (const std::int64_t s : r) mark_[static_cast<std::size_t>(s)] = 0;
    std::sort(r.begin(), r.end());
    return r;
  }

  std::size_t make(std::size_t first, std::size_t last) {
    const std::size_t id = nodes_.size();
    nodes_.push_back(tree_node{first, last, 0, 0, {}});
    if (last - first == 1) {
      std::vector<std::int64_t> sums{0};
      for (const term& t : leaves_[first]) sums.push_back(std::min(t.coefficient, cap_));
      std::sort(sums.begin(), sums.end());
      sums.erase(std::unique(sums.begin(), sums.end()), sums.end());
      nodes_[id].sums = std::move(sums);
      return id;
    }
    const std::size_t middle = first + (last - first) / 2;
    const std::size_t left = make(first, middle);
    const std::size_t right = make(middle, last);
    nodes_[id].left = left;
    nodes_[id].right = right;
    nodes_[id].sums = plus(nodes_[left].sums, nodes_[right].sums);
    return id;
  }

  // Outputs of node `id` given the sums `rest` the other groups reach.
  std::vector<weighted_output> emit_node(std::size_t id, const std::vector<std::int64_t>& rest) {
    auto class_of = [&](std::int64_t s) {
      return std::upper_bound(rest.begin(), rest.end(), bound_ - s) - rest.begin();  // r <= K - s
    };
    const auto bottom = class_of(0);
    std::vector<weighted_output> outputs;  // one per class, by class
    std::vector<std::ptrdiff_t> classes;
    auto output_for = [&](std::ptrdiff_t c, std::int64_t value) -> literal {
      for (std::size_t i = 0; i < classes.size(); ++i)
        if (classes[i] == c) {
          outputs[i].value = std::min(outputs[i].value, value);
          return outputs[i].lit;
        }
      if (++made_ > budget_)
        throw error(
            error_id::over_budget,
            "the reduced group generalized totalizer passed its budget of " + std::to_string(budget_) + " outputs",
            where_);
      classes.push_back(c);
      outputs.push_back({value, pool_.fresh()});
      return outputs.back().lit;
    };
    const tree_node& n = nodes_[id];
    if (n.last - n.first == 1) {
      // Literals of one class share one output (x -> o); a class of one literal is the literal.
      const auto& group = leaves_[n.first];
      std::vector<std::ptrdiff_t> cls(group.size());
      std::vector<std::size_t> members;
      for (std::size_t i = 0; i < group.size(); ++i) cls[i] = class_of(std::min(group[i].coefficient, cap_));
      std::vector<char> done(group.size(), 0);
      for (std::size_t i = 0; i < group.size(); ++i) {
        if (done[i] != 0 || cls[i] == bottom) continue;
        members.clear();
        std::int64_t value = cap_;
        for (std::size_t j = i; j < group.size(); ++j)
          if (done[j] == 0 && cls[j] == cls[i]) {
            done[j] = 1;
            members.push_back(j);
            value = std::min(value, std::min(group[j].coefficient, cap_));
          }
        if (members.size() == 1) {
          outputs.push_back({value, group[i].lit});
        } else {
          set_.clear();
          for (const std::size_t j : members) set_.push_back(group[j].lit);
          outputs.push_back({value, group_literal(out_, pool_, set_, false, cache_)});
        }
      }
      return outputs;
    }
    const std::size_t left_id = n.left;
    const std::size_t right_id = n.right;
    const std::vector<weighted_output> left = emit_node(left_id, plus(rest, nodes_[right_id].sums));
    const std::vector<weighted_output> right = emit_node(right_id, plus(rest, nodes_[left_id].sums));
    for (std::size_t i = 0; i <= left.size(); ++i) {
      const weighted_output u = i == 0 ? weighted_output{0, literal()} : left[i - 1];
      for (std::size_t j = i == 0 ? 1 : 0; j <= right.size(); ++j) {
        const weighted_output v = j == 0 ? weighted_output{0, literal()} : right[j - 1];
        const std::int64_t w = std::min(u.value + v.value, cap_);
        const auto c = class_of(w);
        if (c == bottom) continue;
        const literal o = output_for(c, w);
        if (i == 0)
          emit(out_, ~v.lit, o);
        else if (j == 0)
          emit(out_, ~u.lit, o);
        else
          emit(out_, ~u.lit, ~v.lit, o);
      }
    }
    return outputs;
  }

  static constexpr std::uint64_t work_budget = std::uint64_t{1} << 32;

  Sink& out_;
  variable_pool& pool_;
  const std::vector<std::vector<term>>& leaves_;
  std::int64_t bound_;
  std::int64_t cap_;
  std::uint64_t budget_;
  error_position where_;
  std::uint64_t made_ = 0;
  std::uint64_t work_ = 0;
  group_literal_cache* cache_;
  std::vector<literal> set_;
  std::vector<tree_node> nodes_;
  std::vector<char> mark_;  // scratch for plus(), all zero between calls
};

}  // namespace detail

template <class Sink>
void encode_group_generalized_totalizer(Sink& out, variable_pool& pool, const grouped_constraint& c,
                                        const encode_options& options,
                                        std::uint64_t output_budget = default_generalized_totalizer_output_budget,
                                        group_literal_cache* cache = nullptr) {
  const sides which = options.full_equivalence ? sides::both : sides::upper;
  detail::encode_groups_as_at_most(out, pool, c, [&](const grouped_constraint& le) {
    const std::int64_t cap = detail::checked_add(le.bound, 1, c.where(), "the bound plus one");
    std::vector<std::vector<term>> leaves;
    leaves.reserve(le.groups.size());
    for (const auto& g : le.groups)
      leaves.push_back(has_lower(which) ? g : detail::merge_equal_coefficients(out, pool, g, which, cache));
    detail::group_totalizer_builder<Sink> builder(out, pool, leaves, cap, which, output_budget, c.where());
    const std::vector<weighted_output> root = builder.build(0, leaves.size());
    if (!root.empty() && root.back().value == cap) emit(out, ~root.back().lit);
  });
}

}  // namespace clausewright

namespace clausewright {

// The reduced group generalized totalizer (Bofill et al. 2022): the same tree
// with the outputs of a node merged into the classes no other sum tells apart
// (see detail::reduced_group_totalizer_builder). The same relations and
// limits as encode_group_generalized_totalizer; bounds up to 2^24.
template <class Sink>
void encode_group_reduced_generalized_totalizer(
    Sink& out, variable_pool& pool, const grouped_constraint& c, const encode_options& options,
    std::uint64_t output_budget = default_generalized_totalizer_output_budget, group_literal_cache* cache = nullptr) {
  // Classes of sums are defined one way only: a full encoding is the
  // unreduced tree with both sides.
  if (options.full_equivalence) {
    encode_group_generalized_totalizer(out, pool, c, options, output_budget, cache);
    return;
  }
  detail::encode_groups_as_at_most(out, pool, c, [&](const grouped_constraint& le) {
    detail::reduced_group_totalizer_builder<Sink> builder(out, pool, le.groups, le.bound, output_budget, c.where(),
                                                          cache);
    for (const weighted_output& o : builder.build()) emit(out, ~o.lit);
  });
}

// The method table's entries (methods.hpp).
struct group_generalized_totalizer_encoding {
  static constexpr encoding_descriptor descriptor{
      "group-generalized-totalizer",
      applies::cardinality | applies::linear,
      false,
      "Bofill, Coll, Nightingale, Suy, Ulrich-Oltean, Villaret 2022 (Artificial Intelligence 302); Joshi, Martins, "
      "Manquinho 2015 (CP)",
      "a node of children with p and q outputs (cut at K+1): (p+1)(q+1)-1 clauses; a leaf is a group, one output per "
      "distinct coefficient",
      "rows with at-most-one groups only, with their at-most-one constraints in the formula; a budget of 2^22 outputs",
      false,
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_group_generalized_totalizer(out, pool, grouped_view(c), options);
  }
};

struct group_reduced_generalized_totalizer_encoding {
  static constexpr encoding_descriptor descriptor{
      "group-reduced-generalized-totalizer",
      applies::cardinality | applies::linear,
      false,
      "Bofill, Coll, Nightingale, Suy, Ulrich-Oltean, Villaret 2022 (Artificial Intelligence 302)",
      "as the group generalized totalizer with a node's outputs merged into classes of sums: at most K+1 outputs "
      "per node, one at the root",
      "rows with at-most-one groups only, with their at-most-one constraints in the formula; bounds up to 2^24; "
      "with full_equivalence the unreduced tree",
      false,
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_group_reduced_generalized_totalizer(out, pool, grouped_view(c), options);
  }
};

}  // namespace clausewright
