// clausewright tool: the subcommands.
//
// Each command lives in its own cmd_<name>.cpp and registers itself on the
// application: it adds its subcommand and options, and a callback that runs
// the command and leaves the exit code in the context. Exit codes: 0 success,
// 1 a negative answer (violated constraints, unsatisfiable), 2 bad input or
// usage. Errors are thrown as clausewright::error; main prints them.
#pragma once

#include <string>
#include <vector>

#include <CLI/CLI.hpp>
#include <clausewright/model.hpp>
#include <clausewright/select.hpp>

namespace clausewright::tool {

inline constexpr int exit_success = 0;
inline constexpr int exit_negative = 1;
inline constexpr int exit_bad_input = 2;

struct command_context {
  int exit_code = exit_success;
};

void register_encode(CLI::App& app, command_context& context);
void register_methods(CLI::App& app, command_context& context);
void register_decode(CLI::App& app, command_context& context);
void register_stats(CLI::App& app, command_context& context);
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
