#include <unistd.h>

#include <chrono>
#include <cstdio>

#include "commands.hpp"

namespace clausewright::tool {

namespace {
double now_seconds() {
  return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count();
}
}  // namespace

std::vector<method_id> methods_from_names(const std::vector<std::string>& names) {
  std::vector<method_id> out;
  out.reserve(names.size());
  for (const auto& n : names) out.push_back(method_by_name(n));
  return out;
}

void apply_method_options(const std::vector<std::string>& options, model_encoding_settings& settings) {
  for (const auto& o : options) {
    // Method names have no '=': the last one splits NAME=METHOD.
    const std::size_t eq = o.rfind('=');
    if (eq == std::string::npos) {
      settings.methods.push_back(method_by_name(o));
      continue;
    }
    const std::string pattern = o.substr(0, eq);
    if (pattern.empty())
      throw error(error_id::usage, "--method " + o + ": expected NAME=METHOD with a constraint name or pattern");
    settings.method_rules.push_back({pattern, method_by_name(o.substr(eq + 1))});
  }
}

std::string policy_names() {
  std::string names;
  for (const selection_policy p : all_policies) {
    if (!names.empty()) names += ", ";
    names += to_string(p);
  }
  return names;
}

selection_policy policy_from_name(const std::string& name) {
  if (auto p = find_policy(name)) return *p;
  throw error(error_id::usage, "unknown selection policy '" + name + "'; valid policies: " + policy_names());
}

progress_line::progress_line(bool force, bool never)
    : terminal_(::isatty(STDERR_FILENO) == 1), started_(now_seconds()) {
  enabled_ = !never && (force || terminal_);
  forced_ = force && !never;
}

progress_line::~progress_line() {
  if (shown_ && terminal_) std::fputc('\n', stderr);
}

void progress_line::show(std::uint64_t constraints_done, std::uint64_t clauses_written, bool final_line) {
  const double t = now_seconds();
  // Unasked, only runs long enough to need it show the line.
  if (!final_line && ((!forced_ && t - started_ < 1.0) || t - last_ < 0.25)) return;
  if (final_line && !shown_ && !forced_) return;
  last_ = t;
  shown_ = true;
  // A terminal gets one line rewritten in place; a pipe one line per update.
  const char* start = terminal_ ? "\r" : "";
  const char* end = terminal_ ? "" : "\n";
  if (total_) {
    std::fprintf(stderr, "%sclausewright: %llu of %llu constraints, %llu clauses written%s", start,
                 static_cast<unsigned long long>(constraints_done), static_cast<unsigned long long>(*total_),
                 static_cast<unsigned long long>(clauses_written), end);
  } else {
    std::fprintf(stderr, "%sclausewright: %llu constraints, %llu clauses written%s", start,
                 static_cast<unsigned long long>(constraints_done), static_cast<unsigned long long>(clauses_written),
                 end);
  }
  std::fflush(stderr);
}

void progress_line::done(std::uint64_t constraints_done, std::uint64_t clauses_written) {
  if (enabled_) show(constraints_done, clauses_written, true);
}

}  // namespace clausewright::tool
