// clausewright stats MODEL [--json] [--wide] [--pick POLICY] [--method NAME]... [--budget N]
//
// For every constraint and every method that can encode it: the exact size
// of the encoding, from the pipeline's measurer (a closed form, or a dry run
// of the very routine `encode` uses into a counting sink, so the numbers are
// what `encode --method NAME` writes), and its exact DIMACS bytes (counted by
// the pipeline's dimacs_counting_sink at the constraint's own numbering);
// the method the policy picks; and per model the totals for the picked
// methods and under each single method. Constraints of one shape are
// measured once. A dry run is stopped where its method can no longer be
// picked (but not before `stats_floor` clauses) or at the clause budget, and
// is shown as "more than N clauses"; totals with such a method are lower
// bounds and say so.
//
// The text table groups constraints of one shape (kind, relation, bound,
// inputs, coefficient multiset, hard or soft, the method picked) into one
// row and fits 120 columns: per group the picked method, the smallest and
// the smallest arc-consistent one, and its share of the clauses; then the
// largest constraints and the totals. --wide shows every method's size per
// group. Schema of --json: docs/stats-format.md.
#include <algorithm>
#include <cstdio>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <unordered_map>
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
  bool wide = false;
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
  std::optional<std::uint64_t> bytes;  // DIMACS bytes of its clause lines (none when stopped)
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
  constraint_shape shape;  // unordered: what groups rows
  std::vector<method_row> methods;
  std::optional<method_id> picked;  // empty: every applicable method passed the budget
  bool trivial = false;             // a constant or a single clause: no method, every one writes the same

  [[nodiscard]] std::string label() const {
    std::string text = "#" + std::to_string(index);
    if (!name.empty()) text = name;
    return text;
  }
  // The row of what it is encoded with (for a trivial row, any: all write the same).
  [[nodiscard]] const method_row* used() const {
    if (trivial) return methods.empty() ? nullptr : &methods.front();
    if (!picked) return nullptr;
    for (const auto& m : methods)
      if (m.id == *picked) return &m;
    return nullptr;
  }
};

// A model's size as one encoding would write it.
struct total {
  std::uint64_t vars = 0;       // auxiliary variables of the constraints (relaxation literals included)
  std::uint64_t clauses = 0;    // clauses of the constraints (soft units of soft constraints included)
  std::uint64_t literals = 0;   // literal occurrences in them
  std::uint64_t hard_vars = 0;  // the part of hard constraints (what CNF output has)
  std::uint64_t hard_clauses = 0;
  std::uint64_t fallbacks = 0;  // constraints the method cannot encode, encoded as the policy says (stand-ins)
  std::uint64_t cnf_bytes = 0;  // bytes of the clause lines of the CNF output (products included)
  bool bytes_known = true;      // false once a constraint's encoding was stopped
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

// Constraints of one shape that got one method: a row of the table.
struct shape_group {
  std::vector<std::size_t> members;  // rows, in file order
  std::map<method_id, total> methods;
  total picked;
  std::uint64_t picked_bytes = 0;
  bool picked_bytes_known = true;
};

struct group_key {
  constraint_shape shape;
  bool soft = false;
  int picked = -1;  // the method, -1 for none
  friend bool operator==(const group_key&, const group_key&) = default;
};
struct group_key_hash {
  std::size_t operator()(const group_key& k) const noexcept {
    return detail::shape_hash{}(k.shape) ^
           static_cast<std::size_t>(detail::mix64(static_cast<std::uint64_t>(k.picked + 2) * 2 + (k.soft ? 1 : 0)));
  }
};

class stats_collector final : public model_handler {
 public:
  explicit stats_collector(model_encoding_settings settings) : settings_(std::move(settings)), at_most_one_(settings_) {
    for (const auto& m : method_table) {
      by_method_.emplace(m.id, total{});
      cnf_pools_.emplace(m.id, variable_pool{});
    }
  }

  void begin(const model_header& h) override {
    pool_.reserve_user(h.variables);
    picked_cnf_pool_.reserve_user(h.variables);
    for (auto& [id, p] : cnf_pools_) p.reserve_user(h.variables);
    user_variables_ = h.variables;
    file_ = std::string(h.file);
  }
  literal product(std::span<const literal> factors) override {
    ++products_;
    product_clauses_ += factors.size() + 1;
    product_literals_ += 3 * factors.size() + 1;
    // Its clauses as each output numbers them.
    const auto product_bytes = [&](variable_pool& p) {
      dimacs_counting_sink sink;
      define_product(sink, p.fresh(), factors, scratch_);
      return sink.bytes();
    };
    picked_.cnf_bytes += product_bytes(picked_cnf_pool_);
    for (auto& [id, p] : cnf_pools_) by_method_.at(id).cnf_bytes += product_bytes(p);
    return pool_.fresh();
  }
  void objective(std::span<const term> terms, source_position /*where*/) override {
    has_objective_ = true;
    for (const term& t : terms)
      if (t.coefficient != 0) ++objective_units_;
  }
  void constraint(const constraint_view& v) override {
    normalized_constraint c = normalize_view(v);
    at_most_one_.see(c, v.soft());
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
    row.shape = shape_of(c, settings_);
    row.trivial = !needs_method(c);
    if (c.kind == constraint_kind::constant_false) warn_never_holds(v.where(), "stats");
    const std::vector<method_measurement>& measured = chooser_.measurements(pool_, c, settings_, stats_floor);
    for (const method_measurement& m : measured) {
      if (row.trivial && !row.methods.empty()) {  // every method writes it alike: counted once
        method_row same = row.methods.front();
        same.id = m.method;
        row.methods.push_back(same);
        continue;
      }
      row.methods.push_back(to_row(m, c, v.weight));
    }
    const auto row_of = [&row](method_id id) -> const method_row& {
      for (const auto& m : row.methods)
        if (m.id == id) return m;
      throw error(error_id::usage, "internal: no measurement of a chosen method");
    };
    // What encode would use; stats reports a constraint no method fits in
    // the budget instead of stopping there. Constants and single clauses
    // need no method: every one writes them alike (the first row stands).
    const auto chosen = [&](const model_encoding_settings& s) -> std::optional<method_id> {
      if (row.trivial) return row.methods.empty() ? std::nullopt : std::optional(row.methods.front().id);
      try {
        const std::optional<method_id> m = choose_method(v, c, s, pool_, &chooser_);
        return m ? *m : pick(measured, s.policy, c);
      } catch (const error& e) {
        if (e.id() != error_id::over_budget) throw;
        return std::nullopt;
      }
    };
    const std::optional<method_id> used = chosen(settings_);
    if (!row.trivial) row.picked = used;
    if (used) {
      picked_.add(row_of(*used), v.soft());
      if (!v.soft()) add_cnf_bytes(picked_, picked_cnf_pool_, c, row_of(*used));
    } else {
      picked_.over_budget = true;
      picked_.bytes_known = false;
    }
    model_encoding_settings single = settings_;
    single.method_rules.clear();
    for (auto& [id, t] : by_method_) {
      single.methods.assign(1, id);
      const std::optional<method_id> m = chosen(single);
      if (!m) {
        t.over_budget = true;
        t.bytes_known = false;
        continue;
      }
      t.add(row_of(*m), v.soft());
      if (!v.soft()) add_cnf_bytes(t, cnf_pools_.at(id), c, row_of(*m));
      if (*m != id && !row.trivial) ++t.fallbacks;
    }
    // Later constraints see the variables the picked method takes.
    if (used && !row_of(*used).over_budget)
      (void)pool_.fresh_block(static_cast<std::int64_t>(row_of(*used).size.variables));
    rows_.push_back(std::move(row));
  }

  void end() override { make_groups(); }

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
      // Constants and single clauses need no method: null, as the table's "(none)".
      c["picked"] = row.picked ? json(std::string(info(*row.picked).name)) : json(nullptr);
      c["needs_method"] = !row.trivial;
      constraints.push_back(std::move(c));
    }
    out["constraints"] = std::move(constraints);
    json groups = json::array();
    for (const auto& g : groups_) groups.push_back(group_json(g));
    out["groups"] = std::move(groups);
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

  void print_table(bool wide) const {
    // The file on a line of its own (a long path keeps its end: the name).
    std::string path = file_;
    if (path.size() > line_width - 6) path = "..." + path.substr(path.size() - (line_width - 9));
    out_printf("model %s\n%d variables, %zu constraints in %zu groups of one shape", path.c_str(), user_variables_,
               rows_.size(), groups_.size());
    if (products_ != 0) out_printf(", %llu products", static_cast<unsigned long long>(products_));
    out_printf("; policy %s\n", std::string(to_string(settings_.policy)).c_str());
    if (wide)
      print_wide_groups();
    else
      print_groups();
    print_largest();
    print_totals();
  }

 private:
  // --- measuring ---------------------------------------------------------------------

  // A measurement as the row shows it: as a soft constraint when weighted,
  // with its exact DIMACS bytes numbered at this point of the model.
  method_row to_row(const method_measurement& m, const normalized_constraint& c, std::int64_t weight) {
    method_row row;
    row.id = m.method;
    row.size = weight > 0 ? as_soft(m.size) : m.size;
    row.over_budget = m.over_budget;
    row.seconds = m.seconds;
    if (!m.over_budget) row.bytes = bytes_at(pool_, c, m.method, weight);
    return row;
  }

  // The DIMACS bytes of `c` encoded with `method` from `pool` (counted, not
  // written; none when it cannot be written).
  std::optional<std::uint64_t> bytes_at(const variable_pool& pool, const normalized_constraint& c, method_id method,
                                        std::int64_t weight) const {
    variable_pool scratch = pool;
    dimacs_counting_sink sink;
    try {
      // Constants and single clauses take no method (g++ 12 warns falsely on
      // an optional built by a conditional here).
      if (needs_method(c))
        encode_model_constraint(sink, scratch, c, std::optional<method_id>(method), weight, settings_.options);
      else
        encode_model_constraint(sink, scratch, c, std::optional<method_id>(), weight, settings_.options);
    } catch (const error& e) {
      if (e.id() != error_id::overflow && e.id() != error_id::over_budget) throw;
      return std::nullopt;
    }
    return sink.bytes();
  }

  // Adds the CNF bytes of hard constraint `c` written with `m`'s method to
  // `t`, numbered from `pool` (the CNF output's own numbering for that
  // choice of methods), and advances `pool` past its variables.
  void add_cnf_bytes(total& t, variable_pool& pool, const normalized_constraint& c, const method_row& m) const {
    if (m.over_budget || !t.bytes_known) {
      t.bytes_known = false;
      return;
    }
    // The bytes differ from the row's (numbered from pool_) only through the
    // widths of the auxiliary variables: when all of them have one width at
    // both places, they are the row's.
    const std::int64_t here = pool_.top();
    const std::int64_t there = pool.top();
    const auto v = static_cast<std::int64_t>(m.size.variables);
    const bool same = here == there || v == 0 ||
                      (dimacs_literal_width(here + 1) == dimacs_literal_width(here + v) &&
                       dimacs_literal_width(there + 1) == dimacs_literal_width(there + v) &&
                       dimacs_literal_width(here + 1) == dimacs_literal_width(there + 1));
    const std::optional<std::uint64_t> b = same ? m.bytes : bytes_at(pool, c, m.id, 0);
    if (!b) {
      t.bytes_known = false;
      return;
    }
    t.cnf_bytes += *b;
    (void)pool.fresh_block(static_cast<std::int64_t>(m.size.variables));
  }

  // --- groups ----------------------------------------------------------------------

  void make_groups() {
    std::unordered_map<group_key, std::size_t, group_key_hash> index;
    for (std::size_t i = 0; i < rows_.size(); ++i) {
      const constraint_row& row = rows_[i];
      const group_key key{row.shape, row.weight > 0, row.picked ? static_cast<int>(*row.picked) : -1};
      auto [it, fresh] = index.emplace(key, groups_.size());
      if (fresh) groups_.emplace_back();
      shape_group& g = groups_[it->second];
      g.members.push_back(i);
      for (const auto& m : row.methods) g.methods[m.id].add(m, row.weight > 0);
      if (const method_row* u = row.used()) {
        g.picked.add(*u, row.weight > 0);
        g.picked_bytes += u->bytes.value_or(0);
        g.picked_bytes_known = g.picked_bytes_known && u->bytes.has_value();
      } else {
        g.picked.over_budget = true;
        g.picked_bytes_known = false;
      }
    }
    // Largest first (by the picked clauses), ties in file order.
    std::stable_sort(groups_.begin(), groups_.end(),
                     [](const shape_group& a, const shape_group& b) { return a.picked.clauses > b.picked.clauses; });
  }

  // The smallest method of a group (by its clauses over the group, then
  // variables), among the arc-consistent ones when asked; stopped methods
  // never count as small.
  // What a smallest-method cell shows: the name, "(stopped)" when every
  // candidate was stopped (none is known to be small), "-" when none applies.
  [[nodiscard]] static std::string smallest_text(const shape_group& g, bool arc_consistent) {
    if (const auto m = smallest_of(g, arc_consistent)) return std::string(info(*m).name);
    for (const auto& [id, t] : g.methods)
      if (!arc_consistent || info(id).arc_consistent) return "(stopped)";
    return "-";
  }

  [[nodiscard]] static std::optional<method_id> smallest_of(const shape_group& g, bool arc_consistent) {
    std::optional<method_id> best;
    for (const auto& [id, t] : g.methods) {
      if (t.over_budget || (arc_consistent && !info(id).arc_consistent)) continue;
      const total* b = best ? &g.methods.at(*best) : nullptr;
      if (b == nullptr || t.clauses < b->clauses || (t.clauses == b->clauses && t.vars < b->vars)) best = id;
    }
    return best;
  }

  [[nodiscard]] const constraint_row& first(const shape_group& g) const { return rows_[g.members.front()]; }

  // A group's name in at most `width` characters, never cut inside the
  // count: the common prefix of its members' names ("item*"), else the
  // first name and "+N more".
  [[nodiscard]] std::string group_label(const shape_group& g, std::size_t width) const {
    const std::string head = first(g).label();
    if (g.members.size() == 1) return fit(head, width);
    const std::string more = " +" + std::to_string(g.members.size() - 1) + " more";
    bool named = true;
    bool consecutive = true;
    for (std::size_t k = 0; k < g.members.size(); ++k) {
      named = named && !rows_[g.members[k]].name.empty();
      consecutive = consecutive && rows_[g.members[k]].index == first(g).index + k;
    }
    if (!named) {
      // Unnamed (or partly): the range of indices when it is one.
      std::string range;
      if (first(g).name.empty() && consecutive) {
        range = head;
        range += "..";
        range += rows_[g.members.back()].label();
      }
      if (!range.empty() && range.size() <= width) return range;
    } else {
      // The common prefix of the names, when it says something ("item*").
      std::string prefix = head;
      for (const std::size_t i : g.members) {
        const std::string& l = rows_[i].name;
        std::size_t n = 0;
        while (n < prefix.size() && n < l.size() && prefix[n] == l[n]) ++n;
        prefix.resize(n);
        if (prefix.empty()) break;
      }
      std::string text = prefix;
      text += "* (";
      text += std::to_string(g.members.size());
      text += ')';
      if (prefix.size() >= 3 && text.size() <= width) return text;
    }
    if (more.size() + 4 > width) return fit(head, width);
    return fit(head, width - more.size()) + more;
  }

  // `text` in `width` characters: cut with a '~' at the end when longer.
  [[nodiscard]] static std::string fit(const std::string& text, std::size_t width) {
    if (text.size() <= width) return text;
    if (width == 0) return {};
    return text.substr(0, width - 1) + "~";
  }

  [[nodiscard]] static std::string rule_of(const constraint_row& r) {
    switch (r.kind) {
      case constraint_kind::constant_true:
      case constraint_kind::constant_false:
      case constraint_kind::clause:
        return "";
      default:
        return std::string(to_string(r.rel)) + " " + std::to_string(r.bound);
    }
  }

  [[nodiscard]] static std::string kind_text(const constraint_row& r) {
    std::string text(to_string(r.kind));
    if (r.weight > 0) text += " (soft)";
    return text;
  }

  // The clauses of a total as a cell: ">N" when a method was stopped.
  [[nodiscard]] static std::string clauses_cell(const total& t) {
    std::string text = std::to_string(t.clauses);
    if (t.over_budget) text.insert(text.begin(), '>');
    return text;
  }

  [[nodiscard]] std::string share_of(std::uint64_t clauses) const {
    if (picked_.clauses == 0) return "-";
    char text[16];
    (void)std::snprintf(text, sizeof text, "%.1f%%",
                        100.0 * static_cast<double>(clauses) / static_cast<double>(picked_.clauses));
    return text;
  }

  [[nodiscard]] static std::string method_text(const std::optional<method_id>& m, const char* none) {
    return m ? std::string(info(*m).name) : std::string(none);
  }

  [[nodiscard]] std::string picked_text(const shape_group& g) const {
    const constraint_row& r = first(g);
    if (r.trivial) return "(none)";
    return method_text(r.picked, "(over budget)");
  }

  static constexpr std::size_t line_width = 120;
  static constexpr std::size_t groups_shown = 15;
  static constexpr std::size_t largest_shown = 5;

  void print_groups() const {
    const std::size_t shown = std::min(groups_.size(), groups_shown);
    // Method columns as wide as the names they show.
    std::size_t w_pick = 6;
    std::size_t w_small = 8;
    std::size_t w_ac = 14;  // "arc-consistent"
    for (std::size_t i = 0; i < shown; ++i) {
      w_pick = std::max(w_pick, picked_text(groups_[i]).size());
      w_small = std::max(w_small, smallest_text(groups_[i], false).size());
      w_ac = std::max(w_ac, smallest_text(groups_[i], true).size());
    }
    // count kind rule lits clauses share: 6 18 9 6 11 7, and the spaces.
    const std::size_t fixed = 1 + 6 + 1 + 18 + 1 + 9 + 1 + 6 + 1 + 11 + 1 + 7 + 2;
    const std::size_t methods = w_pick + 2 + w_small + 2 + w_ac;
    const bool two_lines = fixed + methods + 16 > line_width;
    const std::size_t w_label = two_lines ? line_width - fixed - w_pick : line_width - fixed - methods;
    out_printf(
        "\ngroups of constraints of one shape, largest first: clauses of the picked method over the group and its "
        "share;\nthe smallest method and the smallest arc-consistent one over the group ('>N': stopped after N "
        "clauses)\n");
    out_printf("%-*s %6s %-18s %-9s %6s %11s %7s  %-*s", static_cast<int>(w_label), "constraints", "count", "kind",
               "rule", "lits", "clauses", "share", static_cast<int>(w_pick), "picked");
    if (two_lines)
      out_printf("\n");
    else
      out_printf("  %-*s  %s\n", static_cast<int>(w_small), "smallest", "arc-consistent");
    for (std::size_t i = 0; i < shown; ++i) {
      const shape_group& g = groups_[i];
      const constraint_row& r = first(g);
      const std::string small = smallest_text(g, false);
      const std::string ac = smallest_text(g, true);
      out_printf("%-*s %6zu %-18s %-9s %6zu %11s %7s  %-*s", static_cast<int>(w_label), group_label(g, w_label).c_str(),
                 g.members.size(), kind_text(r).c_str(), rule_of(r).c_str(), r.inputs, clauses_cell(g.picked).c_str(),
                 share_of(g.picked.clauses).c_str(), static_cast<int>(w_pick), picked_text(g).c_str());
      if (two_lines)
        out_printf("\n%*s smallest %s, arc-consistent %s\n", static_cast<int>(w_label), "", small.c_str(), ac.c_str());
      else
        out_printf("  %-*s  %s\n", static_cast<int>(w_small), small.c_str(), ac.c_str());
    }
    print_rest(shown);
  }

  void print_rest(std::size_t shown) const {
    if (shown >= groups_.size()) return;
    std::uint64_t clauses = 0;
    std::size_t constraints = 0;
    for (std::size_t i = shown; i < groups_.size(); ++i) {
      clauses += groups_[i].picked.clauses;
      constraints += groups_[i].members.size();
    }
    out_printf("... %zu more groups (%zu constraints, %llu clauses, %s): --json lists them all\n",
               groups_.size() - shown, constraints, static_cast<unsigned long long>(clauses),
               share_of(clauses).c_str());
  }

  void print_wide_groups() const {
    std::vector<method_id> columns;
    for (const auto& m : method_table) {
      bool used = false;
      for (const auto& g : groups_) used = used || (!first(g).trivial && g.methods.contains(m.id));
      if (used) columns.push_back(m.id);
    }
    out_printf(
        "\ngroups of constraints of one shape: clauses/auxiliary variables of each method over the group ('-' does "
        "not apply,\n'>N' stopped after N clauses: it cannot be picked, or passed the budget)\n\n");
    out_printf("%-24s %6s %-18s %-9s %6s", "constraints", "count", "kind", "rule", "lits");
    for (const method_id id : columns) out_printf(" %*s", column_width(id), std::string(info(id).name).c_str());
    out_printf("  picked\n");
    for (const auto& g : groups_) {
      const constraint_row& r = first(g);
      out_printf("%-24s %6zu %-18s %-9s %6zu", group_label(g, 24).c_str(), g.members.size(), kind_text(r).c_str(),
                 rule_of(r).c_str(), r.inputs);
      for (const method_id id : columns) {
        std::string cell = "-";
        if (const auto it = g.methods.find(id); it != g.methods.end()) {
          cell = clauses_cell(it->second);
          if (!it->second.over_budget) {
            cell += '/';
            cell += std::to_string(it->second.vars);
          }
        }
        out_printf(" %*s", column_width(id), cell.c_str());
      }
      out_printf("  %s\n", picked_text(g).c_str());
    }
  }

  void print_largest() const {
    std::vector<std::size_t> order;
    for (std::size_t i = 0; i < rows_.size(); ++i)
      if (rows_[i].used() != nullptr) order.push_back(i);
    const std::size_t n = std::min(order.size(), largest_shown);
    std::partial_sort(
        order.begin(), order.begin() + static_cast<std::ptrdiff_t>(n), order.end(),
        [this](std::size_t a, std::size_t b) { return rows_[a].used()->size.clauses > rows_[b].used()->size.clauses; });
    if (n == 0) return;
    std::size_t w_method = 6;
    for (std::size_t k = 0; k < n; ++k) w_method = std::max(w_method, largest_method(rows_[order[k]]).size());
    const std::size_t w_label = line_width - (2 + 1 + 18 + 1 + 6 + 2 + w_method + 1 + 11 + 1 + 7);
    out_printf("\nlargest constraints:\n  %-*s %-18s %6s  %-*s %11s %7s\n", static_cast<int>(w_label), "constraint",
               "kind", "lits", static_cast<int>(w_method), "picked", "clauses", "share");
    for (std::size_t k = 0; k < n; ++k) {
      const constraint_row& r = rows_[order[k]];
      std::string where = "#" + std::to_string(r.index);
      if (r.position.line != 0) where += ", line " + std::to_string(r.position.line);
      if (!r.name.empty()) {
        where.insert(0, " (");
        where += ')';
      }
      const std::string label = r.name.empty() ? where : fit(r.name, w_label - std::min(w_label, where.size())) + where;
      out_printf("  %-*s %-18s %6zu  %-*s %11llu %7s\n", static_cast<int>(w_label), fit(label, w_label).c_str(),
                 kind_text(r).c_str(), r.inputs, static_cast<int>(w_method), largest_method(r).c_str(),
                 static_cast<unsigned long long>(r.used()->size.clauses), share_of(r.used()->size.clauses).c_str());
    }
  }

  [[nodiscard]] static std::string largest_method(const constraint_row& r) {
    return r.trivial ? std::string("(none)") : method_text(r.picked, "(over budget)");
  }

  void print_totals() const {
    out_printf(
        "\ntotals (constraints only; products add %llu clauses and %llu variables, the objective %llu soft "
        "clauses in WCNF)\n",
        static_cast<unsigned long long>(product_clauses_), static_cast<unsigned long long>(products_),
        static_cast<unsigned long long>(objective_units_));
    out_printf("  %-31s %13s %13s %14s %15s %9s\n", "", "clauses", "aux variables", "literals", "CNF bytes",
               "stand-ins");
    print_total("picked", picked_, false);
    std::uint64_t with_stand_ins = 0;
    std::uint64_t left_out = 0;
    for (const auto& m : method_table) {
      bool applies = false;
      for (const auto& r : rows_)
        for (const auto& mr : r.methods) applies = applies || (mr.id == m.id && !r.trivial);
      if (!applies) {
        ++left_out;
        continue;
      }
      const total& t = by_method_.at(m.id);
      if (t.fallbacks != 0) ++with_stand_ins;
      print_total(std::string("all ") + std::string(m.name), t, true);
    }
    if (with_stand_ins != 0)
      out_printf(
          "  stand-ins: constraints the method cannot encode, counted with the method encode --method would use "
          "there\n  instead (the policy's pick)\n");
    if (left_out != 0)
      out_printf("  (%llu methods that apply to no constraint are left out; --json lists them)\n",
                 static_cast<unsigned long long>(left_out));
    out_printf(
        "  CNF bytes: the clause lines of encode's CNF output (products included; the header line and comments "
        "not)\n");
  }

  void print_total(const std::string& label, const total& t, bool stand_ins) const {
    // A total with a stopped method is only a lower bound: "more than".
    const auto shown = [&t](std::uint64_t n) {
      std::string text = std::to_string(n);
      if (t.over_budget) text.insert(text.begin(), '>');
      return text;
    };
    const std::string bytes = t.bytes_known ? std::to_string(t.cnf_bytes) : std::string("-");
    const std::string standing = stand_ins ? std::to_string(t.fallbacks) : std::string();
    out_printf("  %-31s %13s %13s %14s %15s %9s%s\n", label.c_str(), shown(t.clauses).c_str(), shown(t.vars).c_str(),
               shown(t.literals).c_str(), bytes.c_str(), standing.c_str(), t.over_budget ? "  (more than)" : "");
  }

  [[nodiscard]] json total_json(const total& t) const {
    json j;
    j["vars"] = t.vars;
    j["clauses"] = t.clauses;
    j["literals"] = t.literals;
    j["over_budget"] = t.over_budget;
    j["fallbacks"] = t.fallbacks;
    const auto base_vars = static_cast<std::uint64_t>(user_variables_) + products_;
    j["cnf"] = {{"variables", base_vars + t.hard_vars},
                {"clauses", product_clauses_ + t.hard_clauses},
                {"bytes", t.bytes_known ? json(t.cnf_bytes) : json(nullptr)}};
    j["wcnf"] = {{"variables", base_vars + t.vars}, {"clauses", product_clauses_ + t.clauses + objective_units_}};
    return j;
  }

  [[nodiscard]] json group_json(const shape_group& g) const {
    const constraint_row& r = first(g);
    json j;
    j["label"] = group_label(g, 60);
    j["count"] = g.members.size();
    json members = json::array();
    for (const std::size_t i : g.members) members.push_back(rows_[i].index);
    j["constraints"] = std::move(members);
    j["kind"] = std::string(to_string(r.kind));
    j["relation"] = std::string(to_string(r.rel));
    j["bound"] = r.bound;
    j["inputs"] = r.inputs;
    j["soft"] = r.weight > 0;
    j["needs_method"] = !r.trivial;
    j["picked"] = r.picked ? json(std::string(info(*r.picked).name)) : json(nullptr);
    j["clauses"] = g.picked.clauses;
    j["vars"] = g.picked.vars;
    j["literals"] = g.picked.literals;
    j["over_budget"] = g.picked.over_budget;
    j["dimacs_bytes"] = g.picked_bytes_known ? json(g.picked_bytes) : json(nullptr);
    j["share"] =
        picked_.clauses == 0 ? 0.0 : static_cast<double>(g.picked.clauses) / static_cast<double>(picked_.clauses);
    const auto named = [](const std::optional<method_id>& m) {
      return m ? json(std::string(info(*m).name)) : json(nullptr);
    };
    j["smallest"] = named(smallest_of(g, false));
    j["smallest_arc_consistent"] = named(smallest_of(g, true));
    json methods = json::array();
    for (const auto& m : method_table) {
      const auto it = g.methods.find(m.id);
      if (it == g.methods.end()) continue;
      methods.push_back({{"name", std::string(m.name)},
                         {"clauses", it->second.clauses},
                         {"vars", it->second.vars},
                         {"literals", it->second.literals},
                         {"over_budget", it->second.over_budget}});
    }
    j["methods"] = std::move(methods);
    return j;
  }

  [[nodiscard]] static int column_width(method_id id) {
    return std::max<int>(12, static_cast<int>(info(id).name.size()));
  }

  model_encoding_settings settings_;
  group_finder at_most_one_;  // the at-most-one groups of each row
  variable_pool pool_;
  variable_pool picked_cnf_pool_;                 // CNF numbering of the picked methods (no soft constraints)
  std::map<method_id, variable_pool> cnf_pools_;  // the same under each method alone
  method_chooser chooser_;
  std::vector<literal> scratch_;
  std::int32_t user_variables_ = 0;
  std::string file_;
  std::uint64_t products_ = 0;
  std::uint64_t product_clauses_ = 0;
  std::uint64_t product_literals_ = 0;
  bool has_objective_ = false;
  std::uint64_t objective_units_ = 0;
  std::vector<constraint_row> rows_;
  std::vector<shape_group> groups_;
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
    stats.print_table(r.wide);
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
                                 "Measure every applicable method on every constraint (exact sizes and DIMACS bytes) "
                                 "and show the method the policy picks, by groups of one shape");
  auto r = std::make_shared<stats_request>();
  cmd->add_option("MODEL", r->model, "Model file (.opb or .json, else by content), or - for standard input")
      ->required();
  cmd->add_flag("--json", r->as_json, "Print the statistics as JSON (schema: docs/stats-format.md)");
  cmd->add_flag("--wide", r->wide, "Show every method's size for each group of constraints (wider than 120 columns)");
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
