// clausewright: what every encoding file declares about its method.
//
// An encoding file (encodings/NAME.hpp) ends with one `struct NAME_encoding`
// per method it implements:
//
//   struct NAME_encoding {
//     static constexpr encoding_descriptor descriptor{...};  // name, kinds, arc-consistency, ...
//     template <class Sink>
//     static void encode(Sink&, variable_pool&, const normalized_constraint&, const encode_options&);
//     // optional: the exact size where a closed form is known (units not counted)
//     static std::optional<encoding_size> predict(const normalized_constraint&, const encode_options&);
//     // optional: a cheap lower bound on the clauses, which may stop once past `enough`
//     static std::uint64_t lower_bound(const normalized_constraint&, const encode_options&, std::uint64_t enough);
//   };
//
// encodings/all.hpp lists the files; methods.hpp builds the method table, the
// dispatch and the size predictions from these declarations, so adding an
// encoding touches its file and the list.
#pragma once

#include <algorithm>
#include <cstdint>
#include <string_view>

#include "../sink.hpp"

namespace clausewright {

// Kinds a method applies to, as a bit set.
enum class applies : std::uint8_t { at_most_one = 1, cardinality = 2, linear = 4 };
[[nodiscard]] constexpr std::uint8_t operator|(applies a, applies b) noexcept {
  return static_cast<std::uint8_t>(static_cast<std::uint8_t>(a) | static_cast<std::uint8_t>(b));
}
[[nodiscard]] constexpr std::uint8_t operator|(std::uint8_t a, applies b) noexcept {
  return static_cast<std::uint8_t>(a | static_cast<std::uint8_t>(b));
}

struct encoding_descriptor {
  std::string_view name;         // the name users select it by
  std::uint8_t applies_to;       // bit set of `applies`
  bool arc_consistent;           // as measured by the harness (tests/test_method_table.cpp)
  std::string_view source;       // the publication it follows
  std::string_view size_note;    // closed-form size where published
  std::string_view limits;       // what stops it before the clause budget does
  bool objective_bound = false;  // an incremental objective bound sits on it (optimize.hpp)
  // Applies only to rows with at-most-one groups (normalized_constraint::
  // group_of, groups.hpp), and is correct only with the at-most-one
  // constraints of the groups in the same formula.
  bool needs_groups = false;
};

namespace detail {
// Clauses of one length, added to a size.
constexpr void add_clauses(encoding_size& s, std::uint64_t count, std::uint64_t length) noexcept {
  if (count == 0) return;
  s.clauses += count;
  s.literals += count * length;
  s.longest_clause = std::max(s.longest_clause, length);
}
}  // namespace detail

}  // namespace clausewright
