// clausewright: variables and literals in DIMACS convention.
//
// A literal is a non-zero signed 32-bit integer: +v is variable v, -v its
// negation. The strong type keeps literals apart from counts and coefficients;
// 0 is the "no literal" value and is never valid in a clause.
#pragma once

#include <compare>
#include <cstdint>
#include <limits>
#include <string>

#include "error.hpp"

namespace clausewright {

// Largest variable index: DIMACS solvers store literals as int, and several
// keep 2*v+1 in an int, so stay below 2^30.
inline constexpr std::int32_t max_variable = (std::int32_t{1} << 30) - 1;

class literal {
 public:
  constexpr literal() noexcept = default;
  // No check: use make_literal for values from users.
  constexpr explicit literal(std::int32_t dimacs) noexcept : value_(dimacs) {}

  [[nodiscard]] constexpr std::int32_t dimacs() const noexcept { return value_; }
  [[nodiscard]] constexpr std::int32_t var() const noexcept { return value_ < 0 ? -value_ : value_; }
  [[nodiscard]] constexpr bool negative() const noexcept { return value_ < 0; }
  [[nodiscard]] constexpr bool valid() const noexcept { return value_ != 0; }
  [[nodiscard]] constexpr literal operator~() const noexcept { return literal(-value_); }
  [[nodiscard]] constexpr literal operator-() const noexcept { return literal(-value_); }
  // The literal of the same variable that is true when `positive` is.
  [[nodiscard]] constexpr literal with_sign(bool positive) const noexcept {
    return literal(positive ? var() : -var());
  }

  friend constexpr bool operator==(literal, literal) noexcept = default;
  friend constexpr auto operator<=>(literal, literal) noexcept = default;

 private:
  std::int32_t value_ = 0;
};

// Checked construction from user input (any integer type).
template <class Int>
[[nodiscard]] literal make_literal(Int dimacs, const error_position& where = {}) {
  static_assert(std::numeric_limits<Int>::is_integer, "make_literal takes an integer");
  if (dimacs == 0) throw error(error_id::invalid_literal, "literal 0 is not a literal (variables start at 1)", where);
  const auto magnitude = dimacs < 0 ? -static_cast<long long>(dimacs) : static_cast<long long>(dimacs);
  if (magnitude > max_variable || magnitude < 0)
    throw error(error_id::invalid_literal,
                "literal " + std::to_string(static_cast<long long>(dimacs)) + " is beyond the largest variable " +
                    std::to_string(max_variable),
                where);
  return literal(static_cast<std::int32_t>(dimacs));
}

// Short spelling for code and tests: lit(3), lit(-7). Unchecked in release.
[[nodiscard]] constexpr literal lit(std::int32_t dimacs) noexcept { return literal(dimacs); }

}  // namespace clausewright
