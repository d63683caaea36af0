// Bitwise (binary) at-most-one: Frisch et al. 2005; Prestwich 2007.
//
// Input x_i (counted from 0) carries the binary code of i on m = ceil(log2 n)
// fresh bits b_j: for every i and j the clause ~x_i | b_j when bit j of i is
// 1, ~x_i | ~b_j when it is 0. Two true inputs would need two codes at once.
// That is ceil(log2 n) auxiliary variables and n * ceil(log2 n) clauses.
// Often listed as not arc-consistent, which holds for the bits (false inputs
// do not propagate to them); on the inputs of an at-most-one it is: a true
// x_i fixes every bit, and every other input has a clause on a bit in which
// its code differs (measured in tests/test_method_table.cpp).
//
// Full equivalence defines bit j as "an input whose code has bit j set is
// true", adding b_j -> OR{x_i : bit j of i is 1} (m more clauses), so the bits
// are the code of the true input, or all 0 when none is. Exactly-one adds the
// clause x_1 | ... | x_n.
//
// encode_binary_groups generalises the codes to groups of inputs sharing one
// code: the cross-group part of the bimander encoding.
#pragma once

#include <bit>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

// Bits needed for `count` distinct codes: ceil(log2 count), 0 for count <= 1.
[[nodiscard]] constexpr std::size_t binary_code_bits(std::size_t count) noexcept {
  return count <= 1 ? 0 : static_cast<std::size_t>(std::bit_width(count - 1));
}

// Inputs x[g*group_size .. (g+1)*group_size) share the code g; at most one
// group may hold a true input. ceil(log2 ceil(n/group_size)) auxiliary
// variables, n * that many clauses (plus one per bit with `full`).
template <class Sink>
void encode_binary_groups(Sink& out, variable_pool& pool, std::span<const literal> x, std::size_t group_size,
                          bool full) {
  const std::size_t n = x.size();
  if (group_size == 0) throw error(error_id::usage, "the binary code needs groups of at least one input");
  const std::size_t groups = (n + group_size - 1) / group_size;
  const std::size_t bits = binary_code_bits(groups);
  if (bits == 0) return;
  const std::int32_t first = pool.fresh_block(static_cast<std::int64_t>(bits)).dimacs();
  auto bit = [first](std::size_t j) { return literal(first + static_cast<std::int32_t>(j)); };
  for (std::size_t i = 0; i < n; ++i) {
    const std::size_t code = i / group_size;
    for (std::size_t j = 0; j < bits; ++j) {
      const literal b = bit(j);
      emit(out, ~x[i], ((code >> j) & 1U) != 0 ? b : ~b);
    }
  }
  if (!full) return;
  std::vector<literal> clause;
  clause.reserve(n + 1);
  for (std::size_t j = 0; j < bits; ++j) {
    clause.clear();
    clause.push_back(~bit(j));
    for (std::size_t i = 0; i < n; ++i)
      if (((i / group_size) >> j) & 1U) clause.push_back(x[i]);
    out.add_clause(std::span<const literal>(clause));
  }
}

template <class Sink>
void encode_bitwise_at_most_one(Sink& out, variable_pool& pool, std::span<const literal> x, bool full = false) {
  encode_binary_groups(out, pool, x, 1, full);
}

template <class Sink>
void encode_bitwise(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
  if (c.kind != constraint_kind::at_most_one && c.kind != constraint_kind::exactly_one)
    throw error(error_id::method_not_applicable, "bitwise encodes only at-most-one and exactly-one", c.where());
  encode_bitwise_at_most_one(out, pool, c.literals, options.full_equivalence);
  if (c.kind == constraint_kind::exactly_one) out.add_clause(std::span<const literal>(c.literals));
}

namespace detail {

// Bits of a binary code below n that have bit j set: inputs i < n with bit j
// of i equal to 1.
[[nodiscard]] constexpr std::uint64_t codes_with_bit(std::uint64_t n, std::size_t j) noexcept {
  const std::uint64_t half = std::uint64_t{1} << j;
  const std::uint64_t period = half * 2;
  return n / period * half + (n % period > half ? n % period - half : 0);
}

}  // namespace detail

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct bitwise_encoding {
  static constexpr encoding_descriptor descriptor{"bitwise",
                                                  static_cast<std::uint8_t>(applies::at_most_one),
                                                  true,
                                                  "Frisch et al. 2005; Prestwich 2007",
                                                  "ceil(log2 n) auxiliary variables, n*ceil(log2 n) clauses",
                                                  "none",
                                                  false};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_bitwise(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    // Frisch et al. 2005: ceil(log2 n) bits, n ceil(log2 n) binary clauses;
    // full equivalence adds one clause per bit over the inputs whose code
    // has that bit set.
    const auto n = static_cast<std::uint64_t>(c.size());
    encoding_size s;
    const std::size_t bits = binary_code_bits(n);
    s.variables = bits;
    detail::add_clauses(s, n * bits, 2);
    if (options.full_equivalence)
      for (std::size_t j = 0; j < bits; ++j) detail::add_clauses(s, 1, 1 + detail::codes_with_bit(n, j));
    if (c.kind == constraint_kind::exactly_one) detail::add_clauses(s, 1, n);
    return s;
  }
};

}  // namespace clausewright
