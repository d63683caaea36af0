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

}  // namespace clausewright
