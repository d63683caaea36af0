// Adder network: Warners 1998, "A linear-time transformation of linear
// inequalities into conjunctive normal form" (IPL); in the form of Eén &
// Sörensson 2006, "Translating pseudo-Boolean constraints into SAT" (JSAT).
//
// Every input x with coefficient a goes into the bucket of each bit set in a.
// Buckets are reduced from the lowest bit up, first in first out: three
// literals of bucket b become a full adder, its sum going back to bucket b and
// its carry to bucket b+1; two literals become a half adder. What is left is
// one literal (or none) per bit: the binary sum. A comparator of those bits
// against the bound (lexicographic, one clause per zero bit of K for <=, per
// one bit for >=, units for =) finishes the encoding.
//
// Clauses, textbook (both directions): full adder sum = xor of 3 (8 clauses),
// carry = majority (6); half adder sum = xor of 2 (4), carry = and (3).
// Polarity-aware: for <= only the halves that make the adder outputs count at
// least the inputs' value are built (full adder 4 + 3, half adder 2 + 1), for
// >= only the halves that make them count at most it (4 + 3, 2 + 2); = and
// full_equivalence build both. That suffices because the comparator is
// monotone in the value of the bits and every adder preserves the bound on
// the weighted value (s + 2c >= a + b + c_in, or <=).
// Size: O(n log a_max) clauses and auxiliary variables: every full adder
// takes one literal out of the buckets, which start with one literal per set
// bit of each coefficient. Not arc-consistent (measured).
#pragma once

#include <algorithm>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

struct adder_outputs {
  literal sum;
  literal carry;
};

// sum <-> a xor b xor c, carry <-> majority(a, b, c), in the given sides:
// `upper` makes sum + 2 carry >= a + b + c, `lower` makes it <=.
template <class Sink>
adder_outputs full_adder(Sink& out, variable_pool& pool, literal a, literal b, literal c, sides which) {
  const literal s = pool.fresh();
  const literal carry = pool.fresh();
  if (has_upper(which)) {
    // An odd number of inputs sets the sum; any two set the carry.
    emit(out, ~a, b, c, s);
    emit(out, a, ~b, c, s);
    emit(out, a, b, ~c, s);
    emit(out, ~a, ~b, ~c, s);
    emit(out, ~a, ~b, carry);
    emit(out, ~a, ~c, carry);
    emit(out, ~b, ~c, carry);
  }
  if (has_lower(which)) {
    emit(out, a, b, c, ~s);
    emit(out, ~a, ~b, c, ~s);
    emit(out, ~a, b, ~c, ~s);
    emit(out, a, ~b, ~c, ~s);
    emit(out, a, b, ~carry);
    emit(out, a, c, ~carry);
    emit(out, b, c, ~carry);
  }
  return {s, carry};
}

// sum <-> a xor b, carry <-> a and b, in the given sides (as full_adder).
template <class Sink>
adder_outputs half_adder(Sink& out, variable_pool& pool, literal a, literal b, sides which) {
  const literal s = pool.fresh();
  const literal carry = pool.fresh();
  if (has_upper(which)) {
    emit(out, ~a, b, s);
    emit(out, a, ~b, s);
    emit(out, ~a, ~b, carry);
  }
  if (has_lower(which)) {
    emit(out, a, b, ~s);
    emit(out, ~a, ~b, ~s);
    emit(out, a, ~carry);
    emit(out, b, ~carry);
  }
  return {s, carry};
}

// The binary sum of a weighted sum, least significant bit first. A bit that
// no input can reach is the invalid literal (constant false). With `upper`
// the bits' value is at least the weighted sum, with `lower` at most, with
// both exactly it.
struct binary_sum {
  std::vector<literal> bits;
  sides built = sides::both;

  [[nodiscard]] std::size_t size() const noexcept { return bits.size(); }
};

template <class Sink>
binary_sum build_adder_network(Sink& out, variable_pool& pool, std::span<const literal> literals,
                               std::span<const std::int64_t> coefficients, sides which,
                               const error_position& where = {}) {
  if (literals.size() != coefficients.size())
    throw error(error_id::usage, "the adder network needs one coefficient per literal", where);
  // Each bucket is a queue: a vector and the index of its first literal
  // still waiting (the literals before it went into adders). A bucket holds
  // at most its starting literals and one sum per adder of its bit.
  struct bucket {
    std::vector<literal> literals;
    std::size_t head = 0;
    [[nodiscard]] std::size_t waiting() const noexcept { return literals.size() - head; }
  };
  std::vector<bucket> buckets;
  for (std::size_t i = 0; i < literals.size(); ++i) {
    if (coefficients[i] <= 0)
      throw error(error_id::usage, "the adder network takes normalised constraints (positive coefficients)", where);
    auto a = static_cast<std::uint64_t>(coefficients[i]);
    for (std::size_t bit = 0; a != 0; ++bit, a >>= 1U) {
      if ((a & 1U) == 0) continue;
      if (buckets.size() <= bit) buckets.resize(bit + 1);
      buckets[bit].literals.push_back(literals[i]);
    }
  }
  binary_sum result;
  result.built = which;
  for (std::size_t bit = 0; bit < buckets.size(); ++bit) {
    // A carry out of the top bit makes a new bucket (before the references
    // are taken: the resize moves the buckets).
    if (buckets[bit].waiting() >= 2 && buckets.size() <= bit + 1) buckets.resize(bit + 2);
    bucket& q = buckets[bit];
    while (q.waiting() >= 2) {
      const literal* first = q.literals.data() + q.head;
      adder_outputs o{};
      if (q.waiting() >= 3) {
        const literal a = first[0], b = first[1], c = first[2];
        q.head += 3;
        o = full_adder(out, pool, a, b, c, which);
      } else {
        const literal a = first[0], b = first[1];
        q.head += 2;
        o = half_adder(out, pool, a, b, which);
      }
      q.literals.push_back(o.sum);
      buckets[bit + 1].literals.push_back(o.carry);
    }
    result.bits.push_back(q.waiting() == 0 ? literal() : q.literals[q.head]);
    q = bucket{};  // done with this bit: its memory goes now
  }
  return result;
}

// Compares the bits (their value) with `bound`: sum rel bound. For <= the bits
// must count at least the sum (`upper`), for >= at most (`lower`), for = both.
template <class Sink>
void compare_binary_sum(Sink& out, const binary_sum& sum, relation rel, std::int64_t bound) {
  const std::size_t m = sum.bits.size();
  auto bit_of = [bound](std::size_t b) { return b < 63 && ((static_cast<std::uint64_t>(bound) >> b) & 1U) != 0; };
  if (bound < 0) {
    if (rel != relation::ge) out.add_clause(std::span<const literal>());
    return;
  }
  if (m < 63 && (static_cast<std::uint64_t>(bound) >> m) != 0) {
    // The bound has bits above the sum's: <= holds, >= and = cannot.
    if (rel != relation::le) out.add_clause(std::span<const literal>());
    return;
  }
  if (rel == relation::eq) {
    for (std::size_t b = 0; b < m; ++b) {
      const literal s = sum.bits[b];
      if (s.valid())
        emit(out, bit_of(b) ? s : ~s);
      else if (bit_of(b))
        out.add_clause(std::span<const literal>());
    }
    return;
  }
  // <= K: for each bit b where K has 0, not (s_b and s_j for every higher j
  // where K has 1): the first bit from the top where the sum passes K.
  // >= K: the mirror image on the complemented bits.
  const bool le = rel == relation::le;
  // Spelled as branches: g++ 12.2 at -O1 and above folds the comparison of
  // two bools, one of them ((x >> n) & 1) != 0, wrongly.
  auto wanted = [&](std::size_t b) { return le ? !bit_of(b) : bit_of(b); };  // <=: zero bits; >=: one bits
  std::vector<literal> clause;
  clause.reserve(m);
  for (std::size_t b = 0; b < m; ++b) {
    if (!wanted(b)) continue;
    clause.clear();
    bool satisfied = false;
    auto add = [&](std::size_t j) {
      const literal s = sum.bits[j];
      if (s.valid())
        clause.push_back(le ? ~s : s);
      else if (le)
        satisfied = true;  // ~false
    };
    add(b);
    for (std::size_t j = b + 1; j < m && !satisfied; ++j)
      if (!wanted(j)) add(j);
    if (!satisfied) out.add_clause(std::span<const literal>(clause));
  }
}

// The exact size of encode_adder on `c` (a counting, cardinality or linear
// kind), without building it: the buckets are reduced as counts (a bucket of
// m literals takes floor((m-1)/2) full adders for m >= 3, then a half adder
// when two are left, each passing one carry up), and the comparator is run
// on placeholder bits into a counting sink. O(bits^2).
[[nodiscard]] inline encoding_size adder_size(const normalized_constraint& c, const encode_options& options) {
  const sides which = sides_for(c.rel, options);
  std::vector<std::uint64_t> buckets;
  for (const std::int64_t a : c.coefficients) {
    auto bits = static_cast<std::uint64_t>(a);
    for (std::size_t bit = 0; bits != 0; ++bit, bits >>= 1U) {
      if ((bits & 1U) == 0) continue;
      if (buckets.size() <= bit) buckets.resize(bit + 1, 0);
      ++buckets[bit];
    }
  }
  std::uint64_t full = 0;
  std::uint64_t half = 0;
  binary_sum placeholder;
  for (std::size_t bit = 0; bit < buckets.size(); ++bit) {
    std::uint64_t m = buckets[bit];
    const std::uint64_t f = m >= 3 ? (m - 1) / 2 : 0;
    m -= 2 * f;
    const std::uint64_t h = m == 2 ? 1 : 0;
    m -= h;
    full += f;
    half += h;
    if (f + h != 0) {
      if (buckets.size() <= bit + 1) buckets.resize(bit + 2, 0);
      buckets[bit + 1] += f + h;
    }
    placeholder.bits.push_back(m != 0 ? literal(1) : literal());
  }
  encoding_size s;
  s.variables = 2 * (full + half);
  counting_sink counts;
  compare_binary_sum(counts, placeholder, c.rel, c.bound);
  s.clauses = counts.clauses();
  s.literals = counts.literals();
  s.longest_clause = counts.longest_clause();
  auto add = [&s](std::uint64_t count, std::uint64_t length) {
    if (count == 0) return;
    s.clauses += count;
    s.literals += count * length;
    s.longest_clause = std::max(s.longest_clause, length);
  };
  // Full adder, per side: 4 clauses of 4 literals (sum) and 3 of 3 (carry).
  // Half adder: upper 3 of 3; lower 2 of 3 (sum) and 2 of 2 (carry).
  const std::uint64_t sides_built = (has_upper(which) ? 1U : 0U) + (has_lower(which) ? 1U : 0U);
  add(4 * full * sides_built, 4);
  add(3 * full * sides_built, 3);
  if (has_upper(which)) add(3 * half, 3);
  if (has_lower(which)) {
    add(2 * half, 3);
    add(2 * half, 2);
  }
  return s;
}

template <class Sink>
void encode_adder(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
  if (c.kind == constraint_kind::clause) {
    out.add_clause(std::span<const literal>(c.literals));
    return;
  }
  const sides which = sides_for(c.rel, options);
  const binary_sum sum = build_adder_network(out, pool, c.literals, c.coefficients, which, c.where());
  compare_binary_sum(out, sum, c.rel, c.bound);
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct adder_encoding {
  static constexpr encoding_descriptor descriptor{
      "adder",
      applies::at_most_one | applies::cardinality | applies::linear,
      false,
      "Warners 1998 (IPL); Eén & Sörensson 2006 (JSAT)",
      "O(n log a_max): full adder 8 + 6 clauses, half adder 4 + 3 (one direction: 4 + 3, 2 + 1 or 2 + 2)",
      "none",
      true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_adder(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    return adder_size(c, options);
  }
};

}  // namespace clausewright
