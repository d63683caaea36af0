// Cardinality networks: Asín, Nieuwenhuis, Oliveras, Rodríguez-Carbonell 2011,
// "Cardinality networks: a theoretical and empirical study" (Constraints 16),
// built from Batcher's odd-even merges (Batcher 1968, "Sorting networks and
// their applications", AFIPS); and Batcher's full odd-even sorting network,
// used for cardinality constraints by Eén & Sörensson 2006 (JSAT).
//
// A comparator turns wires a, b into max = a | b and min = a & b, 3 clauses
// per direction: a -> max, b -> max, a & b -> min (upper side) and
// max -> a | b, min -> a, min -> b (lower side); 2 auxiliary variables.
// Wires are sorted in decreasing order, so output j of a network over n inputs
// stands for "at least j inputs are true".
//
// The cardinality network for the m largest of n (m a power of two, the
// inputs padded with false to a multiple of m): every block of m inputs is
// sorted by Batcher's network, then blocks are merged pairwise by the
// simplified merge, which keeps only the m largest of two sorted m-sequences:
// Batcher's merge without the comparators that reach only the discarded
// outputs (the last comparator computes only its max). For "<= k" m is the
// least power of two >= k+1, the upper side is built and ~c_(k+1) asserted;
// for ">= k" (as published, the other three clauses) m >= k, the lower side,
// and c_k; "=" builds both sides of one network with m >= k+1; full
// equivalence builds both sides. Padding is constant false: a comparator
// with a false input is a wire, without clauses.
// Size: O(n log^2 m) comparators. Batcher's sorting network on n = 2^t
// inputs has (t^2 - t + 4) * 2^(t-2) - 1 comparators. Both are arc-consistent
// (Asín et al.; measured by tests/test_method_table.cpp).
#pragma once

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <span>
#include <vector>

#include "common.hpp"

namespace clausewright {

namespace detail {

// A network on a working array of wires; the invalid literal is the constant
// false wire.
template <class Sink>
class comparator_network {
 public:
  comparator_network(Sink& out, variable_pool& pool, sides which) : out_(out), pool_(pool), which_(which) {}

  std::vector<literal> wires;

  // wires[x] becomes the max, wires[y] the min (or is left stale when the min
  // is not needed).
  void compare(std::size_t x, std::size_t y, bool need_min) {
    const literal a = wires[x];
    const literal b = wires[y];
    if (!b.valid()) return;
    if (!a.valid()) {
      wires[x] = b;
      wires[y] = a;
      return;
    }
    const literal max = pool_.fresh();
    wires[x] = max;
    if (has_upper(which_)) {
      emit(out_, ~a, max);
      emit(out_, ~b, max);
    }
    if (has_lower(which_)) emit(out_, ~max, a, b);
    if (!need_min) return;
    const literal min = pool_.fresh();
    wires[y] = min;
    if (has_upper(which_)) emit(out_, ~a, ~b, min);
    if (has_lower(which_)) {
      emit(out_, ~min, a);
      emit(out_, ~min, b);
    }
  }

  // Batcher's odd-even merge of the sequence wires[lo], wires[lo+r], ... up
  // to (not including) lo+n, whose two halves are sorted; only its first
  // `need` elements are computed (need = n/r: all).
  void merge(std::size_t lo, std::size_t n, std::size_t r, std::size_t need) {
    if (need == 0) return;
    const std::size_t length = n / r;
    const std::size_t step = r * 2;
    if (step >= n) {
      compare(lo, lo + r, need >= 2);
      return;
    }
    // Element 2i of the result is element i of the even subsequence, 2i-1
    // element i-1 of the odd one; comparator i joins positions 2i-1 and 2i.
    merge(lo, n, step, std::min(need / 2 + 1, length / 2));
    merge(lo + r, n, step, std::min(need / 2, length / 2));
    const std::size_t pairs = std::min(need / 2, length / 2 - 1);  // those with 2i-1 < need
    for (std::size_t i = 1; i <= pairs; ++i) {
      const std::size_t x = lo + (2 * i - 1) * r;
      compare(x, x + r, 2 * i < need);
    }
  }

  // Batcher's odd-even merge sort of wires[lo .. lo+n), n a power of two.
  void sort(std::size_t lo, std::size_t n) {
    if (n < 2) return;
    sort(lo, n / 2);
    sort(lo + n / 2, n / 2);
    merge(lo, n, 1, n);
  }

 private:
  Sink& out_;
  variable_pool& pool_;
  sides which_;
};

[[nodiscard]] constexpr std::size_t power_of_two_at_least(std::size_t n) noexcept {
  std::size_t p = 1;
  while (p < n) p *= 2;
  return p;
}

inline unary_outputs take_outputs(const std::vector<literal>& wires, std::size_t count, sides which) {
  unary_outputs result;
  result.built = which;
  result.outputs.assign(wires.begin(), wires.begin() + static_cast<std::ptrdiff_t>(count));
  for (const literal l : result.outputs) CLAUSEWRIGHT_ASSERT(l.valid(), "a network output below n is a constant");
  return result;
}

}  // namespace detail

// Batcher's odd-even sorting network over `inputs` (padded with false to a
// power of two): n outputs, outputs[j-1] <-> "at least j inputs true" in the
// sides built.
template <class Sink>
unary_outputs build_sorting_network(Sink& out, variable_pool& pool, std::span<const literal> inputs, sides which) {
  detail::comparator_network<Sink> net(out, pool, which);
  const std::size_t size = detail::power_of_two_at_least(inputs.size());
  net.wires.assign(inputs.begin(), inputs.end());
  net.wires.resize(size, literal());
  if (!inputs.empty()) net.sort(0, size);
  return detail::take_outputs(net.wires, inputs.size(), which);
}

// The cardinality network giving the `needed` largest of `inputs` (computed
// for the least power of two m >= needed): min(n, m) outputs.
template <class Sink>
unary_outputs build_cardinality_network(Sink& out, variable_pool& pool, std::span<const literal> inputs,
                                        std::size_t needed, sides which) {
  if (inputs.empty() || needed == 0) return detail::take_outputs({}, 0, which);
  const std::size_t m = detail::power_of_two_at_least(needed);
  const std::size_t blocks = (inputs.size() + m - 1) / m;
  detail::comparator_network<Sink> net(out, pool, which);
  net.wires.assign(inputs.begin(), inputs.end());
  net.wires.resize(blocks * m, literal());
  for (std::size_t b = 0; b < blocks; ++b) net.sort(b * m, m);
  // Merge neighbouring blocks; the m largest of each pair move to the front.
  for (std::size_t count = blocks; count > 1; count = (count + 1) / 2) {
    for (std::size_t pair = 0; 2 * pair < count; ++pair) {
      const std::size_t lo = 2 * pair * m;
      if (2 * pair + 1 < count) net.merge(lo, 2 * m, 1, m);
      if (pair != 0) std::copy_n(net.wires.begin() + static_cast<std::ptrdiff_t>(lo), m,
                                 net.wires.begin() + static_cast<std::ptrdiff_t>(pair * m));
    }
  }
  return detail::take_outputs(net.wires, std::min(inputs.size(), m), which);
}

template <class Sink>
void encode_cardinality_network(Sink& out, variable_pool& pool, const normalized_constraint& c,
                                const encode_options& options) {
  detail::encode_with_counter(out, c, options, "a cardinality network", [&](std::size_t needed, sides which) {
    return build_cardinality_network(out, pool, c.literals, needed, which);
  });
}

template <class Sink>
void encode_sorting_network(Sink& out, variable_pool& pool, const normalized_constraint& c,
                            const encode_options& options) {
  detail::encode_with_counter(out, c, options, "a sorting network", [&](std::size_t /*needed*/, sides which) {
    return build_sorting_network(out, pool, c.literals, which);
  });
}

}  // namespace clausewright
