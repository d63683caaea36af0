// clausewright decode MODEL SOLVER_OUTPUT [--json] [--true-only] [--violations-only]
//
// Maps a solver's answer back to the model: the user's variables by name
// with their values, the objective, and a check of every original
// constraint (on the user's terms, not on the clauses). Exit 0 when every
// hard constraint holds, 1 when some is violated or the answer is
// "unsatisfiable", 2 for bad input (an answer without an assignment
// included), 3 for an answer "s UNKNOWN": it decides nothing, whatever v
// lines follow it, the same "no answer" as `solve` out of time.
//
// --json prints one JSON object (the words are those of `solve --json`):
// "status" (the answer's s line: "satisfiable", "optimal", "unsatisfiable",
// "unknown", or null without one), "assignment" (name -> true/false; with
// --true-only "true_variables", the names set true, instead), "objective"
// (the objective function's value, null without an objective or without an
// assignment), "soft_cost" and "soft_unsatisfied" (with soft constraints:
// the sum of the weights of the soft constraints not satisfied, and their
// number), "total" (objective + soft cost, the value `solve` minimises;
// null when the model has neither), "hard_constraints", "hard_violated" and "violated" (every
// constraint not satisfied: index, name or null, file, line and column or
// null, "kind" hard or soft, weight, relation, left_side, bound and
// "amount", how far the left side is from the nearest value it may take).
// --true-only in text mode prints only the names set true, one per line,
// and the check on standard error, so the list can be piped on as it is.
#include <cstdint>
#include <cstdio>
#include <memory>
#include <string>

#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "model_file.hpp"
#include "solver_output.hpp"

namespace clausewright::tool {

namespace {

struct decode_request {
  std::string model;
  std::string answer;
  bool violations_only = false;
  bool as_json = false;
  bool true_only = false;
};

using json = nlohmann::ordered_json;

// A sum of the model's terms fits 64 bits for any model the readers accept
// with small enough coefficients; beyond, it is written as a string of
// digits rather than rounded.
json number(wide_int v) {
  if (v > INT64_MAX || v < INT64_MIN) return to_string(v);
  return static_cast<std::int64_t>(v);
}

// How far the left side is from the values the relation allows.
wide_int amount(const violation& v) {
  const wide_int bound = v.bound;
  switch (v.rel) {
    case relation::le:
      return v.left_side - bound;
    case relation::ge:
      return bound - v.left_side;
    case relation::eq:
      return v.left_side > bound ? v.left_side - bound : bound - v.left_side;
  }
  return 0;
}

json violation_json(const model& m, const violation& v) {
  json out;
  out["index"] = v.index;
  out["name"] = v.label != "#" + std::to_string(v.index) ? json(v.label) : json(nullptr);
  out["file"] = m.file();
  out["line"] = v.position.line != 0 ? json(v.position.line) : json(nullptr);
  out["column"] = v.position.column != 0 ? json(v.position.column) : json(nullptr);
  out["kind"] = v.soft() ? "soft" : "hard";
  out["weight"] = v.weight;
  out["relation"] = std::string(to_string(v.rel));
  out["left_side"] = number(v.left_side);
  out["bound"] = v.bound;
  out["amount"] = number(amount(v));
  return out;
}

std::string where(const model& m, const violation& v) {
  std::string out = v.label;
  if (v.label != "#" + std::to_string(v.index)) out += " (#" + std::to_string(v.index) + ")";
  if (v.position.line != 0) {
    out += " at " + m.file() + ":" + std::to_string(v.position.line);
    if (v.position.column != 0) out += ":" + std::to_string(v.position.column);
  }
  return out;
}

int run_decode(const decode_request& r) {
  model m;
  {
    file_source in(r.model);
    m = load_model(in);
  }
  solver_answer answer;
  {
    file_source in(r.answer);
    answer = read_solver_output(in, m.variables());
  }
  const auto status_json = [&answer] {
    return answer.status == answer_status::none ? json(nullptr) : json(std::string(status_name(answer.status)));
  };
  // Without an assignment: the status and nulls where the values would be.
  const auto no_assignment_json = [&] {
    json out;
    out["status"] = status_json();
    out[r.true_only ? "true_variables" : "assignment"] = nullptr;
    out["objective"] = nullptr;
    if (m.soft_constraints() != 0) {
      out["soft_cost"] = nullptr;
      out["soft_unsatisfied"] = nullptr;
    }
    out["total"] = nullptr;
    out["hard_constraints"] = m.hard_constraints();
    out["hard_violated"] = nullptr;
    out["violated"] = nullptr;
    out_printf("%s\n", out.dump(2).c_str());
  };
  if (answer.status == answer_status::unsatisfiable) {
    if (r.as_json)
      no_assignment_json();
    else
      out_printf("unsatisfiable: the solver found no assignment satisfying the hard constraints\n");
    return exit_negative;
  }
  if (answer.status == answer_status::unknown) {
    // Values after "s UNKNOWN" are not a solution the solver stands by.
    std::fprintf(stderr, "clausewright: the solver answered UNKNOWN: there is no assignment to check\n");
    if (r.as_json) no_assignment_json();
    return exit_unknown;
  }
  if (!answer.any_literal && m.variables() > 0)
    throw error(error_id::parse, "the solver output " + r.answer + " has no 'v' lines and no literals");
  const std::uint64_t missing = static_cast<std::uint64_t>(m.variables()) - answer.given;
  if (missing != 0)
    std::fprintf(stderr,
                 "clausewright: note: %llu of the model's %d variables have no value in the answer; "
                 "they are taken as false\n",
                 static_cast<unsigned long long>(missing), m.variables());
  const auto value = [&answer](std::int32_t v) { return answer.values[static_cast<std::size_t>(v)] > 0; };

  const std::vector<violation> violated = m.check(value);
  std::uint64_t hard_violated = 0;
  wide_int soft_cost = 0;
  std::uint64_t soft_violated = 0;
  for (const violation& v : violated) {
    if (v.soft()) {
      ++soft_violated;
      soft_cost += v.weight;
    } else {
      ++hard_violated;
    }
  }
  const int code = hard_violated == 0 ? exit_success : exit_negative;

  if (r.as_json) {
    json out;
    out["status"] = status_json();
    if (!r.violations_only) {
      if (r.true_only) {
        json names = json::array();
        for (std::int32_t v = 1; v <= m.variables(); ++v)
          if (value(v)) names.push_back(m.name_of(v));
        out["true_variables"] = std::move(names);
      } else {
        json assignment = json::object();
        for (std::int32_t v = 1; v <= m.variables(); ++v) assignment[m.name_of(v)] = value(v);
        out["assignment"] = std::move(assignment);
      }
    }
    out["objective"] = m.has_objective() ? number(m.objective_value(value)) : json(nullptr);
    if (m.soft_constraints() != 0) {
      out["soft_cost"] = number(soft_cost);
      out["soft_unsatisfied"] = soft_violated;
    }
    const bool costed = m.has_objective() || m.soft_constraints() != 0;
    out["total"] =
        costed ? number((m.has_objective() ? m.objective_value(value) : wide_int{0}) + soft_cost) : json(nullptr);
    out["hard_constraints"] = m.hard_constraints();
    out["hard_violated"] = hard_violated;
    json list = json::array();
    for (const violation& v : violated) list.push_back(violation_json(m, v));
    out["violated"] = std::move(list);
    out_printf("%s\n", out.dump(2).c_str());
    return code;
  }

  if (!r.violations_only) {
    std::string block;
    for (std::int32_t v = 1; v <= m.variables(); ++v) {
      if (r.true_only) {
        if (!value(v)) continue;
        block += m.name_of(v);
        block += '\n';
      } else {
        block += m.name_of(v);
        block += value(v) ? " = 1\n" : " = 0\n";
      }
      if (block.size() > (1U << 16)) {
        out_text(block);
        block.clear();
      }
    }
    out_text(block);
  }
  // With --true-only standard output is the list of names alone.
  std::string check;
  if (m.has_objective()) check += "objective " + to_string(m.objective_value(value)) + "\n";
  for (const violation& v : violated) {
    const std::string text = where(m, v) + ": the left side is " + to_string(v.left_side) + ", it must be " +
                             std::string(to_string(v.rel)) + " " + std::to_string(v.bound);
    if (v.soft())
      check += "soft constraint not satisfied (weight " + std::to_string(v.weight) + "): " + text + "\n";
    else
      check += "violated: " + text + "\n";
  }
  if (m.soft_constraints() != 0)
    check += "soft cost " + to_string(soft_cost) + " (" + std::to_string(soft_violated) + " of " +
             std::to_string(m.soft_constraints()) + " soft constraints not satisfied)\n";
  if (m.has_objective() && m.soft_constraints() != 0)
    check += "total " + to_string(m.objective_value(value) + soft_cost) + " (objective + soft cost)\n";
  if (hard_violated == 0)
    check += "all " + std::to_string(m.hard_constraints()) + " constraints hold\n";
  else
    check += std::to_string(hard_violated) + " of " + std::to_string(m.hard_constraints()) + " constraints violated\n";
  if (r.true_only)
    std::fputs(check.c_str(), stderr);
  else
    out_text(check);
  return code;
}

}  // namespace

void register_decode(CLI::App& app, command_context& context) {
  auto* cmd = app.add_subcommand("decode",
                                 "Map a SAT or MaxSAT solver's answer back to the model's variables and check every "
                                 "constraint of the model against it");
  auto r = std::make_shared<decode_request>();
  cmd->add_option("MODEL", r->model, "The model file the formula was encoded from (or - for standard input)")
      ->required();
  cmd->add_option("SOLVER_OUTPUT", r->answer,
                  "The solver's output: 's' and 'v' lines, or a bare list of literals (or - for standard input)")
      ->required();
  cmd->add_flag("--violations-only", r->violations_only, "Do not print the variables, only the check");
  cmd->add_flag("--true-only", r->true_only,
                "Print only the variables set true, one name per line (the check goes to standard error); with "
                "--json, \"true_variables\" (their names) in place of \"assignment\"");
  cmd->add_flag("--json", r->as_json,
                "Print one JSON object: status, assignment, objective, soft_cost, the violated constraints");
  cmd->footer(
      "Exit codes: 0 every constraint holds; 1 some constraint is violated, or the answer is UNSATISFIABLE; 2 bad "
      "input (no assignment in the answer included), usage or an input/output error; 3 the answer is UNKNOWN.");
  cmd->callback([&context, r] { context.exit_code = run_decode(*r); });
}

}  // namespace clausewright::tool
