// clausewright tool: the HTML page of `clausewright report`.
//
// The page is built from one JSON document (the page data: totals, groups of
// constraints of one shape, growth curves; docs/report.md), which is also
// embedded in it as <script type="application/json" id="report-data">, so
// the numbers drawn and the numbers a reader can extract are the same. The
// charts are inline SVG drawn here; nothing is fetched from the network.
// Every string from the model (its file name, constraint names) is escaped.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

#include <clausewright/methods.hpp>
#include <nlohmann/json.hpp>

namespace clausewright::tool {

// The colour of a method, the same in every chart and every report.
[[nodiscard]] std::string_view report_color(method_id id) noexcept;

// Text for HTML element content and attribute values: & < > " ' escaped,
// invalid UTF-8 and control characters replaced by U+FFFD.
[[nodiscard]] std::string html_escape(std::string_view text);

// JSON text that can stand inside a <script> element: ASCII only, with
// < > & written as \u escapes (valid JSON, and no "</script>" inside).
[[nodiscard]] std::string script_safe_json(const nlohmann::ordered_json& data);

// A count of the page data or of the statistics: 0 where it is null (a
// number not measured; callers look at is_number() to tell).
[[nodiscard]] inline std::uint64_t json_u64(const nlohmann::ordered_json& j) {
  return j.is_number() ? j.get<std::uint64_t>() : 0;
}

// The whole page.
[[nodiscard]] std::string render_report_html(const nlohmann::ordered_json& data);

}  // namespace clausewright::tool
