// clausewright stats MODEL [--json] [--pick POLICY] [--method NAME]... [--budget N]
//
// For every constraint and every method that can encode it: the exact size
// of the encoding, from the pipeline's measurer (a closed form, or a dry run
// of the very routine `encode` uses into a counting sink, so the numbers are
// what `encode --method NAME` writes); the method the policy picks; and per
// model the totals for the picked methods and under each single method.
// Constraints of one shape are measured once. A dry run is stopped where
// its method can no longer be picked (but not before `stats_floor` clauses)
// or at the clause budget, and is shown as "more than N clauses"; totals
// with such a method are lower bounds and say so. Schema:
// docs/stats-format.md.
#include <cstdio>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <clausewright/io.hpp>
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "model_file.hpp"
#include "stats_data.hpp"

namespace clausewright::tool {

namespace {

using json = nlohmann::ordered_json;

struct stats_request {
  std::string model;
  bool as_json = false;
  std::string pick = std::string(to_string(default_policy));
  std::vector<std::string> methods;
  std::uint64_t budget = default_clause_budget;
  bool full_equivalence = false;
};

// Dry runs of the statistics go on to this many clauses at least, so small
// constraints show every method in full.
constexpr std::uint64_t stats_floor = std::uint64_t{1} << 16;

struct method_row {
  method_id id = method_id::pairwise;
  encoding_size size;        // when over_budget: more than size.clauses clauses
  bool over_budget = false;  // stopped (cannot be picked, or past the budget)
  double seconds = 0;
  std::optional<std::uint64_t> bytes;  // DIMACS bytes (not counted past the floor)
};

struct constraint_row {
  std::size_t index = 0;
  std::string name;
  source_position position;
  constraint_form form = constraint_form::linear;
  constraint_kind kind = constraint_kind::constant_true;
  relation rel = relation::le;
  std::int64_t bound = 0;
  std::size_t terms = 0;
  std::size_t inputs = 0;
  std::int64_t weight = 0;
  std::vector<method_row> methods;
  std::optional<method_id> picked;  // empty: every applicable method passed the budget
  bool trivial = false;             // a constant or a single clause: every method writes the same
};

// A model's size as one encoding would write it.
struct total {
  std::uint64_t vars = 0;       // auxiliary variables of the constraints (relaxation literals included)
  std::uint64_t clauses = 0;    // clauses of the constraints (soft units of soft constraints included)
  std::uint64_t literals = 0;   // literal occurrences in them
  std::uint64_t hard_vars = 0;  // the part of hard constraints (what CNF output has)
  std::uint64_t hard_clauses = 0;
  std::uint64_t fallbacks = 0;  // constraints the method cannot encode, encoded as the policy says
  bool over_budget = false;

  void add(const method_row& m, bool soft) {
    vars += m.size.variables;
    clauses += m.size.clauses;
    literals += m.size.literals;
    over_budget = over_budget || m.over_budget;
    if (!soft) {
      hard_vars += m.size.variables;
      hard_clauses += m.size.clauses;
    }
  }
};

// DIMACS bytes of everything written into it.
class byte_counting_sink {
 public:
  void add_clause(std::span<const literal> clause) {
    bytes_ += 2;  // "0\n"
    for (const literal l : clause) bytes_ += decimal_width(l.dimacs()) + 1;
  }
  // As in CNF: the clause alone.
  void add_soft_clause(std::int64_t /*weight*/, std::span<const literal> clause) { add_clause(clause); }
  [[nodiscard]] std::uint64_t bytes() const noexcept { return bytes_; }

 private:
  std::uint64_t bytes_ = 0;
};

class stats_collector final : public model_handler {
 public:
  explicit stats_collector(model_encoding_settings settings) : settings_(std::move(settings)), groups_(settings_) {
    for (const auto& m : method_table) by_method_.emplace(m.id, total{});
  }

  void begin(const model_header& h) override {
    pool_.reserve_user(h.variables);
    user_variables_ = h.variables;
    file_ = std::string(h.file);
  }
  literal product(std::span<const literal> factors) override {
    ++products_;
    product_clauses_ += factors.size() + 1;
    product_literals_ += 3 * factors.size() + 1;
    return pool_.fresh();
  }
  void objective(std::span<const term> terms, source_position /*where*/) override {
    has_objective_ = true;
    for (const term& t : terms)
      if (t.coefficient != 0) ++objective_units_;
  }
  void constraint(const constraint_view& v) override {
    normalized_constraint c = normalize_view(v);
    groups_.see(c, v.soft());
    constraint_row row;
    row.index = v.index;
    row.name = std::string(v.name);
    row.position = v.position;
    row.form = v.form;
    row.kind = c.kind;
    row.rel = c.rel;
    row.bound = c.bound;
    row.terms = v.terms.size();
    row.inputs = c.size();
    row.weight = v.weight;
    row.trivial = c.is_constant() || c.kind == constraint_kind::clause;
    const std::vector<method_measurement>& measured = chooser_.measurements(pool_, c, settings_, stats_floor);
    const bool cached = chooser_.last_cached();
    for (const method_measurement& m : measured) row.methods.push_back(to_row(m, c, v.weight, cached));
    const auto row_of = [&row](method_id id) -> const method_row& {
      for (const auto& m : row.methods)
        if (m.id == id) return m;
      throw error(error_id::usage, "internal: no measurement of a chosen method");
    };
    // What encode would use; stats reports a constraint no method fits in
    // the budget instead of stopping there.
    const auto chosen = [&](const model_encoding_settings& s) -> std::optional<method_id> {
      try {
        const std::optional<method_id> m = choose_method(v, c, s, pool_, &chooser_);
        return m ? *m : pick(measured, s.policy, c);
      } catch (const error& e) {
        if (e.id() != error_id::over_budget) throw;
        return std::nullopt;
      }
    };
    row.picked = chosen(settings_);
    if (row.picked) {
      picked_.add(row_of(*row.picked), v.soft());
    } else {
      picked_.over_budget = true;
    }
    model_encoding_settings single = settings_;
    single.method_rules.clear();
    for (auto& [id, t] : by_method_) {
      single.methods.assign(1, id);
      const std::optional<method_id> used = chosen(single);
      if (!used) {
        t.over_budget = true;
        continue;
      }
      t.add(row_of(*used), v.soft());
      if (*used != id && !row.trivial) ++t.fallbacks;
    }
    // Later constraints see the variables the picked method takes.
    if (row.picked && !row_of(*row.picked).over_budget)
      (void)pool_.fresh_block(static_cast<std::int64_t>(row_of(*row.picked).size.variables));
    rows_.push_back(std::move(row));
  }

  [[nodiscard]] json to_json(const stats_request& r) const {
    json out;
    out["model"] = file_;
    out["policy"] = std::string(to_string(settings_.policy));
    out["budget"] = settings_.clause_budget;
    out["full_equivalence"] = settings_.options.full_equivalence;
    out["user_variables"] = user_variables_;
    out["products"] = {{"count", products_}, {"clauses", product_clauses_}, {"literals", product_literals_}};
    out["objective"] = {{"present", has_objective_}, {"soft_clauses", objective_units_}};
    json constraints = json::array();
    for (const auto& row : rows_) {
      json c;
      c["index"] = row.index;
      c["name"] = row.name.empty() ? json(nullptr) : json(row.name);
      c["line"] = row.position.line;
      c["column"] = row.position.column;
      c["form"] = std::string(to_string(row.form));
      c["kind"] = std::string(to_string(row.kind));
      c["relation"] = std::string(to_string(row.rel));
      c["bound"] = row.bound;
      c["terms"] = row.terms;
      c["inputs"] = row.inputs;
      c["soft"] = row.weight > 0;
      c["weight"] = row.weight;
      json methods = json::array();
      for (const auto& m : row.methods) {
        json j;
        j["name"] = std::string(info(m.id).name);
        j["vars"] = m.size.variables;
        j["clauses"] = m.size.clauses;
        j["literals"] = m.size.literals;
        j["longest_clause"] = m.size.longest_clause;
        j["dimacs_bytes"] = m.bytes ? json(*m.bytes) : json(nullptr);
        j["seconds"] = m.seconds;
        j["arc_consistent"] = info(m.id).arc_consistent;
        j["over_budget"] = m.over_budget;
        methods.push_back(std::move(j));
      }
      c["methods"] = std::move(methods);
      c["picked"] = row.picked ? json(std::string(info(*row.picked).name)) : json(nullptr);
      constraints.push_back(std::move(c));
    }
    out["constraints"] = std::move(constraints);
    json totals;
    totals["picked"] = total_json(picked_);
    json by = json::array();
    for (const auto& m : method_table) {
      json j = total_json(by_method_.at(m.id));
      j["name"] = std::string(m.name);
      by.push_back(std::move(j));
    }
    totals["by_method"] = std::move(by);
    out["totals"] = std::move(totals);
    (void)r;
    return out;
  }

  void print_table() const {
    // Columns for the methods that apply to some constraint.
    std::vector<method_id> shown;
    for (const auto& m : method_table) {
      bool used = false;
      for (const auto& row : rows_)
        for (const auto& mr : row.methods) used = used || (mr.id == m.id && !row.trivial);
      if (used) shown.push_back(m.id);
    }
    out_printf("model %s: %d variables, %zu constraints", file_.c_str(), user_variables_, rows_.size());
    if (products_ != 0) out_printf(", %llu products", static_cast<unsigned long long>(products_));
    out_printf("; policy %s\n", std::string(to_string(settings_.policy)).c_str());
    out_printf(
        "cells: clauses/auxiliary variables of each method ('-' does not apply, '>N' stopped after N clauses:\n"
        "it cannot be picked, or passed the budget)\n\n");
    out_printf("%-24s %-12s %7s", "constraint", "kind", "lits");
    for (const method_id id : shown) out_printf(" %*s", column_width(id), std::string(info(id).name).c_str());
    out_printf("  picked\n");
    for (const auto& row : rows_) {
      std::string label = "#" + std::to_string(row.index);
      if (!row.name.empty()) label += " " + row.name;
      if (row.weight > 0) label += " [soft " + std::to_string(row.weight) + "]";
      if (label.size() > 24) label = label.substr(0, 23) + "~";
      out_printf("%-24s %-12s %7zu", label.c_str(), std::string(to_string(row.kind)).c_str(), row.inputs);
      for (const method_id id : shown) {
        std::string cell = "-";
        for (const auto& mr : row.methods)
          if (mr.id == id) {
            cell = std::to_string(mr.size.clauses);
            // Appended, not ">" + to_string(n): g++ 12 warns falsely (-Wrestrict) on that.
            if (mr.over_budget) {
              cell.insert(cell.begin(), '>');
            } else {
              cell += '/';
              cell += std::to_string(mr.size.variables);
            }
          }
        out_printf(" %*s", column_width(id), cell.c_str());
      }
      out_printf("  %s\n", !row.picked   ? "(over budget)"
                            : row.trivial ? "(any)"
                                          : std::string(info(*row.picked).name).c_str());
    }
    out_printf(
        "\ntotals (constraints only; products add %llu clauses and %llu variables, the objective %llu soft "
        "clauses in WCNF)\n",
        static_cast<unsigned long long>(product_clauses_), static_cast<unsigned long long>(products_),
        static_cast<unsigned long long>(objective_units_));
    out_printf("  %-28s %14s %14s %16s\n", "", "clauses", "aux variables", "literals");
    print_total("picked", picked_);
    for (const auto& m : method_table) print_total(std::string("all ") + std::string(m.name), by_method_.at(m.id));
  }

 private:
  // A measurement as the row shows it: as a soft constraint when weighted,
  // with its DIMACS bytes from a dry run numbered at this point (for the
  // first constraint of a shape; later ones repeat them).
  method_row to_row(const method_measurement& m, const normalized_constraint& c, std::int64_t weight, bool cached) {
    method_row row;
    row.id = m.method;
    row.size = weight > 0 ? as_soft(m.size) : m.size;
    row.over_budget = m.over_budget;
    row.seconds = m.seconds;
    if (m.over_budget || m.size.clauses > stats_floor) return row;
    const auto key = std::make_pair(m.method, weight > 0);
    if (cached) {
      if (const auto it = bytes_.find(key); it != bytes_.end()) row.bytes = it->second;
      return row;
    }
    variable_pool scratch = pool_;
    byte_counting_sink sink;
    try {
      encode_model_constraint(sink, scratch, c, m.method, weight, settings_.options);
    } catch (const error& e) {
      if (e.id() != error_id::overflow && e.id() != error_id::over_budget) throw;
      return row;  // no bytes for what cannot be written
    }
    const std::uint64_t bytes = sink.bytes();
    bytes_[key] = bytes;
    row.bytes = bytes;
    return row;
  }

  [[nodiscard]] json total_json(const total& t) const {
    json j;
    j["vars"] = t.vars;
    j["clauses"] = t.clauses;
    j["literals"] = t.literals;
    j["over_budget"] = t.over_budget;
    j["fallbacks"] = t.fallbacks;
    const auto base_vars = static_cast<std::uint64_t>(user_variables_) + products_;
    j["cnf"] = {{"variables", base_vars + t.hard_vars}, {"clauses", product_clauses_ + t.hard_clauses}};
    j["wcnf"] = {{"variables", base_vars + t.vars}, {"clauses", product_clauses_ + t.clauses + objective_units_}};
    return j;
  }
  void print_total(const std::string& label, const total& t) const {
    // A total with a stopped method is only a lower bound: "more than".
    const auto shown = [&t](std::uint64_t n) {
      std::string text = std::to_string(n);
      if (t.over_budget) text.insert(text.begin(), '>');
      return text;
    };
    out_printf("  %-28s %14s %14s %16s%s\n", label.c_str(), shown(t.clauses).c_str(), shown(t.vars).c_str(),
                shown(t.literals).c_str(), t.over_budget ? "  (a method was stopped: more than these)" : "");
  }
  [[nodiscard]] static int column_width(method_id id) {
    return std::max<int>(12, static_cast<int>(info(id).name.size()));
  }

  model_encoding_settings settings_;
  group_finder groups_;
  variable_pool pool_;
  method_chooser chooser_;
  std::map<std::pair<method_id, bool>, std::uint64_t> bytes_;  // of the last shape measured afresh
  std::int32_t user_variables_ = 0;
  std::string file_;
  std::uint64_t products_ = 0;
  std::uint64_t product_clauses_ = 0;
  std::uint64_t product_literals_ = 0;
  bool has_objective_ = false;
  std::uint64_t objective_units_ = 0;
  std::vector<constraint_row> rows_;
  total picked_;
  std::map<method_id, total> by_method_;
};

int run_stats(const stats_request& r) {
  model_encoding_settings settings;
  settings.policy = policy_from_name(r.pick);
  apply_method_options(r.methods, settings);
  settings.clause_budget = r.budget;
  settings.options.full_equivalence = r.full_equivalence;
  model_stream in(r.model);
  stats_collector stats(settings);
  in.run(stats);
  if (r.as_json)
    out_printf("%s\n", stats.to_json(r).dump(2).c_str());
  else
    stats.print_table();
  return exit_success;
}

}  // namespace

nlohmann::ordered_json stats_document(model_stream& in, const model_encoding_settings& settings) {
  stats_collector stats(settings);
  in.run(stats);
  return stats.to_json(stats_request{});
}

void register_stats(CLI::App& app, command_context& context) {
  auto* cmd = app.add_subcommand("stats",
                                 "Measure every applicable method on every constraint (exact sizes by dry run) and "
                                 "show the method the policy picks");
  auto r = std::make_shared<stats_request>();
  cmd->add_option("MODEL", r->model, "Model file (.opb or .json, else by content), or - for standard input")
      ->required();
  cmd->add_flag("--json", r->as_json, "Print the statistics as JSON (schema: docs/stats-format.md)");
  cmd->add_option("--pick", r->pick,
                  "Selection policy: smallest, smallest-arc-consistent, balanced, propagating (default)");
  // One name per --method: a vector option would otherwise swallow MODEL too.
  cmd->add_option("--method", r->methods, "As for encode: METHOD or NAME=METHOD (repeatable)")->allow_extra_args(false);
  cmd->add_option("--budget", r->budget,
                  "Clauses one constraint may have (1 to 10^15, default 50000000): dry runs stop there")
      ->check(budget_check());
  cmd->add_flag("--full-equivalence", r->full_equivalence, "Measure with auxiliary variables defined both ways");
  cmd->callback([&context, r] { context.exit_code = run_stats(*r); });
}

}  // namespace clausewright::tool
