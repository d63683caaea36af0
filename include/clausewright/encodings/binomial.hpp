// Binomial (direct) cardinality encoding: folklore, the generalisation of
// pairwise at-most-one.
//
// "sum <= k" is one clause of k+1 negated inputs for every (k+1)-subset (no
// k+1 of them are true together); "sum >= k" is one clause of n-k+1 inputs
// for every (n-k+1)-subset (no n-k+1 of them are false together); "=" is
// both. No auxiliary variables, so full equivalence changes nothing.
// Size: C(n, k+1) clauses for <=, C(n, n-k+1) for >=. Arc-consistent: once k
// inputs are true, every clause over them and one more input is unit.
// Only for tiny cases: the size is estimated first (checked arithmetic) and
// a case over the clause budget throws error_id::over_budget before any
// clause is written.
#pragma once

#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

// The default budget, equal to select.hpp's default_clause_budget (the
// tests check they agree).
inline constexpr std::uint64_t binomial_clause_budget = 50'000'000;

// C(n, r), or nothing when it is above `limit`.
[[nodiscard]] constexpr std::optional<std::uint64_t> binomial_coefficient(std::uint64_t n, std::uint64_t r,
                                                                          std::uint64_t limit) noexcept {
  if (r > n) return 0;
  if (n - r < r) r = n - r;
  __extension__ using wide = unsigned __int128;
  wide value = 1;
  // C(n, i+1) = C(n, i) * (n-i) / (i+1) is exact and grows for i < n/2, so
  // the first value past the limit settles it.
  for (std::uint64_t i = 0; i < r; ++i) {
    value = value * (n - i) / (i + 1);
    if (value > limit) return std::nullopt;
  }
  return static_cast<std::uint64_t>(value);
}

namespace detail {

// One clause per r-subset of `lits`, each literal taken with `positive`.
template <class Sink>
void emit_subsets(Sink& out, std::span<const literal> lits, std::size_t r, bool positive) {
  const std::size_t n = lits.size();
  if (r > n) return;
  std::vector<std::size_t> index(r);
  std::vector<literal> clause(r);
  for (std::size_t i = 0; i < r; ++i) index[i] = i;
  for (;;) {
    for (std::size_t i = 0; i < r; ++i) clause[i] = positive ? lits[index[i]] : ~lits[index[i]];
    out.add_clause(std::span<const literal>(clause));
    // Next subset in lexicographic order: raise the last index that can move.
    std::size_t i = r;
    while (i > 0 && index[i - 1] == n - r + (i - 1)) --i;
    if (i == 0) return;
    ++index[i - 1];
    for (std::size_t j = i; j < r; ++j) index[j] = index[j - 1] + 1;
  }
}

}  // namespace detail

template <class Sink>
void encode_binomial(Sink& out, variable_pool& /*pool*/, const normalized_constraint& c,
                     const encode_options& /*options*/, std::uint64_t clause_budget = binomial_clause_budget) {
  const cardinality_sides need = detail::cardinality_front(out, c, "the binomial encoding");
  if (!need.at_most && !need.at_least) return;
  const std::int64_t k = c.bound;
  const bool at_most = need.at_most;
  const bool at_least = need.at_least;
  const auto n = static_cast<std::int64_t>(c.size());
  const auto un = static_cast<std::uint64_t>(n);
  const auto uk = static_cast<std::uint64_t>(k);
  std::uint64_t total = 0;
  auto count = [&](std::uint64_t r) {
    const std::optional<std::uint64_t> clauses = binomial_coefficient(un, r, clause_budget);
    if (!clauses || *clauses > clause_budget - total)
      throw error(error_id::over_budget,
                  "the binomial encoding of " + std::to_string(n) + " inputs with bound " + std::to_string(k) +
                      " needs more than " + std::to_string(clause_budget) + " clauses",
                  c.where());
    total += *clauses;
  };
  if (at_most) count(uk + 1);
  if (at_least) count(un - uk + 1);
  if (at_most) detail::emit_subsets(out, c.literals, static_cast<std::size_t>(uk + 1), false);
  if (at_least) detail::emit_subsets(out, c.literals, static_cast<std::size_t>(un - uk + 1), true);
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct binomial_encoding {
  static constexpr encoding_descriptor descriptor{"binomial",
                                                  applies::at_most_one | applies::cardinality,
                                                  true,
                                                  "folklore (direct encoding)",
                                                  "0 auxiliary variables; C(n, k+1) clauses for <=, C(n, n-k+1) for >=",
                                                  "C(n, k+1) clauses: refused before writing past the clause budget",
                                                  false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_binomial(out, pool, c, options);
  }
};

}  // namespace clausewright
