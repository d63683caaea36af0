#include "report_html.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <map>
#include <string>
#include <vector>

namespace clausewright::tool {

namespace {

using json = nlohmann::ordered_json;

// One colour per row of the method table, in table order; neighbours in the
// table (which often share a chart) get far-apart hues.
constexpr std::string_view palette[] = {
    "#4e79a7",  // pairwise
    "#f28e2b",  // ladder
    "#e15759",  // bitwise
    "#76b7b2",  // commander
    "#59a14f",  // product
    "#edc948",  // bimander
    "#b07aa1",  // sequential-counter
    "#ff9da7",  // totalizer
    "#9c755f",  // modulo-totalizer
    "#17becf",  // cardinality-network
    "#8cd17d",  // sorting-network
    "#bcbd22",  // binomial
    "#3b3b98",  // bdd
    "#d81b60",  // adder
    "#00796b",  // generalized-totalizer
    "#7f3c8d",  // sequential-weight-counter
};
constexpr std::string_view picked_color = "#263238";
constexpr std::string_view axis_color = "#9aa5ad";
constexpr std::string_view grid_color = "#e6eaed";
constexpr std::string_view text_color = "#37474f";

std::string color_of(const std::string& method) {
  if (const auto id = find_method(method)) return std::string(report_color(*id));
  return std::string(picked_color);
}

// --- numbers ------------------------------------------------------------------------

std::string fmt_int(std::uint64_t v) {
  std::string digits = std::to_string(v);
  std::string out;
  for (std::size_t i = 0; i < digits.size(); ++i) {
    if (i != 0 && (digits.size() - i) % 3 == 0) out += ',';
    out += digits[i];
  }
  return out;
}

std::string fmt_double(double v, int precision) {
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "%.*f", precision, v);
  return buffer;
}

// Three significant digits with k, M, G.
std::string fmt_compact(double v) {
  const double a = std::fabs(v);
  // Three significant digits, trailing zeros dropped (1M, not 1.00M).
  const auto three = [](double x) {
    std::string t = fmt_double(x, x >= 100 ? 0 : (x >= 10 ? 1 : 2));
    if (t.find('.') != std::string::npos) {
      while (t.back() == '0') t.pop_back();
      if (t.back() == '.') t.pop_back();
    }
    return t;
  };
  if (a < 1000) {
    if (a == std::floor(a)) return fmt_double(v, 0);
    return three(v);
  }
  if (a < 1e6) return three(v / 1e3) + "k";
  if (a < 1e9) return three(v / 1e6) + "M";
  return three(v / 1e9) + "G";
}

std::string fmt_factor(double v) {
  if (v == 0) return "0";
  if (v >= 1000) return "\xc3\x97" + fmt_int(static_cast<std::uint64_t>(std::llround(v)));
  if (v >= 100) return "\xc3\x97" + fmt_double(v, 0);
  if (v >= 10) return "\xc3\x97" + fmt_double(v, 1);
  if (v >= 0.01) return "\xc3\x97" + fmt_double(v, 2);
  return "\xc3\x97" + fmt_double(v, 4);
}

std::string num(double v) { return fmt_double(v, 1); }

// --- scales -----------------------------------------------------------------------------

struct scale {
  double d0 = 0;
  double d1 = 1;
  double r0 = 0;
  double r1 = 1;
  bool log = false;

  [[nodiscard]] double operator()(double v) const {
    double t = 0;
    if (log)
      t = (std::log10(std::max(v, d0)) - std::log10(d0)) / (std::log10(d1) - std::log10(d0));
    else
      t = (v - d0) / (d1 - d0);
    return r0 + t * (r1 - r0);
  }
  [[nodiscard]] std::vector<double> ticks() const {
    std::vector<double> out;
    if (log) {
      const int lo = static_cast<int>(std::lround(std::log10(d0)));
      const int hi = static_cast<int>(std::lround(std::log10(d1)));
      const bool fine = hi - lo <= 2;
      for (int e = lo; e <= hi; ++e) {
        const double p = std::pow(10.0, e);
        out.push_back(p);
        if (fine && e < hi) {
          out.push_back(2 * p);
          out.push_back(5 * p);
        }
      }
      return out;
    }
    const double step = (d1 - d0) / 5;
    for (int i = 0; i <= 5; ++i) out.push_back(d0 + step * i);
    return out;
  }
};

// A log scale over [lo, hi] (both > 0) widened to whole decades.
scale log_scale(double lo, double hi, double r0, double r1) {
  scale s;
  s.log = true;
  s.d0 = std::pow(10.0, std::floor(std::log10(lo)));
  s.d1 = std::pow(10.0, std::ceil(std::log10(hi)));
  if (s.d1 <= s.d0) s.d1 = s.d0 * 10;
  s.r0 = r0;
  s.r1 = r1;
  return s;
}

// A linear scale from 0 to a round number at or above hi.
scale linear_scale(double hi, double r0, double r1) {
  scale s;
  const double raw = std::max(hi, 1e-9) / 5;
  const double magnitude = std::pow(10.0, std::floor(std::log10(raw)));
  double step = magnitude;
  for (const double m : {1.0, 2.0, 2.5, 5.0, 10.0})
    if (raw <= m * magnitude) {
      step = m * magnitude;
      break;
    }
  s.d0 = 0;
  s.d1 = step * 5;
  s.r0 = r0;
  s.r1 = r1;
  return s;
}

// Log when the positive values span more than `spread`.
scale auto_scale(double lo, double hi, double r0, double r1, double spread) {
  if (lo > 0 && hi / lo > spread) return log_scale(lo, hi, r0, r1);
  return linear_scale(hi, r0, r1);
}

// --- SVG pieces -----------------------------------------------------------------------------

void text(std::string& out, double x, double y, const std::string& content, const std::string& attributes = "") {
  out += "<text x=\"" + num(x) + "\" y=\"" + num(y) + "\"" + (attributes.empty() ? "" : " " + attributes) + ">" +
         html_escape(content) + "</text>";
}

void line(std::string& out, double x1, double y1, double x2, double y2, std::string_view stroke,
          const std::string& extra = "") {
  out += "<line x1=\"" + num(x1) + "\" y1=\"" + num(y1) + "\" x2=\"" + num(x2) + "\" y2=\"" + num(y2) + "\" stroke=\"" +
         std::string(stroke) + "\"" + (extra.empty() ? "" : " " + extra) + "/>";
}

std::string svg_open(double width, double height, const std::string& label) {
  return "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart\" width=\"" + num(width) + "\" height=\"" +
         num(height) + "\" viewBox=\"0 0 " + num(width) + " " + num(height) + "\" role=\"img\" aria-label=\"" +
         html_escape(label) + "\">";
}

// A vertical value axis with grid lines across [x0, x1].
void y_axis(std::string& out, const scale& s, double x0, double x1, const std::string& title, double title_y) {
  for (const double t : s.ticks()) {
    const double y = s(t);
    line(out, x0, y, x1, y, grid_color);
    text(out, x0 - 6, y + 4, fmt_compact(t), "class=\"tick\" text-anchor=\"end\"");
  }
  line(out, x0, s.r0, x0, s.r1, axis_color);
  text(out, x0 - 54, title_y, title,
       "class=\"axis-title\" transform=\"rotate(-90 " + num(x0 - 54) + " " + num(title_y) +
           ")\" text-anchor=\"middle\"");
}

// --- sections -------------------------------------------------------------------------------

std::string legend(const json& methods, bool with_picked) {
  std::string out = "<div class=\"legend\">";
  if (with_picked)
    out += "<span class=\"key\" data-method=\"picked\"><i style=\"background:" + std::string(picked_color) +
           "\"></i>picked (per constraint)</span>";
  for (const json& m : methods) {
    const std::string name = m["name"].get<std::string>();
    out += "<span class=\"key\" data-method=\"" + html_escape(name) + "\"><i style=\"background:" + color_of(name) +
           "\"></i>" + html_escape(name) + (m["arc_consistent"].get<bool>() ? "" : " <small>(not AC)</small>") +
           "</span>";
  }
  return out + "</div>";
}

// Summary cards of the picked encoding.
std::string summary(const json& data) {
  const json& picked = data["totals"][0];
  std::string out = "<div class=\"cards\">";
  const auto card = [&out](const std::string& label, const std::string& value, const std::string& attribute,
                           const std::string& raw, const std::string& note) {
    out += "<div class=\"card\"><div class=\"label\">" + html_escape(label) + "</div><div class=\"value\" " +
           attribute + "=\"" + raw + "\">" + html_escape(value) + "</div><div class=\"note\">" + html_escape(note) +
           "</div></div>";
  };
  card("clauses (picked)", fmt_int(json_u64(picked["clauses"])), "data-total-clauses",
       std::to_string(json_u64(picked["clauses"])),
       "constraints only; CNF header: " + fmt_int(json_u64(picked["cnf"]["clauses"])));
  card("auxiliary variables (picked)", fmt_int(json_u64(picked["vars"])), "data-total-vars",
       std::to_string(json_u64(picked["vars"])), "CNF variables: " + fmt_int(json_u64(picked["cnf"]["variables"])));
  const bool bytes_known = picked["dimacs_bytes"].is_number();
  card("DIMACS bytes of the clauses", bytes_known ? fmt_int(json_u64(picked["dimacs_bytes"])) : "unknown",
       "data-dimacs-bytes", bytes_known ? std::to_string(json_u64(picked["dimacs_bytes"])) : "",
       !bytes_known                      ? "a method was stopped by the budget"
       : data["model_bytes"].is_number() ? "model file: " + fmt_int(json_u64(data["model_bytes"])) + " bytes"
                                         : "model read from standard input");
  if (picked["blowup_bytes"].is_number()) {
    const double f = picked["blowup_bytes"].get<double>();
    card("blow-up", fmt_factor(f), "data-blowup", fmt_double(f, 6),
         fmt_double(picked["clauses_per_model_byte"].get<double>(), 3) + " clauses per model byte");
  }
  return out + "</div>";
}

// Horizontal bars: the blow-up factor (DIMACS bytes / model bytes) of the
// picked encoding and of each method alone; clauses when the model's size is
// unknown.
std::string totals_chart(const json& data) {
  const json& totals = data["totals"];
  // The factor needs every total's bytes; where stats left some unmeasured,
  // the chart shows clauses instead.
  const bool factor =
      data["model_bytes"].is_number() && json_u64(data["model_bytes"]) > 0 &&
      std::all_of(totals.begin(), totals.end(), [](const json& t) { return t["blowup_bytes"].is_number(); });
  const auto value_of = [&](const json& t) {
    return factor ? t["blowup_bytes"].get<double>() : static_cast<double>(json_u64(t["clauses"]));
  };
  double lo = 0;
  double hi = 0;
  for (const json& t : totals) {
    const double v = value_of(t);
    if (v > 0) lo = lo == 0 ? v : std::min(lo, v);
    hi = std::max(hi, v);
  }
  const double width = 1120;
  const double left = 230;
  const double right = 820;
  const double row = 26;
  const double top = 34;
  const double height = top + row * static_cast<double>(totals.size()) + 54;
  const scale s = auto_scale(lo > 0 ? lo : 1, std::max(hi, 1e-9), left, right, 30);
  std::string out = svg_open(width, height, "blow-up per method");
  for (const double t : s.ticks()) {
    const double x = s(t);
    line(out, x, top - 6, x, height - 48, grid_color);
    text(out, x, height - 32, factor ? "\xc3\x97" + fmt_compact(t) : fmt_compact(t),
         "class=\"tick\" text-anchor=\"middle\"");
  }
  if (factor && s.d0 < 1 && s.d1 > 1) {
    line(out, s(1), top - 10, s(1), height - 48, text_color, "stroke-dasharray=\"4 3\"");
    text(out, s(1), top - 14,
         "\xc3\x97"
         "1: as large as the model",
         "class=\"note-text\" text-anchor=\"middle\"");
  }
  text(out, (left + right) / 2, height - 10,
       factor
           ? "DIMACS bytes of the clauses \xc3\xb7 bytes of the model file" + std::string(s.log ? " (log scale)" : "")
           : "clauses" + std::string(s.log ? " (log scale)" : ""),
       "class=\"axis-title\" text-anchor=\"middle\"");
  double y = top;
  for (const json& t : totals) {
    const std::string name = t["name"].get<std::string>();
    const bool is_picked = name == "picked";
    const double v = value_of(t);
    const double x = v > 0 ? s(v) : left;
    const bool over = t["over_budget"].get<bool>();
    out += "<g class=\"total\" data-method=\"" + html_escape(name) + "\" data-total-clauses=\"" +
           std::to_string(json_u64(t["clauses"])) + "\" data-total-vars=\"" + std::to_string(json_u64(t["vars"])) +
           "\" data-dimacs-bytes=\"" +
           (t["dimacs_bytes"].is_number() ? std::to_string(json_u64(t["dimacs_bytes"])) : std::string()) + "\">";
    text(out, left - 10, y + 17, is_picked ? "picked (per constraint)" : name,
         std::string("text-anchor=\"end\" class=\"") + (is_picked ? "row-label strong" : "row-label") + "\"");
    out += "<rect x=\"" + num(left) + "\" y=\"" + num(y + 4) + "\" width=\"" + num(std::max(x - left, 1.0)) +
           "\" height=\"" + num(row - 8) + "\" rx=\"2\" fill=\"" +
           (is_picked ? std::string(picked_color) : color_of(name)) + "\"" + (over ? " fill-opacity=\"0.55\"" : "") +
           "/>";
    if (over)
      out += "<rect x=\"" + num(left) + "\" y=\"" + num(y + 4) + "\" width=\"" + num(std::max(x - left, 1.0)) +
             "\" height=\"" + num(row - 8) + "\" fill=\"url(#hatch)\"/>";
    std::string label = over ? "\xe2\x89\xa5 " : "";
    if (factor) label += fmt_factor(v) + "  \xc2\xb7  ";
    label += fmt_int(json_u64(t["clauses"]));
    label += " clauses, ";
    label += fmt_int(json_u64(t["vars"]));
    label += " vars";
    if (over) label += " (over budget)";
    if (!is_picked && json_u64(t["fallbacks"]) != 0) label += ", " + fmt_int(json_u64(t["fallbacks"])) + " fallbacks";
    text(out, std::max(x, left) + 8, y + 17, label,
         std::string("class=\"bar-label") + (is_picked ? " strong" : "") + "\"");
    out += "</g>";
    y += row;
  }
  return out + "</svg>";
}

// The methods a group's constraints were given, most first.
std::vector<std::string> picks_of(const json& group) {
  std::vector<std::pair<std::uint64_t, std::string>> picks;
  for (const auto& [name, count] : group["picks"].items()) picks.emplace_back(count.get<std::uint64_t>(), name);
  std::stable_sort(picks.begin(), picks.end(), [](const auto& a, const auto& b) { return a.first > b.first; });
  std::vector<std::string> out;
  out.reserve(picks.size());
  for (const auto& p : picks) out.push_back(p.second);
  return out;
}

std::string group_title(const json& g) {
  std::string s = fmt_int(json_u64(g["count"])) + " \xc3\x97 " + g["kind"].get<std::string>();
  if (g["kind"] == "cardinality" || g["kind"] == "linear")
    s += " " + g["relation"].get<std::string>() + " " + std::to_string(g["bound"].get<std::int64_t>());
  if (g["soft"].get<bool>()) s += " (soft)";
  return s;
}

// Kind, relation and bound in a few characters.
std::string short_shape(const json& g) {
  const std::string kind = g["kind"].get<std::string>();
  std::string rel = g["relation"].get<std::string>();
  if (rel == "<=") rel = "\xe2\x89\xa4";
  if (rel == ">=") rel = "\xe2\x89\xa5";
  std::string s;
  if (kind == "at-most-one")
    s = "at most one";
  else if (kind == "exactly-one")
    s = "exactly one";
  else if (kind == "cardinality")
    s = "card. " + rel + " " + std::to_string(g["bound"].get<std::int64_t>());
  else
    s = kind + " " + rel + " " + std::to_string(g["bound"].get<std::int64_t>());
  return g["soft"].get<bool>() ? s + ", soft" : s;
}

constexpr std::size_t chart_groups = 8;

// Grouped bars: clauses of each group under each method (summed over the
// group's constraints), log scale, the pick marked.
std::string groups_chart(const json& data) {
  std::vector<const json*> shown;
  for (const json& g : data["groups"])
    if (!g["trivial"].get<bool>() && shown.size() < chart_groups) shown.push_back(&g);
  if (shown.empty()) return "<p class=\"empty\">No constraint beyond single clauses: every method writes the same.</p>";
  double lo = 0;
  double hi = 1;
  std::size_t bars = 0;
  for (const json* g : shown) {
    for (const json& m : (*g)["methods"]) {
      const auto c = static_cast<double>(json_u64(m["clauses"]));
      if (c > 0) lo = lo == 0 ? c : std::min(lo, c);
      hi = std::max(hi, c);
      ++bars;
    }
  }
  const double width = 1120;
  const double left = 78;
  const double right = width - 16;
  const double top = 30;
  const double bottom = 330;
  const double height = bottom + 56;
  const scale s = log_scale(std::max(std::min(lo, 1.0), 1.0), hi, bottom, top);
  std::string out = svg_open(width, height, "clauses per constraint group and method");
  out +=
      "<defs><pattern id=\"hatch\" patternUnits=\"userSpaceOnUse\" width=\"6\" height=\"6\" "
      "patternTransform=\"rotate(45)\"><rect width=\"3\" height=\"6\" fill=\"#ffffff\" fill-opacity=\"0.6\"/>"
      "</pattern></defs>";
  y_axis(out, s, left, right, "clauses in the group (log)", (top + bottom) / 2);
  const double gap = 26;
  const double slot = std::min(34.0, (right - left - gap * static_cast<double>(shown.size() + 1)) /
                                         static_cast<double>(std::max<std::size_t>(bars, 1)));
  // Centred when the bars do not fill the width.
  const double used = slot * static_cast<double>(bars) + gap * static_cast<double>(shown.size() - 1);
  double x = left + std::max(gap, (right - left - used) / 2);
  for (const json* gp : shown) {
    const json& g = *gp;
    const std::vector<std::string> picks = picks_of(g);
    const double start = x;
    for (const json& m : g["methods"]) {
      const std::string name = m["name"].get<std::string>();
      const auto clauses = static_cast<double>(json_u64(m["clauses"]));
      const double y = clauses > 0 ? s(clauses) : bottom;
      const bool picked = std::find(picks.begin(), picks.end(), name) != picks.end();
      const bool over = json_u64(m["over_budget"]) != 0;
      out += "<g data-method=\"" + html_escape(name) + "\" data-group=\"" + std::to_string(json_u64(g["id"])) +
             "\" data-clauses=\"" + std::to_string(json_u64(m["clauses"])) + "\"" +
             (picked ? " data-picked=\"1\"" : "") + "><title>" +
             html_escape(name + ": " + fmt_int(json_u64(m["clauses"])) + " clauses, " + fmt_int(json_u64(m["vars"])) +
                         " auxiliary variables" + (over ? " (over budget: where the run stopped)" : "") +
                         (picked ? " \xe2\x80\x94 picked" : "")) +
             "</title>";
      const double w = slot - 3;
      out += "<rect x=\"" + num(x) + "\" y=\"" + num(y) + "\" width=\"" + num(w) + "\" height=\"" +
             num(std::max(bottom - y, 1.0)) + "\" fill=\"" + color_of(name) + "\"" +
             (picked ? " stroke=\"#111\" stroke-width=\"2\"" : "") + "/>";
      if (over) {
        out += "<rect x=\"" + num(x) + "\" y=\"" + num(y) + "\" width=\"" + num(w) + "\" height=\"" +
               num(std::max(bottom - y, 1.0)) + "\" fill=\"url(#hatch)\"/>";
        text(out, x + w / 2, y - 4, "cut", "class=\"tick\" text-anchor=\"middle\"");
      }
      if (picked) {
        const double cx = x + w / 2;
        out += "<path d=\"M" + num(cx - 6) + " " + num(y - 15) + " L" + num(cx + 6) + " " + num(y - 15) + " L" +
               num(cx) + " " + num(y - 6) + " Z\" fill=\"#111\"/>";
        text(out, cx, y - 19, "pick", "class=\"pick-label\" text-anchor=\"middle\"");
      }
      out += "</g>";
      x += slot;
    }
    const double mid = (start + x - 3) / 2;
    line(out, start, bottom, x - 3, bottom, text_color);
    // Three short lines: a group may be only a dozen narrow bars wide.
    text(out, mid, bottom + 16,
         "G" + std::to_string(json_u64(g["id"])) + " \xc2\xb7 " + fmt_int(json_u64(g["count"])) + "\xc3\x97",
         "class=\"group-label\" text-anchor=\"middle\"");
    text(out, mid, bottom + 30, short_shape(g), "class=\"tick\" text-anchor=\"middle\"");
    text(out, mid, bottom + 44, "n = " + fmt_int(json_u64(g["inputs"])), "class=\"tick\" text-anchor=\"middle\"");
    x += gap;
  }
  return out + "</svg>";
}

// One growth chart: `metric` 1 clauses, 2 auxiliary variables.
std::string growth_chart(const json& curve, int metric, const std::string& title, const std::string& x_title,
                         double budget) {
  const double width = 550;
  const double height = 300;
  const double left = 70;
  const double right = width - 14;
  const double top = 30;
  const double bottom = height - 46;
  double xlo = 0;
  double xhi = 0;
  double ylo = 0;
  double yhi = 0;
  std::vector<std::string> without;  // methods with no auxiliary variables at all
  const auto see_x = [&](double x) {
    xlo = xlo == 0 ? x : std::min(xlo, x);
    xhi = std::max(xhi, x);
  };
  for (const json& s : curve["series"]) {
    bool positive = false;
    for (const json& p : s["points"]) {
      see_x(p[0].get<double>());
      const double v = p[static_cast<std::size_t>(metric)].get<double>();
      if (v > 0) {
        positive = true;
        ylo = ylo == 0 ? v : std::min(ylo, v);
        yhi = std::max(yhi, v);
      }
    }
    if (s["cut_at"].is_number()) see_x(s["cut_at"].get<double>());
    if (!positive && !s["points"].empty() && metric == 2) without.push_back(s["method"].get<std::string>());
  }
  bool cut = false;
  for (const json& s : curve["series"]) cut = cut || s["cut_at"].is_number();
  if (metric == 1 && cut) yhi = std::max(yhi, budget);
  std::string out = svg_open(width, height, title);
  text(out, left, 18, title, "class=\"chart-title\"");
  if (xhi <= 0 || yhi <= 0) {
    text(out, width / 2, height / 2, "nothing to draw", "class=\"note-text\" text-anchor=\"middle\"");
    return out + "</svg>";
  }
  const scale sx = log_scale(std::max(xlo, 1.0), std::max(xhi, 2.0), left, right);
  const scale sy = log_scale(std::max(ylo, 1.0), yhi, bottom, top);
  y_axis(out, sy, left, right, metric == 1 ? "clauses" : "auxiliary variables", (top + bottom) / 2);
  for (const double t : sx.ticks()) {
    const double x = sx(t);
    line(out, x, top, x, bottom, grid_color);
    text(out, x, bottom + 16, fmt_compact(t), "class=\"tick\" text-anchor=\"middle\"");
  }
  line(out, left, bottom, right, bottom, axis_color);
  text(out, (left + right) / 2, height - 8, x_title + " (log)", "class=\"axis-title\" text-anchor=\"middle\"");
  const double own = sx(curve["own"].get<double>());
  line(out, own, top, own, bottom, text_color, "stroke-dasharray=\"5 4\"");
  text(out, own + 4, top + 10, "this model", "class=\"note-text\"");
  if (metric == 1 && cut) {
    const double by = sy(budget);
    line(out, left, by, right, by, "#c62828", "stroke-dasharray=\"2 3\"");
    text(out, right - 4, by - 5, "curve budget " + fmt_compact(budget),
         "class=\"note-text budget\" text-anchor=\"end\"");
  }
  for (const json& s : curve["series"]) {
    const std::string name = s["method"].get<std::string>();
    const std::string color = color_of(name);
    std::string path;
    double last_x = -1;
    double last_y = -1;
    std::string dots;
    for (const json& p : s["points"]) {
      const double v = p[static_cast<std::size_t>(metric)].get<double>();
      if (v <= 0) continue;
      const double x = sx(p[0].get<double>());
      const double y = sy(v);
      path += path.empty() ? "M" : " L";
      path += num(x);
      path += ' ';
      path += num(y);
      dots += "<circle cx=\"" + num(x) + "\" cy=\"" + num(y) + "\" r=\"2.2\" fill=\"" + color + "\"/>";
      last_x = x;
      last_y = y;
    }
    out += "<g data-method=\"" + html_escape(name) + "\"><title>" + html_escape(name) + "</title>";
    if (!path.empty()) {
      out += "<path d=\"";
      out += path;
      out += "\" fill=\"none\" stroke=\"";
      out += color;
      out += "\" stroke-width=\"2\"/>";
      out += dots;
    }
    if (s["cut_at"].is_number()) {
      // The run at cut_at passed the budget: a dashed step to the budget
      // line (clauses) or up to the top (variables), ended by a cross; only
      // the cross when the first run passed it.
      const double cx = sx(s["cut_at"].get<double>());
      const double cy = metric == 1 ? sy(budget) : top;
      if (last_x >= 0) line(out, last_x, last_y, cx, cy, color, "stroke-width=\"1.5\" stroke-dasharray=\"3 3\"");
      out += "<path d=\"M" + num(cx - 4) + " " + num(cy - 4) + " L" + num(cx + 4) + " " + num(cy + 4) + " M" +
             num(cx - 4) + " " + num(cy + 4) + " L" + num(cx + 4) + " " + num(cy - 4) + "\" stroke=\"" + color +
             "\" stroke-width=\"2\"/>";
    }
    out += "</g>";
  }
  if (!without.empty()) {
    std::string note = "no auxiliary variables: ";
    for (std::size_t i = 0; i < without.size(); ++i) note += (i == 0 ? "" : ", ") + without[i];
    text(out, left + 6, bottom - 8, note, "class=\"note-text\"");
  }
  return out + "</svg>";
}

std::string curves_section(const json& data) {
  const json& curves = data["curves"];
  if (curves.empty()) return "<p class=\"empty\">No group to draw growth curves for.</p>";
  const auto budget = static_cast<double>(json_u64(data["curve_budget"]));
  std::map<std::uint64_t, const json*> groups;
  for (const json& g : data["groups"]) groups[json_u64(g["id"])] = &g;
  std::string out;
  std::uint64_t current = 0;
  for (const json& c : curves) {
    const std::uint64_t id = json_u64(c["group"]);
    const json& g = *groups.at(id);
    if (id != current) {
      if (current != 0) out += "</div>";
      current = id;
      out += "<h3>G" + std::to_string(id) + ": " + html_escape(group_title(g)) +
             ", n = " + fmt_int(json_u64(g["inputs"])) + "</h3><div class=\"grid\">";
    }
    const bool by_n = c["axis"] == "n";
    const std::string x_title = by_n ? "n (inputs)" : (g["kind"] == "cardinality" ? "k (the bound)" : "the bound");
    const std::string against = by_n ? " against n" : " against the bound, n = " + fmt_int(json_u64(g["inputs"]));
    out += growth_chart(c, 1, "Clauses" + against, x_title, budget);
    out += growth_chart(c, 2, "Auxiliary variables" + against, x_title, budget);
  }
  return out + "</div>";
}

std::string cell_range(std::uint64_t lo, std::uint64_t hi) {
  if (lo == hi) return fmt_compact(static_cast<double>(lo));
  return fmt_compact(static_cast<double>(lo)) + "\xe2\x80\x93" + fmt_compact(static_cast<double>(hi));
}

std::string groups_table(const json& data) {
  const json& methods = data["methods"];
  std::string out =
      "<div class=\"table-wrap\"><table class=\"groups\"><thead><tr><th>group</th><th>count</th>"
      "<th>kind</th><th>n</th><th>bound</th><th>coefficients</th>";
  for (const json& m : methods) {
    const std::string name = m["name"].get<std::string>();
    out += "<th class=\"method\" data-method=\"" + html_escape(name) + "\"><i style=\"background:" + color_of(name) +
           "\"></i>" + html_escape(name) + "</th>";
  }
  out += "<th>pick</th><th class=\"num\">group total<br><small>clauses / vars</small></th></tr></thead><tbody>";
  for (const json& g : data["groups"]) {
    const std::vector<std::string> picks = picks_of(g);
    out += "<tr data-group=\"" + std::to_string(json_u64(g["id"])) + "\" data-count=\"" +
           std::to_string(json_u64(g["count"])) + "\" data-kind=\"" + html_escape(g["kind"].get<std::string>()) +
           "\" data-inputs=\"" + std::to_string(json_u64(g["inputs"])) + "\" data-picked-clauses=\"" +
           std::to_string(json_u64(g["picked_clauses"])) + "\" data-picked-vars=\"" +
           std::to_string(json_u64(g["picked_vars"])) + "\">";
    std::string examples;
    for (const json& e : g["examples"]) examples += (examples.empty() ? "" : ", ") + e.get<std::string>();
    if (json_u64(g["count"]) > g["examples"].size()) examples += ", \xe2\x80\xa6";
    out += "<td><b>G" + std::to_string(json_u64(g["id"])) + "</b><div class=\"examples\" title=\"" +
           html_escape(examples) + "\">" + html_escape(examples) + "</div></td>";
    out += "<td class=\"num\">" + fmt_int(json_u64(g["count"])) + "</td>";
    out += "<td>" + html_escape(g["kind"].get<std::string>()) + (g["soft"].get<bool>() ? " <small>soft</small>" : "") +
           "</td>";
    out += "<td class=\"num\">" + fmt_int(json_u64(g["inputs"])) + "</td>";
    out += "<td class=\"num\">" + html_escape(g["relation"].get<std::string>()) + " " +
           std::to_string(g["bound"].get<std::int64_t>()) + "</td>";
    if (g["coefficients"].is_object()) {
      const json& c = g["coefficients"];
      out += "<td class=\"num\">" + std::to_string(c["min"].get<std::int64_t>()) + "\xe2\x80\x93" +
             std::to_string(c["max"].get<std::int64_t>()) + "<small> (" + fmt_int(json_u64(c["distinct"])) +
             " distinct)</small></td>";
    } else {
      out += "<td class=\"num\">1</td>";
    }
    for (const json& m : methods) {
      const std::string name = m["name"].get<std::string>();
      const json* entry = nullptr;
      for (const json& e : g["methods"])
        if (e["name"] == name) entry = &e;
      if (entry == nullptr) {
        out += "<td class=\"na\">\xe2\x80\x93</td>";
        continue;
      }
      const json& e = *entry;
      const bool picked = std::find(picks.begin(), picks.end(), name) != picks.end() && !g["trivial"].get<bool>();
      const bool over = json_u64(e["over_budget"]) != 0;
      out += "<td class=\"cell" + std::string(picked ? " pick" : "") + "\" data-method=\"" + html_escape(name) +
             "\" data-clauses=\"" + std::to_string(json_u64(e["clauses"])) + "\" data-vars=\"" +
             std::to_string(json_u64(e["vars"])) + "\"" + (picked ? " style=\"--c:" + color_of(name) + "\"" : "") +
             " title=\"" +
             html_escape(name + " per constraint: " + fmt_int(json_u64(e["clauses_min"])) +
                         (json_u64(e["clauses_min"]) != json_u64(e["clauses_max"])
                              ? "\xe2\x80\x93" + fmt_int(json_u64(e["clauses_max"]))
                              : "") +
                         " clauses, " + fmt_int(json_u64(e["vars_min"])) +
                         (json_u64(e["vars_min"]) != json_u64(e["vars_max"])
                              ? "\xe2\x80\x93" + fmt_int(json_u64(e["vars_max"]))
                              : "") +
                         " vars; whole group: " + fmt_int(json_u64(e["clauses"])) + " clauses, " +
                         fmt_int(json_u64(e["vars"])) + " vars") +
             "\">" +
             (over ? "<span class=\"over\">over</span>"
                   : cell_range(json_u64(e["clauses_min"]), json_u64(e["clauses_max"]))) +
             "<span class=\"vars\">" + cell_range(json_u64(e["vars_min"]), json_u64(e["vars_max"])) + "</span></td>";
    }
    std::string pick;
    if (g["trivial"].get<bool>()) {
      pick = "(any)";
    } else {
      for (const std::string& p : picks)
        pick += (pick.empty() ? "" : ", ") + p +
                (picks.size() > 1 ? " \xc3\x97" + std::to_string(json_u64(g["picks"][p])) : "");
      if (json_u64(g["unpicked"]) != 0)
        pick +=
            (pick.empty() ? "" : ", ") + std::string("over budget \xc3\x97") + std::to_string(json_u64(g["unpicked"]));
    }
    out += "<td class=\"pick-name\">" + html_escape(pick) + "</td><td class=\"num\">" +
           fmt_int(json_u64(g["picked_clauses"])) + "<span class=\"vars\">" + fmt_int(json_u64(g["picked_vars"])) +
           "</span></td></tr>";
  }
  out += "</tbody></table></div>";
  if (json_u64(data["groups_omitted"]) != 0)
    out += "<p class=\"note\">" + fmt_int(json_u64(data["groups_omitted"])) + " smaller groups (" +
           fmt_int(json_u64(data["constraints_omitted"])) + " constraints) are left out of the table and the data.</p>";
  return out;
}

constexpr std::string_view style = R"css(
:root{--ink:#263238;--muted:#607d8b;--line:#e0e6ea;--bg:#ffffff;--panel:#f7f9fa}
*{box-sizing:border-box}
body{margin:0;background:var(--bg);color:var(--ink);font:14px/1.45 system-ui,-apple-system,"Segoe UI","DejaVu Sans","Liberation Sans",Arial,sans-serif}
main{max-width:1160px;margin:0 auto;padding:24px 20px 48px}
h1{font-size:26px;margin:0 0 4px;font-weight:650;letter-spacing:-.01em}
h1 .file{color:var(--muted);font-weight:500}
h2{font-size:18px;margin:34px 0 6px;padding-top:14px;border-top:1px solid var(--line)}
h3{font-size:15px;margin:22px 0 6px}
p.lead,p.note,p.empty{color:var(--muted);margin:4px 0 10px}
.meta{color:var(--muted);margin-bottom:16px}
.cards{display:flex;gap:12px;margin:14px 0 6px}
.card{flex:1;background:var(--panel);border:1px solid var(--line);border-radius:8px;padding:10px 14px}
.card .label{font-size:12px;color:var(--muted);text-transform:uppercase;letter-spacing:.04em}
.card .value{font-size:24px;font-weight:650;font-variant-numeric:tabular-nums}
.card .note{font-size:12px;color:var(--muted)}
.legend{display:flex;flex-wrap:wrap;gap:6px 16px;margin:8px 0 4px;font-size:12.5px}
.legend .key{display:inline-flex;align-items:center;gap:6px;cursor:default}
.legend i,th.method i{display:inline-block;width:12px;height:12px;border-radius:2px}
svg.chart{display:block;font-size:11px;fill:#37474f}
svg .tick{fill:#607d8b;font-size:10.5px}
svg .axis-title{fill:#455a64;font-size:11.5px}
svg .chart-title{fill:#263238;font-size:13px;font-weight:600}
svg .row-label{fill:#37474f;font-size:12.5px}
svg .bar-label{fill:#37474f;font-size:12px}
svg .strong{font-weight:700;fill:#263238}
svg .group-label{fill:#263238;font-size:12px;font-weight:600}
svg .pick-label{fill:#111;font-size:10px;font-weight:700}
svg .note-text{fill:#607d8b;font-size:10.5px}
svg .budget{fill:#c62828}
.grid{display:grid;grid-template-columns:1fr 1fr;gap:8px 20px}
.dim{opacity:.15}
.table-wrap{overflow-x:auto}
table.groups{border-collapse:collapse;font-size:12px;font-variant-numeric:tabular-nums;width:100%}
table.groups th{font-weight:600;text-align:left;border-bottom:2px solid var(--ink);padding:4px 5px;vertical-align:bottom;white-space:nowrap}
table.groups th.method{writing-mode:vertical-rl;transform:rotate(180deg);text-align:left;padding:6px 3px;font-weight:500}
table.groups th.method i{margin-bottom:4px}
table.groups td{border-bottom:1px solid var(--line);padding:4px 5px;vertical-align:top}
table.groups td.num{text-align:right;white-space:nowrap}
table.groups td.cell{text-align:right;white-space:nowrap}
table.groups td .vars{display:block;color:var(--muted);font-size:10.5px}
table.groups td.pick{background:#fff4cc;font-weight:700;box-shadow:inset 3px 0 0 var(--c)}
table.groups td.na{color:#b0bec5;text-align:center}
table.groups td.pick-name{font-weight:600;max-width:120px;overflow-wrap:anywhere}
table.groups .examples{color:var(--muted);font-size:11px;max-width:130px;overflow:hidden;text-overflow:ellipsis;white-space:nowrap}
.over{color:#c62828;font-weight:600}
footer{margin-top:30px;color:var(--muted);font-size:12px}
)css";

constexpr std::string_view script = R"js(
(function () {
  "use strict";
  var data = JSON.parse(document.getElementById("report-data").textContent);
  var marks = document.querySelectorAll("svg [data-method], td[data-method], th[data-method]");
  function focus(name) {
    for (var i = 0; i < marks.length; ++i) {
      var own = marks[i].getAttribute("data-method");
      if (name && own !== name) marks[i].classList.add("dim"); else marks[i].classList.remove("dim");
    }
  }
  var keys = document.querySelectorAll(".legend .key");
  for (var i = 0; i < keys.length; ++i) {
    keys[i].addEventListener("mouseenter", function (e) { focus(e.currentTarget.getAttribute("data-method")); });
    keys[i].addEventListener("mouseleave", function () { focus(null); });
  }
  var status = document.getElementById("report-status");
  status.setAttribute("data-script", "ran");
  status.setAttribute("data-groups", String(data.groups.length));
  status.setAttribute("data-rows", String(document.querySelectorAll("table.groups tbody tr").length));
})();
)js";

}  // namespace

std::string_view report_color(method_id id) noexcept {
  for (std::size_t i = 0; i < std::size(method_table); ++i)
    if (method_table[i].id == id) return palette[i % std::size(palette)];
  return picked_color;
}

std::string html_escape(std::string_view s) {
  std::string out;
  out.reserve(s.size());
  const auto replacement = "\xef\xbf\xbd";
  for (std::size_t i = 0; i < s.size();) {
    const auto c = static_cast<unsigned char>(s[i]);
    if (c < 0x80) {
      switch (c) {
        case '&':
          out += "&amp;";
          break;
        case '<':
          out += "&lt;";
          break;
        case '>':
          out += "&gt;";
          break;
        case '"':
          out += "&quot;";
          break;
        case '\'':
          out += "&#39;";
          break;
        default:
          if ((c < 0x20 && c != '\t' && c != '\n') || c == 0x7f)
            out += replacement;
          else
            out += static_cast<char>(c);
      }
      ++i;
      continue;
    }
    // A well-formed UTF-8 sequence is copied; anything else becomes U+FFFD.
    std::size_t length = 0;
    std::uint32_t code = 0;
    if (c >= 0xc2 && c <= 0xdf) {
      length = 2;
      code = c & 0x1fU;
    } else if (c >= 0xe0 && c <= 0xef) {
      length = 3;
      code = c & 0x0fU;
    } else if (c >= 0xf0 && c <= 0xf4) {
      length = 4;
      code = c & 0x07U;
    }
    bool valid = length != 0 && i + length <= s.size();
    for (std::size_t k = 1; valid && k < length; ++k) {
      const auto d = static_cast<unsigned char>(s[i + k]);
      valid = (d & 0xc0U) == 0x80;
      code = (code << 6U) | (d & 0x3fU);
    }
    const std::uint32_t least[] = {0, 0, 0x80, 0x800, 0x10000};
    valid = valid && code >= least[length] && code <= 0x10ffff && (code < 0xd800 || code > 0xdfff);
    if (valid) {
      out.append(s.substr(i, length));
      i += length;
    } else {
      out += replacement;
      ++i;
    }
  }
  return out;
}

std::string script_safe_json(const nlohmann::ordered_json& data) {
  const std::string text = data.dump(-1, ' ', true, nlohmann::ordered_json::error_handler_t::replace);
  std::string out;
  out.reserve(text.size());
  for (const char c : text) {
    // Only inside strings: JSON has these characters nowhere else.
    if (c == '<')
      out += "\\u003c";
    else if (c == '>')
      out += "\\u003e";
    else if (c == '&')
      out += "\\u0026";
    else
      out += c;
  }
  return out;
}

std::string render_report_html(const nlohmann::ordered_json& data) {
  const std::string model = data["model"].is_string() ? data["model"].get<std::string>() : "";
  std::string out;
  out.reserve(1 << 16);
  out +=
      "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
      "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
      "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'; "
      "script-src 'unsafe-inline'; img-src data:\">"
      "<title>clausewright report: " +
      html_escape(model) + "</title><style>" + std::string(style) + "</style></head><body><main>";
  out += "<h1>Encoding report <span class=\"file\">" + html_escape(model) + "</span></h1>";
  std::size_t non_trivial = 0;
  for (const json& g : data["groups"])
    if (!g["trivial"].get<bool>()) ++non_trivial;
  out += "<div class=\"meta\">" + fmt_int(json_u64(data["constraints"])) + " constraints in " +
         fmt_int(data["groups"].size() + json_u64(data["groups_omitted"])) + " groups of one shape (" +
         fmt_int(non_trivial) + " beyond single clauses) \xc2\xb7 " + fmt_int(json_u64(data["user_variables"])) +
         " variables \xc2\xb7 policy " + html_escape(data["policy"].get<std::string>()) + " \xc2\xb7 budget " +
         fmt_int(json_u64(data["budget"])) + " clauses per dry run" +
         (data["full_equivalence"].get<bool>() ? " \xc2\xb7 full equivalence" : "") + "</div>";
  out += summary(data);

  out +=
      "<h2>Blow-up per method</h2><p class=\"lead\">The whole model under the picked method of each constraint, "
      "and under each method alone (constraints it cannot encode fall back to the policy). Hatched: some dry run "
      "passed the budget, so the size is at least this.</p>";
  out += legend(data["methods"], true);
  out += totals_chart(data);

  out +=
      "<h2>Clauses per constraint group</h2><p class=\"lead\">Constraints of one shape (kind, relation, bound, "
      "inputs and multiset of coefficients) form a group; bars are the clauses of the whole group under each "
      "method, the outlined bar with the marker is the method the policy picked. The " +
      std::to_string(chart_groups) + " largest groups are drawn; the table below lists all.</p>";
  out += legend(data["methods"], false);
  out += groups_chart(data);

  out +=
      "<h2>Growth</h2><p class=\"lead\">Each method on the shapes of the largest groups, scaled: n' = n\xc2\xb7s "
      "for s a geometric series (coefficients drawn from the group's own in the same order, the bound in the same "
      "ratio to their sum), then the bound varied with n fixed. Sizes by dry run; a curve stops (\xc3\x97) where a "
      "run passes the curve budget of " +
      fmt_int(json_u64(data["curve_budget"])) + " clauses.</p>";
  out += legend(data["methods"], false);
  out += curves_section(data);

  out +=
      "<h2>Constraint groups</h2><p class=\"lead\">Per constraint: clauses (above) and auxiliary variables (below) "
      "of each method; a range where the group's constraints differ (order of coefficients, units). Highlighted: "
      "the pick.</p>";
  out += groups_table(data);

  out +=
      "<footer>Written by clausewright report. Sizes are exact counts of dry runs of the encodings (the numbers "
      "of <code>clausewright stats --json</code>); no solver was run. <span id=\"report-status\" "
      "data-script=\"not-run\"></span></footer>";
  out += "</main><script type=\"application/json\" id=\"report-data\">" + script_safe_json(data) + "</script>";
  out += "<script>" + std::string(script) + "</script></body></html>\n";
  return out;
}

}  // namespace clausewright::tool
