#include "json_model.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <unordered_map>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

namespace clausewright::tool {

namespace {

using json = nlohmann::ordered_json;

// One step of the path from the document's root to a value.
struct step {
  std::string key;  // empty: an array index
  std::size_t index = 0;
};
using json_path = std::vector<step>;

// --- finding a value in the text by its path ---------------------------------------------

class locator {
 public:
  explicit locator(std::string_view text) : text_(text) {}

  // Offset of the value at `path` (or of its key when `at_key`); where the
  // path cannot be followed, the offset of the deepest value reached.
  [[nodiscard]] std::size_t find(const json_path& path, bool at_key = false) const {
    std::size_t at = skip_space(0);
    for (std::size_t depth = 0; depth < path.size(); ++depth) {
      const step& s = path[depth];
      if (at >= text_.size()) return at;
      const char open = text_[at];
      if (!s.key.empty() && open == '{') {
        std::size_t i = skip_space(at + 1);
        bool found = false;
        while (i < text_.size() && text_[i] == '"') {
          const std::size_t key_start = i;
          const std::size_t key_end = skip_string(i);
          const std::string_view raw = text_.substr(key_start + 1, key_end - key_start - 2);
          i = skip_space(key_end);
          if (i < text_.size() && text_[i] == ':') i = skip_space(i + 1);
          if (raw == s.key) {
            if (at_key && depth + 1 == path.size()) return key_start;
            at = i;
            found = true;
            break;
          }
          i = skip_space(skip_value(i));
          if (i < text_.size() && text_[i] == ',') i = skip_space(i + 1);
        }
        if (!found) return at;
      } else if (s.key.empty() && open == '[') {
        std::size_t i = skip_space(at + 1);
        for (std::size_t k = 0; k < s.index && i < text_.size() && text_[i] != ']'; ++k) {
          i = skip_space(skip_value(i));
          if (i < text_.size() && text_[i] == ',') i = skip_space(i + 1);
        }
        if (i >= text_.size() || text_[i] == ']') return at;
        at = i;
      } else {
        return at;
      }
    }
    return at;
  }

 private:
  [[nodiscard]] std::size_t skip_space(std::size_t i) const {
    while (i < text_.size() && (text_[i] == ' ' || text_[i] == '\t' || text_[i] == '\n' || text_[i] == '\r')) ++i;
    return i;
  }
  // From an opening quote to just past the closing one.
  [[nodiscard]] std::size_t skip_string(std::size_t i) const {
    for (++i; i < text_.size(); ++i) {
      if (text_[i] == '\\') {
        ++i;
      } else if (text_[i] == '"') {
        return i + 1;
      }
    }
    return i;
  }
  // Past one value; containers by counting brackets (no recursion).
  [[nodiscard]] std::size_t skip_value(std::size_t i) const {
    if (i >= text_.size()) return i;
    if (text_[i] == '"') return skip_string(i);
    if (text_[i] != '{' && text_[i] != '[') {
      while (i < text_.size() && text_[i] != ',' && text_[i] != '}' && text_[i] != ']' && text_[i] != ' ' &&
             text_[i] != '\n' && text_[i] != '\t' && text_[i] != '\r')
        ++i;
      return i;
    }
    std::size_t depth = 0;
    while (i < text_.size()) {
      const char c = text_[i];
      if (c == '"') {
        i = skip_string(i);
        continue;
      }
      if (c == '{' || c == '[') ++depth;
      if (c == '}' || c == ']') {
        --depth;
        if (depth == 0) return i + 1;
      }
      ++i;
    }
    return i;
  }

  std::string_view text_;
};

source_position position_of(std::string_view text, std::size_t offset) {
  source_position p{1, 1};
  offset = std::min(offset, text.size());
  for (std::size_t i = 0; i < offset; ++i) {
    if (text[i] == '\n') {
      ++p.line;
      p.column = 1;
    } else {
      ++p.column;
    }
  }
  return p;
}

const char* type_name(const json& v) {
  switch (v.type()) {
    case json::value_t::null: return "null";
    case json::value_t::object: return "an object";
    case json::value_t::array: return "an array";
    case json::value_t::string: return "a string";
    case json::value_t::boolean: return "a boolean";
    case json::value_t::number_integer:
    case json::value_t::number_unsigned: return "an integer";
    case json::value_t::number_float: return "a number with a fraction";
    case json::value_t::binary: return "binary data";
    case json::value_t::discarded: return "nothing";
  }
  return "a value";
}

// --- repeated keys -------------------------------------------------------------------------

// The first key that repeats a key of its object, in a text already parsed
// as JSON: the offset of its opening quote and of the first one. nlohmann's
// parser keeps the last value of a repeated key without a word, which would
// silently change the model (a second "constraints", a repeated "k").
struct repeated_key {
  std::size_t at = 0;
  std::size_t first = 0;
  std::string key;
};

std::optional<repeated_key> find_repeated_key(std::string_view text) {
  struct frame {
    bool object = false;
    // Keys as written and where; an escaped key is decoded, so "a" and
    // "\u0061" are the same key. Objects of the format have a few keys: a
    // linear search, a set only for larger ones.
    std::vector<std::pair<std::string, std::size_t>> keys;
    std::unordered_map<std::string, std::size_t> many;
  };
  std::vector<frame> stack;
  bool expect_key = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (c == '{' || c == '[') {
      stack.emplace_back();
      stack.back().object = c == '{';
      expect_key = c == '{';
    } else if (c == '}' || c == ']') {
      if (!stack.empty()) stack.pop_back();
      expect_key = false;
    } else if (c == ',') {
      expect_key = !stack.empty() && stack.back().object;
    } else if (c == '"') {
      const std::size_t start = i;
      bool escaped = false;
      for (++i; i < text.size() && text[i] != '"'; ++i) {
        if (text[i] == '\\') {
          escaped = true;
          ++i;
        }
      }
      if (!expect_key || stack.empty()) continue;
      expect_key = false;
      std::string key(text.substr(start + 1, i - start - 1));
      if (escaped) {
        // The document parsed, so a key's escapes are valid; text the parser
        // did not read as a key (past the document's end) is kept as written.
        const json decoded = json::parse(text.substr(start, std::min(i, text.size() - 1) - start + 1), nullptr, false);
        if (decoded.is_string()) key = decoded.get<std::string>();
      }
      frame& f = stack.back();
      std::optional<std::size_t> first;
      if (f.keys.size() < 16) {
        for (const auto& [k, where] : f.keys)
          if (k == key) first = where;
      } else {
        if (f.many.empty())
          for (const auto& [k, where] : f.keys) f.many.emplace(k, where);
        if (const auto it = f.many.find(key); it != f.many.end()) first = it->second;
      }
      if (first) return repeated_key{start, *first, std::move(key)};
      if (!f.many.empty()) f.many.emplace(key, start);
      f.keys.emplace_back(std::move(key), start);
    }
  }
  return std::nullopt;
}

// --- the reader -----------------------------------------------------------------------------------

class json_reader {
 public:
  json_reader(std::string_view text, const std::string& file) : text_(text), file_(file), locate_(text) {}

  model read() {
    json doc;
    try {
      doc = json::parse(text_.begin(), text_.end(), nullptr, true, false);
    } catch (const json::parse_error& e) {
      std::string what = e.what();
      const auto column = what.find("column ");
      auto colon = column == std::string::npos ? std::string::npos : what.find(": ", column);
      what = colon == std::string::npos ? what : what.substr(colon + 2);
      fail_offset(token_start(e.byte == 0 ? 0 : e.byte - 1), "not valid JSON: " + what);
    } catch (const json::exception& e) {
      // Numbers beyond the range of a double: find the number in the text.
      std::string what = e.what();
      std::size_t offset = 0;
      const auto quote = what.find('\'');
      if (quote != std::string::npos) {
        const auto end = what.find('\'', quote + 1);
        const std::string token = what.substr(quote + 1, end == std::string::npos ? std::string::npos : end - quote - 1);
        if (!token.empty()) offset = std::min(text_.find(token), text_.size());
      }
      fail_offset(offset, "a number does not fit in 64 bits: " + what.substr(what.find(']') + 2));
    }
    if (const auto repeated = find_repeated_key(text_)) {
      const source_position first = position_of(text_, repeated->first);
      fail_offset(repeated->at, "the key \"" + repeated->key + "\" appears twice in one object (first at line " +
                                    std::to_string(first.line) + ", column " + std::to_string(first.column) +
                                    "): each key may be given once");
    }
    model_.set_file(file_);
    json_path path;
    if (!doc.is_object()) fail(path, std::string("expected a JSON object with \"constraints\", found ") + type_name(doc));
    for (const auto& [key, value] : doc.items())
      if (key != "format" && key != "version" && key != "description" && key != "variables" &&
          key != "constraints" && key != "objective")
        fail({{key, 0}}, "unknown key \"" + key +
                             "\": expected \"variables\", \"constraints\", \"objective\", \"format\", \"version\" "
                             "or \"description\"",
             true);
    if (doc.contains("format")) {
      const json& f = doc["format"];
      if (!f.is_string() || f.get<std::string>() != "clausewright-model")
        fail({{"format", 0}}, "expected \"format\": \"clausewright-model\"");
    }
    if (doc.contains("version")) {
      const json& v = doc["version"];
      if (!v.is_number_integer() || v.get<std::int64_t>() != 1)
        fail({{"version", 0}}, "expected \"version\": 1 (the only version of the format)");
    }
    if (doc.contains("description") && !doc["description"].is_string())
      fail({{"description", 0}}, std::string("expected a string, found ") + type_name(doc["description"]));
    if (doc.contains("variables")) read_variables(doc["variables"]);
    // The rest in the order of the text: variables are numbered by first
    // appearance when they are not declared.
    for (const auto& [key, value] : doc.items()) {
      if (key == "constraints") read_constraints(value);
      if (key == "objective") read_objective(value);
    }
    return std::move(model_);
  }

 private:
  [[noreturn]] void fail_offset(std::size_t offset, const std::string& what) const {
    const source_position p = position_of(text_, offset);
    error_position e;
    e.file = file_;
    e.line = p.line;
    e.column = p.column;
    throw error(error_id::parse, what, e);
  }
  [[noreturn]] void fail(const json_path& path, const std::string& what, bool at_key = false) const {
    fail_offset(locate_.find(path, at_key), what);
  }
  // nlohmann/json reports the last byte it read; the message is clearer at
  // the start of the token that byte ends (a string, a number, a word).
  [[nodiscard]] std::size_t token_start(std::size_t offset) const {
    if (offset >= text_.size()) return text_.size();
    const auto word = [](char c) {
      return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '.' || c == '+' ||
             c == '-';
    };
    if (text_[offset] == '"') {
      for (std::size_t i = offset; i-- > 0;) {
        if (text_[i] != '"') continue;
        std::size_t backslashes = 0;
        while (i > backslashes && text_[i - 1 - backslashes] == '\\') ++backslashes;
        if (backslashes % 2 == 0) return i;
      }
      return offset;
    }
    if (word(text_[offset])) {
      while (offset > 0 && word(text_[offset - 1])) --offset;
    }
    return offset;
  }
  source_position position(const json_path& path) const { return position_of(text_, locate_.find(path)); }

  static json_path child(json_path path, std::string key) {
    path.push_back({std::move(key), 0});
    return path;
  }
  static json_path child(json_path path, std::size_t index) {
    path.push_back({{}, index});
    return path;
  }

  std::int64_t integer(const json& v, const json_path& path, const char* what) const {
    if (v.is_number_unsigned()) {
      if (v.get<std::uint64_t>() > static_cast<std::uint64_t>(std::numeric_limits<std::int64_t>::max()))
        fail(path, std::string("the ") + what + " does not fit in 64 bits (at most 9223372036854775807)");
      return static_cast<std::int64_t>(v.get<std::uint64_t>());
    }
    if (v.is_number_integer()) return v.get<std::int64_t>();
    if (v.is_number_float()) {
      const double d = v.get<double>();
      if (std::isfinite(d) && std::trunc(d) == d && std::fabs(d) >= 9.2e18)
        fail(path, std::string("the ") + what + " does not fit in 64 bits (from -9223372036854775808 to "
                                               "9223372036854775807)");
      fail(path, std::string("expected an integer ") + what + ", found a number with a fraction or an exponent");
    }
    fail(path, std::string("expected an integer ") + what + ", found " + type_name(v));
  }

  void read_variables(const json& v) {
    const json_path path{{"variables", 0}};
    if (!v.is_array()) fail(path, std::string("expected an array of variable names, found ") + type_name(v));
    declared_ = true;
    for (std::size_t i = 0; i < v.size(); ++i) {
      const json& name = v[i];
      const json_path at = child(path, i);
      if (!name.is_string()) fail(at, std::string("expected a variable name (a string), found ") + type_name(name));
      const auto& s = name.get_ref<const std::string&>();
      if (!valid_variable_name(s))
        fail(at, "malformed variable name \"" + s +
                     "\": expected a letter or '_' followed by letters, digits or _ . : [ ] ( ) -");
      if (model_.find_variable(s)) fail(at, "variable \"" + s + "\" is declared twice");
      (void)model_.variable(s);
    }
  }

  literal literal_of(const json& v, const json_path& path) {
    if (!v.is_string()) fail(path, std::string("expected a literal (a variable name, or ~name), found ") + type_name(v));
    std::string_view s = v.get_ref<const std::string&>();
    bool negative = false;
    if (!s.empty() && s.front() == '~') {
      negative = true;
      s.remove_prefix(1);
    }
    if (!valid_variable_name(s))
      fail(path, "malformed literal \"" + v.get<std::string>() +
                     "\": expected a variable name (a letter or '_' followed by letters, digits or _ . : [ ] ( ) -), "
                     "or ~ and a name");
    std::optional<literal> l = model_.find_variable(s);
    if (!l) {
      if (declared_) fail(path, "variable \"" + std::string(s) + "\" is not declared in \"variables\"");
      l = model_.variable(s);
    }
    return negative ? ~*l : *l;
  }

  void read_terms(const json& v, const json_path& path, std::vector<term>& out) {
    if (!v.is_array()) fail(path, std::string("expected an array of terms, found ") + type_name(v));
    out.clear();
    for (std::size_t i = 0; i < v.size(); ++i) {
      const json& t = v[i];
      const json_path at = child(path, i);
      if (t.is_array()) {
        if (t.size() != 2)
          fail(at, "expected a term [coefficient, literal], found an array of " + std::to_string(t.size()));
        out.push_back({integer(t[0], child(at, 0), "coefficient"), literal_of(t[1], child(at, 1))});
      } else if (t.is_object()) {
        for (const auto& [key, value] : t.items())
          if (key != "coefficient" && key != "literal")
            fail(child(at, key), "unknown key \"" + key + "\" in a term: expected \"coefficient\" and \"literal\"",
                 true);
        if (!t.contains("coefficient")) fail(at, "a term needs a \"coefficient\"");
        if (!t.contains("literal")) fail(at, "a term needs a \"literal\"");
        out.push_back({integer(t["coefficient"], child(at, "coefficient"), "coefficient"),
                       literal_of(t["literal"], child(at, "literal"))});
      } else {
        fail(at, std::string("expected a term [coefficient, literal] or {\"coefficient\", \"literal\"}, found ") +
                     type_name(t));
      }
    }
  }

  void read_literals(const json& v, const json_path& path, std::vector<term>& out) {
    if (!v.is_array()) fail(path, std::string("expected an array of literals, found ") + type_name(v));
    out.clear();
    for (std::size_t i = 0; i < v.size(); ++i) out.push_back({1, literal_of(v[i], child(path, i))});
  }

  void read_constraints(const json& v) {
    const json_path path{{"constraints", 0}};
    if (!v.is_array()) fail(path, std::string("expected an array of constraints, found ") + type_name(v));
    std::vector<term> terms;
    for (std::size_t i = 0; i < v.size(); ++i) read_constraint(v[i], child(path, i), terms);
  }

  void read_constraint(const json& c, const json_path& at, std::vector<term>& terms) {
    if (!c.is_object()) fail(at, std::string("expected a constraint (an object with \"type\"), found ") + type_name(c));
    if (!c.contains("type")) fail(at, "a constraint needs a \"type\": at-most-one, exactly-one, at-most, at-least, "
                                      "exactly, clause or linear");
    const json& type = c["type"];
    if (!type.is_string()) fail(child(at, "type"), std::string("expected the type as a string, found ") + type_name(type));
    const std::string& t = type.get_ref<const std::string&>();
    constraint_settings s;
    bool counted = false;  // takes "literals" and "k"
    bool takes_k = false;
    relation rel = relation::le;
    if (t == "at-most-one") {
      s.form = constraint_form::at_most_one;
      counted = true;
    } else if (t == "exactly-one") {
      s.form = constraint_form::exactly_one;
      counted = true;
      rel = relation::eq;
    } else if (t == "at-most") {
      s.form = constraint_form::at_most;
      counted = takes_k = true;
    } else if (t == "at-least") {
      s.form = constraint_form::at_least;
      counted = takes_k = true;
      rel = relation::ge;
    } else if (t == "exactly") {
      s.form = constraint_form::exactly;
      counted = takes_k = true;
      rel = relation::eq;
    } else if (t == "clause") {
      s.form = constraint_form::clause;
      counted = true;
      rel = relation::ge;
    } else if (t == "linear") {
      s.form = constraint_form::linear;
    } else {
      fail(child(at, "type"), "unknown constraint type \"" + t +
                                  "\": expected at-most-one, exactly-one, at-most, at-least, exactly, clause or linear");
    }
    for (const auto& [key, value] : c.items()) {
      const bool allowed = key == "type" || key == "name" || key == "weight" || key == "method" ||
                           key == "description" || (counted && key == "literals") || (takes_k && key == "k") ||
                           (!counted && (key == "terms" || key == "relation" || key == "bound"));
      if (!allowed) {
        std::string message = "key \"";
        message += key;
        message += "\" does not belong to a constraint of type ";
        message += t;
        fail(child(at, key), message, true);
      }
    }
    const auto require = [&](const char* key) {
      if (!c.contains(key)) fail(at, "a constraint of type " + t + " needs \"" + key + "\"");
    };
    std::string name;
    if (c.contains("name")) {
      const json& n = c["name"];
      if (!n.is_string()) fail(child(at, "name"), std::string("expected the name as a string, found ") + type_name(n));
      name = n.get<std::string>();
    }
    if (c.contains("description") && !c["description"].is_string())
      fail(child(at, "description"), std::string("expected a string, found ") + type_name(c["description"]));
    if (c.contains("weight")) {
      s.weight = integer(c["weight"], child(at, "weight"), "weight");
      if (s.weight <= 0) fail(child(at, "weight"), "the weight of a soft constraint must be positive");
    }
    if (c.contains("method")) {
      const json& m = c["method"];
      if (!m.is_string()) fail(child(at, "method"), std::string("expected a method name, found ") + type_name(m));
      try {
        s.method = method_by_name(m.get_ref<const std::string&>());
      } catch (const error& e) {
        fail(child(at, "method"), e.detail());
      }
    }
    std::int64_t bound = 0;
    if (counted) {
      require("literals");
      read_literals(c["literals"], child(at, "literals"), terms);
      if (takes_k) {
        require("k");
        bound = integer(c["k"], child(at, "k"), "bound k");
        if (bound < 0) fail(child(at, "k"), "expected k >= 0, found " + std::to_string(bound));
      } else {
        bound = 1;
      }
    } else {
      require("terms");
      require("relation");
      require("bound");
      read_terms(c["terms"], child(at, "terms"), terms);
      const json& r = c["relation"];
      if (!r.is_string()) fail(child(at, "relation"), std::string("expected \"<=\", \">=\" or \"=\", found ") + type_name(r));
      const std::string& op = r.get_ref<const std::string&>();
      if (op == "<=") {
        rel = relation::le;
      } else if (op == ">=") {
        rel = relation::ge;
      } else if (op == "=") {
        rel = relation::eq;
      } else {
        fail(child(at, "relation"), "unknown relation \"" + op + "\": expected \"<=\", \">=\" or \"=\"");
      }
      bound = integer(c["bound"], child(at, "bound"), "bound");
    }
    s.name = name;
    s.position = position(at);
    (void)model_.add_constraint(terms, rel, bound, s);
  }

  void read_objective(const json& v) {
    const json_path path{{"objective", 0}};
    std::vector<term> terms;
    read_terms(v, path, terms);
    model_.set_objective(terms, position(path));
  }

  std::string_view text_;
  std::string file_;
  locator locate_;
  model model_;
  bool declared_ = false;
};

bool name_char(char c) {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' || c == '.' ||
         c == ':' || c == '[' || c == ']' || c == '(' || c == ')' || c == '-';
}

}  // namespace

bool valid_variable_name(std::string_view name) noexcept {
  if (name.empty()) return false;
  const char first = name.front();
  if (!((first >= 'a' && first <= 'z') || (first >= 'A' && first <= 'Z') || first == '_')) return false;
  for (const char c : name)
    if (!name_char(c)) return false;
  return true;
}

model parse_json_model(std::string_view text, const std::string& file) {
  // A UTF-8 byte-order mark is skipped; positions count from after it.
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
  return json_reader(text, file).read();
}

model read_json_model(byte_source& in) {
  std::string text;
  std::vector<char> block(std::size_t{1} << 20);
  for (std::size_t n = in.read(block.data(), block.size()); n != 0; n = in.read(block.data(), block.size()))
    text.append(block.data(), n);
  return parse_json_model(text, in.name());
}

}  // namespace clausewright::tool
