#include "opb.hpp"

#include <algorithm>
#include <cstdint>
#include <cstdio>
#include <limits>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

namespace clausewright::tool {

namespace {

constexpr int end_of_file = char_cursor::end;
constexpr std::size_t block_size = std::size_t{1} << 18;
// Header fields further into a comment line than this are not looked for.
constexpr std::size_t header_scan_limit = 4096;

bool is_digit(int c) { return c >= '0' && c <= '9'; }
bool is_word(int c) { return is_digit(c) || (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_'; }
bool is_space(int c) { return c == ' ' || c == '\t' || c == '\r' || c == '\f' || c == '\v'; }
bool is_relation_char(int c) { return c == '<' || c == '>' || c == '=' || c == '!'; }

std::string describe_char(int c) {
  if (c == end_of_file) return "the end of the file";
  if (c == '\n') return "the end of the line";
  if (c >= 0x21 && c <= 0x7e) return std::string("'") + static_cast<char>(c) + "'";
  char hex[16];
  std::snprintf(hex, sizeof hex, "byte 0x%02x", static_cast<unsigned>(c));
  return hex;
}

struct header_info {
  bool found = false;
  std::int32_t variables = 0;
  std::optional<std::uint64_t> constraints;
  source_position constraints_at;
};

enum class pass { header, scan, full };

class opb_parser {
 public:
  opb_parser(byte_source& in, pass mode, model_handler* handler, std::optional<std::int32_t> declared)
      : in_(in), text_(in, block_size), mode_(mode), handler_(handler), declared_(declared) {}

  void run() {
    for (;;) {
      skip_blank();
      const int c = peek();
      if (c == end_of_file) break;
      if (c == '\n') {
        advance();
        continue;
      }
      if (c == '*') {
        comment_line();
        continue;
      }
      if (mode_ == pass::header) return;
      statements_seen_ = true;
      statement();
    }
  }

  [[nodiscard]] const header_info& header() const noexcept { return header_; }
  [[nodiscard]] std::int32_t max_variable_seen() const noexcept { return max_var_; }
  [[nodiscard]] std::uint64_t constraints() const noexcept { return constraints_; }
  [[nodiscard]] bool any_statement() const noexcept { return statements_seen_; }
  [[nodiscard]] source_position position() const noexcept { return {text_.line(), text_.column()}; }

 private:
  // --- characters ------------------------------------------------------------------
  int peek() { return text_.peek(); }
  void advance() { text_.advance(); }
  void skip_blank() {
    while (is_space(peek())) advance();
  }

  [[noreturn]] void fail_at(source_position where, const std::string& what) const {
    error_position p;
    p.file = in_.name();
    p.line = where.line;
    p.column = where.column;
    throw error(error_id::parse, what, p);
  }
  [[noreturn]] void fail(const std::string& what) const { fail_at(position(), what); }
  [[noreturn]] void unexpected(const std::string& expected) {
    const int c = peek();
    if (c == end_of_file)
      fail("unexpected end of the file: expected " + expected + " (the statement starting at line " +
           std::to_string(statement_start_.line) + " is not finished)");
    if (c == '\n') fail("expected " + expected + " before the end of the line (each statement ends with ';' on its line)");
    fail("expected " + expected + ", found " + describe_char(c));
  }

  // --- comments and the header ---------------------------------------------------------
  void comment_line() {
    const source_position start = position();
    const bool may_be_header = !statements_seen_ && !header_.found;
    std::string text;
    for (int c = peek(); c != end_of_file && c != '\n'; c = peek()) {
      if (may_be_header && text.size() < header_scan_limit) text.push_back(static_cast<char>(c));
      advance();
    }
    if (may_be_header) parse_header(text, start);
  }

  void parse_header(const std::string& text, source_position start) {
    const auto field = [&](std::string_view key, std::uint64_t limit, const char* what) -> std::optional<std::uint64_t> {
      const auto at = text.find(key);
      if (at == std::string::npos) return std::nullopt;
      std::size_t i = at + key.size();
      while (i < text.size() && (text[i] == ' ' || text[i] == '\t')) ++i;
      const source_position number_at{start.line, start.column + i};
      if (i >= text.size() || !is_digit(static_cast<unsigned char>(text[i])))
        fail_at(number_at, std::string("expected a number after '") + std::string(key) + "' in the header");
      std::uint64_t value = 0;
      for (; i < text.size() && is_digit(static_cast<unsigned char>(text[i])); ++i) {
        value = value * 10 + static_cast<std::uint64_t>(text[i] - '0');
        if (value > limit)
          fail_at(number_at, std::string("the header's ") + what + " count is beyond the largest supported, " +
                                 std::to_string(limit));
      }
      if (key == "#constraint=") header_.constraints_at = number_at;
      return value;
    };
    const auto variables = field("#variable=", static_cast<std::uint64_t>(max_variable), "variable");
    if (!variables) return;
    header_.found = true;
    header_.variables = static_cast<std::int32_t>(*variables);
    header_.constraints = field("#constraint=", std::numeric_limits<std::uint64_t>::max() / 10, "constraint");
  }

  // --- numbers and literals ------------------------------------------------------------------
  // An integer with an optional sign; `what` names it in messages.
  std::int64_t integer(const char* what) {
    const source_position start = position();
    bool negative = false;
    int c = peek();
    if (c == '+' || c == '-') {
      negative = c == '-';
      advance();
      c = peek();
    }
    if (!is_digit(c)) {
      if (c == ' ' || c == '\t') fail(std::string("expected the digits of the ") + what + " right after its sign");
      unexpected(std::string("an integer ") + what);
    }
    __extension__ using wide = unsigned __int128;
    wide magnitude = 0;
    const wide limit = negative ? static_cast<wide>(std::numeric_limits<std::int64_t>::max()) + 1
                                : static_cast<wide>(std::numeric_limits<std::int64_t>::max());
    std::string digits;
    while (is_digit(c = peek())) {
      magnitude = magnitude * 10 + static_cast<unsigned>(c - '0');
      if (digits.size() < 24) digits.push_back(static_cast<char>(c));
      if (magnitude > limit)
        fail_at(start, std::string("the ") + what + " " + (negative ? "-" : "") + digits +
                           "... does not fit in 64 bits (from -9223372036854775808 to 9223372036854775807)");
      advance();
    }
    if (is_word(c) && c != 'x')
      fail(std::string("expected a space after the ") + what + ", found " + describe_char(c));
    if (negative) return magnitude == limit ? std::numeric_limits<std::int64_t>::min() : -static_cast<std::int64_t>(magnitude);
    return static_cast<std::int64_t>(magnitude);
  }

  literal variable_literal() {
    const source_position start = position();
    bool negative = false;
    if (peek() == '~') {
      negative = true;
      advance();
      skip_blank();
    }
    if (peek() != 'x') unexpected("a variable such as x1 after '~'");
    advance();
    std::string digits;
    std::int64_t v = 0;
    int c = peek();
    if (!is_digit(c)) {
      std::string name = "x";
      while (is_word(c = peek()) && name.size() < 40) {
        name.push_back(static_cast<char>(c));
        advance();
      }
      fail_at(start, "malformed variable name '" + name + "': expected x followed by a number, such as x1");
    }
    while (is_digit(c = peek())) {
      v = v * 10 + (c - '0');
      if (digits.size() < 24) digits.push_back(static_cast<char>(c));
      if (v > max_variable)
        fail_at(start, "variable x" + digits + "... is beyond the largest supported variable x" +
                           std::to_string(max_variable));
      advance();
    }
    if (is_word(c)) {
      std::string name = "x" + digits;
      while (is_word(c = peek()) && name.size() < 40) {
        name.push_back(static_cast<char>(c));
        advance();
      }
      fail_at(start, "malformed variable name '" + name + "': expected x followed by a number, such as x1");
    }
    if (v == 0) fail_at(start, "x" + digits + " is not a variable: variables are numbered from x1");
    const auto var = static_cast<std::int32_t>(v);
    if (declared_ && var > *declared_)
      fail_at(start, "variable x" + std::to_string(var) + " is not declared: the header says #variable= " +
                         std::to_string(*declared_));
    max_var_ = std::max(max_var_, var);
    return literal(negative ? -var : var);
  }

  // --- statements ----------------------------------------------------------------------------------
  void statement() {
    statement_start_ = position();
    std::int64_t weight = 0;
    int c = peek();
    if (c == '[') {
      advance();
      skip_blank();
      const source_position at = position();
      weight = integer("weight");
      if (weight <= 0) fail_at(at, "the weight of a soft constraint must be positive");
      skip_blank();
      if (peek() != ']') unexpected("']' after the weight");
      advance();
      skip_blank();
    } else if ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z')) {
      if (keyword()) return;
    }
    constraint(weight);
  }

  // "min:" (the objective) or "soft:" (the top weight of a weighted file,
  // not needed here). Returns true when the statement was consumed.
  bool keyword() {
    const source_position start = position();
    std::string word;
    for (int c = peek(); is_word(c) && word.size() < 40; c = peek()) {
      word.push_back(static_cast<char>(c));
      advance();
    }
    if (word.size() > 1 && word[0] == 'x' && std::all_of(word.begin() + 1, word.end(), [](char ch) { return is_digit(ch); }))
      fail_at(start, "expected a coefficient before the variable " + word + " (write +1 " + word + ")");
    skip_blank();
    if (peek() == ':' && word == "min") {
      advance();
      objective();
      return true;
    }
    if (peek() == ':' && word == "soft") {
      advance();
      skip_blank();
      if (peek() != ';') (void)integer("top weight");
      skip_blank();
      if (peek() != ';') unexpected("';' after the top weight");
      advance();
      return true;
    }
    if (peek() == ':' && word == "max")
      fail_at(start, "OPB has no 'max:' objective: write 'min:' with the coefficients negated");
    fail_at(start, "expected a term (a coefficient and a variable), 'min:' or a comment, found '" + word + "'");
  }

  // Terms up to a relation or ';'. Returns the character that stopped them.
  int terms(bool in_objective) {
    terms_.clear();
    for (;;) {
      skip_blank();
      const int c = peek();
      if (c == ';' || is_relation_char(c)) return c;
      if (c == '~' || c == 'x') fail("expected a coefficient before the variable (write +1 x1)");
      if (c != '+' && c != '-' && !is_digit(c))
        unexpected(in_objective ? "a term (a coefficient and a variable) or ';'"
                                : "a term (a coefficient and a variable), a relation (>=, <=, =) or ';'");
      const std::int64_t coefficient = integer("coefficient");
      factors_.clear();
      for (;;) {
        skip_blank();
        const int d = peek();
        if (d != '~' && d != 'x') break;
        factors_.push_back(variable_literal());
      }
      if (factors_.empty()) unexpected("a variable such as x1 or ~x1 after the coefficient");
      terms_.push_back({coefficient, factors_.size() == 1 ? factors_[0] : product()});
    }
  }

  literal product() {
    std::sort(factors_.begin(), factors_.end(), [](literal a, literal b) {
      return a.var() != b.var() ? a.var() < b.var() : a.dimacs() < b.dimacs();
    });
    factors_.erase(std::unique(factors_.begin(), factors_.end()), factors_.end());
    if (factors_.size() == 1) return factors_[0];
    if (mode_ != pass::full) return factors_[0];
    key_.clear();
    for (const literal f : factors_) key_.push_back(f.dimacs());
    const auto it = products_.find(key_);
    if (it != products_.end()) return it->second;
    const literal p = handler_->product(factors_);
    products_.emplace(key_, p);
    return p;
  }

  void objective() {
    if (objective_seen_) fail_at(statement_start_, "a second objective: an OPB file has at most one 'min:' line");
    objective_seen_ = true;
    const int stop = terms(true);
    if (stop != ';') unexpected("a term or ';' to end the objective (an objective has no relation)");
    advance();
    if (mode_ == pass::full) handler_->objective(terms_, statement_start_);
  }

  void constraint(std::int64_t weight) {
    const int stop = terms(false);
    if (stop == ';') fail("expected a relation (>=, <= or =) and a bound before ';'");
    if (terms_.empty()) fail("expected a term (a coefficient and a variable) before the relation");
    const source_position relation_at = position();
    std::string op;
    while (is_relation_char(peek()) && op.size() < 8) {
      op.push_back(static_cast<char>(peek()));
      advance();
    }
    relation rel = relation::ge;
    if (op == ">=") {
      rel = relation::ge;
    } else if (op == "<=") {
      rel = relation::le;
    } else if (op == "=") {
      rel = relation::eq;
    } else {
      fail_at(relation_at, "unknown relation '" + op + "': expected >=, <= or =");
    }
    skip_blank();
    const std::int64_t bound = integer("bound");
    skip_blank();
    if (peek() != ';') unexpected("';' after the bound");
    advance();
    const std::size_t index = constraints_++;
    if (mode_ != pass::full) return;
    constraint_view v;
    v.terms = terms_;
    v.rel = rel;
    v.bound = bound;
    v.weight = weight;
    v.position = statement_start_;
    v.file = in_.name();
    v.index = index;
    handler_->constraint(v);
  }

  byte_source& in_;
  char_cursor text_;
  pass mode_;
  model_handler* handler_;
  std::optional<std::int32_t> declared_;

  header_info header_;
  bool statements_seen_ = false;
  bool objective_seen_ = false;
  source_position statement_start_;
  std::int32_t max_var_ = 0;
  std::uint64_t constraints_ = 0;
  std::vector<term> terms_;
  std::vector<literal> factors_;
  std::vector<std::int32_t> key_;
  std::map<std::vector<std::int32_t>, literal> products_;
};

}  // namespace

void read_opb(byte_source& in, model_handler& handler) {
  header_info header;
  {
    opb_parser first(in, pass::header, nullptr, std::nullopt);
    first.run();
    header = first.header();
  }
  in.rewind();
  std::int32_t variables = header.variables;
  if (!header.found) {
    opb_parser scan(in, pass::scan, nullptr, std::nullopt);
    scan.run();
    if (!scan.any_statement()) {
      error_position p;
      p.file = in.name();
      p.line = scan.position().line;
      p.column = scan.position().column;
      throw error(error_id::parse,
                  "expected the OPB header '* #variable= N #constraint= M' or a constraint, found the end of the file",
                  p);
    }
    variables = scan.max_variable_seen();
    in.rewind();
  }
  model_header h;
  h.variables = variables;
  h.constraints = header.constraints;
  h.file = in.name();
  handler.begin(h);
  opb_parser full(in, pass::full, &handler, header.found ? std::optional<std::int32_t>(variables) : std::nullopt);
  full.run();
  if (header.constraints && *header.constraints != full.constraints()) {
    error_position p;
    p.file = in.name();
    p.line = header.constraints_at.line;
    p.column = header.constraints_at.column;
    throw error(error_id::parse,
                "the header says #constraint= " + std::to_string(*header.constraints) + ", but the file has " +
                    std::to_string(full.constraints()) + " constraints",
                p);
  }
  handler.end();
}

}  // namespace clausewright::tool
