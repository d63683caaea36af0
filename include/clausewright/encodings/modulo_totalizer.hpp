// Modulo totalizer: Ogawa, Liu, Hasegawa, Koshimura, Fujita 2013, "Modulo
// based CNF encoding of cardinality constraints and its application to MaxSAT
// solvers" (ICTAI 2013).
//
// The totalizer's tree, but every node writes its count N as p*Q + R with a
// divisor p of about sqrt(k) (here the least p with p*p >= k) and 0 <= R < p:
// unary remainder digits r_s ("R >= s", s < p), unary quotient digits q_s
// ("Q >= s", cut at qk+1 where k = p*qk + rk) and a carry c for a node whose
// children's remainders can reach p. A leaf x is the remainder digit r_1 = x
// (the quotient digit q_1 = x when p = 1). Joining children A (remainders
// a_i, quotients g_i) and B (b_j, h_j), with a_0 = b_0 = g_0 = h_0 = true:
//   upper side   a_i & b_j -> r_(i+j) | c              i+j < p
//                a_i & b_j -> c,  a_i & b_j -> r_(i+j-p)  i+j >= p
//                g_i & h_j -> q_(i+j),  g_i & h_j & c -> q_(i+j+1)
//   lower side   c -> a_(i+1) | b_(p-i)
//                r_s -> a_(i+1) | b_(s-i),  r_s & c -> a_(i+1) | b_(p+s-i)
//                q_s -> c | g_(i+1) | h_(s-i),  q_s -> g_(i+1) | h_(s-1-i)
// (quotient indices above the cut go to the cut; a digit a node cannot have
// drops from the clause; when no pair of remainders reaches p+s-1, r_s & c is
// excluded outright). Clauses cover every pair of child digits, so with the
// upper side alone the value p*Q + R read off the largest true digits of a
// node is at least its count; "<= k" is then ~q_(qk+1) and ~q_qk | ~r_s for
// every s > rk. Both sides make every digit exact, and "= k" is the four units
// q_qk, ~q_(qk+1), r_rk, ~r_(rk+1).
//
// Relations: <= builds the upper side (the paper encodes at-most-k); >= is
// encoded as <= over the negated inputs; = and full
// equivalence build both sides of one tree.
// Size: a node has at most 2p^2 + 2(qk+2)^2 = O(k) clauses per direction and
// p + qk + 1 auxiliary variables; over the tree O(n sqrt(k)) of each (nodes
// below p leaves are small, nodes above have O(k) clauses but there are
// fewer of them), against the totalizer's O(nk) clauses.
// Not arc-consistent (measured by tests/test_method_table.cpp): a clause
// a_i & b_j -> r_(i+j) | c leaves unit propagation a choice it cannot make;
// e.g. x1 + x2 + x3 + x4 <= 2 (p = 2) under x1, x3, ~x4 does not derive ~x2,
// and x1 + x2 + x3 + x4 = 2 under x1, x3 does not either.
#pragma once

#include <algorithm>
#include <array>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

// The least p >= 1 with p*p >= k.
[[nodiscard]] constexpr std::size_t modulo_divisor(std::size_t k) noexcept {
  std::size_t p = 1;
  while (p * p < k) ++p;
  return p;
}

// Digits of a modulo totalizer's root over its inputs (count N = p*Q + R):
// remainder[s-1] stands for R >= s, quotient[s-1] for Q >= s (the last one
// for Q >= quotient.size() and above when the quotient was cut), in the
// sides built.
struct modulo_outputs {
  std::size_t divisor = 1;
  std::vector<literal> remainder;
  std::vector<literal> quotient;
  sides built = sides::upper;
};

namespace detail {

template <class Sink>
class modulo_totalizer_builder {
 public:
  modulo_totalizer_builder(Sink& out, variable_pool& pool, std::span<const literal> inputs, std::size_t divisor,
                           std::size_t quotient_cut, sides which)
      : out_(out), pool_(pool), inputs_(inputs), p_(divisor), q_cut_(quotient_cut), which_(which) {}

  struct digits {
    std::vector<literal> remainder;
    std::vector<literal> quotient;
    std::size_t leaves = 0;
  };

  digits build(std::size_t first, std::size_t last) {
    if (last - first == 1) {
      digits leaf;
      leaf.leaves = 1;
      if (p_ >= 2)
        leaf.remainder.push_back(inputs_[first]);
      else if (q_cut_ >= 1)
        leaf.quotient.push_back(inputs_[first]);
      return leaf;
    }
    const std::size_t middle = first + (last - first) / 2;
    const digits a = build(first, middle);
    const digits b = build(middle, last);
    return join(a, b);
  }

 private:
  // Collects one clause of at most five literals on the stack; an invalid
  // literal (a digit that is constantly true in a premise) is left out.
  class clause {
   public:
    clause& operator<<(literal l) noexcept {
      if (l.valid()) lits_[size_++] = l;
      return *this;
    }
    [[nodiscard]] std::span<const literal> view() const noexcept { return {lits_.data(), size_}; }

   private:
    std::array<literal, 5> lits_{};
    std::size_t size_ = 0;
  };

  // Literal of digit i (1-based) of `d`: none for 0 (true in a premise, or
  // false in a conclusion) and for digits the child does not have.
  static literal digit(const std::vector<literal>& d, std::size_t i) noexcept {
    return i >= 1 && i <= d.size() ? d[i - 1] : literal();
  }
  static literal negated(literal l) noexcept { return l.valid() ? ~l : l; }

  void add(const clause& c) { out_.add_clause(c.view()); }

  std::vector<literal> fresh_digits(std::size_t count) {
    std::vector<literal> d;
    d.reserve(count);
    const std::int32_t first = pool_.fresh_block(static_cast<std::int64_t>(count)).dimacs();
    for (std::size_t s = 0; s < count; ++s) d.push_back(literal(first + static_cast<std::int32_t>(s)));
    return d;
  }

  digits join(const digits& a, const digits& b) {
    digits v;
    v.leaves = a.leaves + b.leaves;
    const std::size_t pa = a.remainder.size();
    const std::size_t pb = b.remainder.size();
    const std::size_t qa = a.quotient.size();
    const std::size_t qb = b.quotient.size();
    const bool has_carry = pa + pb >= p_;
    const literal carry = has_carry ? pool_.fresh() : literal();
    v.remainder = fresh_digits(std::min(v.leaves, p_ - 1));
    v.quotient = fresh_digits(std::min(v.leaves / p_, q_cut_));
    const std::size_t rv = v.remainder.size();
    const std::size_t qv = v.quotient.size();
    // The quotient digit for "Q >= s" with s cut at the quotient cut; none
    // when the node cannot reach s (the premise is then impossible).
    auto quotient_at = [&](std::size_t s) { return s > q_cut_ ? digit(v.quotient, q_cut_) : digit(v.quotient, s); };

    if (has_upper(which_)) {
      for (std::size_t i = 0; i <= pa; ++i)
        for (std::size_t j = i == 0 ? 1 : 0; j <= pb; ++j) {
          const std::size_t s = i + j;
          if (s < p_) {
            add(clause() << negated(digit(a.remainder, i)) << negated(digit(b.remainder, j)) << digit(v.remainder, s)
                         << carry);
          } else {
            add(clause() << negated(digit(a.remainder, i)) << negated(digit(b.remainder, j)) << carry);
            if (s > p_)
              add(clause() << negated(digit(a.remainder, i)) << negated(digit(b.remainder, j))
                           << digit(v.remainder, s - p_));
          }
        }
      for (std::size_t i = 0; i <= qa; ++i)
        for (std::size_t j = 0; j <= qb; ++j) {
          if (i + j > 0)
            add(clause() << negated(digit(a.quotient, i)) << negated(digit(b.quotient, j)) << quotient_at(i + j));
          if (has_carry)
            add(clause() << negated(digit(a.quotient, i)) << negated(digit(b.quotient, j)) << ~carry
                         << quotient_at(i + j + 1));
        }
    }
    if (has_lower(which_)) {
      // A pair (i, j) of child values at most i and at most j: the digits
      // a_(i+1) and b_(j+1) are false.
      auto below = [](const std::vector<literal>& d, std::size_t i) { return digit(d, i + 1); };
      if (has_carry)
        for (std::size_t i = 0; i <= pa && i <= p_ - 1; ++i) {
          const std::size_t j = p_ - 1 - i;
          if (j <= pb) add(clause() << ~carry << below(a.remainder, i) << below(b.remainder, j));
        }
      for (std::size_t s = 1; s <= rv; ++s) {
        const literal rs = ~v.remainder[s - 1];
        for (std::size_t i = 0; i <= pa && i <= s - 1; ++i) {
          const std::size_t j = s - 1 - i;
          if (j <= pb) add(clause() << rs << below(a.remainder, i) << below(b.remainder, j));
        }
        if (!has_carry) continue;
        const std::size_t t = p_ + s - 1;  // with a carry, R < s means a remainder sum below p + s
        if (t > pa + pb) {
          add(clause() << rs << ~carry);
          continue;
        }
        for (std::size_t i = 0; i <= pa && i <= t; ++i) {
          const std::size_t j = t - i;
          if (j <= pb) add(clause() << rs << ~carry << below(a.remainder, i) << below(b.remainder, j));
        }
      }
      for (std::size_t s = 1; s <= qv; ++s) {
        const literal qs = ~v.quotient[s - 1];
        for (std::size_t i = 0; i <= qa && i <= s - 1; ++i) {
          const std::size_t j = s - 1 - i;
          if (j <= qb) add(clause() << qs << carry << below(a.quotient, i) << below(b.quotient, j));
        }
        if (!has_carry || s < 2) continue;
        for (std::size_t i = 0; i <= qa && i <= s - 2; ++i) {
          const std::size_t j = s - 2 - i;
          if (j <= qb) add(clause() << qs << below(a.quotient, i) << below(b.quotient, j));
        }
      }
    }
    return v;
  }

  Sink& out_;
  variable_pool& pool_;
  std::span<const literal> inputs_;
  std::size_t p_;
  std::size_t q_cut_;
  sides which_;
};

}  // namespace detail

// The tree over `inputs` with divisor p and the quotient cut at `quotient_cut`
// (>= 1), in the given sides.
template <class Sink>
modulo_outputs build_modulo_totalizer(Sink& out, variable_pool& pool, std::span<const literal> inputs,
                                      std::size_t divisor, std::size_t quotient_cut, sides which) {
  CLAUSEWRIGHT_ASSERT(divisor >= 1 && quotient_cut >= 1, "the modulo totalizer needs p >= 1 and a quotient cut");
  modulo_outputs result;
  result.divisor = divisor;
  result.built = which;
  if (inputs.empty()) return result;
  detail::modulo_totalizer_builder<Sink> builder(out, pool, inputs, divisor, quotient_cut, which);
  auto root = builder.build(0, inputs.size());
  result.remainder = std::move(root.remainder);
  result.quotient = std::move(root.quotient);
  return result;
}

namespace detail {

// sum lits {<=, =} k with 0 <= k <= n.
template <class Sink>
void encode_modulo_at_most(Sink& out, variable_pool& pool, std::span<const literal> lits, std::size_t k, bool equality,
                           sides which) {
  const std::size_t p = modulo_divisor(k);
  const std::size_t qk = k / p;
  const std::size_t rk = k % p;
  const modulo_outputs root = build_modulo_totalizer(out, pool, lits, p, qk + 1, which);
  auto digit = [](const std::vector<literal>& d, std::size_t s) {
    return s >= 1 && s <= d.size() ? d[s - 1] : literal();
  };
  const literal q_k = digit(root.quotient, qk);         // invalid when qk = 0: Q >= 0 holds
  const literal q_over = digit(root.quotient, qk + 1);  // invalid when the count cannot reach it
  if (q_over.valid()) emit(out, ~q_over);
  if (qk >= 1 && !q_k.valid()) {
    // Q cannot reach qk: N <= k already, and N = k cannot hold.
    if (equality) out.add_clause(std::span<const literal>());
    return;
  }
  // With the upper side alone a larger remainder digit may be true while a
  // smaller is false: exclude each one above rk.
  const std::size_t last = has_lower(which) ? std::min(rk + 1, root.remainder.size()) : root.remainder.size();
  for (std::size_t s = rk + 1; s <= last; ++s) {
    if (q_k.valid())
      emit(out, ~q_k, ~root.remainder[s - 1]);
    else
      emit(out, ~root.remainder[s - 1]);
  }
  if (!equality) return;
  if (q_k.valid()) emit(out, q_k);
  if (rk >= 1) {
    if (rk > root.remainder.size()) {
      out.add_clause(std::span<const literal>());
      return;
    }
    emit(out, root.remainder[rk - 1]);
  }
}

}  // namespace detail

template <class Sink>
void encode_modulo_totalizer(Sink& out, variable_pool& pool, const normalized_constraint& c,
                             const encode_options& options) {
  require_unit_coefficients(c, "the modulo totalizer");
  if (c.kind == constraint_kind::clause) {
    out.add_clause(std::span<const literal>(c.literals));
    return;
  }
  const auto n = static_cast<std::int64_t>(c.size());
  const std::int64_t k = c.bound;
  const bool needs_at_most = c.rel != relation::ge;
  const bool needs_at_least = c.rel != relation::le;
  if ((needs_at_most && k < 0) || (needs_at_least && k > n)) {
    out.add_clause(std::span<const literal>());
    return;
  }
  if (c.rel == relation::eq) {
    detail::encode_modulo_at_most(out, pool, c.literals, static_cast<std::size_t>(k), true, sides::both);
    return;
  }
  const sides which = options.full_equivalence ? sides::both : sides::upper;
  if (c.rel == relation::le) {
    if (k < n) detail::encode_modulo_at_most(out, pool, c.literals, static_cast<std::size_t>(k), false, which);
    return;
  }
  // sum x >= k  <=>  sum ~x <= n - k
  if (k <= 0) return;
  std::vector<literal> negated(c.literals.size());
  std::transform(c.literals.begin(), c.literals.end(), negated.begin(), [](literal l) { return ~l; });
  detail::encode_modulo_at_most(out, pool, negated, static_cast<std::size_t>(n - k), false, which);
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct modulo_totalizer_encoding {
  static constexpr encoding_descriptor descriptor{
      "modulo-totalizer",
      applies::at_most_one | applies::cardinality,
      false,
      "Ogawa, Liu, Hasegawa, Koshimura, Fujita 2013 (ICTAI)",
      "divisor p = ceil(sqrt k): O(n sqrt k) auxiliary variables and clauses",
      "none",
      false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_modulo_totalizer(out, pool, c, options);
  }
};

}  // namespace clausewright
