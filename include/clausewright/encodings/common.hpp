// clausewright: pieces shared by the encodings.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "../constraint.hpp"
#include "../error.hpp"
#include "../literal.hpp"
#include "../pool.hpp"
#include "../sink.hpp"

namespace clausewright {

// What an encoding is asked for beyond the constraint itself.
struct encode_options {
  // false: only the clauses the relation needs (Plaisted & Greenbaum 1986);
  // true: the auxiliary outputs are defined in both directions (Tseitin 1968),
  // which reification and bounds changed later need.
  bool full_equivalence = false;
};

// Which clauses a counter carries. `upper`: a count of at least j forces
// output j true (needed to enforce "sum <= k" by asserting ~output[k]);
// `lower`: output j true forces a count of at least j (needed for "sum >= k").
enum class sides : std::uint8_t { upper = 1, lower = 2, both = 3 };

[[nodiscard]] constexpr bool has_upper(sides s) noexcept { return (static_cast<unsigned>(s) & 1U) != 0; }
[[nodiscard]] constexpr bool has_lower(sides s) noexcept { return (static_cast<unsigned>(s) & 2U) != 0; }

// The sides a constraint of relation `rel` needs.
[[nodiscard]] constexpr sides sides_for(relation rel, const encode_options& options) noexcept {
  if (options.full_equivalence || rel == relation::eq) return sides::both;
  return rel == relation::le ? sides::upper : sides::lower;
}

// Unary outputs of a counting encoding: outputs[j-1] stands for "at least j
// of the inputs are true", in the sides the counter was built with. The
// number of outputs is the counter's cut: counts above it are not told apart.
struct unary_outputs {
  std::vector<literal> outputs;
  sides built = sides::upper;

  [[nodiscard]] std::size_t size() const noexcept { return outputs.size(); }
  // Literal for "count >= j", 1 <= j <= size().
  [[nodiscard]] literal at_least(std::size_t j) const { return outputs.at(j - 1); }
  // Literal for "count <= j", 0 <= j < size().
  [[nodiscard]] literal at_most(std::size_t j) const { return ~outputs.at(j); }
};

// Which sides of sum {<=, >=, =} k a cardinality method has to assert, after
// the cases that need no counter: `impossible` (emit the empty clause), or
// neither side (nothing to emit).
struct cardinality_sides {
  bool impossible = false;
  bool at_most = false;   // assert "count <= bound"
  bool at_least = false;  // assert "count >= bound"
};

[[nodiscard]] inline cardinality_sides needed_sides(const normalized_constraint& c) noexcept {
  const auto n = static_cast<std::int64_t>(c.size());
  const std::int64_t k = c.bound;
  const bool needs_at_most = c.rel != relation::ge;
  const bool needs_at_least = c.rel != relation::le;
  cardinality_sides s;
  s.impossible = (needs_at_most && k < 0) || (needs_at_least && k > n);
  s.at_most = !s.impossible && needs_at_most && k < n;
  s.at_least = !s.impossible && needs_at_least && k > 0;
  return s;
}

// Throws unless the constraint has unit coefficients (cardinality methods).
inline void require_unit_coefficients(const normalized_constraint& c, const char* method) {
  if (!c.unit_coefficients())
    throw error(error_id::method_not_applicable,
                std::string(method) + " encodes only constraints with equal coefficients", c.where());
}

namespace detail {

// The front of every cardinality method: checks the coefficients, and emits
// what needs no counter itself (a clause; the empty clause when the bound
// cannot be met). Returns the sides left to assert (neither: done).
template <class Sink>
[[nodiscard]] cardinality_sides cardinality_front(Sink& out, const normalized_constraint& c, const char* method) {
  require_unit_coefficients(c, method);
  if (c.kind == constraint_kind::clause) {
    out.add_clause(std::span<const literal>(c.literals));
    return {};
  }
  const cardinality_sides need = needed_sides(c);
  if (need.impossible) out.add_clause(std::span<const literal>());
  return need;
}

// Asserts sum {<=, >=, =} k on the unary outputs of a counter with unit
// coefficients; `make(needed, which)` builds a counter whose first `needed`
// outputs are exact in the sides `which` ("<= k" needs k+1 outputs, ">= k"
// needs k).
template <class Sink, class Make>
void encode_with_counter(Sink& out, const normalized_constraint& c, const encode_options& options, const char* method,
                         Make&& make) {
  const cardinality_sides need = cardinality_front(out, c, method);
  if (!need.at_most && !need.at_least) return;
  const std::int64_t k = c.bound;
  const unary_outputs r = make(static_cast<std::size_t>(need.at_most ? k + 1 : k), sides_for(c.rel, options));
  if (need.at_most) emit(out, r.at_most(static_cast<std::size_t>(k)));
  if (need.at_least) emit(out, r.at_least(static_cast<std::size_t>(k)));
}

// The "<=" (or "=") form of a weighted constraint, for the encodings that
// count up to the bound: ">=" becomes "<=" over the negated literals
// (negated_view; the sum of the coefficients is checked first, since a
// constraint built by hand may not have been normalised). A clause, or a
// bound below zero after the flip (the empty clause), is emitted here and
// `encode` is not called.
template <class Sink, class Encode>
void encode_as_at_most(Sink& out, const normalized_constraint& c, Encode&& encode) {
  if (c.kind == constraint_kind::clause) {
    out.add_clause(std::span<const literal>(c.literals));
    return;
  }
  std::int64_t total = 0;
  for (const std::int64_t a : c.coefficients) total = checked_add(total, a, c.where(), "the sum of the coefficients");
  const bool ge = c.rel == relation::ge;
  const normalized_constraint flipped = ge ? negated_view(c) : normalized_constraint{};
  const normalized_constraint& le = ge ? flipped : c;
  if (le.bound < 0) {
    out.add_clause(std::span<const literal>());
    return;
  }
  encode(le);
}

}  // namespace detail

}  // namespace clausewright
