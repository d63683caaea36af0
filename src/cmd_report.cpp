// clausewright report MODEL -o FILE.html [--pick POLICY] [--method NAME]... [--budget N]
//                                        [--curve-budget N] [--curves G] [--full-equivalence]
//
// One self-contained HTML page (inline SVG, nothing fetched) that shows where
// a model's CNF comes from: the totals per method against the model file's
// size (the blow-up factor), the clauses of each group of constraints of one
// shape under each method with the pick marked, growth curves of the methods
// on the model's own shapes scaled up and down, and the table of groups. The
// numbers are those of `stats --json` (the same measuring code, see
// stats_data.hpp); the curves are dry runs of the library (cw::measure, which
// uses cw::predict_size to skip runs a closed form puts past the budget).
// Page layout and data block: docs/report.md.
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <filesystem>
#include <map>
#include <memory>
#include <string>
#include <system_error>
#include <tuple>
#include <vector>

#include <clausewright/io.hpp>
#include <clausewright/select.hpp>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "model_file.hpp"
#include "report_html.hpp"
#include "stats_data.hpp"

namespace clausewright::tool {

namespace {

using json = nlohmann::ordered_json;

struct report_request {
  std::string model;
  std::string output;
  std::string pick = std::string(to_string(default_policy));
  std::vector<std::string> methods;
  std::uint64_t budget = default_clause_budget;
  std::uint64_t curve_budget = 1'000'000;
  std::size_t curve_groups = 3;
  bool full_equivalence = false;
};

// Constraints of one shape have the same size under every method up to the
// order of their coefficients (which BDDs and totalizers of weights see):
// kind, relation and bound after normalisation, number of inputs, the
// multiset of coefficients, and whether the constraint is soft (a soft one
// adds its relaxation variable and soft unit).
struct shape_key {
  constraint_kind kind = constraint_kind::constant_true;
  relation rel = relation::le;
  std::int64_t bound = 0;
  std::size_t inputs = 0;
  bool soft = false;
  std::vector<std::int64_t> coefficients;  // sorted; empty for unit coefficients

  bool operator<(const shape_key& o) const {
    return std::tie(kind, rel, bound, inputs, soft, coefficients) <
           std::tie(o.kind, o.rel, o.bound, o.inputs, o.soft, o.coefficients);
  }
};

struct shape_group {
  shape_key key;
  normalized_constraint example;  // the first constraint of the group, as normalised
};

// Second pass over the model: the shape of every constraint.
class shape_collector final : public model_handler {
 public:
  void begin(const model_header& h) override { pool_.reserve_user(h.variables); }
  literal product(std::span<const literal> /*factors*/) override { return pool_.fresh(); }
  void objective(std::span<const term> /*terms*/, source_position /*where*/) override {}
  void constraint(const constraint_view& v) override {
    normalized_constraint c = normalize_view(v);
    shape_key key;
    key.kind = c.kind;
    key.rel = c.rel;
    key.bound = c.bound;
    key.inputs = c.size();
    key.soft = v.soft();
    if (!c.unit_coefficients()) {
      key.coefficients = c.coefficients;
      std::sort(key.coefficients.begin(), key.coefficients.end());
    }
    const auto [it, inserted] = index_.try_emplace(std::move(key), groups_.size());
    if (inserted) groups_.push_back({it->first, std::move(c)});
    group_of_.push_back(it->second);
  }

  [[nodiscard]] const std::vector<shape_group>& groups() const noexcept { return groups_; }
  [[nodiscard]] const std::vector<std::size_t>& group_of() const noexcept { return group_of_; }

 private:
  variable_pool pool_;
  std::map<shape_key, std::size_t> index_;
  std::vector<shape_group> groups_;
  std::vector<std::size_t> group_of_;  // per constraint, in file order
};

[[nodiscard]] bool trivial_kind(constraint_kind k) noexcept {
  return k == constraint_kind::constant_true || k == constraint_kind::constant_false || k == constraint_kind::clause;
}

// Sums of one method over the constraints of a group.
struct method_sum {
  std::uint64_t clauses = 0;
  std::uint64_t vars = 0;
  std::uint64_t bytes = 0;
  std::uint64_t clauses_min = UINT64_MAX;
  std::uint64_t clauses_max = 0;
  std::uint64_t vars_min = UINT64_MAX;
  std::uint64_t vars_max = 0;
  std::uint64_t over_budget = 0;  // constraints whose dry run passed the budget
  std::uint64_t count = 0;
  bool bytes_known = true;  // stats leaves the bytes of large or stopped encodings unmeasured (null)

  void add(const json& m) {
    const std::uint64_t c = json_u64(m["clauses"]);
    const std::uint64_t v = json_u64(m["vars"]);
    clauses += c;
    vars += v;
    bytes += json_u64(m["dimacs_bytes"]);
    if (!m["dimacs_bytes"].is_number()) bytes_known = false;
    clauses_min = std::min(clauses_min, c);
    clauses_max = std::max(clauses_max, c);
    vars_min = std::min(vars_min, v);
    vars_max = std::max(vars_max, v);
    if (m["over_budget"].get<bool>()) ++over_budget;
    ++count;
  }
};

struct group_sum {
  std::uint64_t count = 0;
  std::vector<std::string> examples;  // labels of the first few constraints
  std::map<std::string, method_sum> methods;
  std::map<std::string, std::uint64_t> picks;
  std::uint64_t picked_clauses = 0;
  std::uint64_t picked_vars = 0;
  std::uint64_t unpicked = 0;  // constraints every method of which passed the budget
};

const json* method_entry(const json& constraint, const std::string& name) {
  for (const json& m : constraint["methods"])
    if (m["name"].get<std::string>() == name) return &m;
  return nullptr;
}

// Scales the example of a group: n' inputs keeping the coefficient
// distribution (coefficient i' is the one at the same relative position in
// the example), the bound in proportion to the sum of the coefficients (to n
// for cardinality constraints; 1 stays 1 for at-most-one and exactly-one).
[[nodiscard]] normalized_constraint scale_inputs(const normalized_constraint& c, std::size_t n_scaled) {
  const std::size_t n = c.size();
  std::vector<term> terms(n_scaled);
  std::int64_t sum = 0;
  for (std::size_t i = 0; i < n_scaled; ++i) {
    const std::size_t from = i * n / n_scaled;
    terms[i] = {c.coefficients[from], literal(static_cast<std::int32_t>(i + 1))};
    sum += terms[i].coefficient;
  }
  std::int64_t bound = c.bound;
  if (c.kind == constraint_kind::cardinality || c.kind == constraint_kind::linear) {
    const double ratio = static_cast<double>(c.bound) / static_cast<double>(c.coefficient_sum());
    bound =
        std::clamp<std::int64_t>(std::llround(ratio * static_cast<double>(sum)), 1, std::max<std::int64_t>(sum - 1, 1));
  }
  return normalize(terms, c.rel, bound, c.index, c.name);
}

// The example with another bound.
[[nodiscard]] normalized_constraint with_bound(const normalized_constraint& c, std::int64_t bound) {
  std::vector<term> terms(c.size());
  for (std::size_t i = 0; i < c.size(); ++i) terms[i] = {c.coefficients[i], literal(static_cast<std::int32_t>(i + 1))};
  return normalize(terms, c.rel, bound, c.index, c.name);
}

struct curve_series {
  method_id method = method_id::pairwise;
  json points = json::array();  // [x, clauses, vars]
  std::optional<std::int64_t> cut_at;
};

// Dry runs of every method that encodes the example, at each x in `xs`
// (increasing); a method whose run passes the budget is cut there.
template <class Make>
json curve(const normalized_constraint& example, const std::vector<std::int64_t>& xs, const Make& make,
           const report_request& r, const encode_options& options) {
  std::vector<curve_series> series;
  for (const auto& m : method_table)
    if (can_encode(m.id, example)) series.push_back({m.id, json::array(), std::nullopt});
  for (const std::int64_t x : xs) {
    bool alive = false;
    for (const auto& s : series) alive = alive || !s.cut_at;
    if (!alive) break;
    const normalized_constraint c = make(x);
    variable_pool pool;
    pool.reserve_user(static_cast<std::int32_t>(std::max<std::size_t>(c.size(), example.size())));
    for (auto& s : series) {
      if (s.cut_at || !can_encode(s.method, c)) continue;
      const method_measurement m = measure(s.method, pool, c, options, r.curve_budget);
      if (m.over_budget) {
        s.cut_at = x;
        continue;
      }
      s.points.push_back(json::array({x, m.size.clauses, m.size.variables}));
    }
  }
  json out = json::array();
  for (const auto& s : series) {
    json j;
    j["method"] = std::string(info(s.method).name);
    j["points"] = s.points;
    j["cut_at"] = s.cut_at ? json(*s.cut_at) : json(nullptr);
    out.push_back(std::move(j));
  }
  return out;
}

// A geometric series of factors 2^(j/2) applied to `base`, rounded, kept in
// [lo, hi], without repeats, and with `base` itself.
[[nodiscard]] std::vector<std::int64_t> geometric(std::int64_t base, int j_min, int j_max, std::int64_t lo,
                                                  std::int64_t hi) {
  std::vector<std::int64_t> xs;
  for (int j = j_min; j <= j_max; ++j) {
    const auto x = static_cast<std::int64_t>(std::llround(static_cast<double>(base) * std::exp2(j / 2.0)));
    if (x >= lo && x <= hi) xs.push_back(x);
  }
  if (base >= lo && base <= hi) xs.push_back(base);
  std::sort(xs.begin(), xs.end());
  xs.erase(std::unique(xs.begin(), xs.end()), xs.end());
  return xs;
}

json growth_curves(const shape_group& g, std::size_t id, const report_request& r, const encode_options& options) {
  const normalized_constraint& c = g.example;
  json out = json::array();
  const auto n = static_cast<std::int64_t>(c.size());
  // Against n: 1/16 to 256 times the inputs, at most 2^20.
  const std::vector<std::int64_t> ns = geometric(n, -8, 16, 2, std::int64_t{1} << 20);
  json by_n;
  by_n["group"] = id;
  by_n["axis"] = "n";
  by_n["own"] = n;
  by_n["series"] = curve(
      c, ns, [&](std::int64_t x) { return x == n ? c : scale_inputs(c, static_cast<std::size_t>(x)); }, r, options);
  out.push_back(std::move(by_n));
  if (c.kind == constraint_kind::cardinality || c.kind == constraint_kind::linear) {
    // Against the bound, n fixed: every value the series reaches below the
    // sum of the coefficients.
    const std::int64_t top = std::max<std::int64_t>(c.coefficient_sum() - 1, 1);
    const std::vector<std::int64_t> bounds = geometric(c.bound, -40, 40, 1, top);
    json by_bound;
    by_bound["group"] = id;
    by_bound["axis"] = "bound";
    by_bound["own"] = c.bound;
    by_bound["series"] = curve(
        c, bounds, [&](std::int64_t b) { return b == c.bound ? c : with_bound(c, b); }, r, options);
    out.push_back(std::move(by_bound));
  }
  return out;
}

std::string label_of(const json& constraint) {
  if (constraint["name"].is_string()) return constraint["name"].get<std::string>();
  return "#" + std::to_string(constraint["index"].get<std::uint64_t>());
}

json page_data(const report_request& r, const json& stats, const shape_collector& shapes,
               std::optional<std::uint64_t> model_bytes, const encode_options& options) {
  const json& constraints = stats["constraints"];
  const auto& group_of = shapes.group_of();
  if (constraints.size() != group_of.size())
    throw error(error_id::usage, "internal: the statistics and the shapes disagree on the number of constraints");

  // Groups, and DIMACS bytes of the picked encoding and of each method alone
  // (stats totals the clauses, not the bytes).
  std::vector<group_sum> groups(shapes.groups().size());
  std::map<std::string, bool> shown;  // methods that apply to some constraint that is not a single clause
  for (std::size_t i = 0; i < constraints.size(); ++i) {
    const json& c = constraints[i];
    group_sum& g = groups[group_of[i]];
    const bool trivial = trivial_kind(shapes.groups()[group_of[i]].key.kind);
    if (g.examples.size() < 3) g.examples.push_back(label_of(c));
    ++g.count;
    for (const json& m : c["methods"]) {
      g.methods[m["name"].get<std::string>()].add(m);
      if (!trivial) shown[m["name"].get<std::string>()] = true;
    }
    // A constant or a single clause needs no method (picked is null): every
    // method writes it alike, the first entry stands for them.
    const json* picked = c["picked"].is_string()            ? method_entry(c, c["picked"].get<std::string>())
                         : trivial && !c["methods"].empty() ? &c["methods"][0]
                                                            : nullptr;
    if (picked != nullptr) {
      if (c["picked"].is_string()) ++g.picks[c["picked"].get<std::string>()];
      g.picked_clauses += json_u64((*picked)["clauses"]);
      g.picked_vars += json_u64((*picked)["vars"]);
    } else {
      ++g.unpicked;
    }
  }

  json data;
  data["model"] = stats["model"];
  data["model_bytes"] = model_bytes ? json(*model_bytes) : json(nullptr);
  data["policy"] = stats["policy"];
  data["budget"] = stats["budget"];
  data["curve_budget"] = std::min(r.curve_budget, r.budget);
  data["full_equivalence"] = stats["full_equivalence"];
  data["user_variables"] = stats["user_variables"];
  data["constraints"] = constraints.size();
  data["products"] = stats["products"];
  data["objective"] = stats["objective"];

  json methods = json::array();
  for (const auto& m : method_table) {
    if (!shown.contains(std::string(m.name))) continue;
    json j;
    j["name"] = std::string(m.name);
    j["color"] = std::string(report_color(m.id));
    j["arc_consistent"] = m.arc_consistent;
    methods.push_back(std::move(j));
  }
  data["methods"] = std::move(methods);

  // Bytes: the exact size of the CNF output past its header (stats counts
  // them at each output's own numbering); null where a method was stopped.
  const auto total_entry = [&](const std::string& name, const json& t) {
    const bool known = t["cnf"]["bytes"].is_number();
    const std::uint64_t bytes = json_u64(t["cnf"]["bytes"]);
    json j;
    j["name"] = name;
    j["clauses"] = t["clauses"];
    j["vars"] = t["vars"];
    j["literals"] = t["literals"];
    j["cnf"] = t["cnf"];
    j["wcnf"] = t["wcnf"];
    j["over_budget"] = t["over_budget"];
    j["fallbacks"] = t["fallbacks"];
    j["dimacs_bytes"] = known ? json(bytes) : json(nullptr);
    if (model_bytes && *model_bytes > 0) {
      j["blowup_bytes"] = known ? json(static_cast<double>(bytes) / static_cast<double>(*model_bytes)) : json(nullptr);
      j["clauses_per_model_byte"] = static_cast<double>(json_u64(t["clauses"])) / static_cast<double>(*model_bytes);
    } else {
      j["blowup_bytes"] = nullptr;
      j["clauses_per_model_byte"] = nullptr;
    }
    return j;
  };
  json totals = json::array();
  totals.push_back(total_entry("picked", stats["totals"]["picked"]));
  for (const json& t : stats["totals"]["by_method"]) {
    const std::string name = t["name"].get<std::string>();
    if (shown.contains(name)) totals.push_back(total_entry(name, t));
  }
  data["totals"] = std::move(totals);

  // Groups, largest picked encoding first.
  std::vector<std::size_t> order(groups.size());
  for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
  std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
    if (groups[a].picked_clauses != groups[b].picked_clauses)
      return groups[a].picked_clauses > groups[b].picked_clauses;
    return groups[a].count > groups[b].count;
  });
  // A page of a model whose every constraint has its own shape stays small:
  // the largest groups only (the totals above cover all constraints).
  constexpr std::size_t max_groups = 500;
  std::uint64_t constraints_omitted = 0;
  for (std::size_t rank = max_groups; rank < order.size(); ++rank) constraints_omitted += groups[order[rank]].count;
  data["groups_omitted"] = order.size() > max_groups ? order.size() - max_groups : 0;
  data["constraints_omitted"] = constraints_omitted;
  json group_list = json::array();
  for (std::size_t rank = 0; rank < order.size() && rank < max_groups; ++rank) {
    const std::size_t gi = order[rank];
    const group_sum& g = groups[gi];
    const shape_key& key = shapes.groups()[gi].key;
    const normalized_constraint& example = shapes.groups()[gi].example;
    json j;
    j["id"] = rank + 1;
    j["count"] = g.count;
    j["kind"] = std::string(to_string(key.kind));
    j["relation"] = std::string(to_string(key.rel));
    j["bound"] = key.bound;
    j["inputs"] = key.inputs;
    j["soft"] = key.soft;
    j["trivial"] = trivial_kind(key.kind);
    if (!key.coefficients.empty()) {
      std::vector<std::int64_t> distinct = key.coefficients;
      distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
      j["coefficients"] = {{"min", key.coefficients.front()},
                           {"max", key.coefficients.back()},
                           {"distinct", distinct.size()},
                           {"sum", example.coefficient_sum()}};
    } else {
      j["coefficients"] = nullptr;
    }
    j["examples"] = g.examples;
    json ms = json::array();
    for (const auto& m : method_table) {
      const auto it = g.methods.find(std::string(m.name));
      if (it == g.methods.end()) continue;
      const method_sum& s = it->second;
      json e;
      e["name"] = std::string(m.name);
      e["clauses"] = s.clauses;
      e["vars"] = s.vars;
      e["dimacs_bytes"] = s.bytes_known ? json(s.bytes) : json(nullptr);
      e["clauses_min"] = s.clauses_min;
      e["clauses_max"] = s.clauses_max;
      e["vars_min"] = s.vars_min;
      e["vars_max"] = s.vars_max;
      e["over_budget"] = s.over_budget;
      ms.push_back(std::move(e));
    }
    j["methods"] = std::move(ms);
    j["picks"] = g.picks;
    j["picked_clauses"] = g.picked_clauses;
    j["picked_vars"] = g.picked_vars;
    j["unpicked"] = g.unpicked;
    group_list.push_back(std::move(j));
  }

  // Growth curves of the largest groups that are more than a single clause.
  json curves = json::array();
  std::size_t drawn = 0;
  for (std::size_t rank = 0; rank < order.size() && drawn < r.curve_groups; ++rank) {
    const shape_group& g = shapes.groups()[order[rank]];
    if (trivial_kind(g.key.kind) || g.example.size() < 2) continue;
    for (json& c : growth_curves(g, rank + 1, r, options)) curves.push_back(std::move(c));
    ++drawn;
  }
  data["groups"] = std::move(group_list);
  data["curves"] = std::move(curves);
  return data;
}

int run_report(const report_request& r) {
  model_encoding_settings settings;
  settings.policy = policy_from_name(r.pick);
  settings.methods = methods_from_names(r.methods);
  settings.clause_budget = r.budget;
  settings.options.full_equivalence = r.full_equivalence;
  report_request curves = r;
  curves.curve_budget = std::min(r.curve_budget, r.budget);

  model_stream in(r.model);
  const json stats = stats_document(in, settings);
  shape_collector shapes;
  in.run(shapes);

  std::optional<std::uint64_t> model_bytes;
  if (r.model != "-") {
    std::error_code ec;
    const auto size = std::filesystem::file_size(r.model, ec);
    if (!ec) model_bytes = size;
  }
  const json data = page_data(curves, stats, shapes, model_bytes, settings.options);
  const std::string html = render_report_html(data);

  atomic_file_output file(r.output);
  file.write(html.data(), html.size());
  file.commit();
  return exit_success;
}

}  // namespace

void register_report(CLI::App& app, command_context& context) {
  auto* cmd = app.add_subcommand("report",
                                 "Write a self-contained HTML page of the model's encoding sizes: blow-up per method, "
                                 "clauses per group of constraints, growth curves, the table of groups");
  auto r = std::make_shared<report_request>();
  cmd->add_option("MODEL", r->model, "Model file (.opb or .json, else by content), or - for standard input")
      ->required();
  cmd->add_option("-o,--output", r->output, "The HTML file to write")->required();
  cmd->add_option("--pick", r->pick, "Selection policy: smallest, smallest-arc-consistent, balanced (default)");
  cmd->add_option("--method", r->methods, "As for encode: the methods to use where they apply (repeatable)")
      ->allow_extra_args(false);
  cmd->add_option("--budget", r->budget, "Clause budget of each dry run of the statistics (default 50000000)");
  cmd->add_option("--curve-budget", r->curve_budget,
                  "Clause budget of each dry run of the growth curves; a curve stops there (default 1000000)");
  cmd->add_option("--curves", r->curve_groups, "Groups to draw growth curves for, largest first (default 3)");
  cmd->add_flag("--full-equivalence", r->full_equivalence, "Measure with auxiliary variables defined both ways");
  cmd->callback([&context, r] { context.exit_code = run_report(*r); });
}

}  // namespace clausewright::tool
