// Totalizer: Bailleux & Boufkhad 2003, "Efficient CNF encoding of Boolean
// cardinality constraints" (CP 2003), with the outputs cut at k+1 as in
// Büttner & Rintanen 2005.
//
// A balanced binary tree over the inputs (left half floor(n/2)); every node
// counts its leaves in unary, output r_s standing for "at least s of my leaves
// are true". A node joining children with outputs a_1..a_p and b_1..b_q
// (a_0 = b_0 = true) has outputs r_1..r_m, m = min(p+q, cut), and
//     upper side (C1):  a_i & b_j -> r_(i+j)             1 <= i+j <= m
//     lower side (C2):  r_(i+j+1) -> a_(i+1) | b_(j+1)   i+j+1 <= m
// over 0 <= i <= p, 0 <= j <= q, where a_(p+1) and b_(q+1) are false (the
// literal drops). The children are cut at `cut` too. Uncut (cut >= p+q) that
// is (p+1)(q+1)-1 clauses per direction; for p = q = 1: a1->r1, b1->r1,
// a1&b1->r2 and r1->a1|b1, r2->a1, r2->b1. Pairs with i+j above the cut are
// not needed: a count of at least s in the node is reached by some pair with
// i+j = s whose child outputs are forced, so forcing stays exact up to the cut.
//
// Relations, as published: <= k builds the upper side with cut k+1 and
// asserts ~r_(k+1); >= k builds the lower side with cut k and asserts r_k;
// = builds both sides of one tree with cut k+1 and asserts both units;
// full_equivalence builds both sides for every relation.
// Size with cut c: O(n log c) auxiliary variables, O(nc) clauses. It is
// arc-consistent for <=, >= and = (measured by tests/test_method_table.cpp).
//
// The `totalizer` class keeps its tree, so the cut can be raised later with
// extend(): only the new outputs and the clauses a fresh build with the larger
// cut has beyond the old ones are added; a caller then states "count <= j" for
// any j below the new cut by the unit or the assumption ~r_(j+1).
#pragma once

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

class totalizer {
 public:
  totalizer() = default;

  // Builds the tree over `inputs` with outputs cut at `cut`, in `which` sides.
  template <class Sink>
  totalizer(Sink& out, variable_pool& pool, std::span<const literal> inputs, std::size_t cut, sides which)
      : inputs_(inputs.begin(), inputs.end()), which_(which) {
    root_.built = which;
    if (!inputs_.empty()) {
      nodes_.reserve(inputs_.size() - 1);
      root_child_ = make_tree(0, inputs_.size());
    }
    extend(out, pool, cut);
  }

  // The root's outputs: outputs()[j-1] <-> "at least j inputs", j <= cut().
  [[nodiscard]] const unary_outputs& outputs() const noexcept { return root_; }
  [[nodiscard]] std::size_t cut() const noexcept { return cut_; }
  [[nodiscard]] std::size_t input_count() const noexcept { return inputs_.size(); }
  [[nodiscard]] sides built() const noexcept { return which_; }

  // Raises the cut to `new_cut` (a cut at or below the current one changes
  // nothing). Outputs already handed out keep their meaning.
  template <class Sink>
  void extend(Sink& out, variable_pool& pool, std::size_t new_cut) {
    if (new_cut <= cut_ || inputs_.empty()) {
      cut_ = std::max(cut_, new_cut);
      refresh_root();
      return;
    }
    lay_out(new_cut);
    // Post-order: children are extended before their parent.
    for (node& v : nodes_) join(out, pool, v, cut_, new_cut);
    cut_ = new_cut;
    refresh_root();
  }

 private:
  // A child is a node (index >= 0) or a leaf (input ~index).
  using child = std::ptrdiff_t;

  struct node {
    child left = 0;
    child right = 0;
    std::size_t left_leaves = 0;
    std::size_t right_leaves = 0;
    std::size_t offset = 0;  // the outputs are outputs_[offset .. offset + size)
    std::size_t size = 0;
  };

  // Gives every node room for min(leaves, cut) outputs in one array, keeping
  // the outputs made so far.
  void lay_out(std::size_t cut) {
    std::size_t total = 0;
    for (const node& v : nodes_) total += std::min(v.left_leaves + v.right_leaves, cut);
    std::vector<literal> grown(total);
    std::size_t offset = 0;
    for (node& v : nodes_) {
      std::copy_n(outputs_.begin() + static_cast<std::ptrdiff_t>(v.offset), v.size,
                  grown.begin() + static_cast<std::ptrdiff_t>(offset));
      v.offset = offset;
      offset += std::min(v.left_leaves + v.right_leaves, cut);
    }
    outputs_.swap(grown);
  }

  child make_tree(std::size_t first, std::size_t last) {
    if (last - first == 1) return -static_cast<child>(first) - 1;
    const std::size_t middle = first + (last - first) / 2;
    node v;
    v.left = make_tree(first, middle);
    v.right = make_tree(middle, last);
    v.left_leaves = middle - first;
    v.right_leaves = last - middle;
    nodes_.push_back(v);
    return static_cast<child>(nodes_.size() - 1);
  }

  // Called with a cut of at least 1, where a leaf's one output is its input.
  [[nodiscard]] std::span<const literal> outputs_of(child c) const {
    if (c < 0) return {inputs_.data() + (-c - 1), 1};
    const node& v = nodes_[static_cast<std::size_t>(c)];
    return {outputs_.data() + v.offset, v.size};
  }

  // Adds to node `v` what a cut of `new_cut` has beyond a cut of `old_cut`.
  template <class Sink>
  void join(Sink& out, variable_pool& pool, node& v, std::size_t old_cut, std::size_t new_cut) {
    const std::span<const literal> a = outputs_of(v.left);
    const std::span<const literal> b = outputs_of(v.right);
    const auto p = static_cast<std::ptrdiff_t>(a.size());
    const auto q = static_cast<std::ptrdiff_t>(b.size());
    const auto p_old = static_cast<std::ptrdiff_t>(std::min(v.left_leaves, old_cut));
    const auto q_old = static_cast<std::ptrdiff_t>(std::min(v.right_leaves, old_cut));
    const auto m_old = static_cast<std::ptrdiff_t>(v.size);
    const auto m = static_cast<std::ptrdiff_t>(std::min(a.size() + b.size(), new_cut));
    literal* const r = outputs_.data() + v.offset;  // r[s-1] is r_s
    if (m > m_old) {
      const std::int32_t first = pool.fresh_block(m - m_old).dimacs();
      for (std::ptrdiff_t s = m_old; s < m; ++s) r[s] = literal(first + static_cast<std::int32_t>(s - m_old));
      v.size = static_cast<std::size_t>(m);
    }
    if (has_upper(which_)) {
      for (std::ptrdiff_t i = 0; i <= std::min(p, m); ++i) {
        // Pairs (i, j) already there: j <= min(q_old, m_old - i) for i <= p_old.
        std::ptrdiff_t j = i == 0 ? 1 : 0;
        if (i <= p_old) j = std::max(j, std::min(q_old, m_old - i) + 1);
        const std::ptrdiff_t j_last = std::min(q, m - i);
        if (i == 0) {
          for (; j <= j_last; ++j) emit(out, ~b[j - 1], r[j - 1]);
          continue;
        }
        const literal ai = ~a[i - 1];
        if (j == 0 && j <= j_last) {
          emit(out, ai, r[i - 1]);
          j = 1;
        }
        for (; j <= j_last; ++j) emit(out, ai, ~b[j - 1], r[i + j - 1]);
      }
    }
    if (has_lower(which_)) {
      for (std::ptrdiff_t i = 0; i <= std::min(p, m - 1); ++i) {
        std::ptrdiff_t j = 0;
        if (i <= p_old) j = std::max<std::ptrdiff_t>(0, std::min(q_old, m_old - 1 - i) + 1);
        const std::ptrdiff_t j_last = std::min(q, m - 1 - i);
        if (i < p) {
          const literal ai = a[i];
          for (; j <= j_last && j < q; ++j) emit(out, ~r[i + j], ai, b[j]);
          if (j <= j_last) emit(out, ~r[i + j], ai);  // j == q: b_(q+1) is false
        } else {
          // i == p: a_(p+1) is false; j_last < q since m <= p + q.
          for (; j <= j_last; ++j) emit(out, ~r[i + j], b[j]);
        }
      }
    }
  }

  void refresh_root() {
    root_.outputs.clear();
    if (inputs_.empty() || cut_ == 0) return;
    const std::span<const literal> top = outputs_of(root_child_);
    root_.outputs.assign(top.begin(), top.end());
  }

  std::vector<literal> inputs_;
  std::vector<node> nodes_;  // post-order: the root is last
  std::vector<literal> outputs_;
  child root_child_ = 0;
  std::size_t cut_ = 0;
  sides which_ = sides::upper;
  unary_outputs root_;
};

// The outputs of a totalizer over `inputs` cut at `cut`, when the tree is not
// needed afterwards.
template <class Sink>
unary_outputs build_totalizer(Sink& out, variable_pool& pool, std::span<const literal> inputs, std::size_t cut,
                              sides which) {
  const totalizer tree(out, pool, inputs, cut, which);
  return tree.outputs();
}

// A lower bound on the clauses of encode_totalizer, from its root alone: the
// root joins children of p = min(floor(n/2), cut) and q = min(n - floor(n/2),
// cut) outputs into m = min(p + q, cut) and writes one clause per pair (i, j)
// with 1 <= i + j <= m (upper side) or i + j <= m - 1 (lower side). O(n).
[[nodiscard]] inline std::uint64_t totalizer_clause_lower_bound(const normalized_constraint& c,
                                                                const encode_options& options) {
  if (!c.unit_coefficients() || c.kind == constraint_kind::clause || c.size() < 2) return 0;
  const cardinality_sides need = needed_sides(c);
  if (need.impossible || (!need.at_most && !need.at_least)) return 0;
  const auto cut = static_cast<std::uint64_t>(need.at_most ? c.bound + 1 : c.bound);
  const std::uint64_t n = c.size();
  const std::uint64_t p = std::min(n / 2, cut);
  const std::uint64_t q = std::min(n - n / 2, cut);
  const std::uint64_t m = std::min(p + q, cut);
  const sides which = sides_for(c.rel, options);
  auto pairs = [p, q](std::uint64_t most) {  // pairs (i, j), i <= p, j <= q, i + j <= most
    std::uint64_t count = 0;
    for (std::uint64_t i = 0; i <= std::min(p, most); ++i) count += std::min(q, most - i) + 1;
    return count;
  };
  std::uint64_t bound = 0;
  if (has_upper(which)) bound += pairs(m) - 1;
  if (has_lower(which) && m >= 1) bound += pairs(m - 1);
  return bound;
}

template <class Sink>
void encode_totalizer(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
  detail::encode_with_counter(out, c, options, "the totalizer", [&](std::size_t cut, sides which) {
    return build_totalizer(out, pool, c.literals, cut, which);
  });
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct totalizer_encoding {
  static constexpr encoding_descriptor descriptor{
      "totalizer",
      applies::at_most_one | applies::cardinality,
      true,
      "Bailleux & Boufkhad 2003 (CP); outputs cut at k+1, Büttner & Rintanen 2005",
      "a node joining counts of sizes a and b: (a+1)(b+1)-1 clauses per direction before cutting; "
      "O(n log k) auxiliary variables, O(nk) clauses",
      "O(nk) clauses: past the clause budget for large k times n",
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_totalizer(out, pool, c, options);
  }
  [[nodiscard]] static std::uint64_t lower_bound(const normalized_constraint& c, const encode_options& options,
                                                 std::uint64_t enough) {
    static_cast<void>(enough);
    return totalizer_clause_lower_bound(c, options);
  }
};

}  // namespace clausewright
