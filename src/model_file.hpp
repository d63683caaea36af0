// clausewright tool: model files of either format, by extension or content.
#pragma once

#include <string>

#include <clausewright/model.hpp>

#include "input.hpp"

namespace clausewright::tool {

enum class model_format { opb, json };

// ".opb" and ".json" decide; otherwise a file whose first non-blank byte is
// '{' is JSON, anything else OPB (a leading UTF-8 byte-order mark is
// skipped). An empty file is an error. Rewinds `in`.
[[nodiscard]] model_format detect_format(byte_source& in);

// The whole model in memory (decode, tests).
[[nodiscard]] model load_model(byte_source& in, model_format format);
[[nodiscard]] model load_model(byte_source& in);

// Builds a model from what a reader hands out.
class model_builder final : public model_handler {
 public:
  explicit model_builder(model& m) : model_(m) {}
  void begin(const model_header& header) override;
  literal product(std::span<const literal> factors) override;
  void objective(std::span<const term> terms, source_position where) override;
  void constraint(const constraint_view& c) override;

 private:
  model& model_;
};

// A model file to stream into handlers, as often as needed: OPB is read
// again each time, JSON is parsed once and replayed.
class model_stream {
 public:
  explicit model_stream(const std::string& path);
  void run(model_handler& handler);
  [[nodiscard]] model_format format() const noexcept { return format_; }
  [[nodiscard]] const std::string& name() const { return source_.name(); }
  [[nodiscard]] const std::optional<file_identity>& identity() const noexcept { return source_.identity(); }

 private:
  file_source source_;
  model_format format_;
  std::optional<model> json_model_;
};

}  // namespace clausewright::tool
