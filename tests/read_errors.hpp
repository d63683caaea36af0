// Shared by the reader tests: run a reader on bad text and capture the
// position and message of the clausewright::error it must throw.
#pragma once

#include <gtest/gtest.h>
#include <clausewright/error.hpp>

#include <cstdint>
#include <string>

namespace cw_test {

struct failure {
  std::string message;
  std::uint64_t line = 0;
  std::uint64_t column = 0;
};

// Calls read(text); the error must be a parse error naming `file`.
template <class Read>
failure capture_read_error(Read&& read, const std::string& text, const std::string& file) {
  try {
    read(text);
  } catch (const clausewright::error& e) {
    EXPECT_EQ(e.id(), clausewright::error_id::parse) << e.what();
    EXPECT_EQ(e.where().file, file) << e.what();
    return {e.what(), e.where().line, e.where().column};
  } catch (const std::exception& e) {
    ADD_FAILURE() << "not a clausewright::error: " << e.what();
    return {};
  }
  ADD_FAILURE() << "no error for:\n" << text.substr(0, 200);
  return {};
}

}  // namespace cw_test

// The test file defines read_error(text) -> cw_test::failure.
#define EXPECT_ERROR_AT(text, line_, column_, part)                          \
  do {                                                                       \
    const cw_test::failure f_ = read_error(text);                            \
    EXPECT_EQ(f_.line, static_cast<std::uint64_t>(line_)) << f_.message;     \
    EXPECT_EQ(f_.column, static_cast<std::uint64_t>(column_)) << f_.message; \
    EXPECT_NE(f_.message.find(part), std::string::npos) << f_.message;       \
  } while (false)
