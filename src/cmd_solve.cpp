// clausewright solve MODEL [--time-limit SECONDS] [--json] [--search linear|binary] [--stats]
//                   [--method NAME]... [--pick POLICY] [--bound METHOD]
//
// Encodes the model straight into the embedded CaDiCaL (the same encoding
// `encode` writes) and solves it there. A model without an objective and
// without soft constraints is a question of satisfiability. Otherwise the
// value minimised is the objective plus the weights of the soft constraints
// not satisfied, and the optimum is found and proved by tightening a bound on
// it between solver calls (optimize.hpp): linear search from the top by
// default, binary search by option. Each improving solution is reported on
// standard error as it is found; the final status, the value and the
// assignment of the model's variables go to standard output (as JSON with
// --json). When the time limit ends the search, the best solution so far is
// "satisfiable" (not proved optimal) with the proved lower bound, as after
// SIGINT or SIGTERM. A progress line (time, best value, lower bound, solver
// calls, conflicts) goes to standard error every two seconds, and each rise
// of the lower bound as it is proved. Exit codes: 0 satisfiable (a model
// without objective or soft constraints) or optimal; 1 unsatisfiable; 2 bad
// input, usage or an input/output error; 3 unknown (the limit or a signal
// came before a solution); 4 satisfiable but not proved optimal (the limit or
// a signal ended the search).
//
// The words are those of decode: "objective" is the objective function's
// value, "soft cost" the weights of the soft constraints not satisfied,
// "total" their sum, the value the search minimises (and bounds).
//
// Text output: "status S", then "objective V" when the model has an
// objective, "soft cost ..." with soft constraints, "total T" with both,
// "lower bound ..." (of the total) when the search was stopped, then
// "name = 0|1" per variable of the model; an unsatisfiable answer names
// the constraints that can never hold. JSON output: an object with "status"
// ("optimal", "satisfiable", "unsatisfiable", "unknown"), "objective" (the
// objective function's value; null without a solution or without an
// objective), "soft_cost" and "soft_unsatisfied" (when it has soft
// constraints), "total" (the value minimised; null without a solution or
// when nothing is minimised), "lower_bound" (of the total, proved; null when
// nothing is proved), "assignment" (variable name -> true/false, in the
// model's order, or null), "search", "never_hold" (hard constraints
// normalised to false: index, name, line, column), "solutions",
// "solver_calls", "seconds".
//
// --stats first prints the size table of `clausewright stats` for the model
// (every applicable method on every constraint, and the picks), by running
// that command; with --json it goes to standard error.
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <condition_variable>
#include <csignal>
#include <cstdio>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include <clausewright/cadical.hpp>
#include <clausewright/optimize.hpp>
#if defined(CLAUSEWRIGHT_TOOL_HAS_LP)
#include <clausewright/lp_bound.hpp>
#endif
#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "model_file.hpp"

namespace clausewright::tool {

namespace {

using json = nlohmann::ordered_json;

struct solve_request {
  std::string model;
  double time_limit = -1;  // seconds; negative: none
  bool as_json = false;
  std::string search = "core-boosted";
  bool stats = false;
  std::vector<std::string> methods;
  std::string pick = std::string(to_string(default_policy));
  std::string bound = "automatic";
};

// Where model_encoder writes: clauses into the solver, the objective's terms
// and the costs of soft constraints (as objective terms, no detour through
// soft clauses) into the objective the search minimises.
class solving_sink {
 public:
  solving_sink(cadical_solver& solver, objective& cost) : solver_(solver), cost_(cost) {}

  void add_clause(std::span<const literal> clause) { solver_.add_clause(clause); }
  void add_objective_term(std::int64_t coefficient, literal l) { cost_.add(coefficient, l); }

 private:
  cadical_solver& solver_;
  objective& cost_;
};

// Runs `clausewright stats` on the model, onto standard error when asked.
void print_stats(const solve_request& r, bool to_stderr) {
  if (r.model == "-") throw error(error_id::usage, "--stats reads the model twice: give a file, not standard input");
  std::vector<std::string> args{"clausewright", "stats", r.model, "--pick", r.pick};
  for (const auto& m : r.methods) {
    args.emplace_back("--method");
    args.push_back(m);
  }
  std::vector<const char*> argv;
  argv.reserve(args.size());
  for (const auto& a : args) argv.push_back(a.c_str());
  CLI::App inner;
  command_context context;
  register_stats(inner, context);
  finish_standard_output();
  int saved = -1;
  if (to_stderr) {
    saved = ::dup(STDOUT_FILENO);
    if (saved >= 0) static_cast<void>(::dup2(STDERR_FILENO, STDOUT_FILENO));
  }
  auto restore = [&] {
    const auto back = [&] {
      if (saved >= 0) {
        static_cast<void>(::dup2(saved, STDOUT_FILENO));
        ::close(saved);
        saved = -1;
      }
    };
    try {
      finish_standard_output();  // the table goes where it was meant to
    } catch (...) {
      back();
      throw;
    }
    back();
  };
  try {
    inner.parse(static_cast<int>(argv.size()), argv.data());
  } catch (...) {
    restore();
    throw;
  }
  restore();
  out_printf("\n");
}

// The value minimised, on the model's own terms: the objective's terms plus
// the weights of the soft constraints an assignment does not satisfy.
struct model_cost {
  wide_int objective_terms = 0;
  wide_int soft = 0;
  std::uint64_t soft_unsatisfied = 0;
  [[nodiscard]] wide_int total() const { return objective_terms + soft; }
};

model_cost cost_of(const model& m, const std::vector<bool>& values) {
  const auto value = [&values](std::int32_t v) {
    return static_cast<std::size_t>(v) < values.size() && values[static_cast<std::size_t>(v)];
  };
  model_cost c;
  if (m.has_objective()) c.objective_terms = m.objective_value(value);
  if (m.soft_constraints() != 0)
    for (const violation& v : m.check(value))
      if (v.soft()) {
        c.soft += v.weight;
        ++c.soft_unsatisfied;
      }
  return c;
}

// SIGINT and SIGTERM end the search with the best solution so far: the
// handler only sets the flag, which the solver reads during its search.
std::atomic<bool> interrupted{false};

extern "C" void on_interrupt(int /*signal*/) { interrupted.store(true); }

// A line on standard error every few seconds while the search runs (also
// during long solver calls): time, best value, lower bound, calls, conflicts.
class progress_lines {
 public:
  progress_lines() : started_(solver_clock::now()), printer_([this] { loop(); }) {}
  progress_lines(const progress_lines&) = delete;
  progress_lines& operator=(const progress_lines&) = delete;
  ~progress_lines() {
    {
      const std::lock_guard<std::mutex> lock(mutex_);
      done_ = true;
    }
    wake_.notify_all();
    printer_.join();
  }
  void update(const search_progress& p) {
    const std::lock_guard<std::mutex> lock(mutex_);
    last_ = p;
  }
  void lower(std::int64_t bound) {
    const std::lock_guard<std::mutex> lock(mutex_);
    last_.lower_bound = std::max(last_.lower_bound, bound);
  }
  void best(std::int64_t value) {
    const std::lock_guard<std::mutex> lock(mutex_);
    last_.best = value;
  }

 private:
  void loop() {
    std::unique_lock<std::mutex> lock(mutex_);
    while (!wake_.wait_for(lock, std::chrono::seconds(2), [this] { return done_; })) {
      const double seconds = std::chrono::duration<double>(solver_clock::now() - started_).count();
      const std::string best = last_.best ? std::to_string(*last_.best) : std::string("none");
      std::fprintf(stderr, "clausewright: %.1f s: best %s, lower bound %lld, %llu solver calls, %llu conflicts\n",
                   seconds, best.c_str(), static_cast<long long>(last_.lower_bound),
                   static_cast<unsigned long long>(last_.solves), static_cast<unsigned long long>(last_.conflicts));
    }
  }

  std::mutex mutex_;
  std::condition_variable wake_;
  bool done_ = false;
  search_progress last_;
  solver_clock::time_point started_;
  std::thread printer_;
};

std::int64_t to_int64(wide_int v, const char* what) {
  if (v > INT64_MAX || v < INT64_MIN)
    throw error(error_id::overflow, std::string(what) + " overflows the 64-bit range");
  return static_cast<std::int64_t>(v);
}

// The answer when the time limit ends the run before the solver is asked.
int report_unknown(const solve_request& r, const model& m, solver_clock::time_point started) {
  const double seconds = std::chrono::duration<double>(solver_clock::now() - started).count();
  std::fprintf(stderr, "clausewright: unknown after 0 solver calls, %.3f s\n", seconds);
  if (r.as_json) {
    json out;
    out["status"] = "unknown";
    out["objective"] = nullptr;
    if (m.soft_constraints() != 0) {
      out["soft_cost"] = nullptr;
      out["soft_unsatisfied"] = nullptr;
    }
    out["total"] = nullptr;
    out["lower_bound"] = nullptr;
    out["assignment"] = nullptr;
    out["search"] = r.search;
    out["solutions"] = 0;
    out["solver_calls"] = 0;
    out["seconds"] = seconds;
    out_printf("%s\n", out.dump(2).c_str());
  } else {
    out_text("status unknown\n");
  }
  return exit_unknown;
}

int run_solve(const solve_request& r) {
  const auto started = solver_clock::now();
  const std::optional<bound_method> bound = find_bound_method(r.bound);
  if (!bound) {
    std::string valid;
    for (const bound_method b : all_bound_methods) valid += (valid.empty() ? "" : ", ") + std::string(to_string(b));
    throw error(error_id::usage, "unknown objective bound method '" + r.bound + "'; valid ones: " + valid);
  }
  model_encoding_settings settings;
  settings.policy = policy_from_name(r.pick);
  apply_method_options(r.methods, settings);

  model m;
  {
    file_source in(r.model);
    m = load_model(in);
  }
  if (r.stats) print_stats(r, r.as_json);

  cadical_solver solver;
  variable_pool pool;
  objective cost;
  solving_sink sink(solver, cost);
  // The time limit covers the encoding too: the pipeline stops at the deadline.
  if (r.time_limit >= 0 && r.time_limit <= 100.0 * 365 * 24 * 3600)
    settings.deadline =
        started + std::chrono::duration_cast<solver_clock::duration>(std::chrono::duration<double>(r.time_limit));
  model_encoding_summary summary;
  std::vector<std::size_t> never_hold;  // hard constraints normalised to false
  try {
    summary = encode_model(m, sink, pool, settings, [&](const constraint_outcome& o) {
      if (o.kind != constraint_kind::constant_false || o.weight != 0) return;
      never_hold.push_back(o.index);
      warn_never_holds(m.constraint(o.index).where(), "solve");
    });
  } catch (const error& e) {
    if (e.id() != error_id::time_limit) throw;
    std::fprintf(stderr, "clausewright: the time limit passed while encoding (%s)\n", e.what());
    return report_unknown(r, m, started);
  }
  const bool optimising = m.has_objective() || m.soft_constraints() != 0;
  std::fprintf(stderr, "clausewright: %llu constraints into CaDiCaL: %llu clauses, %d variables (%d of the model)\n",
               static_cast<unsigned long long>(summary.constraints),
               static_cast<unsigned long long>(summary.hard_clauses), pool.top(), m.variables());

  optimize_options options;
  options.search = find_search_strategy(r.search).value_or(search_strategy::core_boosted);
  options.stop = &interrupted;
  // The model's hard constraints as rows of the linear relaxation.
  for (std::size_t i = 0; i < m.constraints(); ++i) {
    const constraint_view c = m.constraint(i);
    if (!c.soft()) options.rows.push_back({{c.terms.begin(), c.terms.end()}, c.rel, c.bound});
  }
#if defined(CLAUSEWRIGHT_TOOL_HAS_LP)
  options.relax = clp_relaxation;
#endif
  if (r.time_limit >= 0) {
    const auto spent = std::chrono::duration<double>(solver_clock::now() - started);
    options.time_limit =
        std::max(std::chrono::duration<double>(r.time_limit) - spent, std::chrono::duration<double>(0));
  }
  options.record_variables = m.variables();
  options.bound.method = *bound;
  options.bound.policy = settings.policy;
  if (*bound == bound_method::reencode) {
    // The model's hard at-most-one sets: each re-encoded bound gets its
    // groups from them, so the group methods of the table apply.
    for (std::size_t i = 0; i < m.constraints(); ++i) {
      const constraint_view c = m.constraint(i);
      if (c.soft()) continue;
      const normalized_constraint n = normalize_view(c);
      if (n.kind == constraint_kind::at_most_one || n.kind == constraint_kind::exactly_one)
        options.bound.at_most_one_sets.push_back(n.literals);
    }
  }
  options.evaluate = [&m](const std::vector<bool>& values) { return to_int64(cost_of(m, values).total(), "the cost"); };
  options.on_solution = [&m, found = std::uint64_t{0}](const improving_solution& s) mutable {
    // The variables set true, the first few of them: enough to follow the
    // search without flooding the terminal on large models.
    std::string shown;
    std::uint64_t more = 0;
    for (std::int32_t v = 1; v <= m.variables(); ++v) {
      if (!s.values[static_cast<std::size_t>(v)]) continue;
      if (shown.size() < 200)
        shown += " " + m.name_of(v);
      else
        ++more;
    }
    if (more != 0) shown += " ... (" + std::to_string(more) + " more)";
    std::fprintf(stderr, "clausewright: solution %llu: total %lld (%.3f s); true:%s\n",
                 static_cast<unsigned long long>(++found), static_cast<long long>(s.objective), s.seconds,
                 shown.empty() ? " none" : shown.c_str());
  };

  interrupted.store(false);
  const auto previous_int = std::signal(SIGINT, on_interrupt);
  const auto previous_term = std::signal(SIGTERM, on_interrupt);
  std::optional<progress_lines> progress;
  progress.emplace();
  options.on_progress = [&progress](const search_progress& p) { progress->update(p); };
  options.on_bound = [&progress](const bound_update& b) {
    progress->lower(b.lower_bound);
    std::fprintf(stderr, "clausewright: lower bound %lld (%s, %.3f s)\n", static_cast<long long>(b.lower_bound),
                 std::string(to_string(b.source)).c_str(), b.seconds);
  };
  options.on_solution = [&progress, report = options.on_solution](const improving_solution& s) {
    progress->best(s.objective);
    report(s);
  };
  optimize_result result;
  if (optimising) {
    objective_bound<cadical_solver> bounds(solver, pool, cost, options.bound);
    result = minimize(solver, pool, bounds, options);
    std::fprintf(stderr, "clausewright: objective bounds by %s: %llu clauses, %llu variables\n",
                 std::string(to_string(result.bound)).c_str(),
                 static_cast<unsigned long long>(result.bound_size.clauses),
                 static_cast<unsigned long long>(result.bound_size.variables));
  } else {
    result = satisfy(solver, pool, options);
  }
  progress.reset();
  std::signal(SIGINT, previous_int);
  std::signal(SIGTERM, previous_term);
  const bool has_solution = result.status == optimize_status::optimal || result.status == optimize_status::satisfiable;
  const std::string status(to_string(result.status));
  std::fprintf(stderr, "clausewright: %s after %llu solver calls, %.3f s\n", status.c_str(),
               static_cast<unsigned long long>(result.solves),
               std::chrono::duration<double>(solver_clock::now() - started).count());

  model_cost decoded;
  if (has_solution) decoded = cost_of(m, result.values);
  if (r.as_json) {
    json out;
    out["status"] = status;
    out["objective"] =
        has_solution && m.has_objective() ? json(to_int64(decoded.objective_terms, "the objective")) : json(nullptr);
    if (m.soft_constraints() != 0) {
      out["soft_cost"] = has_solution ? json(to_int64(decoded.soft, "the soft cost")) : json(nullptr);
      out["soft_unsatisfied"] = has_solution ? json(decoded.soft_unsatisfied) : json(nullptr);
    }
    out["total"] = has_solution && optimising ? json(*result.objective) : json(nullptr);
    out["lower_bound"] =
        optimising && result.status != optimize_status::unsatisfiable && result.status != optimize_status::unknown
            ? json(result.lower_bound)
            : json(nullptr);
    if (has_solution) {
      json assignment = json::object();
      for (std::int32_t v = 1; v <= m.variables(); ++v)
        assignment[m.name_of(v)] = static_cast<bool>(result.values[static_cast<std::size_t>(v)]);
      out["assignment"] = std::move(assignment);
    } else {
      out["assignment"] = nullptr;
    }
    out["search"] = std::string(to_string(options.search));
    json impossible = json::array();
    for (const std::size_t i : never_hold) {
      const constraint_view c = m.constraint(i);
      impossible.push_back({{"index", i},
                            {"name", c.name.empty() ? json(nullptr) : json(std::string(c.name))},
                            {"line", c.position.line},
                            {"column", c.position.column}});
    }
    out["never_hold"] = std::move(impossible);
    out["solutions"] = result.solutions;
    out["solver_calls"] = result.solves;
    out["seconds"] = std::chrono::duration<double>(solver_clock::now() - started).count();
    out_printf("%s\n", out.dump(2).c_str());
  } else {
    std::string block = "status " + status + "\n";
    // An unsatisfiable answer names the constraints that can never hold.
    if (result.status == optimize_status::unsatisfiable)
      for (const std::size_t i : never_hold) block += "can never hold: " + m.constraint(i).where().describe() + "\n";
    if (has_solution && m.has_objective()) block += "objective " + to_string(decoded.objective_terms) + "\n";
    if (has_solution && m.soft_constraints() != 0)
      block += "soft cost " + to_string(decoded.soft) + " (" + std::to_string(decoded.soft_unsatisfied) + " of " +
               std::to_string(m.soft_constraints()) + " soft constraints not satisfied)\n";
    if (has_solution && m.has_objective() && m.soft_constraints() != 0)
      block += "total " + std::to_string(*result.objective) + " (objective + soft cost)\n";
    if (result.status == optimize_status::satisfiable && optimising)
      block += "lower bound " + std::to_string(result.lower_bound) + " of the total (not proved optimal)\n";
    if (has_solution) {
      for (std::int32_t v = 1; v <= m.variables(); ++v) {
        block += m.name_of(v);
        block += result.values[static_cast<std::size_t>(v)] ? " = 1\n" : " = 0\n";
        if (block.size() > (1U << 16)) {
          out_text(block);
          block.clear();
        }
      }
    }
    out_text(block);
  }
  switch (result.status) {
    case optimize_status::unsatisfiable:
      return exit_negative;
    case optimize_status::unknown:
      return exit_unknown;
    case optimize_status::satisfiable:
      return optimising ? exit_not_proved_optimal : exit_success;
    case optimize_status::optimal:
      break;
  }
  return exit_success;
}

}  // namespace

void register_solve(CLI::App& app, command_context& context) {
  auto* cmd = app.add_subcommand("solve",
                                 "Solve a model with the embedded CaDiCaL: decide satisfiability, or find and prove "
                                 "the optimum of its objective and soft constraints");
  auto r = std::make_shared<solve_request>();
  cmd->add_option("MODEL", r->model, "Model file (.opb or .json, else by content), or - for standard input")
      ->required();
  cmd->add_option("--time-limit", r->time_limit,
                  "Stop after this many seconds (as Ctrl-C and SIGTERM do: the best solution so far is reported "
                  "as satisfiable, not proved optimal, with the proved lower bound; exit code 4)")
      ->check(CLI::Validator(
          [](std::string& text) {
            double seconds = -1;
            std::size_t used = 0;
            try {
              seconds = std::stod(text, &used);
            } catch (const std::exception&) {
              used = 0;
            }
            if (used != text.size() || !(seconds >= 0) || seconds == HUGE_VAL)
              return "expected a number of seconds >= 0, found '" + text + "'";
            return std::string();
          },
          "SECONDS", "seconds"));
  cmd->add_flag("--json", r->as_json,
                "Print the result as JSON: status, objective, soft_cost, total (integers or null), lower_bound, "
                "assignment (name -> true/false)");
  cmd->add_option("--search", r->search,
                  "core-boosted (default: cores and the linear relaxation for the lower bound, neighbourhoods and "
                  "solution-improving calls for the best solution), linear (from the top, each solution tightens "
                  "the bound), binary, or core-guided")
      ->check(CLI::IsMember({"core-boosted", "linear", "binary", "core-guided"}));
  cmd->add_flag("--stats", r->stats,
                "First print the size table of every applicable encoding per constraint and the picks (as "
                "`clausewright stats`)");
  cmd->add_option("--method", r->methods, "As for encode: METHOD or NAME=METHOD (repeatable)")->allow_extra_args(false);
  cmd->add_option("--pick", r->pick,
                  "Selection policy: smallest, smallest-arc-consistent, balanced, propagating (default)");
  cmd->add_option("--bound", r->bound,
                  "How the objective is bounded: automatic (default), totalizer, sequential-counter, "
                  "generalized-totalizer, sequential-weight-counter, bdd, adder, reencode");
  cmd->footer(
      "Exit codes: 0 satisfiable (no objective, no soft constraints) or optimal; 1 unsatisfiable; 2 bad input, usage "
      "or an input/output error; 3 unknown (the time limit, Ctrl-C or SIGTERM came before any solution); 4 "
      "satisfiable, not proved optimal (the time limit, Ctrl-C or SIGTERM ended the search).");
  cmd->callback([&context, r] { context.exit_code = run_solve(*r); });
}

}  // namespace clausewright::tool
