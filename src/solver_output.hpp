// clausewright tool: reading a SAT or MaxSAT solver's answer.
//
// Accepted, after the SAT Competition and MaxSAT Evaluation output rules:
//   c ...                      comments
//   s SATISFIABLE | s UNSATISFIABLE | s OPTIMUM FOUND | s UNKNOWN
//   o 17                       a MaxSAT cost (kept, not needed)
//   v 1 -2 3 0                 literals, over any number of v lines
//   v 0110                     the MaxSAT Evaluation's string of 0/1 values
// or a bare list of literals (one or more lines of integers, 0 optional).
//
// The two forms of v lines are told apart on the whole answer: the string of
// values is the only token on the v lines, made of 0s and 1s alone, at least
// as long as the model's variable count, without a closing 0. Every other
// answer is a list of literals, so "v 1 -2 10 0" sets variable 10 true.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "input.hpp"

namespace clausewright::tool {

enum class answer_status { none, satisfiable, unsatisfiable, optimum, unknown };

// The status as `solve` names it ("OPTIMUM FOUND" is "optimal"); empty for
// an answer without an s line.
[[nodiscard]] constexpr std::string_view status_name(answer_status s) noexcept {
  switch (s) {
    case answer_status::none:
      return "";
    case answer_status::satisfiable:
      return "satisfiable";
    case answer_status::unsatisfiable:
      return "unsatisfiable";
    case answer_status::optimum:
      return "optimal";
    case answer_status::unknown:
      return "unknown";
  }
  return "";
}

struct solver_answer {
  answer_status status = answer_status::none;
  // values[v] for v in 1..variables: 1 true, -1 false, 0 not given.
  std::vector<std::int8_t> values;
  std::uint64_t given = 0;  // variables among 1..variables with a value
  bool any_literal = false;
  std::optional<std::string> cost;
};

// Reads the answer, keeping the values of variables 1..variables (others
// are checked for form and dropped).
[[nodiscard]] solver_answer read_solver_output(byte_source& in, std::int32_t variables);

}  // namespace clausewright::tool
