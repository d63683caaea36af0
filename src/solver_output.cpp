#include "solver_output.hpp"

#include <clausewright/error.hpp>
#include <clausewright/literal.hpp>

namespace clausewright::tool {

namespace {

class answer_reader {
 public:
  answer_reader(byte_source& in, std::int32_t variables) : in_(in), text_(in), variables_(variables) {
    answer_.values.assign(static_cast<std::size_t>(variables) + 1, 0);
  }

  solver_answer run() {
    bool any_line = false;
    for (;;) {
      skip_blank();
      const int c = peek();
      if (c == -1) break;
      if (c == '\n') {
        advance();
        continue;
      }
      any_line = true;
      line_start_ = position();
      if (c == 'c') {
        skip_line();
      } else if (c == 's') {
        advance();
        status_line();
      } else if (c == 'o') {
        advance();
        skip_blank();
        std::string cost;
        while (peek() != -1 && peek() != '\n' && cost.size() < 64) {
          cost.push_back(static_cast<char>(peek()));
          advance();
        }
        answer_.cost = cost;
        skip_line();
      } else if (c == 'v') {
        advance();
        values_line(true);
      } else if (c == '-' || (c >= '0' && c <= '9')) {
        values_line(false);
      } else {
        fail("expected a line starting with 'c', 's', 'o' or 'v', or a list of literals, found " + describe(c));
      }
    }
    if (!any_line) fail("the solver output is empty: expected 's' and 'v' lines or a list of literals");
    settle_first();
    return std::move(answer_);
  }

 private:
  int peek() { return text_.peek(); }
  void advance() { text_.advance(); }
  void skip_blank() {
    for (int c = peek(); c == ' ' || c == '\t' || c == '\r'; c = peek()) advance();
  }
  void skip_line() {
    for (int c = peek(); c != -1 && c != '\n'; c = peek()) advance();
  }
  [[nodiscard]] error_position position() const {
    error_position p;
    p.file = in_.name();
    p.line = text_.line();
    p.column = text_.column();
    return p;
  }
  [[noreturn]] void fail(const std::string& what) const { throw error(error_id::parse, what, position()); }
  static std::string describe(int c) {
    if (c >= 0x21 && c <= 0x7e) return std::string("'") + static_cast<char>(c) + "'";
    return "byte " + std::to_string(c);
  }

  void status_line() {
    skip_blank();
    std::string word;
    while (peek() != -1 && peek() != '\n' && word.size() < 64) {
      word.push_back(static_cast<char>(peek()));
      advance();
    }
    while (!word.empty() && (word.back() == ' ' || word.back() == '\t' || word.back() == '\r')) word.pop_back();
    answer_status s = answer_status::none;
    if (word == "SATISFIABLE") {
      s = answer_status::satisfiable;
    } else if (word == "UNSATISFIABLE") {
      s = answer_status::unsatisfiable;
    } else if (word == "OPTIMUM FOUND") {
      s = answer_status::optimum;
    } else if (word == "UNKNOWN") {
      s = answer_status::unknown;
    } else {
      throw error(error_id::parse,
                  "unknown status 's " + word + "': expected SATISFIABLE, UNSATISFIABLE, OPTIMUM FOUND or UNKNOWN",
                  line_start_);
    }
    if (answer_.status != answer_status::none && answer_.status != s)
      throw error(error_id::parse, "a second, different status line", line_start_);
    answer_.status = s;
    skip_line();
  }

  void values_line(bool v_line) {
    for (;;) {
      skip_blank();
      const int c = peek();
      if (c == -1 || c == '\n') return;
      const error_position at = position();
      // A token of 0s and 1s is kept whole (it may be the string of values,
      // one byte per variable); anything else beyond the length of the
      // longest literal is an error already, so it is cut there.
      std::string token;
      bool bits = true;
      for (int d = peek(); d != -1 && d != '\n' && d != ' ' && d != '\t' && d != '\r'; d = peek()) {
        bits = bits && (d == '0' || d == '1');
        if (bits || token.size() < 24) token.push_back(static_cast<char>(d));
        advance();
      }
      if (!v_line) {
        literal_token(token, at);
        continue;
      }
      // Which form the v lines use is decided from the whole answer, never
      // token by token: "v 1 -2 10 0" holds the literals 1, -2 and 10, not
      // two strings of values. The string form is a single token, so the
      // first v token is held back until a second one shows the answer is
      // a list of literals (or the end shows it is the only one).
      ++v_tokens_;
      if (v_tokens_ == 1 && bits) {
        first_v_token_ = std::move(token);
        first_v_at_ = at;
        holding_first_ = true;
        continue;
      }
      release_first();
      literal_token(token, at);
    }
  }

  // The held-back first v token is a literal after all.
  void release_first() {
    if (!holding_first_) return;
    holding_first_ = false;
    literal_token(first_v_token_, first_v_at_);
    first_v_token_.clear();
  }

  // At the end: a single v token of 0s and 1s with a value for every
  // variable of the model (the formula may have more, its auxiliary
  // variables) and no closing 0 token is the MaxSAT Evaluation's string of
  // values; anything shorter is a literal ("v 1", "v 10").
  void settle_first() {
    if (!holding_first_) return;
    if (v_tokens_ == 1 && first_v_token_.size() >= static_cast<std::size_t>(variables_) && first_v_token_.size() > 1) {
      holding_first_ = false;
      bit_string(first_v_token_, first_v_at_);
      first_v_token_.clear();
      return;
    }
    release_first();
  }

  // The MaxSAT Evaluation's "v 0110...": the value of variable i+1 at index i.
  void bit_string(const std::string& bits, const error_position& at) {
    std::int64_t v = 0;
    for (const char ch : bits) set(++v, ch == '1', at);
  }

  void literal_token(const std::string& token, const error_position& at) {
    std::size_t i = 0;
    bool negative = false;
    if (i < token.size() && token[i] == '-') {
      negative = true;
      ++i;
    }
    if (i >= token.size()) throw error(error_id::parse, "expected a literal (a non-zero integer), found '-'", at);
    std::int64_t v = 0;
    for (; i < token.size(); ++i) {
      const char ch = token[i];
      if (ch < '0' || ch > '9')
        throw error(error_id::parse, "expected a literal (an integer), found '" + token + "'", at);
      v = v * 10 + (ch - '0');
      if (v > max_variable)
        throw error(error_id::parse, "literal " + token + "... is beyond the largest variable " + std::to_string(max_variable), at);
    }
    if (v == 0) return;  // ends a list of literals
    answer_.any_literal = true;
    set(v, !negative, at);
  }

  void set(std::int64_t v, bool truth, const error_position& at) {
    answer_.any_literal = true;
    if (v > variables_) return;
    auto& slot = answer_.values[static_cast<std::size_t>(v)];
    const std::int8_t want = truth ? 1 : -1;
    if (slot == -want)
      throw error(error_id::parse, "variable " + std::to_string(v) + " is given both values", at);
    if (slot == 0) ++answer_.given;
    slot = want;
  }

  byte_source& in_;
  char_cursor text_;
  std::int32_t variables_;
  error_position line_start_;
  solver_answer answer_;
  std::uint64_t v_tokens_ = 0;  // tokens on v lines, the closing 0 included
  bool holding_first_ = false;
  std::string first_v_token_;
  error_position first_v_at_;
};

}  // namespace

solver_answer read_solver_output(byte_source& in, std::int32_t variables) {
  return answer_reader(in, variables).run();
}

}  // namespace clausewright::tool
