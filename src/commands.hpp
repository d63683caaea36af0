// clausewright tool: the subcommands.
//
// Each command lives in its own cmd_<name>.cpp and registers itself on the
// application: it adds its subcommand and options, and a callback that runs
// the command and leaves the exit code in the context. Errors are thrown as
// clausewright::error; main prints them.
//
// Exit codes, the same for every command:
//   0  success: satisfiable, optimal, every constraint holds, output written
//   1  a negative answer: unsatisfiable, violated constraints
//   2  bad input, bad usage, or an input/output error (a full disk, a
//      closed pipe): the message says which
//   3  no answer: `solve` stopped by its time limit before a solution, or a
//      solver output given to `decode` that says UNKNOWN (it decides
//      nothing, like a run out of time; malformed input stays 2)
//   4  a solution that is not proved optimal: `solve` of a model with an
//      objective or soft constraints stopped by its time limit after it
//      found a solution (printed, with the lower bound proved so far)
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include <CLI/CLI.hpp>
#include <clausewright/model.hpp>
#include <clausewright/select.hpp>

namespace clausewright::tool {

inline constexpr int exit_success = 0;
inline constexpr int exit_negative = 1;
inline constexpr int exit_bad_input = 2;
inline constexpr int exit_unknown = 3;
inline constexpr int exit_not_proved_optimal = 4;
// The exit codes as the help footer and the commands' help show them.
inline constexpr const char* exit_code_text =
    "Exit codes: 0 success (satisfiable, optimal, all constraints hold); 1 a negative answer (unsatisfiable, "
    "violated constraints); 2 bad input, usage or an input/output error; 3 no answer (solve stopped by its time "
    "limit without a solution, decode of an UNKNOWN answer); 4 a solution not proved optimal (solve stopped by its "
    "time limit).";

struct command_context {
  int exit_code = exit_success;
};

void register_encode(CLI::App& app, command_context& context);
void register_methods(CLI::App& app, command_context& context);
void register_decode(CLI::App& app, command_context& context);
void register_stats(CLI::App& app, command_context& context);
void register_report(CLI::App& app, command_context& context);
// In cmd_solve.cpp when it exists (the build defines CLAUSEWRIGHT_TOOL_HAS_SOLVE).
void register_solve(CLI::App& app, command_context& context);
// A reserved name: the command says it is not available and exits 2.
void register_unavailable(CLI::App& app, command_context& context, const std::string& name,
                          const std::string& description);

// --- helpers shared by the commands (tool_common.cpp) ----------------------------------

// The methods of repeated --method options, each checked against the table
// (an unknown name is an error listing the valid ones).
[[nodiscard]] std::vector<method_id> methods_from_names(const std::vector<std::string>& names);
// Repeated --method options into the settings: METHOD for every constraint
// it can encode, NAME=METHOD for the constraints whose name matches NAME (a
// name or an fnmatch pattern such as 'cap*'; "#3" is unnamed constraint 3).
void apply_method_options(const std::vector<std::string>& options, model_encoding_settings& settings);
// A --pick policy name (an unknown one is an error listing the valid ones).
[[nodiscard]] selection_policy policy_from_name(const std::string& name);
[[nodiscard]] std::string policy_names();

// A --budget value: a positive integer up to max_clause_budget; anything else
// (0, negative, too large, not a number) is a usage error.
inline constexpr std::uint64_t max_clause_budget = 1'000'000'000'000'000;  // 10^15
[[nodiscard]] CLI::Validator budget_check();

// Standard output of the commands. Every write is checked: a failed one (a
// full disk, a closed pipe) throws an input/output error with the system's
// message, and main checks the final flush, so no output is lost with exit 0.
void out_text(std::string_view text);
void out_printf(const char* format, ...) __attribute__((format(printf, 1, 2)));
// Flushes standard output; throws the error of a failed flush or an earlier
// failed write.
void finish_standard_output();

// Warns on standard error that a constraint can never hold (normalisation
// made it false), naming it and where it is; `command` says who warns.
void warn_never_holds(const error_position& where, std::string_view command);

// A progress line on standard error for long runs: shown when standard error
// is a terminal (or when forced) and the run has taken over a second.
class progress_line {
 public:
  // Forced: shown from the start, also on a pipe.
  progress_line(bool force, bool never);
  progress_line(const progress_line&) = delete;
  progress_line& operator=(const progress_line&) = delete;
  ~progress_line();
  void set_total(std::optional<std::uint64_t> constraints) { total_ = constraints; }
  [[nodiscard]] bool enabled() const noexcept { return enabled_; }
  void update(std::uint64_t constraints_done, std::uint64_t clauses_written) {
    if (!enabled_ || (++calls_ & 63U) != 0) return;
    show(constraints_done, clauses_written, false);
  }
  void done(std::uint64_t constraints_done, std::uint64_t clauses_written);

 private:
  void show(std::uint64_t constraints_done, std::uint64_t clauses_written, bool final_line);
  bool enabled_ = false;
  bool forced_ = false;
  bool terminal_ = false;
  bool shown_ = false;
  std::uint64_t calls_ = 0;
  std::optional<std::uint64_t> total_;
  double started_ = 0;
  double last_ = 0;
};

}  // namespace clausewright::tool
