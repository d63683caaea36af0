// Pairwise (binomial) at-most-one: folklore.
//
// For every pair of inputs the clause (~a | ~b). No auxiliary variables,
// n(n-1)/2 clauses; exactly-one adds the clause of all inputs. Arc-consistent:
// once one input is true, unit propagation sets every other false.
// The best choice for a handful of literals, quadratic beyond.
#pragma once

#include <optional>

#include <span>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

template <class Sink>
void encode_pairwise_at_most_one(Sink& out, std::span<const literal> lits) {
  for (std::size_t i = 0; i < lits.size(); ++i)
    for (std::size_t j = i + 1; j < lits.size(); ++j) emit(out, ~lits[i], ~lits[j]);
}

template <class Sink>
void encode_pairwise(Sink& out, variable_pool& /*pool*/, const normalized_constraint& c,
                     const encode_options& /*options*/) {
  if (c.kind != constraint_kind::at_most_one && c.kind != constraint_kind::exactly_one)
    throw error(error_id::method_not_applicable, "pairwise encodes only at-most-one and exactly-one", c.where());
  encode_pairwise_at_most_one(out, c.literals);
  if (c.kind == constraint_kind::exactly_one) out.add_clause(std::span<const literal>(c.literals));
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct pairwise_encoding {
  static constexpr encoding_descriptor descriptor{
      "pairwise",
      static_cast<std::uint8_t>(applies::at_most_one),
      true,
      "folklore (binomial encoding)",
      "0 auxiliary variables, n(n-1)/2 clauses",
      "n(n-1)/2 clauses: past the default clause budget from about 10 000 inputs",
      false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_pairwise(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& /*options*/) {
    // n(n-1)/2 binary clauses, plus the clause of all inputs for exactly-one.
    const auto n = static_cast<std::uint64_t>(c.size());
    encoding_size s;
    const std::uint64_t pairs = n * (n - 1) / 2;
    const bool exactly = c.kind == constraint_kind::exactly_one;
    s.clauses = pairs + (exactly ? 1 : 0);
    s.literals = 2 * pairs + (exactly ? n : 0);
    s.longest_clause = exactly ? n : (pairs != 0 ? 2 : 0);
    return s;
  }
};

}  // namespace clausewright
