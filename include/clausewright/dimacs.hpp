// clausewright: streaming DIMACS CNF writer (DIMACS Challenge format, 1993).
//
// The writer never holds the formula: clauses are formatted into a block
// buffer and flushed. The header "p cnf V C" is either known up front (count
// first with a dry run into counting_sink, then write) or reserved as a padded
// line and patched when the writer finishes (outputs that can seek back).
// Into an output that writes on a thread of its own and lends its blocks
// (threaded_output), the clauses after the header go into those blocks as
// numbers and are formatted on the writing thread (format_clause_block): the
// decimal formatting, most of the writer's work, runs beside the encoding.
// While that thread is behind (half its blocks waiting), the next block is
// formatted here instead, so that the two threads share the work. The bytes
// are the same either way.
#pragma once

#include <cstdint>
#include <cstring>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

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

  dimacs_writer(const dimacs_writer&) = delete;
  dimacs_writer& operator=(const dimacs_writer&) = delete;
  // Destroyed unfinished (a failure), a lent block is left to the output,
  // which drops what is pending.
  ~dimacs_writer() = default;

  // Comment lines are allowed before the header and between clauses.
  void comment(std::string_view text) {
    end_numbers();
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
    deferred_ = true;
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
    deferred_ = true;
  }

  void add_clause(std::span<const literal> clause) {
    if (deferred_ && add_numbers(clause)) return;
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
    end_numbers();
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
  // Bytes written; through an output that formats on its own thread, exact
  // once that output is finished.
  [[nodiscard]] std::uint64_t bytes() { return text_.position() + text_.output().transformed_bytes(); }

  // Ends a clause in a block of numbers: no literal is this far out of range
  // (max_variable is 2^30 - 1), and a literal 0 is written as it is.
  static constexpr std::int32_t end_of_clause = std::numeric_limits<std::int32_t>::min();

  // The transform of the blocks of numbers: each clause is its literals and
  // end_of_clause as std::int32_t, written out as DIMACS text. Returns the
  // bytes written.
  static std::uint64_t format_clause_block(std::span<const char> block, byte_output& out, std::vector<char>& scratch) {
    constexpr std::size_t chunk = std::size_t{1} << 18;
    constexpr std::size_t longest = 12;  // write_decimal's 11 bytes and a space
    if (scratch.size() < chunk + longest) scratch.resize(chunk + longest);
    char* const start = scratch.data();
    char* const limit = start + chunk;
    char* p = start;
    std::uint64_t total = 0;
    for (std::size_t at = 0; at + sizeof(std::int32_t) <= block.size(); at += sizeof(std::int32_t)) {
      std::int32_t value = 0;
      std::memcpy(&value, block.data() + at, sizeof value);
      if (value != end_of_clause) {
        p = write_decimal(p, value);
        *p++ = ' ';
      } else {
        p[0] = '0';
        p[1] = '\n';
        p += 2;
      }
      if (p >= limit) {
        out.write(start, static_cast<std::size_t>(p - start));
        total += static_cast<std::uint64_t>(p - start);
        p = start;
      }
    }
    if (p != start) out.write(start, static_cast<std::size_t>(p - start));
    return total + static_cast<std::uint64_t>(p - start);
  }

 private:
  // A lent block smaller than this is given back and the clauses formatted here.
  static constexpr std::size_t smallest_number_block = 4096;

  // Adds the clause to the block of numbers; false when it goes as text (the
  // output lends no blocks, or the clause is longer than a block).
  bool add_numbers(std::span<const literal> clause) {
    const std::size_t need = (clause.size() + 1) * sizeof(std::int32_t);
    if (numbers_.size() - numbers_used_ < need) {
      // A block boundary. Keep filling a block of text begun here; else
      // format the next block here while the writing thread is behind.
      if (formatting_here_ && text_.room() >= clause.size() * 12 + 2) return false;
      end_numbers();
      byte_output& out = text_.output();
      formatting_here_ = out.blocks() != 0 && 2 * out.backlog() >= out.blocks();
      if (formatting_here_) return false;
      text_.flush();  // the text before these clauses goes first
      numbers_ = text_.output().lend();
      if (numbers_.size() < smallest_number_block) {
        if (!numbers_.empty()) text_.output().hand_over(0, nullptr);
        numbers_ = {};
        deferred_ = false;  // this output formats nothing: text from here on
        return false;
      }
      if (numbers_.size() < need) {
        end_numbers();
        return false;
      }
    }
    std::int32_t top = max_var_;
    char* p = numbers_.data() + numbers_used_;
    for (const literal l : clause) {
      const std::int32_t value = l.dimacs();
      std::memcpy(p, &value, sizeof value);
      p += sizeof value;
      top = l.var() > top ? l.var() : top;
    }
    std::memcpy(p, &end_of_clause, sizeof end_of_clause);
    numbers_used_ = static_cast<std::size_t>(p + sizeof end_of_clause - numbers_.data());
    max_var_ = top;
    ++clauses_;
    return true;
  }
  // Hands the block of numbers to the output, to be formatted there.
  void end_numbers() {
    if (numbers_.empty()) return;
    const std::size_t used = numbers_used_;
    numbers_ = {};
    numbers_used_ = 0;
    text_.output().hand_over(used, &format_clause_block);
  }

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
  std::span<char> numbers_;  // the lent block the clauses go into as numbers
  std::size_t numbers_used_ = 0;
  bool deferred_ = false;         // after the header: clauses as numbers while the output lends blocks
  bool formatting_here_ = false;  // the current block is text formatted here (the writing thread is behind)
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
