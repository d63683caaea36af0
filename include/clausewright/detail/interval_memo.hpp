// clausewright internals: the interval memo of a decision diagram built for
// a "<=" bound, after Abío, Nieuwenhuis, Oliveras, Rodríguez-Carbonell,
// Mayer-Eichberger 2012, "A new look at BDDs for pseudo-Boolean constraints"
// (JAIR).
//
// The bounds K that give one function at a level form an interval
// [beta, gamma]; a node is kept under its beta, and a later bound inside a
// kept interval reuses the node. Shared by the BDD (encodings/bdd.hpp) and
// the group MDD (encodings/group_mdd.hpp), whose levels are inputs and
// groups. Lookups cost O(log nodes of the level); the maps live in one arena.
#pragma once

#include <cstdint>
#include <limits>
#include <map>
#include <memory_resource>
#include <optional>
#include <vector>

namespace clausewright::detail {

inline constexpr std::int64_t interval_minus_infinity = std::numeric_limits<std::int64_t>::min();
inline constexpr std::int64_t interval_plus_infinity = std::numeric_limits<std::int64_t>::max();

// An interval end moved by a weight (infinite ends stay infinite; finite ends
// stay within the coefficient sum, so no overflow).
[[nodiscard]] constexpr std::int64_t interval_shift(std::int64_t bound, std::int64_t weight) noexcept {
  if (bound == interval_minus_infinity || bound == interval_plus_infinity) return bound;
  return bound + weight;
}

template <class Ref>
class interval_memo {
 public:
  struct entry {
    std::int64_t beta;
    std::int64_t gamma;
    Ref ref;
  };
  interval_memo() = default;
  interval_memo(const interval_memo&) = delete;
  interval_memo& operator=(const interval_memo&) = delete;
  interval_memo(interval_memo&&) = delete;
  interval_memo& operator=(interval_memo&&) = delete;
  ~interval_memo() = default;

  void levels(std::size_t count) {
    memo_.reserve(count);
    for (std::size_t i = memo_.size(); i < count; ++i) memo_.emplace_back(&arena_);
  }
  // The kept node whose interval holds k, if any.
  [[nodiscard]] std::optional<entry> find(std::size_t level, std::int64_t k) const {
    const auto& level_memo = memo_[level];
    auto it = level_memo.upper_bound(k);
    if (it == level_memo.begin()) return std::nullopt;
    --it;
    if (it->second.gamma >= k) return entry{it->first, it->second.gamma, it->second.ref};
    return std::nullopt;
  }
  void keep(std::size_t level, std::int64_t beta, std::int64_t gamma, Ref ref) {
    memo_[level].emplace(beta, kept{gamma, ref});
  }

 private:
  struct kept {
    std::int64_t gamma;
    Ref ref;
  };
  std::pmr::monotonic_buffer_resource arena_;
  std::vector<std::pmr::map<std::int64_t, kept>> memo_;  // per level: beta -> [beta, gamma]
};

}  // namespace clausewright::detail
