// clausewright: streaming DIMACS CNF writer (DIMACS Challenge format, 1993).
//
// The writer never holds the formula: clauses are formatted into a block
// buffer and flushed. The header "p cnf V C" is either known up front (count
// first with a dry run into counting_sink, then write) or reserved as a padded
// line and patched when the writer finishes (outputs that can seek back).
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <string_view>

#include "error.hpp"
#include "io.hpp"
#include "literal.hpp"

namespace clausewright {

class dimacs_writer {
 public:
  // Width of the reserved header line, newline excluded: "p cnf " plus room
  // for 10 digits of variables and 20 of clauses; the rest is spaces, which
  // DIMACS readers skip before the end of the line.
  static constexpr std::size_t reserved_header_width = 40;

  explicit dimacs_writer(byte_output& out) : text_(out) {}

  // Comment lines are allowed before the header and between clauses.
  void comment(std::string_view text) {
    text_.put("c ");
    for (const char ch : text) text_.put(ch == '\n' ? ' ' : ch);
    text_.put('\n');
  }

  // Header with exact counts; finish() checks the body matched them.
  void begin(std::int32_t variables, std::uint64_t clauses) {
    start();
    exact_ = true;
    promised_clauses_ = clauses;
    write_header(variables, clauses, false);
  }

  // Header reserved and patched by finish(variables).
  void begin_patched() {
    start();
    if (!text_.output().can_patch())
      throw error(error_id::usage, "the output cannot seek back: give the header counts up front");
    exact_ = false;
    header_offset_ = text_.position();
    for (std::size_t i = 0; i < reserved_header_width; ++i) text_.put(' ');
    text_.put('\n');
  }

  void add_clause(std::span<const literal> clause) {
    // One reserve per clause: 12 bytes per literal covers "-1073741823 ".
    const std::size_t need = clause.size() * 12 + 2;
    if (text_.room() < need) text_.reserve(need);
    if (text_.room() < need) {
      // A clause longer than the buffer: write it literal by literal.
      for (const literal l : clause) {
        text_.put_int(l.dimacs());
        text_.put(' ');
        if (l.var() > max_var_) max_var_ = l.var();
      }
      text_.put("0\n");
    } else {
      std::int32_t top = max_var_;
      char* p = text_.cursor();
      for (const literal l : clause) {
        p = write_decimal(p, l.dimacs());
        *p++ = ' ';
        top = l.var() > top ? l.var() : top;
      }
      max_var_ = top;
      p[0] = '0';
      p[1] = '\n';
      text_.finish_unchecked(p + 2);
    }
    ++clauses_;
  }

  // Flushes and completes the header. `variables` must cover every variable
  // used (the pool's top()); it may exceed the largest one seen.
  void finish(std::int32_t variables) {
    if (finished_) throw error(error_id::usage, "DIMACS writer finished twice");
    if (!begun_) throw error(error_id::usage, "DIMACS writer finished before begin");
    if (variables < max_var_)
      throw error(error_id::usage, "header variable count " + std::to_string(variables) +
                                       " is below the largest variable written, " + std::to_string(max_var_));
    if (exact_ && clauses_ != promised_clauses_)
      throw error(error_id::usage, "header promised " + std::to_string(promised_clauses_) + " clauses, " +
                                       std::to_string(clauses_) + " were written");
    if (exact_ && variables != header_variables_)
      throw error(error_id::usage, "header promised " + std::to_string(header_variables_) + " variables, finish says " +
                                       std::to_string(variables));
    text_.flush();
    if (!exact_) write_header(variables, clauses_, true);
    finished_ = true;
  }

  [[nodiscard]] std::uint64_t clauses() const noexcept { return clauses_; }
  [[nodiscard]] std::int32_t max_variable() const noexcept { return max_var_; }
  [[nodiscard]] std::uint64_t bytes() const noexcept { return text_.position(); }

 private:
  void start() {
    if (begun_) throw error(error_id::usage, "DIMACS header written twice");
    begun_ = true;
  }

  void write_header(std::int32_t variables, std::uint64_t clauses, bool patch) {
    header_variables_ = variables;
    std::string line = "p cnf " + std::to_string(variables) + " " + std::to_string(clauses);
    if (!patch) {
      text_.put(line);
      text_.put('\n');
      return;
    }
    line.resize(reserved_header_width, ' ');
    text_.output().patch(header_offset_, line.data(), line.size());
  }

  text_writer text_;
  std::uint64_t clauses_ = 0;
  std::uint64_t promised_clauses_ = 0;
  std::uint64_t header_offset_ = 0;
  std::int32_t max_var_ = 0;
  std::int32_t header_variables_ = 0;
  bool begun_ = false;
  bool exact_ = true;
  bool finished_ = false;
};

}  // namespace clausewright
