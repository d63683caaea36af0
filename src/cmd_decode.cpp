// clausewright decode MODEL SOLVER_OUTPUT
//
// Maps a solver's answer back to the model: the user's variables by name
// with their values, the objective, and a check of every original
// constraint (on the user's terms, not on the clauses). Exit 0 when every
// hard constraint holds, 1 when some is violated or the answer is
// "unsatisfiable", 2 for bad input (an answer without an assignment
// included), 3 for an answer "s UNKNOWN": it decides nothing, whatever v
// lines follow it, the same "no answer" as `solve` out of time.
#include <cstdio>
#include <memory>
#include <string>

#include "commands.hpp"
#include "model_file.hpp"
#include "solver_output.hpp"

namespace clausewright::tool {

namespace {

struct decode_request {
  std::string model;
  std::string answer;
  bool violations_only = false;
};

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
  if (answer.status == answer_status::unsatisfiable) {
    out_printf("unsatisfiable: the solver found no assignment satisfying the hard constraints\n");
    return exit_negative;
  }
  if (answer.status == answer_status::unknown) {
    // Values after "s UNKNOWN" are not a solution the solver stands by.
    std::fprintf(stderr, "clausewright: the solver answered UNKNOWN: there is no assignment to check\n");
    return exit_unknown;
  }
  if (!answer.any_literal && m.variables() > 0)
    throw error(error_id::parse, "the solver output " + r.answer + " has no 'v' lines and no literals");
  const std::uint64_t missing = static_cast<std::uint64_t>(m.variables()) - answer.given;
  if (missing != 0)
    std::fprintf(stderr, "clausewright: note: %llu of the model's %d variables have no value in the answer; "
                 "they are taken as false\n", static_cast<unsigned long long>(missing), m.variables());
  const auto value = [&answer](std::int32_t v) { return answer.values[static_cast<std::size_t>(v)] > 0; };

  if (!r.violations_only) {
    std::string block;
    for (std::int32_t v = 1; v <= m.variables(); ++v) {
      block += m.name_of(v);
      block += value(v) ? " = 1\n" : " = 0\n";
      if (block.size() > (1U << 16)) {
        out_text(block);
        block.clear();
      }
    }
    out_text(block);
  }
  if (m.has_objective()) out_printf("objective %s\n", to_string(m.objective_value(value)).c_str());

  const std::vector<violation> violated = m.check(value);
  std::uint64_t hard_violated = 0;
  wide_int soft_cost = 0;
  std::uint64_t soft_violated = 0;
  for (const violation& v : violated) {
    const std::string text = where(m, v) + ": the left side is " + to_string(v.left_side) + ", it must be " +
                             std::string(to_string(v.rel)) + " " + std::to_string(v.bound);
    if (v.soft()) {
      ++soft_violated;
      soft_cost += v.weight;
      out_printf("soft constraint not satisfied (weight %lld): %s\n", static_cast<long long>(v.weight), text.c_str());
    } else {
      ++hard_violated;
      out_printf("violated: %s\n", text.c_str());
    }
  }
  if (m.soft_constraints() != 0)
    out_printf("soft cost %s (%llu of %zu soft constraints not satisfied)\n", to_string(soft_cost).c_str(),
               static_cast<unsigned long long>(soft_violated), m.soft_constraints());
  if (hard_violated == 0) {
    out_printf("all %zu constraints hold\n", m.hard_constraints());
    return exit_success;
  }
  out_printf("%llu of %zu constraints violated\n", static_cast<unsigned long long>(hard_violated),
             m.hard_constraints());
  return exit_negative;
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
  cmd->footer(
      "Exit codes: 0 every constraint holds; 1 some constraint is violated, or the answer is UNSATISFIABLE; 2 bad "
      "input (no assignment in the answer included), usage or an input/output error; 3 the answer is UNKNOWN.");
  cmd->callback([&context, r] { context.exit_code = run_decode(*r); });
}

}  // namespace clausewright::tool
