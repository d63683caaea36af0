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
// group, which is where the size goes down (Bofill et al. 2022). The
// paper's reduced form (merging outputs that no remaining sum tells apart)
// is not built here.
//
// The clauses are correct only together with the at-most-one constraints of
// the groups. Relations: <= builds the upper side (as published); >= goes
// through detail::at_most_form (a "none" literal per group, the row over the
// complements), = through both; full_equivalence (outputs defined in both
// directions) is not available: the method throws method_not_applicable.
// Propagation (with the groups' at-most-one clauses, pairwise):
// arc-consistent for <= (measured in tests/test_groups.cpp).
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
#include "generalized_totalizer.hpp"

namespace clausewright {

namespace detail {

template <class Sink>
class group_totalizer_builder {
 public:
  group_totalizer_builder(Sink& out, variable_pool& pool, const std::vector<std::vector<term>>& leaves,
                          std::int64_t cap, std::uint64_t output_budget, error_position where)
      : out_(out), pool_(pool), leaves_(leaves), cap_(cap), budget_(output_budget), where_(std::move(where)) {}

  // Outputs of the subtree over leaves [first, last), sorted by value.
  std::vector<weighted_output> build(std::size_t first, std::size_t last) {
    if (last - first == 1) {
      std::vector<weighted_output> outputs;
      for (const term& t : leaves_[first]) outputs.push_back({std::min(t.coefficient, cap_), t.lit});
      std::sort(outputs.begin(), outputs.end(),
                [](const weighted_output& a, const weighted_output& b) { return a.value < b.value; });
      return outputs;
    }
    const std::size_t middle = first + (last - first) / 2;
    const std::vector<weighted_output> left = build(first, middle);
    const std::vector<weighted_output> right = build(middle, last);
    return join(left, right);
  }

  [[nodiscard]] std::uint64_t outputs_made() const noexcept { return made_; }

 private:
  static weighted_output at(const std::vector<weighted_output>& child, std::size_t i) {
    return i == 0 ? weighted_output{0, literal()} : child[i - 1];
  }

  std::vector<weighted_output> join(const std::vector<weighted_output>& left,
                                    const std::vector<weighted_output>& right) {
    index_.clear();
    std::vector<weighted_output> outputs;
    for (std::size_t i = 0; i <= left.size(); ++i) {
      const weighted_output u = at(left, i);
      for (std::size_t j = i == 0 ? 1 : 0; j <= right.size(); ++j) {
        const weighted_output v = at(right, j);
        const std::int64_t w = std::min(u.value + v.value, cap_);  // at most the coefficient sum
        auto [it, fresh] = index_.try_emplace(w, literal());
        if (fresh) {
          if (++made_ > budget_)
            throw error(error_id::over_budget,
                        "the group generalized totalizer passed its budget of " + std::to_string(budget_) + " outputs",
                        where_);
          it->second = pool_.fresh();
          outputs.push_back({w, it->second});
        }
        if (i == 0)
          emit(out_, ~v.lit, it->second);
        else if (j == 0)
          emit(out_, ~u.lit, it->second);
        else
          emit(out_, ~u.lit, ~v.lit, it->second);
      }
    }
    std::sort(outputs.begin(), outputs.end(),
              [](const weighted_output& a, const weighted_output& b) { return a.value < b.value; });
    return outputs;
  }

  Sink& out_;
  variable_pool& pool_;
  const std::vector<std::vector<term>>& leaves_;
  std::int64_t cap_;
  std::uint64_t budget_;
  error_position where_;
  std::uint64_t made_ = 0;
  std::unordered_map<std::int64_t, literal> index_;  // reused across nodes
};

}  // namespace detail

template <class Sink>
void encode_group_generalized_totalizer(Sink& out, variable_pool& pool, const grouped_constraint& c,
                                        const encode_options& options,
                                        std::uint64_t output_budget = default_generalized_totalizer_output_budget) {
  if (options.full_equivalence)
    throw error(error_id::method_not_applicable,
                "group-generalized-totalizer defines its outputs in one direction only (no full equivalence)",
                c.where());
  detail::encode_groups_as_at_most(out, pool, c, [&](const grouped_constraint& le) {
    const std::int64_t cap = detail::checked_add(le.bound, 1, c.where(), "the bound plus one");
    std::vector<std::vector<term>> leaves;
    leaves.reserve(le.groups.size());
    for (const auto& g : le.groups) leaves.push_back(detail::merge_equal_coefficients(out, pool, g, sides::upper));
    detail::group_totalizer_builder<Sink> builder(out, pool, leaves, cap, output_budget, c.where());
    const std::vector<weighted_output> root = builder.build(0, leaves.size());
    if (!root.empty() && root.back().value == cap) emit(out, ~root.back().lit);
  });
}

}  // namespace clausewright
