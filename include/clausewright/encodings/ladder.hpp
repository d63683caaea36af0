// Ladder (sequential) at-most-one: Sinz 2005, "Towards an optimal CNF
// encoding of Boolean cardinality constraints" (CP), the sequential counter
// with k = 1; its register chain is the ladder of Gent & Nightingale 2004,
// "A new encoding of AllDifferent into SAT".
//
// Register s_i (1 <= i < n) is implied by "one of x_1..x_i is true":
//     ~x_1 | s_1;
//     for 1 < i < n:  ~x_i | s_i,  ~s_{i-1} | s_i,  ~x_i | ~s_{i-1};
//     ~x_n | ~s_{n-1};
// that is n-1 auxiliary variables and 3n-4 clauses. Arc-consistent: a true
// x_i sets s_i..s_{n-1} true, which sets every later x_j false through
// ~x_j | ~s_{j-1}; it also sets s_{i-1} false, and ~s_{j-1} | s_j then carries
// the falsity down to s_1, so ~x_j | s_j sets every earlier x_j false.
//
// Full equivalence defines every register both ways, s_i <-> x_1 | ... | x_i,
// by adding s_1 -> x_1 and s_i -> s_{i-1} | x_i (n-1 more clauses, 4n-5 in
// all). Exactly-one adds the clause x_1 | ... | x_n.
#pragma once

#include <cstdint>
#include <optional>
#include <span>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

template <class Sink>
void encode_ladder_at_most_one(Sink& out, variable_pool& pool, std::span<const literal> x, bool full = false) {
  const std::size_t n = x.size();
  if (n < 2) return;
  const std::int32_t first = pool.fresh_block(static_cast<std::int64_t>(n - 1)).dimacs();
  auto s = [first](std::size_t i) { return literal(first + static_cast<std::int32_t>(i - 1)); };
  emit(out, ~x[0], s(1));
  if (full) emit(out, ~s(1), x[0]);
  for (std::size_t i = 2; i < n; ++i) {
    const literal xi = x[i - 1];
    emit(out, ~xi, s(i));
    emit(out, ~s(i - 1), s(i));
    emit(out, ~xi, ~s(i - 1));
    if (full) emit(out, ~s(i), s(i - 1), xi);
  }
  emit(out, ~x[n - 1], ~s(n - 1));
}

template <class Sink>
void encode_ladder(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
  if (c.kind != constraint_kind::at_most_one && c.kind != constraint_kind::exactly_one)
    throw error(error_id::method_not_applicable, "the ladder encodes only at-most-one and exactly-one", c.where());
  encode_ladder_at_most_one(out, pool, c.literals, options.full_equivalence);
  if (c.kind == constraint_kind::exactly_one) out.add_clause(std::span<const literal>(c.literals));
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct ladder_encoding {
  static constexpr encoding_descriptor descriptor{"ladder",
                                                  static_cast<std::uint8_t>(applies::at_most_one),
                                                  true,
                                                  "Sinz 2005 (CP), k = 1; Gent & Nightingale 2004",
                                                  "n-1 auxiliary variables, 3n-4 clauses",
                                                  "none",
                                                  false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_ladder(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    // Sinz 2005 with k = 1 (Gent & Nightingale's ladder): n-1 variables,
    // 3n-4 binary clauses; full equivalence adds 1 binary and n-2 ternary.
    const auto n = static_cast<std::uint64_t>(c.size());
    encoding_size s;
    if (n >= 2) {
      s.variables = n - 1;
      detail::add_clauses(s, 3 * n - 4 + (options.full_equivalence ? 1 : 0), 2);
      if (options.full_equivalence) detail::add_clauses(s, n - 2, 3);
    }
    if (c.kind == constraint_kind::exactly_one) detail::add_clauses(s, 1, n);
    return s;
  }
};

}  // namespace clausewright
