// clausewright: the exceptions raised for bad user input.
//
// Every error carries an id (what went wrong, for programs) and a position
// (which constraint, or which file, line and column, for people).
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>

namespace clausewright {

enum class error_id : std::uint8_t {
  invalid_literal,       // a literal of variable 0, or beyond the supported range
  invalid_bound,         // a bound that makes no sense (k < 0 for a cardinality)
  overflow,              // a coefficient, bound or sum beyond the 64-bit range
  empty_constraint,      // a constraint that needs literals and has none
  method_not_applicable, // the chosen method cannot encode this constraint
  unknown_method,        // a method name not in the table
  over_budget,           // an encoding stopped because it passed its size budget
  parse,                 // malformed input file
  io,                    // reading or writing a file failed
  solver,                // the embedded solver failed or was misused
  usage,                 // an API call made in the wrong state
  time_limit,            // the deadline passed while encoding
};

// Where an error is: a constraint index (0-based, in the order added), and/or a
// file position (1-based line and column).
struct error_position {
  std::optional<std::size_t> constraint;
  std::string constraint_name;
  std::string file;
  std::uint64_t line = 0;
  std::uint64_t column = 0;

  [[nodiscard]] std::string describe() const {
    std::string out;
    if (!file.empty()) {
      out += file;
      if (line != 0) {
        out += ':' + std::to_string(line);
        if (column != 0) out += ':' + std::to_string(column);
      }
    }
    if (constraint) {
      if (!out.empty()) out += ": ";
      out += "constraint " + std::to_string(*constraint);
      if (!constraint_name.empty()) out += " (" + constraint_name + ")";
    }
    return out;
  }
};

class error : public std::runtime_error {
 public:
  error(error_id id, const std::string& what, error_position where = {})
      : std::runtime_error(format(what, where)), id_(id), where_(std::move(where)), detail_(what) {}

  [[nodiscard]] error_id id() const noexcept { return id_; }
  [[nodiscard]] const error_position& where() const noexcept { return where_; }
  // The message without the position prefix.
  [[nodiscard]] const std::string& detail() const noexcept { return detail_; }

 private:
  static std::string format(const std::string& what, const error_position& where) {
    std::string position = where.describe();
    return position.empty() ? what : position + ": " + what;
  }

  error_id id_;
  error_position where_;
  std::string detail_;
};

inline error_position at_constraint(std::size_t index, std::string name = {}) {
  error_position p;
  p.constraint = index;
  p.constraint_name = std::move(name);
  return p;
}

}  // namespace clausewright
