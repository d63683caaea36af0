// clausewright tool: the JSON model format of our own (docs/model-format.md,
// schema in docs/model.schema.json), read with nlohmann/json.
//
// Positions: nlohmann/json keeps none for values, so when a value is wrong
// the reader finds it again in the text by its path (the text is valid JSON
// by then) and reports its line and column.
#pragma once

#include <string>
#include <string_view>

#include <clausewright/model.hpp>

#include "input.hpp"

namespace clausewright::tool {

// The allowed characters of a variable name: a letter or '_' first, then
// letters, digits and _ . : [ ] ( ) - (so "x[3]" and "shift.mon-1" are names).
[[nodiscard]] bool valid_variable_name(std::string_view name) noexcept;

[[nodiscard]] model parse_json_model(std::string_view text, const std::string& file);
[[nodiscard]] model read_json_model(byte_source& in);

}  // namespace clausewright::tool
