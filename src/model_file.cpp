#include "model_file.hpp"

#include <vector>

#include "json_model.hpp"
#include "opb.hpp"

namespace clausewright::tool {

namespace {

bool ends_with(const std::string& s, std::string_view suffix) {
  return s.size() >= suffix.size() && s.compare(s.size() - suffix.size(), suffix.size(), suffix) == 0;
}

}  // namespace

model_format detect_format(byte_source& in) {
  std::vector<char> block(4096);
  char first = '\0';
  bool found = false;
  bool start = true;
  while (!found) {
    const std::size_t n = in.read(block.data(), block.size());
    if (n == 0) break;
    // A byte-order mark at the start is no part of the content.
    const std::size_t skip = start && n >= 3 && block[0] == '\xEF' && block[1] == '\xBB' && block[2] == '\xBF' ? 3 : 0;
    start = false;
    for (std::size_t i = skip; i < n; ++i) {
      const char c = block[i];
      if (c != ' ' && c != '\t' && c != '\n' && c != '\r') {
        first = c;
        found = true;
        break;
      }
    }
  }
  in.rewind();
  if (!found) {
    error_position p;
    p.file = in.name();
    p.line = 1;
    p.column = 1;
    throw error(error_id::parse, "the file is empty: expected an OPB or a JSON model", p);
  }
  if (ends_with(in.name(), ".json")) return model_format::json;
  if (ends_with(in.name(), ".opb")) return model_format::opb;
  return first == '{' ? model_format::json : model_format::opb;
}

void model_builder::begin(const model_header& header) {
  model_.set_file(std::string(header.file));
  model_.reserve_variables(header.variables);
}

literal model_builder::product(std::span<const literal> factors) { return model_.add_product(factors); }

void model_builder::objective(std::span<const term> terms, source_position where) {
  model_.set_objective(terms, where);
}

void model_builder::constraint(const constraint_view& c) {
  constraint_settings s;
  s.weight = c.weight;
  s.method = c.method;
  s.name = c.name;
  s.form = c.form;
  s.position = c.position;
  (void)model_.add_constraint(c.terms, c.rel, c.bound, s);
}

model load_model(byte_source& in, model_format format) {
  if (format == model_format::json) return read_json_model(in);
  model m;
  model_builder builder(m);
  read_opb(in, builder);
  return m;
}

model load_model(byte_source& in) { return load_model(in, detect_format(in)); }

model_stream::model_stream(const std::string& path) : source_(path), format_(detect_format(source_)) {
  if (format_ == model_format::json) json_model_ = read_json_model(source_);
}

void model_stream::run(model_handler& handler) {
  if (json_model_) {
    json_model_->replay(handler);
    return;
  }
  source_.rewind();
  read_opb(source_, handler);
}

}  // namespace clausewright::tool
