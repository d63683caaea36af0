// Pairwise (binomial) at-most-one: folklore.
//
// For every pair of inputs the clause (~a | ~b). No auxiliary variables,
// n(n-1)/2 clauses; exactly-one adds the clause of all inputs. Arc-consistent:
// once one input is true, unit propagation sets every other false.
// The best choice for a handful of literals, quadratic beyond.
#pragma once

#include <span>

#include "common.hpp"

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

}  // namespace clausewright
