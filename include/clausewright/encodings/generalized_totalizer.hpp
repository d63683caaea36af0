// Generalized totalizer: Joshi, Martins, Manquinho 2015, "Generalized
// totalizer encoding for pseudo-Boolean constraints" (CP).
//
// A balanced binary tree over the inputs (left half floor(n/2)). A node has
// one output per distinct sum its inputs can reach, sums of cap = K+1 and
// above collapsed into cap; a leaf's output is the input itself at min(a,
// cap). A node joining children with outputs u (from L) and v (from R) gets,
// for every pair including the empty one (value 0, true),
//     l_u & r_v -> o_min(u+v, cap)                       (upper side),
// so the inputs summing to w set o_w; sum <= K is then ~o_cap. A node joining
// children of p and q outputs has (p+1)(q+1)-1 such clauses; on unit
// coefficients this is the totalizer with outputs cut at K+1 (Bailleux &
// Boufkhad 2003; Büttner & Rintanen 2005).
//
// The lower side (o_w -> sum >= w) has, for every pair (u, v) with u + v
// below cap, the clause  l_succ(u) | r_succ(v) | ~o_w'  where succ is the next
// output of the child (none: the literal drops) and w' the node's next output
// above u + v, plus the chain o_w' -> o_w over consecutive outputs, without
// which the lower side would only falsify the next output above the sum.
// With both sides o_w <-> "sum >= w" for every output w.
//
// Relations: <= builds the upper side only (as published); >= is encoded as
// <= over the negated inputs (negated_view), so it is the published encoding
// of the complementary sum; = builds one tree with both sides and asserts
// ~o_(K+1) and o_w for the smallest output w >= K; full_equivalence builds both
// sides for every relation. Size: grows with the number of distinct partial
// sums, at most (K+2)^2 clauses per node; exponential in n when the sums are
// all distinct. An output budget (default_generalized_totalizer_output_budget,
// or the argument of encode_generalized_totalizer) throws
// error_id::over_budget before the outputs exhaust memory. Arc-consistent for
// <= and >=; for = not in general (measured).
#pragma once

#include <algorithm>
#include <cstdint>
#include <limits>
#include <map>
#include <optional>
#include <span>
#include <string>
#include <unordered_map>
#include <utility>
#include <vector>

#include "../detail/subset_sums.hpp"
#include "../detail/weighted_join.hpp"
#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

// Outputs over all nodes of one tree (about 50 bytes each while a node is
// joined): 2^22 keeps the peak near 200 MiB.
inline constexpr std::uint64_t default_generalized_totalizer_output_budget = std::uint64_t{1} << 22;

// The root of a generalized totalizer. Upper side: the inputs summing to w
// (cap and above: to cap) set outputs[w], so sum <= K2 for any K2 < cap is
// enforced by asserting ~outputs[w] for every output w > K2 (a bound can be
// tightened later that way). With both sides, outputs[w] <-> sum >= w.
struct generalized_totalizer_outputs {
  std::map<std::int64_t, literal> outputs;
  std::int64_t cap = 0;
  sides built = sides::upper;
};

namespace detail {

template <class Sink>
class generalized_totalizer_builder {
 public:
  generalized_totalizer_builder(Sink& out, variable_pool& pool, std::span<const literal> literals,
                                std::span<const std::int64_t> coefficients, std::int64_t cap, sides which,
                                std::uint64_t output_budget, error_position where)
      : literals_(literals),
        coefficients_(coefficients),
        joiner_(out, pool, cap, which, output_budget, std::move(where), "generalized totalizer") {}

  std::vector<weighted_output> build(std::size_t first, std::size_t last) {
    if (last - first == 1) return {weighted_output{std::min(coefficients_[first], joiner_.cap()), literals_[first]}};
    const std::size_t middle = first + (last - first) / 2;
    const std::vector<weighted_output> left = build(first, middle);
    const std::vector<weighted_output> right = build(middle, last);
    return joiner_.join(left, right);
  }

 private:
  std::span<const literal> literals_;
  std::span<const std::int64_t> coefficients_;
  weighted_joiner<Sink> joiner_;
};

}  // namespace detail

// The tree over the given inputs with outputs cut at `cap` (>= 1).
template <class Sink>
generalized_totalizer_outputs build_generalized_totalizer(
    Sink& out, variable_pool& pool, std::span<const literal> literals, std::span<const std::int64_t> coefficients,
    std::int64_t cap, sides which, const error_position& where = {},
    std::uint64_t output_budget = default_generalized_totalizer_output_budget) {
  if (literals.size() != coefficients.size())
    throw error(error_id::usage, "the generalized totalizer needs one coefficient per literal", where);
  if (cap < 1) throw error(error_id::usage, "the generalized totalizer needs a cut of at least 1", where);
  std::int64_t total = 0;
  for (const std::int64_t a : coefficients) {
    if (a <= 0)
      throw error(error_id::usage, "the generalized totalizer takes normalised constraints (positive coefficients)",
                  where);
    total = detail::checked_add(total, a, where, "the sum of the coefficients");
  }
  generalized_totalizer_outputs result;
  result.cap = cap;
  result.built = which;
  if (literals.empty()) return result;
  detail::generalized_totalizer_builder<Sink> builder(out, pool, literals, coefficients, cap, which, output_budget,
                                                      where);
  for (const weighted_output& o : builder.build(0, literals.size())) result.outputs.emplace(o.value, o.lit);
  return result;
}

template <class Sink>
void encode_generalized_totalizer(Sink& out, variable_pool& pool, const normalized_constraint& c,
                                  const encode_options& options,
                                  std::uint64_t output_budget = default_generalized_totalizer_output_budget) {
  detail::encode_as_at_most(out, c, [&](const normalized_constraint& le) {
    const std::int64_t cap = detail::checked_add(le.bound, 1, c.where(), "the bound plus one");
    const sides which = options.full_equivalence || le.rel == relation::eq ? sides::both : sides::upper;
    const generalized_totalizer_outputs root =
        build_generalized_totalizer(out, pool, le.literals, le.coefficients, cap, which, c.where(), output_budget);
    if (const auto top = root.outputs.find(cap); top != root.outputs.end()) emit(out, ~top->second);
    if (le.rel == relation::eq) {
      const auto reach = root.outputs.lower_bound(le.bound);
      if (reach == root.outputs.end())
        out.add_clause(std::span<const literal>());
      else
        emit(out, reach->second);
    }
  });
}

// A lower bound on the clauses of encode_generalized_totalizer, from its
// root alone: children with p and q distinct sums (cut at K+1) give
// (p+1)(q+1)-1 upper-side clauses. The distinct sums come from the subset
// sums of each half, input by input, so the count can stop once the bound
// passes `enough` (the sums of some of a half's inputs are fewer than its
// own). Zero when that is too costly to compute.
[[nodiscard]] inline std::uint64_t generalized_totalizer_clause_lower_bound(
    const normalized_constraint& c, const encode_options& /*options*/,
    std::uint64_t enough = std::numeric_limits<std::uint64_t>::max()) {
  if (c.kind == constraint_kind::clause || c.size() < 2) return 0;
  const normalized_constraint flipped = c.rel == relation::ge ? negated_view(c) : normalized_constraint{};
  const normalized_constraint& le = c.rel == relation::ge ? flipped : c;
  if (le.bound < 0) return 0;
  const auto cap = static_cast<std::uint64_t>(le.bound) + 1;
  const std::size_t n = le.size();
  if (!detail::subset_sums_affordable(n, cap)) return 0;
  const std::size_t half = n / 2;
  // A child of one input is a leaf: one output.
  detail::subset_sums left(cap);
  detail::subset_sums right(cap);
  std::uint64_t left_total = 0;
  std::uint64_t right_total = 0;
  auto distinct = [cap](const detail::subset_sums& sums, std::uint64_t total) {
    return sums.count(1, cap - 1) + (total >= cap ? 1 : 0);
  };
  std::uint64_t bound = 0;
  for (std::size_t t = 0; t < n - half; ++t) {
    if (t < half) {
      left.add(static_cast<std::uint64_t>(le.coefficients[t]));
      left_total += static_cast<std::uint64_t>(le.coefficients[t]);
    }
    right.add(static_cast<std::uint64_t>(le.coefficients[half + t]));
    right_total += static_cast<std::uint64_t>(le.coefficients[half + t]);
    if ((t & 15U) == 15U || t + 1 == n - half) {
      const std::uint64_t p = half == 1 ? 1 : distinct(left, left_total);
      const std::uint64_t q = n - half == 1 ? 1 : distinct(right, right_total);
      bound = (p + 1) * (q + 1) - 1;
      if (bound > enough) break;
    }
  }
  return bound;
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct generalized_totalizer_encoding {
  static constexpr encoding_descriptor descriptor{
      "generalized-totalizer",
      applies::at_most_one | applies::cardinality | applies::linear,
      true,
      "Joshi, Martins, Manquinho 2015 (CP)",
      "a node of children with p and q distinct sums (cut at K+1): (p+1)(q+1)-1 clauses per direction",
      "a budget of 2^22 outputs (default_generalized_totalizer_output_budget)",
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_generalized_totalizer(out, pool, c, options);
  }
  [[nodiscard]] static std::uint64_t lower_bound(const normalized_constraint& c, const encode_options& options,
                                                 std::uint64_t enough) {
    return generalized_totalizer_clause_lower_bound(c, options, enough);
  }
};

}  // namespace clausewright
