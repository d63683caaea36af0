// clausewright tool: the statistics document of `stats --json`, for other
// commands (report) that show the same numbers. Schema: docs/stats-format.md.
#pragma once

#include <nlohmann/json.hpp>

#include <clausewright/model.hpp>

#include "model_file.hpp"

namespace clausewright::tool {

// Measures every constraint of the model in `in` (one pass over it) and
// returns exactly the document `clausewright stats --json` prints with the
// same settings.
[[nodiscard]] nlohmann::ordered_json stats_document(model_stream& in, const model_encoding_settings& settings);

}  // namespace clausewright::tool
