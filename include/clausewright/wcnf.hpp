// clausewright: streaming WCNF writer (weighted MaxSAT), a weighted clause
// sink (sink.hpp: weighted_clause_sink): hard clauses through add_clause,
// soft ones through add_soft_clause. The model encoder gives it the
// objective as soft unit clauses.
//
// Two forms of the MaxSAT Evaluations:
//   current (since 2022): hard clauses "h 1 -2 0", soft clauses "5 -1 0",
//                         no header line;
//   older:                the header "p wcnf V C TOP" and every clause led by
//                         its weight, hard ones by TOP (above the sum of all
//                         soft weights), so V, C and TOP are needed up front.
#pragma once

#include <cstdint>
#include <span>
#include <string_view>

#include "error.hpp"
#include "io.hpp"
#include "literal.hpp"
#include "sink.hpp"

namespace clausewright {

enum class wcnf_style { current, older };

class wcnf_writer {
 public:
  wcnf_writer(byte_output& out, wcnf_style style) : text_(out), style_(style) {}

  void comment(std::string_view text) {
    text_.put("c ");
    for (const char ch : text) text_.put(ch == '\n' ? ' ' : ch);
    text_.put('\n');
  }
  // The older form's header; `top` must exceed the sum of the soft weights.
  void begin_older(std::int32_t variables, std::uint64_t clauses, std::int64_t top) {
    top_ = top;
    text_.put("p wcnf ");
    text_.put_int(variables);
    text_.put(' ');
    text_.put_int(clauses);
    text_.put(' ');
    text_.put_int(top);
    text_.put('\n');
  }

  void add_clause(std::span<const literal> clause) {
    if (style_ == wcnf_style::current) {
      write(clause, "h ", 0);
    } else {
      write(clause, {}, top_);
    }
    ++hard_;
  }
  void add_soft_clause(std::int64_t weight, std::span<const literal> clause) {
    write(clause, {}, weight);
    ++soft_;
  }
  void finish() { text_.flush(); }

  [[nodiscard]] std::uint64_t hard_clauses() const noexcept { return hard_; }
  [[nodiscard]] std::uint64_t soft_clauses() const noexcept { return soft_; }

 private:
  void write(std::span<const literal> clause, std::string_view prefix, std::int64_t weight) {
    const std::size_t need = clause.size() * 12 + 26;
    text_.reserve(need);
    if (text_.room() < need) {
      // Longer than the buffer: literal by literal.
      if (prefix.empty()) {
        text_.put_int(weight);
        text_.put(' ');
      } else {
        text_.put(prefix);
      }
      for (const literal l : clause) {
        text_.put_int(l.dimacs());
        text_.put(' ');
      }
      text_.put("0\n");
      return;
    }
    if (prefix.empty()) {
      text_.put_int(weight);
      text_.put_unchecked(' ');
    } else {
      for (const char c : prefix) text_.put_unchecked(c);
    }
    char* p = text_.cursor();
    for (const literal l : clause) {
      p = write_decimal(p, l.dimacs());
      *p++ = ' ';
    }
    p[0] = '0';
    p[1] = '\n';
    text_.finish_unchecked(p + 2);
  }

  text_writer text_;
  wcnf_style style_;
  std::int64_t top_ = 1;
  std::uint64_t hard_ = 0;
  std::uint64_t soft_ = 0;
};

static_assert(weighted_clause_sink<wcnf_writer>);

}  // namespace clausewright
