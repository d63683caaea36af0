// Running the command-line tool from tests: files, shell quoting, and one
// run of `clausewright ARGS` with its exit code and both outputs.
#pragma once

#include <sys/wait.h>

#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

namespace tool_run {

namespace fs = std::filesystem;

struct run_result {
  int code = -1;   // exit status, -1 when killed by a signal
  int signal = 0;  // the signal that ended it
  std::string out;
  std::string err;
  double seconds = 0;  // wall-clock time of the run
};

inline std::string read_file(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

inline void write_file(const fs::path& p, const std::string& text) {
  std::ofstream out(p, std::ios::binary);
  out << text;
}

// `s` as one word for /bin/sh.
inline std::string quote(const std::string& s) {
  std::string q = "'";
  for (const char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

// "prefix" + n, appended: g++ 12 warns falsely (-Wrestrict) on the sum.
inline std::string with_number(const char* prefix, long long n) {
  std::string s = prefix;
  s += std::to_string(n);
  return s;
}

inline bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// Runs `program ARGS` through the shell, standard input from `input` (else
// /dev/null), its outputs caught in files of `dir`.
inline run_result run_program(const std::string& program, const std::string& args, const fs::path& dir,
                              const std::string& input = {}) {
  const fs::path out = dir / ".stdout";
  const fs::path err = dir / ".stderr";
  std::string command = quote(program) + " " + args + " >" + quote(out.string()) + " 2>" + quote(err.string());
  command += input.empty() ? " </dev/null" : " <" + quote(input);
  const auto start = std::chrono::steady_clock::now();
  const int status = std::system(command.c_str());
  run_result r;
  r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.signal = WIFSIGNALED(status) ? WTERMSIG(status) : 0;
  r.out = read_file(out);
  r.err = read_file(err);
  return r;
}

}  // namespace tool_run
