// clausewright: the variable pool that hands out auxiliary variables.
#pragma once

#include <cstdint>
#include <string>

#include "error.hpp"
#include "literal.hpp"

namespace clausewright {

// Variables 1..user_variables belong to the user; every fresh() call returns
// the next unused variable after them. The pool only counts: it stores nothing
// per variable.
class variable_pool {
 public:
  constexpr variable_pool() noexcept = default;
  explicit variable_pool(std::int32_t user_variables) { reserve_user(user_variables); }

  // Make sure 1..v are not handed out (the user has them).
  void reserve_user(std::int32_t v) {
    if (v < 0 || v > max_variable)
      throw error(error_id::invalid_literal, "user variable count " + std::to_string(v) + " is out of range");
    if (v > top_) {
      if (top_ > user_) {
        throw error(error_id::usage, "variable " + std::to_string(v) +
                                         " claimed for the user after auxiliary variables were handed out");
      }
      top_ = v;
      user_ = v;
    }
  }

  [[nodiscard]] literal fresh() {
    if (top_ >= max_variable)
      throw error(error_id::overflow, "out of variables: more than " + std::to_string(max_variable) + " needed");
    return literal(++top_);
  }

  // The first of `count` consecutive fresh variables.
  [[nodiscard]] literal fresh_block(std::int64_t count) {
    if (count <= 0) return literal(top_ + 1);
    if (count > max_variable - top_)
      throw error(error_id::overflow, "out of variables: more than " + std::to_string(max_variable) + " needed");
    const literal first(top_ + 1);
    top_ += static_cast<std::int32_t>(count);
    return first;
  }

  // Largest variable in use (user or auxiliary): the V of "p cnf V C".
  [[nodiscard]] constexpr std::int32_t top() const noexcept { return top_; }
  [[nodiscard]] constexpr std::int32_t user_variables() const noexcept { return user_; }
  [[nodiscard]] constexpr std::int64_t auxiliary_variables() const noexcept {
    return static_cast<std::int64_t>(top_) - user_;
  }

 private:
  std::int32_t top_ = 0;
  std::int32_t user_ = 0;
};

}  // namespace clausewright
