#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <cstdarg>
#include <cstdio>
#include <cstring>

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

CLI::Validator budget_check() {
  return CLI::Validator(
      [](std::string& text) {
        const bool digits =
            !text.empty() && text.size() <= 16 && text.find_first_not_of("0123456789") == std::string::npos;
        const std::uint64_t value = digits ? std::stoull(text) : 0;
        if (value != 0 && value <= max_clause_budget) return std::string();
        return "expected a clause budget from 1 to " + std::to_string(max_clause_budget) + ", found '" + text + "'";
      },
      "N", "clause budget");
}

namespace {

[[noreturn]] void standard_output_failed(int code) {
  throw error(error_id::io, std::string("writing standard output failed") +
                                (code != 0 ? std::string(": ") + std::strerror(code) : std::string()));
}

// The commands' standard output, written with write(2) in blocks: stdio's
// buffered writes do not keep errno when a flush fails inside them.
class standard_output {
 public:
  static constexpr std::size_t block = std::size_t{1} << 16;

  void put(std::string_view text) {
    if (pending_.size() + text.size() > block) flush();
    if (text.size() > block) {
      write_all(text);
      return;
    }
    pending_.append(text);
  }
  void flush() {
    std::string text;
    text.swap(pending_);  // dropped even when the write fails: reported once
    pending_.reserve(block);
    write_all(text);
  }

 private:
  static void write_all(std::string_view text) {
    const char* data = text.data();
    std::size_t size = text.size();
    while (size > 0) {
      const ::ssize_t n = ::write(STDOUT_FILENO, data, size);
      if (n < 0) {
        if (errno == EINTR) continue;
        standard_output_failed(errno);
      }
      data += n;
      size -= static_cast<std::size_t>(n);
    }
  }
  std::string pending_;
};

standard_output& stdout_buffer() {
  static standard_output out;
  return out;
}

}  // namespace

void out_text(std::string_view text) {
  // What stdio holds (a --help text) goes first.
  if (std::fflush(stdout) != 0) standard_output_failed(errno);
  stdout_buffer().put(text);
}

void out_printf(const char* format, ...) {
  // Formatted here and written by out_text: stdio's formatted writes lose
  // errno when their flush fails half-way.
  std::va_list args;
  va_start(args, format);
  std::va_list again;
  va_copy(again, args);
  const int n = std::vsnprintf(nullptr, 0, format, args);
  va_end(args);
  if (n < 0) {
    va_end(again);
    throw error(error_id::io, "formatting the output failed");
  }
  std::string text(static_cast<std::size_t>(n) + 1, '\0');
  (void)std::vsnprintf(text.data(), text.size(), format, again);
  va_end(again);
  text.pop_back();
  out_text(text);
}

void finish_standard_output() {
  errno = 0;
  if (std::fflush(stdout) != 0 || std::ferror(stdout) != 0) standard_output_failed(errno);
  stdout_buffer().flush();
}

void warn_never_holds(const error_position& where, std::string_view command) {
  std::fprintf(stderr, "clausewright %.*s: warning: %s: this constraint can never hold (normalised to false)\n",
               static_cast<int>(command.size()), command.data(), where.describe().c_str());
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
