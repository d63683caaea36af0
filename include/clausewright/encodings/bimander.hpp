// Bimander at-most-one: Nguyen & Mai 2015, "A new method to encode the
// at-most-one constraint into SAT" (SoICT).
//
// The inputs are split into m = ceil(n/g) groups of g consecutive inputs;
// inside a group the pairwise clauses, across groups the binary code of the
// group index on ceil(log2 m) commander bits (every input of group i gets
// ~x | +-b_j for each bit j, as in the bitwise encoding). Size: ceil(log2 m)
// auxiliary variables and sum over groups of s(s-1)/2 plus n*ceil(log2 m)
// clauses. g = 1 is the bitwise encoding, g >= n the pairwise one. The paper
// states the parameter as the number of groups m; we fix the group size.
//
// Default group size 4: per input the pairwise part costs (g-1)/2 clauses and
// each halving of the number of groups saves one clause, so g = 2, 3, 4 are
// within a fraction of a clause per input of each other, and g = 4 (a power of
// two, so no code is wasted by rounding) gives n*(ceil(log2 n) - 2) + 1.5n
// clauses with two bits fewer than bitwise when 4 divides n.
//
// Arc-consistent on the inputs for every group size: a true input fixes all
// bits, every input of another group has a clause on a bit its code differs
// in, and the inputs of its own group have the pairwise clauses.
//
// Full equivalence defines each bit both ways, b_j <-> OR{x in a group whose
// index has bit j set}, adding one clause per bit. Exactly-one adds the
// clause x_1 | ... | x_n.
#pragma once

#include <optional>

#include <algorithm>
#include <span>

#include "bitwise.hpp"
#include "common.hpp"
#include "descriptor.hpp"
#include "pairwise.hpp"

namespace clausewright {

inline constexpr std::size_t bimander_default_group_size = 4;

template <class Sink>
void encode_bimander_at_most_one(Sink& out, variable_pool& pool, std::span<const literal> x,
                                 std::size_t group_size = bimander_default_group_size, bool full = false) {
  if (group_size == 0) throw error(error_id::usage, "the bimander encoding needs groups of at least one input");
  for (std::size_t start = 0; start < x.size(); start += group_size)
    encode_pairwise_at_most_one(out, x.subspan(start, std::min(group_size, x.size() - start)));
  encode_binary_groups(out, pool, x, group_size, full);
}

template <class Sink>
void encode_bimander(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
  if (c.kind != constraint_kind::at_most_one && c.kind != constraint_kind::exactly_one)
    throw error(error_id::method_not_applicable, "the bimander encoding takes only at-most-one and exactly-one",
                c.where());
  encode_bimander_at_most_one(out, pool, c.literals, bimander_default_group_size, options.full_equivalence);
  if (c.kind == constraint_kind::exactly_one) out.add_clause(std::span<const literal>(c.literals));
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct bimander_encoding {
  static constexpr encoding_descriptor descriptor{
      "bimander",
      static_cast<std::uint8_t>(applies::at_most_one),
      true,
      "Nguyen & Mai 2015",
      "groups of 4, b = ceil(log2 ceil(n/4)): b auxiliary variables, n*b + 6 "
      "clauses per group of 4",
      "none",
      false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_bimander(out, pool, c, options);
  }
};

}  // namespace clausewright
