// BDD: the reduced ordered decision diagram of a weighted sum, built with the
// interval method of Abío, Nieuwenhuis, Oliveras, Rodríguez-Carbonell and
// Mayer-Eichberger 2012, "A new look at BDDs for pseudo-Boolean constraints"
// (JAIR), and translated node by node as in Eén & Sörensson 2006,
// "Translating pseudo-Boolean constraints into SAT" (JSAT).
//
// Inputs are ordered by decreasing coefficient (ties keep the input order).
// The node at level i for bound K stands for  sum_{j>=i} a_j x_j <= K. The
// set of bounds K' that give that same function is an interval [beta, gamma]
// (Abío et al.): the construction returns it with the node and keeps it per
// level, so a later bound falling inside it reuses the node and equivalent
// nodes merge. The result is the reduced diagram: a node whose two children
// coincide is replaced by the child.
//
// Clauses per node v = ITE(x, high, low):
//   <= (one direction, v -> function): ~v | low,  ~v | ~x | high
//      (2 clauses; valid because high implies low for a monotone sum);
//   =  (one direction): ~v | ~x | high,  ~v | x | low,  ~v | high | low
//      (the third, implied, clause lets unit propagation find every violated
//      partial assignment: it sets a node false once both children are);
//   full_equivalence: the 6 if-then-else clauses of Eén & Sörensson, the
//      four of v <-> ITE plus v | ~high | ~low and ~v | high | low.
// Clauses with a terminal child are simplified, so nodes next to terminals
// have fewer. Size: the number of nodes, which is O(n K) and exponential for
// some constraints; a node budget (default_bdd_node_budget, or the argument of
// encode_bdd) makes the construction throw error_id::over_budget instead of
// exhausting memory.
//
// >= is encoded as <= over the negated inputs (negated_view). = is encoded as
// one diagram of the interval [K, K]: with both bounds equal, a node is
// "sum_{j>=i} a_j x_j = K'" and two such nodes that can be satisfied are the
// same function only when their K' are equal, so the memo is keyed by K' alone
// and unsatisfiable ones reduce to the false terminal bottom up; this is
// smaller than two diagrams (for <= K and >= K) and needs no second pass.
//
// Propagation: arc-consistent for <= and >= (Abío et al. 2012); for = not in
// general (deciding what an equality implies is subset sum); both measured.
#pragma once

#include <algorithm>
#include <array>
#include <cstdint>
#include <functional>
#include <limits>
#include <numeric>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "../detail/interval_memo.hpp"
#include "../detail/subset_sums.hpp"
#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

// Memo entries (nodes plus pass-through intervals) one diagram may hold, about
// 100 bytes each: 2^20 entries stay near 100 MiB.
inline constexpr std::uint64_t default_bdd_node_budget = std::uint64_t{1} << 20;

// What the diagram compares: sum <= K, or sum = K.
enum class bdd_shape : std::uint8_t { at_most, exactly };

// A diagram node or one of the two terminals.
struct bdd_ref {
  static constexpr std::int32_t false_terminal = -1;
  static constexpr std::int32_t true_terminal = -2;
  std::int32_t node = false_terminal;  // index into bdd_builder::nodes(), or a terminal

  [[nodiscard]] constexpr bool is_false() const noexcept { return node == false_terminal; }
  [[nodiscard]] constexpr bool is_true() const noexcept { return node == true_terminal; }
  [[nodiscard]] constexpr bool is_node() const noexcept { return node >= 0; }
  friend constexpr bool operator==(bdd_ref, bdd_ref) noexcept = default;
};

struct bdd_node {
  literal variable;     // the node's auxiliary literal
  std::uint32_t level;  // position of its input in bdd_builder::inputs()
  bdd_ref high;         // child when the input is true
  bdd_ref low;          // child when the input is false
  std::int64_t beta;    // the bounds [beta, gamma] this node stands for
  std::int64_t gamma;   // (for `exactly`, beta == gamma)
};

// Builds diagrams over one weighted sum and keeps every node it made, so the
// diagram for another bound shares all nodes the two have in common. root(K)
// emits the clauses of the nodes it creates and returns the root.
//
// Tightening a bound later: with the one-directional clauses a node literal
// implies its function, so for `at_most` asserting root(K2) for K2 < K adds
// sum <= K2 on top of an asserted sum <= K at the cost of the new nodes only.
// With full_equivalence every node literal is equivalent to its function, so
// root(K) is a reified "sum <= K" (and its negation "sum >= K+1") usable under
// assumptions in either direction.
template <class Sink>
class bdd_builder {
 public:
  bdd_builder(Sink& out, variable_pool& pool, std::span<const literal> literals,
              std::span<const std::int64_t> coefficients, bdd_shape shape, bool full_equivalence,
              std::uint64_t node_budget = default_bdd_node_budget, error_position where = {})
      : out_(out), pool_(pool), shape_(shape), full_(full_equivalence), budget_(node_budget), where_(std::move(where)) {
    if (literals.size() != coefficients.size())
      throw error(error_id::usage, "the BDD needs one coefficient per literal", where_);
    if (literals.size() >= std::numeric_limits<std::uint32_t>::max())
      throw error(error_id::over_budget, "too many inputs for one BDD", where_);
    std::vector<std::size_t> order(literals.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return coefficients[a] > coefficients[b]; });
    inputs_.reserve(order.size());
    weights_.reserve(order.size());
    for (const std::size_t i : order) {
      if (coefficients[i] <= 0)
        throw error(error_id::usage, "the BDD takes normalised constraints (positive coefficients)", where_);
      inputs_.push_back(literals[i]);
      weights_.push_back(coefficients[i]);
    }
    // rest_[i] = sum of the weights from level i on.
    rest_.assign(inputs_.size() + 1, 0);
    for (std::size_t i = inputs_.size(); i-- > 0;)
      rest_[i] = detail::checked_add(rest_[i + 1], weights_[i], where_, "the sum of the coefficients");
    memo_.levels(inputs_.size());
  }

  // The root of the diagram for `bound`, building what is missing.
  bdd_ref root(std::int64_t bound) { return build(bound).ref; }

  // The literal of a node reference (terminals have none).
  [[nodiscard]] literal literal_of(bdd_ref r) const {
    CLAUSEWRIGHT_ASSERT(r.is_node(), "terminals have no literal");
    return nodes_[static_cast<std::size_t>(r.node)].variable;
  }
  [[nodiscard]] const std::vector<bdd_node>& nodes() const noexcept { return nodes_; }
  // The inputs in diagram order (decreasing coefficient) and their weights.
  [[nodiscard]] std::span<const literal> inputs() const noexcept { return inputs_; }
  [[nodiscard]] std::span<const std::int64_t> weights() const noexcept { return weights_; }
  // Memo entries held: what the budget counts.
  [[nodiscard]] std::uint64_t entries() const noexcept { return entries_; }

 private:
  static constexpr std::int64_t minus_infinity = detail::interval_minus_infinity;
  static constexpr std::int64_t plus_infinity = detail::interval_plus_infinity;

  struct result {
    std::int64_t beta = 0;
    std::int64_t gamma = 0;
    bdd_ref ref;
  };
  struct frame {
    std::uint32_t level;
    std::uint8_t stage;  // 0: new, 1: low child pending, 2: high child pending
    std::int64_t bound;
    result low;
  };

  // Terminal or memo hit, without building.
  std::optional<result> resolve(std::uint32_t level, std::int64_t k) const {
    const std::int64_t rest = rest_[level];
    if (shape_ == bdd_shape::at_most) {
      if (k < 0) return result{minus_infinity, -1, bdd_ref{bdd_ref::false_terminal}};
      if (k >= rest) return result{rest, plus_infinity, bdd_ref{bdd_ref::true_terminal}};
    } else {
      if (k < 0 || k > rest) return result{k, k, bdd_ref{bdd_ref::false_terminal}};
      if (rest == 0) return result{k, k, bdd_ref{bdd_ref::true_terminal}};  // k == 0 at the bottom
    }
    if (const auto kept = memo_.find(level, k)) return result{kept->beta, kept->gamma, kept->ref};
    return std::nullopt;
  }

  // Both children known: the node (or the shared child) and its interval.
  result combine(std::uint32_t level, std::int64_t k, const result& low, const result& high) {
    result r;
    if (shape_ == bdd_shape::at_most) {
      const std::int64_t w = weights_[level];
      r.beta = std::max(low.beta, detail::interval_shift(high.beta, w));
      r.gamma = std::min(low.gamma, detail::interval_shift(high.gamma, w));
    } else {
      r.beta = r.gamma = k;
    }
    CLAUSEWRIGHT_ASSERT(r.beta <= k && k <= r.gamma, "BDD interval must contain its bound");
    if (entries_ >= budget_)
      throw error(error_id::over_budget, "the BDD passed its node budget of " + std::to_string(budget_) + " nodes",
                  where_);
    if (low.ref == high.ref) {
      r.ref = low.ref;
    } else {
      if (nodes_.size() >= static_cast<std::size_t>(std::numeric_limits<std::int32_t>::max()))
        throw error(error_id::over_budget, "too many BDD nodes", where_);
      r.ref = bdd_ref{static_cast<std::int32_t>(nodes_.size())};
      nodes_.push_back(bdd_node{pool_.fresh(), level, high.ref, low.ref, r.beta, r.gamma});
      emit_node(nodes_.back());
    }
    memo_.keep(level, r.beta, r.gamma, r.ref);
    ++entries_;
    return r;
  }

  result build(std::int64_t bound) {
    if (auto r = resolve(0, bound)) return *r;
    std::vector<frame> stack;
    stack.reserve(inputs_.size() + 1);
    stack.push_back(frame{0, 0, bound, {}});
    result ret;
    bool returning = false;
    while (!stack.empty()) {
      frame& f = stack.back();
      if (returning) {
        if (f.stage == 1) {
          f.low = ret;
          f.stage = 2;
          const frame child{f.level + 1, 0, f.bound - weights_[f.level], {}};
          returning = false;
          stack.push_back(child);
        } else {
          ret = combine(f.level, f.bound, f.low, ret);
          stack.pop_back();
        }
        continue;
      }
      if (auto r = resolve(f.level, f.bound)) {
        ret = *r;
        stack.pop_back();
        returning = true;
        continue;
      }
      f.stage = 1;
      const frame child{f.level + 1, 0, f.bound, {}};
      stack.push_back(child);
    }
    return ret;
  }

  // A clause part: a literal, or a constant from a terminal child.
  struct part {
    literal lit;
    std::int8_t constant = 0;  // 0: the literal, 1: true, -1: false
  };
  static part plain(literal l) noexcept { return {l, 0}; }
  part positive(bdd_ref r) const noexcept {
    if (r.is_true()) return {literal(), 1};
    if (r.is_false()) return {literal(), -1};
    return {nodes_[static_cast<std::size_t>(r.node)].variable, 0};
  }
  part negative(bdd_ref r) const noexcept {
    part p = positive(r);
    p.constant = static_cast<std::int8_t>(-p.constant);
    p.lit = ~p.lit;
    return p;
  }
  void emit_parts(part a, part b, part c) {
    std::array<literal, 3> clause{};
    std::size_t size = 0;
    for (const part& p : {a, b, c}) {
      if (p.constant > 0) return;
      if (p.constant == 0) clause[size++] = p.lit;
    }
    out_.add_clause(std::span<const literal>(clause.data(), size));
  }
  void emit_parts(part a, part b) { emit_parts(a, b, part{literal(), -1}); }

  void emit_node(const bdd_node& n) {
    const literal v = n.variable;
    const literal x = inputs_[n.level];
    if (full_) {
      emit_parts(plain(~v), plain(~x), positive(n.high));
      emit_parts(plain(~v), plain(x), positive(n.low));
      emit_parts(plain(v), plain(~x), negative(n.high));
      emit_parts(plain(v), plain(x), negative(n.low));
      emit_parts(plain(v), negative(n.high), negative(n.low));
      emit_parts(plain(~v), positive(n.high), positive(n.low));
    } else if (shape_ == bdd_shape::at_most) {
      emit_parts(plain(~v), positive(n.low));
      emit_parts(plain(~v), plain(~x), positive(n.high));
    } else {
      emit_parts(plain(~v), plain(~x), positive(n.high));
      emit_parts(plain(~v), plain(x), positive(n.low));
      emit_parts(plain(~v), positive(n.high), positive(n.low));
    }
  }

  Sink& out_;
  variable_pool& pool_;
  bdd_shape shape_;
  bool full_;
  std::uint64_t budget_;
  error_position where_;
  std::vector<literal> inputs_;
  std::vector<std::int64_t> weights_;
  std::vector<std::int64_t> rest_;
  // Memo nodes come from one arena, released at once with the builder.
  detail::interval_memo<bdd_ref> memo_;  // per level: beta -> [beta, gamma]
  std::vector<bdd_node> nodes_;
  std::uint64_t entries_ = 0;
};

// A lower bound on the clauses of encode_bdd for <= and >=: the exact
// number of nodes on up to 64 levels of the diagram. With the
// inputs in diagram order, a bound r reaches level i for every subset sum s
// of the inputs above it (r = K - s); the function there, "the inputs from
// i on sum to at most r", is decided by the largest subset sum of those
// inputs that is at most r (S_i below), and it is a node of level i exactly
// when it depends on x_i: some subset sum t of the inputs after i has
// r - a_i < t <= r. Each node writes at least one clause (a node has a
// non-true child). Zero when the subset sums are too costly to compute.
// The count stops once it passes `enough`.
[[nodiscard]] inline std::uint64_t bdd_clause_lower_bound(
    const normalized_constraint& c, const encode_options& /*options*/,
    std::uint64_t enough = std::numeric_limits<std::uint64_t>::max()) {
  if (c.kind == constraint_kind::clause || c.rel == relation::eq || c.size() < 2) return 0;
  const normalized_constraint flipped = c.rel == relation::ge ? negated_view(c) : normalized_constraint{};
  const normalized_constraint& le = c.rel == relation::ge ? flipped : c;
  if (le.bound < 0) return 0;
  const auto k = static_cast<std::uint64_t>(le.bound);
  const std::size_t n = le.size();
  if (!detail::subset_sums_affordable(2 * n, k)) return 0;
  std::vector<std::uint64_t> weights;
  weights.reserve(n);
  for (const std::int64_t a : le.coefficients) weights.push_back(static_cast<std::uint64_t>(a));
  std::stable_sort(weights.begin(), weights.end(), std::greater<>());
  // The sampled levels: up to 64 consecutive ones from n/8 on (so the sums
  // above them cost n/8 inputs), and the subset sums after each of them
  // (from the back; those of the small coefficients fill up quickly).
  const std::size_t first_level = n <= 64 ? 0 : n / 8;
  std::vector<std::size_t> levels;
  for (std::size_t i = first_level; i < n && i < first_level + 64; ++i) levels.push_back(i);
  std::vector<detail::subset_sums> after;  // after[j]: sums of the inputs after levels[j]
  after.reserve(levels.size());
  {
    detail::subset_sums sums(k);
    std::size_t next = n;
    for (std::size_t j = levels.size(); j-- > 0;) {
      for (; next > levels[j] + 1; --next) sums.add(weights[next - 1]);
      after.push_back(sums);
    }
    std::reverse(after.begin(), after.end());
  }
  std::vector<std::uint64_t> rest(n + 1, 0);  // sum of the weights from level i on
  for (std::size_t i = n; i-- > 0;) rest[i] = rest[i + 1] + weights[i];
  std::uint64_t nodes = 0;
  detail::subset_sums above(k);  // sums of the inputs above the level
  std::size_t added = 0;
  for (std::size_t j = 0; j < levels.size() && nodes <= enough; ++j) {
    const std::size_t i = levels[j];
    for (; added < i; ++added) above.add(weights[added]);
    const std::uint64_t a = weights[i];
    const detail::subset_sums& later = after[j];  // S_(i+1)
    // S_i = S_(i+1) and S_(i+1) + a_i; r runs up over [0, min(k, rest_i - 1)].
    const std::uint64_t last = std::min(k, rest[i] - 1);
    if (later.full()) {
      // Every r is its own largest sum, and depends on x_i (t = r): one node
      // per reachable r, that is per sum s above with k - last <= s.
      nodes += above.count(k - last, k);
      continue;
    }
    std::uint64_t floor_later = 0;  // largest t in S_(i+1) with t <= r
    std::uint64_t floor_here = 0;   // largest t in S_i with t <= r
    std::uint64_t counted = std::numeric_limits<std::uint64_t>::max();
    for (std::uint64_t r = 0; r <= last; ++r) {
      if (later.contains(r)) floor_later = r;
      if (later.contains(r) || (r >= a && later.contains(r - a))) floor_here = r;
      if (!above.contains(k - r) || floor_here == counted) continue;
      if (floor_later + a > r) {  // depends on x_i: r - a < t <= r for t = floor_later
        ++nodes;
        counted = floor_here;
      }
    }
  }
  return nodes;
}

template <class Sink>
void encode_bdd(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options,
                std::uint64_t node_budget = default_bdd_node_budget) {
  if (c.kind == constraint_kind::clause) {
    out.add_clause(std::span<const literal>(c.literals));
    return;
  }
  // negated_view adds the coefficients: check the sum of a hand-built constraint first.
  std::int64_t total = 0;
  for (const std::int64_t a : c.coefficients)
    total = detail::checked_add(total, a, c.where(), "the sum of the coefficients");
  const bool ge = c.rel == relation::ge;
  const normalized_constraint flipped = ge ? negated_view(c) : normalized_constraint{};
  const normalized_constraint& le = ge ? flipped : c;
  bdd_builder<Sink> builder(out, pool, le.literals, le.coefficients,
                            le.rel == relation::eq ? bdd_shape::exactly : bdd_shape::at_most, options.full_equivalence,
                            node_budget, c.where());
  const bdd_ref root = builder.root(le.bound);
  if (root.is_false())
    out.add_clause(std::span<const literal>());
  else if (root.is_node())
    emit(out, builder.literal_of(root));
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct bdd_encoding {
  static constexpr encoding_descriptor descriptor{
      "bdd",
      applies::at_most_one | applies::cardinality | applies::linear,
      true,
      "Abío, Nieuwenhuis, Oliveras, Rodríguez-Carbonell, Mayer-Eichberger 2012 (JAIR); "
      "Eén & Sörensson 2006 (JSAT)",
      "one node per distinct interval of bounds, O(nK); per node 2 clauses (<=, >=), 3 (=), 6 (full)",
      "a budget of 2^20 memo entries (default_bdd_node_budget)",
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_bdd(out, pool, c, options);
  }
  [[nodiscard]] static std::uint64_t lower_bound(const normalized_constraint& c, const encode_options& options,
                                                 std::uint64_t enough) {
    return bdd_clause_lower_bound(c, options, enough);
  }
};

}  // namespace clausewright
