// clausewright internals: the set of subset sums of a list of weights, up to a
// cap, as a bit set (the textbook dynamic program, shifted-or per weight).
//
// The size bounds of the weighted encodings use it: the generalized totalizer
// has one output per distinct sum a subtree reaches (Joshi, Martins,
// Manquinho 2015) and the BDD one node per distinct function of a level,
// which distinct sums of the inputs above and below that level decide (Abío
// et al. 2012). Cost: O(n * cap / 64) word operations; callers keep cap small.
#pragma once

#include <algorithm>
#include <bit>
#include <cstdint>
#include <span>
#include <vector>

namespace clausewright::detail {

// Bits 0..cap: bit s set when some subset of `weights` sums to s.
class subset_sums {
 public:
  explicit subset_sums(std::uint64_t cap) : cap_(cap), words_((cap >> 6U) + 1, 0) { words_[0] = 1; }

  void add(std::uint64_t weight) {
    if (weight == 0 || weight > cap_ || full_) return;
    const std::uint64_t shift_words = weight >> 6U;
    const unsigned shift_bits = static_cast<unsigned>(weight & 63U);
    // words[i] |= words shifted up by `weight`, from the top down (in place),
    // up to the word of the largest sum now reachable: above it all is zero.
    const std::uint64_t reach = std::min(cap_, largest_ + weight);
    const std::size_t top = static_cast<std::size_t>(reach >> 6U);
    if (shift_bits == 0) {
      for (std::size_t i = top + 1; i-- > shift_words;) words_[i] |= words_[i - shift_words];
    } else {
      for (std::size_t i = top; i > shift_words; --i)
        words_[i] |= (words_[i - shift_words] << shift_bits) | (words_[i - shift_words - 1] >> (64U - shift_bits));
      words_[shift_words] |= words_[0] << shift_bits;
    }
    largest_ = reach;
    trim();
    // Once every sum up to the cap is reachable nothing changes any more.
    if ((++added_ & 15U) == 0) full_ = largest_ == cap_ && count(0, cap_) == cap_ + 1;
  }
  void add_all(std::span<const std::int64_t> weights) {
    for (const std::int64_t w : weights) add(static_cast<std::uint64_t>(w));
  }

  [[nodiscard]] bool contains(std::uint64_t s) const noexcept {
    return s <= cap_ && ((words_[s >> 6U] >> (s & 63U)) & 1U) != 0;
  }
  // Sums in [from, to] (inclusive, clipped to the cap).
  [[nodiscard]] std::uint64_t count(std::uint64_t from, std::uint64_t to) const noexcept {
    to = std::min(to, cap_);
    std::uint64_t n = 0;
    for (std::uint64_t s = from; s <= to; ++s) {
      if ((s & 63U) == 0 && s + 63 <= to) {
        n += static_cast<std::uint64_t>(std::popcount(words_[s >> 6U]));
        s += 63;
        continue;
      }
      n += contains(s) ? 1 : 0;
    }
    return n;
  }
  [[nodiscard]] std::uint64_t cap() const noexcept { return cap_; }
  // Whether every sum 0..cap is reachable (looked at every 16 weights added).
  [[nodiscard]] bool full() const noexcept { return full_; }

 private:
  void trim() {
    const unsigned top = static_cast<unsigned>(cap_ & 63U);
    if (top != 63) words_.back() &= (std::uint64_t{2} << top) - 1;
  }
  std::uint64_t cap_;
  std::vector<std::uint64_t> words_;
  std::uint64_t largest_ = 0;  // the largest sum reachable (at most the cap)
  std::uint64_t added_ = 0;
  bool full_ = false;
};

// Sums up to this many bits are computed for size bounds; above, no bound.
inline constexpr std::uint64_t subset_sum_cap_limit = std::uint64_t{1} << 24;
// Word operations one bound may spend (n * cap / 64).
inline constexpr std::uint64_t subset_sum_work_limit = std::uint64_t{1} << 27;

[[nodiscard]] inline bool subset_sums_affordable(std::uint64_t n, std::uint64_t cap) noexcept {
  if (cap > subset_sum_cap_limit) return false;
  return n * ((cap >> 6U) + 1) <= subset_sum_work_limit;
}

}  // namespace clausewright::detail
