// clausewright: the method table and dispatch by method.
//
// One registry of every encoding, built from the descriptors the encoding
// files declare (encodings/descriptor.hpp, listed in encodings/all.hpp): its
// name (the command-line tool lists and selects methods by these names), the
// constraint kinds it applies to, and whether it is arc-consistent. The arc-consistency column is what the test
// harness measures (tests/test_method_table.cpp fails when a claim here and
// the measurement disagree). Size formulas are given where one is published.
#pragma once

#include <array>
#include <concepts>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>

#include "constraint.hpp"
#include "encodings/all.hpp"
#include "encodings/common.hpp"
#include "encodings/descriptor.hpp"
#include "error.hpp"

namespace clausewright {

enum class method_id : std::uint8_t {
#define CLAUSEWRIGHT_METHOD_ID(name) name,
  CLAUSEWRIGHT_ENCODINGS(CLAUSEWRIGHT_METHOD_ID)
#undef CLAUSEWRIGHT_METHOD_ID
};

struct method_info {
  method_id id;
  std::string_view name;       // the name users select it by
  std::uint8_t applies_to;     // bit set of `applies`
  bool arc_consistent;         // as measured by the harness
  std::string_view source;     // the publication it follows
  std::string_view size_note;  // closed-form size where published, else empty
  std::string_view limits;     // what stops it before the clause budget does
  bool objective_bound;        // an incremental objective bound sits on it
  bool needs_groups;           // only rows with at-most-one groups (groups.hpp)

  [[nodiscard]] constexpr bool applies_to_kind(applies a) const noexcept {
    return (applies_to & static_cast<std::uint8_t>(a)) != 0;
  }
};

namespace detail {
[[nodiscard]] constexpr method_info row(method_id id, const encoding_descriptor& d) noexcept {
  return {id,          d.name,   d.applies_to,      d.arc_consistent, d.source,
          d.size_note, d.limits, d.objective_bound, d.needs_groups};
}
template <class E>
concept predicts = requires(const normalized_constraint& c, const encode_options& o) {
  { E::predict(c, o) } -> std::same_as<std::optional<encoding_size>>;
};
template <class E>
concept bounds_below = requires(const normalized_constraint& c, const encode_options& o, std::uint64_t enough) {
  { E::lower_bound(c, o, enough) } -> std::same_as<std::uint64_t>;
};
template <class E>
[[nodiscard]] std::optional<encoding_size> predict_by(const normalized_constraint& c, const encode_options& o) {
  if constexpr (predicts<E>)
    return E::predict(c, o);
  else
    return std::nullopt;
}
template <class E>
[[nodiscard]] std::uint64_t lower_bound_by(const normalized_constraint& c, const encode_options& o,
                                           std::uint64_t enough) {
  if constexpr (bounds_below<E>)
    return E::lower_bound(c, o, enough);
  else
    return 0;
}
}  // namespace detail

// Built from the encodings' descriptors, in the order of the list.
inline constexpr std::array method_table{
#define CLAUSEWRIGHT_METHOD_ROW(name) detail::row(method_id::name, name##_encoding::descriptor),
    CLAUSEWRIGHT_ENCODINGS(CLAUSEWRIGHT_METHOD_ROW)
#undef CLAUSEWRIGHT_METHOD_ROW
};

[[nodiscard]] constexpr const method_info& info(method_id id) noexcept {
  for (const auto& m : method_table)
    if (m.id == id) return m;
  return method_table[0];  // unreachable: every id is in the table
}

[[nodiscard]] inline std::optional<method_id> find_method(std::string_view name) noexcept {
  for (const auto& m : method_table)
    if (m.name == name) return m.id;
  return std::nullopt;
}

// The method for a name, or an error listing the valid names.
[[nodiscard]] inline method_id method_by_name(std::string_view name) {
  if (auto id = find_method(name)) return *id;
  std::string valid;
  for (const auto& m : method_table) {
    if (!valid.empty()) valid += ", ";
    valid += m.name;
  }
  throw error(error_id::unknown_method, "unknown method '" + std::string(name) + "'; valid methods: " + valid);
}

// Whether `id` can encode `c` (constants and single clauses every method can).
[[nodiscard]] constexpr bool can_encode(method_id id, const normalized_constraint& c) noexcept {
  const method_info& m = info(id);
  switch (c.kind) {
    case constraint_kind::constant_true:
    case constraint_kind::constant_false:
    case constraint_kind::clause:
      return true;
    default:
      break;
  }
  // A group method needs a group of two literals or more (see groups.hpp).
  if (m.needs_groups) {
    if (!c.has_groups()) return false;
    return (c.kind == constraint_kind::cardinality && m.applies_to_kind(applies::cardinality)) ||
           (c.kind == constraint_kind::linear && m.applies_to_kind(applies::linear));
  }
  switch (c.kind) {
    case constraint_kind::constant_true:
    case constraint_kind::constant_false:
    case constraint_kind::clause:
      return true;
    case constraint_kind::at_most_one:
    case constraint_kind::exactly_one:
      return m.applies_to_kind(applies::at_most_one) || m.applies_to_kind(applies::cardinality) ||
             m.applies_to_kind(applies::linear);
    case constraint_kind::cardinality:
      return m.applies_to_kind(applies::cardinality) || m.applies_to_kind(applies::linear);
    case constraint_kind::linear:
      return m.applies_to_kind(applies::linear);
  }
  return false;
}

// Throws method_not_applicable, naming the constraint, unless `id` can
// encode `c`.
inline void require_applicable(method_id id, const normalized_constraint& c) {
  if (!can_encode(id, c) && info(id).needs_groups)
    throw error(error_id::method_not_applicable,
                "method " + std::string(info(id).name) + " needs at-most-one groups in the row (two or more of its " +
                    "literals in one at-most-one, exactly-one or cardinality <= 1 constraint); this " +
                    std::string(to_string(c.kind)) + " constraint has none",
                c.where());
  if (!can_encode(id, c))
    throw error(
        error_id::method_not_applicable,
        "method " + std::string(info(id).name) + " cannot encode a " + std::string(to_string(c.kind)) + " constraint",
        c.where());
}

// Encodes a normalised constraint with the given method: its units as unit
// clauses, the empty clause when it is impossible, nothing when it is
// trivially true, and otherwise the method's clauses.
// What every method writes alike: the empty clause of an impossible
// constraint, the units, a single clause. Returns whether that was all.
template <class Sink>
bool encode_common_part(Sink& out, const normalized_constraint& c) {
  if (c.kind == constraint_kind::constant_false) {
    out.add_clause(std::span<const literal>());
    return true;
  }
  for (const literal u : c.units) emit(out, u);
  switch (c.kind) {
    case constraint_kind::constant_true:
      return true;
    case constraint_kind::clause:
      out.add_clause(std::span<const literal>(c.literals));
      return true;
    default:
      return false;
  }
}

template <class Sink>
void encode_with(method_id id, Sink& out, variable_pool& pool, const normalized_constraint& c,
                 const encode_options& options = {}) {
  static_assert(check_clause_sink<Sink>());
  if (encode_common_part(out, c)) return;
  require_applicable(id, c);
  switch (id) {
#define CLAUSEWRIGHT_DISPATCH(name)                 \
  case method_id::name:                             \
    name##_encoding::encode(out, pool, c, options); \
    return;
    CLAUSEWRIGHT_ENCODINGS(CLAUSEWRIGHT_DISPATCH)
#undef CLAUSEWRIGHT_DISPATCH
  }
}

// The same for a constraint that may need no method: constants and single
// clauses are written without one; any other kind needs `id`.
template <class Sink>
void encode_with(std::optional<method_id> id, Sink& out, variable_pool& pool, const normalized_constraint& c,
                 const encode_options& options = {}) {
  if (id) {
    encode_with(*id, out, pool, c, options);
    return;
  }
  if (c.is_constant() || c.kind == constraint_kind::clause) {
    encode_common_part(out, c);
    return;
  }
  throw error(error_id::method_not_applicable, "a " + std::string(to_string(c.kind)) + " constraint needs a method",
              c.where());
}

}  // namespace clausewright
