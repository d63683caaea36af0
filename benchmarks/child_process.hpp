// Shared by the benchmark programs that time commands: a body or a command
// run in a child process, its wall time, peak memory and exit status.
#pragma once

#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>
#include <vector>

namespace clausewright_bench {

inline double now() {
  return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count();
}

struct child_result {
  double seconds = 0;
  long max_rss_kib = 0;
  int status = -1;
};

// Runs body() in a child process; its return value is the exit status (3
// when it throws).
template <class Body>
child_result in_child(Body body) {
  std::fflush(stdout);  // or the child's stdio would write the parent's pending output again
  std::fflush(stderr);
  const double start = now();
  const pid_t pid = ::fork();
  if (pid == 0) {
    int rc = 0;
    try {
      rc = body();
    } catch (const std::exception& e) {
      std::fprintf(stderr, "child failed: %s\n", e.what());
      rc = 3;
    }
    std::_Exit(rc);
  }
  int status = 0;
  rusage usage{};
  ::wait4(pid, &status, 0, &usage);
  return {now() - start, usage.ru_maxrss, WIFEXITED(status) ? WEXITSTATUS(status) : -1};
}

// Runs argv (argv[0] a path), its standard output into `stdout_path` when
// given: exit status 4 when that cannot be opened, 5 when argv[0] cannot run.
inline child_result run_command(const std::vector<std::string>& argv, const std::string& stdout_path = {}) {
  return in_child([&] {
    if (!stdout_path.empty() && std::freopen(stdout_path.c_str(), "w", stdout) == nullptr) return 4;
    std::vector<char*> args;
    args.reserve(argv.size() + 1);
    for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
    args.push_back(nullptr);
    ::execv(args[0], args.data());
    std::perror("execv");
    return 5;
  });
}

inline double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v.empty() ? 0 : v[v.size() / 2];
}

}  // namespace clausewright_bench
