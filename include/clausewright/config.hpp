// clausewright: version and the internal assertion macro.
#pragma once

#include <cstdio>
#include <cstdlib>

#define CLAUSEWRIGHT_VERSION_MAJOR 0
#define CLAUSEWRIGHT_VERSION_MINOR 1
#define CLAUSEWRIGHT_VERSION_PATCH 0
#define CLAUSEWRIGHT_VERSION_STRING "0.1.0"

// Internal invariants (never user input: user input raises clausewright::error).
// Define CLAUSEWRIGHT_ASSERT before including any clausewright header to route
// failures elsewhere, or define CLAUSEWRIGHT_NO_ASSERT to compile them out.
#ifndef CLAUSEWRIGHT_ASSERT
#ifdef CLAUSEWRIGHT_NO_ASSERT
#define CLAUSEWRIGHT_ASSERT(condition, message) ((void)0)
#else
#define CLAUSEWRIGHT_ASSERT(condition, message)                                      \
  ((condition) ? (void)0                                                             \
               : ::clausewright::detail::assertion_failed(__FILE__, __LINE__, (message)))
#endif
#endif

namespace clausewright::detail {

[[noreturn]] inline void assertion_failed(const char* file, int line, const char* message) {
  std::fprintf(stderr, "%s:%d: clausewright internal error: %s\n", file, line, message);
  std::abort();
}

}  // namespace clausewright::detail
