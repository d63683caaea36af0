// Commander at-most-one and exactly-one: Klieber & Kwon 2007, "Efficient CNF
// encoding for selecting 1 from N objects".
//
// The inputs are split into groups of g (3 by default, the paper's choice),
// each with a commander variable c standing for its group. For every group:
//   (1) at most one input of the group is true (pairwise);
//   (2) c -> x_1 | ... | x_g: a true commander needs a true input;
//   (3) ~c -> ~x for every input x of the group;
// and the constraint is applied again to the commanders, recursively, until
// at most g literals are left, which get the pairwise at-most-one (plus their
// at-least-one clause for exactly-one). This is the paper's exactly-one; its
// at-most-one drops the clauses (2) and asks only at-most-one of the
// commanders. A group of a single input needs no commander: the input itself
// stands in (the clauses (1)-(3) would make c <-> x).
//
// Size, at-most-one over n = 3^t inputs: (n-3)/2 auxiliary variables and
// 3n - 6 clauses; exactly-one: (n-3)/2 variables and 3.5n - 6.5 clauses
// (Klieber & Kwon's "about n/2 variables, 3.5n clauses"). Arc-consistent: a
// true input makes its commander true, which makes the other commanders false
// one level up, whose (3) clauses make their inputs false; for exactly-one the
// (2) clauses carry "all inputs false" upwards and the top clause back down.
//
// Full equivalence for at-most-one adds the clauses (2), so that every
// commander is defined both ways, c <-> x_1 | ... | x_g, exactly as in the
// paper's exactly-one. For exactly-one full equivalence adds nothing.
#pragma once

#include <algorithm>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"
#include "pairwise.hpp"

namespace clausewright {

inline constexpr std::size_t commander_default_group_size = 3;

// `exactly_one`: the paper's exactly-one. `define_commanders`: the clauses (2)
// (implied by exactly_one).
template <class Sink>
void encode_commander_at_most_one(Sink& out, variable_pool& pool, std::span<const literal> x,
                                  std::size_t group_size = commander_default_group_size, bool exactly_one = false,
                                  bool define_commanders = false) {
  if (group_size < 2) throw error(error_id::usage, "the commander encoding needs groups of at least two inputs");
  define_commanders = define_commanders || exactly_one;
  std::vector<literal> level(x.begin(), x.end());
  std::vector<literal> commanders;
  std::vector<literal> clause;
  clause.reserve(group_size + 1);
  while (level.size() > group_size) {
    commanders.clear();
    for (std::size_t start = 0; start < level.size(); start += group_size) {
      const std::span<const literal> group =
          std::span<const literal>(level).subspan(start, std::min(group_size, level.size() - start));
      if (group.size() == 1) {
        commanders.push_back(group[0]);
        continue;
      }
      const literal c = pool.fresh();
      commanders.push_back(c);
      encode_pairwise_at_most_one(out, group);
      if (define_commanders) {
        clause.assign(1, ~c);
        clause.insert(clause.end(), group.begin(), group.end());
        out.add_clause(std::span<const literal>(clause));
      }
      for (const literal xi : group) emit(out, c, ~xi);
    }
    level.swap(commanders);
  }
  encode_pairwise_at_most_one(out, std::span<const literal>(level));
  if (exactly_one) out.add_clause(std::span<const literal>(level));
}

template <class Sink>
void encode_commander(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
  if (c.kind != constraint_kind::at_most_one && c.kind != constraint_kind::exactly_one)
    throw error(error_id::method_not_applicable, "the commander encoding takes only at-most-one and exactly-one",
                c.where());
  encode_commander_at_most_one(out, pool, c.literals, commander_default_group_size,
                               c.kind == constraint_kind::exactly_one, options.full_equivalence);
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct commander_encoding {
  static constexpr encoding_descriptor descriptor{
      "commander",
      static_cast<std::uint8_t>(applies::at_most_one),
      true,
      "Klieber & Kwon 2007",
      "groups of 3, n = 3^t: (n-3)/2 auxiliary variables, 3n-6 clauses (3.5n-6.5 "
      "for exactly-one)",
      "none",
      false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_commander(out, pool, c, options);
  }
};

}  // namespace clausewright
