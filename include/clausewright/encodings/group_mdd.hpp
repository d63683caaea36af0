// Group MDD: the reduced ordered multi-valued decision diagram of a weighted
// sum over at-most-one groups, after Bofill, Coll, Suy, Villaret 2017, "Compact
// MDDs for pseudo-Boolean constraints with at-most-one relations in resource-
// constrained scheduling problems" (IJCAI), extended in Artificial
// Intelligence Review 2020 (titles recalled from memory). Built with the interval method of Abío,
// Nieuwenhuis, Oliveras, Rodríguez-Carbonell, Mayer-Eichberger 2012 (JAIR),
// as encodings/bdd.hpp builds the BDD.
//
// One layer per group (groups ordered by decreasing largest coefficient, ties
// in the given order). A node at layer g for bound K stands for
//     sum_{h>=g} v_h <= K,   v_h = the coefficient of group h's true literal, or 0;
// it has one edge per distinct coefficient d of its group (taken by every
// literal with that coefficient, to the node for K - d) and one edge "none"
// (to the node for K). The bounds that give the same function form an
// interval [beta, gamma]: beta is the largest and gamma the smallest of
// child.beta + d (child.gamma + d) over the edges, d = 0 for "none"; a later
// bound inside a kept interval reuses the node. A node whose edges all lead to
// one child is that child. Size: at a layer, distinct nodes have disjoint
// intervals, each holding a bound in 0..K, so at most groups * (K+1) nodes
// (Bofill et al. 2017 state the same bound); each node has one auxiliary
// variable, and each edge of several literals at most one more (below).
//
// Clauses per node v with "none" child c0 and child c_x for literal x
// (clauses with a terminal child simplified, as in bdd.hpp; x stands for the
// literal of x's edge, see below):
//   upper side (v -> its function):   ~v | c0;   ~v | ~x | c_x   (c_x != c0);
//      (valid because every c_x implies c0: a heavier sum leaves less room);
//   lower side (~v -> not its function):  v | ~x | ~c_x   (every x), and for
//      each edge of coefficient d (and "none", d = 0):
//          v | ~c_d | (the x of coefficient above d with c_x != c_d):
//      when no heavier literal is chosen, the group adds at most d, so c_d
//      makes v true. For the largest d this is v | ~c_max, the analogue of
//      the BDD's v | ~high | ~low; for "none" it lists the group's literals.
//      These let unit propagation read the bound off the literals still free
//      (without them >= is not arc-consistent, as the harness found); with d
//      distinct coefficients a node has d+1 of them, O(d^2) literals.
// The clauses are correct only together with the at-most-one constraints of
// the groups: two true literals of one group are counted once.
//
// An edge taken by several literals (one coefficient) has one fresh literal
// y: x -> y for each of them, and y -> (some of them) for the lower side.
// It is made when a node first needs it, so a group whose edges never lead
// anywhere but where "none" does costs nothing; with a group_literal_cache
// (optional last argument) rows over the same sets share it. With edge literals, a node's
// clauses are per distinct coefficient, not per literal.
//
// Relations: <= asserts the root for K with the upper side; >= asserts the
// negation of the root for K-1 with the lower side; = asserts both (one
// diagram holds both roots, sharing nodes); full_equivalence builds both sides
// at every node, so each node literal is equivalent to its function.
// Propagation (with the groups' at-most-one clauses, pairwise, when the
// at-most-one sets are exactly the groups): arc-consistent for <= and >=, as
// the harness measures in tests/test_groups.cpp (the interval BDD is for <=
// and >=, Abío et al. 2012); for = not in general (subset sum), measured.
#pragma once

#include <algorithm>
#include <cstdint>
#include <functional>
#include <limits>
#include <numeric>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "../detail/interval_memo.hpp"
#include "../groups.hpp"
#include "bdd.hpp"
#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

// Upper bound on the nodes of the group MDD for a "<=" row (Bofill et al.
// 2017): groups * (bound + 1). Every node adds one variable.
[[nodiscard]] inline std::uint64_t group_mdd_node_bound(const grouped_constraint& c) noexcept {
  if (c.bound < 0) return 0;
  return static_cast<std::uint64_t>(c.groups.size()) * (static_cast<std::uint64_t>(c.bound) + 1);
}

// Builds the diagram over the groups of a row; root(K) builds what is missing
// for bound K and returns the root (a bdd_ref: a node or a terminal).
template <class Sink>
class group_mdd_builder {
 public:
  group_mdd_builder(Sink& out, variable_pool& pool, const std::vector<std::vector<term>>& groups, sides which,
                    std::uint64_t node_budget = default_bdd_node_budget, error_position where = {},
                    group_literal_cache* cache = nullptr)
      : out_(out), pool_(pool), which_(which), budget_(node_budget), where_(std::move(where)), cache_(cache) {
    std::vector<std::size_t> order(groups.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
      return grouped_constraint::group_maximum(groups[a]) > grouped_constraint::group_maximum(groups[b]);
    });
    if (groups.size() >= std::numeric_limits<std::uint32_t>::max())
      throw error(error_id::over_budget, "too many groups for one MDD", where_);
    for (const std::size_t g : order) {
      layer l;
      l.first_edge = edge_weight_.size();
      std::vector<term> sorted = groups[g];
      for (const term& t : sorted)
        if (t.coefficient <= 0)
          throw error(error_id::usage, "the group MDD takes positive coefficients (a normalised row)", where_);
      std::stable_sort(sorted.begin(), sorted.end(),
                       [](const term& a, const term& b) { return a.coefficient > b.coefficient; });
      for (std::size_t i = 0; i < sorted.size(); ++i) {
        if (i == 0 || sorted[i].coefficient != sorted[i - 1].coefficient) {
          edge_weight_.push_back(sorted[i].coefficient);
          edge_first_.push_back(inputs_.size());
          edge_literal_.push_back(literal());
          ++l.edges;
        }
        inputs_.push_back(sorted[i].lit);
      }
      layers_.push_back(l);
    }
    edge_first_.push_back(inputs_.size());
    rest_.assign(layers_.size() + 1, 0);
    for (std::size_t i = layers_.size(); i-- > 0;)
      rest_[i] =
          detail::checked_add(rest_[i + 1], edge_weight_[layers_[i].first_edge], where_, "the sum of the group maxima");
    memo_.levels(layers_.size());
  }

  bdd_ref root(std::int64_t bound) {
    const bdd_ref r = build(bound).ref;
    flush();
    return r;
  }

  [[nodiscard]] literal literal_of(bdd_ref r) const {
    CLAUSEWRIGHT_ASSERT(r.is_node(), "terminals have no literal");
    return variables_[static_cast<std::size_t>(r.node)];
  }
  // Nodes made (each one auxiliary variable).
  [[nodiscard]] std::size_t node_count() const noexcept { return variables_.size(); }
  [[nodiscard]] std::size_t layer_count() const noexcept { return layers_.size(); }

 private:
  static constexpr std::int64_t minus_infinity = detail::interval_minus_infinity;
  static constexpr std::int64_t plus_infinity = detail::interval_plus_infinity;

  struct layer {
    std::size_t first_edge = 0;  // into edge_weight_, edge_first_, edge_literal_
    std::size_t edges = 0;       // distinct coefficients, decreasing
  };
  struct result {
    std::int64_t beta = 0;
    std::int64_t gamma = 0;
    bdd_ref ref;
  };
  struct frame {
    std::uint32_t layer;
    std::uint32_t next;  // edges resolved so far: 0 is "none", e >= 1 the edge of weight edge e-1
    std::int64_t bound;
    std::size_t results;  // where this frame's child results start in results_
  };

  std::optional<result> resolve(std::uint32_t level, std::int64_t k) const {
    if (k < 0) return result{minus_infinity, -1, bdd_ref{bdd_ref::false_terminal}};
    if (k >= rest_[level]) return result{rest_[level], plus_infinity, bdd_ref{bdd_ref::true_terminal}};
    if (const auto kept = memo_.find(level, k)) return result{kept->beta, kept->gamma, kept->ref};
    return std::nullopt;
  }

  // children[0] is the "none" child, children[e+1] the child of edge e.
  result combine(std::uint32_t level, std::int64_t k, std::span<const result> children) {
    const layer& l = layers_[level];
    result r{children[0].beta, children[0].gamma, {}};
    bool all_same = true;
    for (std::size_t e = 0; e < l.edges; ++e) {
      const std::int64_t w = edge_weight_[l.first_edge + e];
      r.beta = std::max(r.beta, detail::interval_shift(children[e + 1].beta, w));
      r.gamma = std::min(r.gamma, detail::interval_shift(children[e + 1].gamma, w));
      all_same = all_same && children[e + 1].ref == children[0].ref;
    }
    CLAUSEWRIGHT_ASSERT(r.beta <= k && k <= r.gamma, "MDD interval must contain its bound");
    if (entries_ >= budget_)
      throw error(error_id::over_budget,
                  "the group MDD passed its node budget of " + std::to_string(budget_) + " nodes", where_);
    if (all_same) {
      r.ref = children[0].ref;
    } else {
      if (variables_.size() >= static_cast<std::size_t>(std::numeric_limits<std::int32_t>::max()))
        throw error(error_id::over_budget, "too many MDD nodes", where_);
      r.ref = bdd_ref{static_cast<std::int32_t>(variables_.size())};
      variables_.push_back(pool_.fresh());
      pending_.push_back({variables_.back(), level, pending_children_.size()});
      for (std::size_t e = 0; e <= l.edges; ++e) pending_children_.push_back(children[e].ref);
    }
    memo_.keep(level, r.beta, r.gamma, r.ref);
    ++entries_;
    return r;
  }

  result build(std::int64_t bound) {
    if (auto r = resolve(0, bound)) return *r;
    std::vector<frame> stack;
    stack.reserve(layers_.size() + 1);
    results_.clear();
    stack.push_back(frame{0, 0, bound, 0});
    result ret;
    while (!stack.empty()) {
      frame& f = stack.back();
      const layer& l = layers_[f.layer];
      if (f.next <= l.edges) {
        const std::int64_t w = f.next == 0 ? 0 : edge_weight_[l.first_edge + f.next - 1];
        const std::int64_t k = f.bound - w;
        ++f.next;
        if (auto r = resolve(f.layer + 1, k)) {
          results_.push_back(*r);
        } else {
          const frame child{f.layer + 1, 0, k, results_.size()};
          stack.push_back(child);
        }
        continue;
      }
      const std::size_t first = f.results;
      const std::uint32_t level = f.layer;
      const std::int64_t k = f.bound;
      ret = combine(level, k, std::span<const result>(results_).subspan(first, l.edges + 1));
      results_.resize(first);
      stack.pop_back();
      if (!stack.empty()) results_.push_back(ret);
    }
    return ret;
  }

  // Clause building with terminal children: a true part satisfies the clause,
  // a false part drops. The scratch buffer is reused across clauses.
  void begin() {
    clause_.clear();
    satisfied_ = false;
  }
  void add(literal l) { clause_.push_back(l); }
  void add_child(bdd_ref r, bool positive) {
    if (r.is_node()) {
      const literal v = variables_[static_cast<std::size_t>(r.node)];
      clause_.push_back(positive ? v : ~v);
    } else if (r.is_true() == positive) {
      satisfied_ = true;
    }
  }
  void end() {
    if (!satisfied_) out_.add_clause(std::span<const literal>(clause_));
  }

  // The literal of edge e (global index): the group's literal when only one
  // has that coefficient, else one fresh literal for all of them, made when a
  // node first needs it (x -> y always; y -> some x for the lower side).
  literal edge_literal(std::size_t e) {
    const std::size_t first = edge_first_[e];
    const std::size_t last = edge_first_[e + 1];
    if (last - first == 1) return inputs_[first];
    if (!edge_literal_[e].valid())
      edge_literal_[e] = detail::group_literal(
          out_, pool_, std::span<const literal>(inputs_).subspan(first, last - first), has_lower(which_), cache_);
    return edge_literal_[e];
  }
  // Whether edge e (global index) is written through its literal: it is one
  // literal already, it was made, rows share it (a cache), or two nodes or
  // more of this diagram need it. An edge one node needs is written with its
  // literals directly (a clause with ~y becomes one clause per literal, y in
  // a clause becomes the literals): fewer clauses than defining y, and unit
  // propagation derives the same.
  [[nodiscard]] bool through_literal(std::size_t e) const {
    return edge_first_[e + 1] - edge_first_[e] == 1 || edge_literal_[e].valid() || cache_ != nullptr || uses_[e] >= 2;
  }
  [[nodiscard]] std::span<const literal> edge_inputs(std::size_t e) const {
    return std::span<const literal>(inputs_).subspan(edge_first_[e], edge_first_[e + 1] - edge_first_[e]);
  }

  // Which edges of a node its clauses mention (e local to the layer).
  [[nodiscard]] bool node_uses(const layer& l, std::span<const bdd_ref> children, std::size_t e) const {
    const bdd_ref none = children[0];
    const bdd_ref child = children[e + 1];
    if (has_upper(which_) && child != none) return true;
    if (!has_lower(which_)) return false;
    if (!child.is_false()) return true;
    for (std::size_t f = e + 1; f <= l.edges; ++f) {
      const bdd_ref target = f < l.edges ? children[f + 1] : none;
      if (!target.is_false() && child != target) return true;
    }
    return false;
  }

  // Writes the nodes made since the last flush, once the uses of every edge
  // by this diagram are known.
  void flush() {
    uses_.assign(edge_weight_.size(), 0);
    for (const pending_node& n : pending_) {
      const layer& l = layers_[n.level];
      const auto children = std::span<const bdd_ref>(pending_children_).subspan(n.first_child, l.edges + 1);
      for (std::size_t e = 0; e < l.edges; ++e)
        if (node_uses(l, children, e)) ++uses_[l.first_edge + e];
    }
    for (const pending_node& n : pending_) {
      const layer& l = layers_[n.level];
      emit_node(n.variable, l, std::span<const bdd_ref>(pending_children_).subspan(n.first_child, l.edges + 1));
    }
    pending_.clear();
    pending_children_.clear();
  }

  // The clause in clause_ plus ~(edge e): one clause with ~y, or one per
  // literal of the edge.
  void end_with_negated_edge(std::size_t e) {
    if (satisfied_) return;
    if (through_literal(e)) {
      clause_.push_back(~edge_literal(e));
      out_.add_clause(std::span<const literal>(clause_));
      return;
    }
    clause_.push_back(literal());
    for (const literal x : edge_inputs(e)) {
      clause_.back() = ~x;
      out_.add_clause(std::span<const literal>(clause_));
    }
  }
  void add_edge(std::size_t e) {
    if (through_literal(e)) {
      clause_.push_back(edge_literal(e));
    } else {
      for (const literal x : edge_inputs(e)) clause_.push_back(x);
    }
  }

  void emit_node(literal v, const layer& l, std::span<const bdd_ref> children) {
    const bdd_ref none = children[0];
    auto child = [&](std::size_t e) { return children[e + 1]; };  // e local to the layer
    const std::size_t base = l.first_edge;
    if (has_upper(which_)) {
      begin(), add(~v), add_child(none, true), end();
      for (std::size_t e = 0; e < l.edges; ++e) {
        if (child(e) == none) continue;
        if (through_literal(base + e)) (void)edge_literal(base + e);  // made before the clause is assembled
        begin(), add(~v), add_child(child(e), true), end_with_negated_edge(base + e);
      }
    }
    if (has_lower(which_)) {
      for (std::size_t e = 0; e < l.edges; ++e) {
        if (child(e).is_false()) continue;
        if (through_literal(base + e)) (void)edge_literal(base + e);
        begin(), add(v), add_child(child(e), false), end_with_negated_edge(base + e);
      }
      // Per edge e (and "none" last): v | ~c_e | the edges of larger
      // coefficient whose child differs from c_e.
      for (std::size_t e = 0; e <= l.edges; ++e) {
        const bdd_ref target = e < l.edges ? child(e) : none;
        if (target.is_false()) continue;
        for (std::size_t f = 0; f < e; ++f)
          if (child(f) != target && through_literal(base + f)) (void)edge_literal(base + f);
        begin();
        add(v);
        for (std::size_t f = 0; f < e; ++f)
          if (child(f) != target) add_edge(base + f);
        add_child(target, false);
        end();
      }
    }
  }

  struct pending_node {
    literal variable;
    std::uint32_t level;
    std::size_t first_child;  // into pending_children_: none, then one per edge
  };
  std::vector<pending_node> pending_;
  std::vector<bdd_ref> pending_children_;
  std::vector<std::uint32_t> uses_;  // per edge: nodes of the last flush that need it

  Sink& out_;
  variable_pool& pool_;
  sides which_;
  std::uint64_t budget_;
  error_position where_;
  group_literal_cache* cache_;
  std::vector<layer> layers_;
  std::vector<std::int64_t> edge_weight_;
  std::vector<literal> inputs_;          // the groups' literals, by layer and edge
  std::vector<std::size_t> edge_first_;  // edge e's literals: inputs_[edge_first_[e] .. edge_first_[e+1])
  std::vector<literal> edge_literal_;    // edge e's shared literal, once made
  std::vector<std::int64_t> rest_;       // rest_[g]: sum of the largest coefficients of layers g..
  detail::interval_memo<bdd_ref> memo_;  // per level: beta -> [beta, gamma]
  std::vector<literal> variables_;       // node literals
  std::vector<result> results_;          // child results of the open frames
  std::vector<literal> clause_;
  bool satisfied_ = false;
  std::uint64_t entries_ = 0;
};

template <class Sink>
void encode_group_mdd(Sink& out, variable_pool& pool, const grouped_constraint& c, const encode_options& options,
                      std::uint64_t node_budget = default_bdd_node_budget, group_literal_cache* cache = nullptr) {
  if (c.kind == constraint_kind::constant_false) {
    out.add_clause(std::span<const literal>());
    return;
  }
  if (c.kind == constraint_kind::constant_true) return;
  const bool at_most = c.rel != relation::ge;
  const bool at_least = c.rel != relation::le;
  sides which = sides::both;
  if (!options.full_equivalence && !at_least) which = sides::upper;
  if (!options.full_equivalence && !at_most) which = sides::lower;
  group_mdd_builder<Sink> builder(out, pool, c.groups, which, node_budget, c.where(), cache);
  if (at_most) {
    const bdd_ref r = builder.root(c.bound);
    if (r.is_false())
      out.add_clause(std::span<const literal>());
    else if (r.is_node())
      emit(out, builder.literal_of(r));
  }
  if (at_least) {
    const bdd_ref r = builder.root(detail::checked_sub(c.bound, 1, c.where(), "the bound minus one"));
    if (r.is_true())
      out.add_clause(std::span<const literal>());
    else if (r.is_node())
      emit(out, ~builder.literal_of(r));
  }
}

// The method table's entry (methods.hpp).
struct group_mdd_encoding {
  static constexpr encoding_descriptor descriptor{
      "group-mdd",
      applies::cardinality | applies::linear,
      true,
      "Bofill, Coll, Suy, Villaret 2017 (IJCAI), 2020 (Artificial Intelligence Review); intervals as in Abio et al. "
      "2012 (JAIR)",
      "at most groups*(K+1) nodes, one variable each, plus one per edge of several literals; per node 1 + e clauses "
      "(<=, e edges leading elsewhere than none), plus the lower side for >=, = and full",
      "rows with at-most-one groups only, with their at-most-one constraints in the formula; a node budget "
      "(default_bdd_node_budget)",
      false,
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_group_mdd(out, pool, grouped_view(c), options);
  }
};

}  // namespace clausewright
