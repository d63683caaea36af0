// clausewright internals: joining two children of a generalized totalizer,
// Joshi, Martins, Manquinho 2015, "Generalized totalizer encoding for
// pseudo-Boolean constraints" (CP).
//
// Shared by the generalized totalizer over single inputs
// (encodings/generalized_totalizer.hpp) and the group generalized totalizer
// over at-most-one groups (encodings/group_generalized_totalizer.hpp, Bofill,
// Coll, Nightingale, Suy, Ulrich-Oltean, Villaret 2022): the trees differ in
// their leaves only.
//
// A node joining children with outputs u (from L) and v (from R) gets one
// output per distinct sum, sums of cap and above collapsed into cap, and for
// every pair including the empty one (value 0, true)
//     l_u & r_v -> o_min(u+v, cap)                       (upper side);
// (p+1)(q+1)-1 clauses for children of p and q outputs. The lower side
// (o_w -> sum >= w; needs children whose outputs mean "child sum >= value")
// has, for every pair (u, v) with u + v below cap, the clause
// l_succ(u) | r_succ(v) | ~o_w' (succ: the next output of the child, none:
// the literal drops; w' the node's next output above u + v), and the chain
// o_w' -> o_w over consecutive outputs. With both sides o_w <-> sum >= w.
#pragma once

#include <algorithm>
#include <cstdint>
#include <string>
#include <string_view>
#include <unordered_map>
#include <utility>
#include <vector>

#include "../encodings/common.hpp"
#include "../error.hpp"
#include "../literal.hpp"
#include "../pool.hpp"

namespace clausewright {

struct weighted_output {
  std::int64_t value;  // a reachable sum (cap stands for cap and above)
  literal lit;
};

namespace detail {

template <class Sink>
class weighted_joiner {
 public:
  // `what` names the method in the budget error.
  weighted_joiner(Sink& out, variable_pool& pool, std::int64_t cap, sides which, std::uint64_t output_budget,
                  error_position where, std::string_view what)
      : out_(out),
        pool_(pool),
        cap_(cap),
        which_(which),
        budget_(output_budget),
        where_(std::move(where)),
        what_(what) {}

  [[nodiscard]] std::int64_t cap() const noexcept { return cap_; }
  [[nodiscard]] std::uint64_t outputs_made() const noexcept { return made_; }

  // The node over two children (outputs sorted by value, each below or at cap).
  std::vector<weighted_output> join(const std::vector<weighted_output>& left,
                                    const std::vector<weighted_output>& right) {
    index_.clear();
    index_.reserve(left.size() + right.size());
    std::vector<weighted_output> outputs;
    for (std::size_t i = 0; i <= left.size(); ++i) {
      const weighted_output u = at(left, i);
      for (std::size_t j = i == 0 ? 1 : 0; j <= right.size(); ++j) {
        const weighted_output v = at(right, j);
        const std::int64_t w = std::min(u.value + v.value, cap_);  // no overflow: at most the coefficient sum
        auto [it, fresh] = index_.try_emplace(w, literal());
        if (fresh) {
          if (++made_ > budget_)
            throw error(error_id::over_budget,
                        "the " + std::string(what_) + " passed its budget of " + std::to_string(budget_) + " outputs",
                        where_);
          it->second = pool_.fresh();
          outputs.push_back({w, it->second});
        }
        if (!has_upper(which_)) continue;
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
    if (has_lower(which_)) {
      for (std::size_t i = 0; i <= left.size(); ++i) {
        const std::int64_t u = at(left, i).value;
        for (std::size_t j = 0; j <= right.size(); ++j) {
          const std::int64_t t = u + at(right, j).value;
          if (t >= cap_) break;  // right values increase
          const auto next = std::upper_bound(outputs.begin(), outputs.end(), t,
                                             [](std::int64_t x, const weighted_output& o) { return x < o.value; });
          if (next == outputs.end()) continue;
          // The inputs summing to at most t (left at most u, right at most v) clear o_next.
          const bool left_more = i < left.size();
          const bool right_more = j < right.size();
          if (left_more && right_more)
            emit(out_, left[i].lit, right[j].lit, ~next->lit);
          else if (left_more)
            emit(out_, left[i].lit, ~next->lit);
          else if (right_more)
            emit(out_, right[j].lit, ~next->lit);
          else
            emit(out_, ~next->lit);
        }
      }
      for (std::size_t k = 1; k < outputs.size(); ++k) emit(out_, ~outputs[k].lit, outputs[k - 1].lit);
    }
    return outputs;
  }

 private:
  // Outputs of a child with the empty sum in front: value 0, always true.
  static weighted_output at(const std::vector<weighted_output>& child, std::size_t i) {
    return i == 0 ? weighted_output{0, literal()} : child[i - 1];
  }

  Sink& out_;
  variable_pool& pool_;
  std::int64_t cap_;
  sides which_;
  std::uint64_t budget_;
  error_position where_;
  std::string_view what_;
  std::uint64_t made_ = 0;
  std::unordered_map<std::int64_t, literal> index_;  // reused across nodes
};

}  // namespace detail

}  // namespace clausewright
