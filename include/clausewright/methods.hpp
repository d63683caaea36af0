// clausewright: the method table and dispatch by method.
//
// One registry of every encoding: its name (the command-line tool lists and
// selects methods by these names), the constraint kinds it applies to, and
// whether it is arc-consistent. The arc-consistency column is what the test
// harness measures (tests/test_method_table.cpp fails when a claim here and
// the measurement disagree). Size formulas are given where one is published.
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>

#include "constraint.hpp"
#include "encodings/adder.hpp"
#include "encodings/bdd.hpp"
#include "encodings/bimander.hpp"
#include "encodings/binomial.hpp"
#include "encodings/bitwise.hpp"
#include "encodings/cardinality_network.hpp"
#include "encodings/commander.hpp"
#include "encodings/common.hpp"
#include "encodings/generalized_totalizer.hpp"
#include "encodings/ladder.hpp"
#include "encodings/modulo_totalizer.hpp"
#include "encodings/pairwise.hpp"
#include "encodings/product.hpp"
#include "encodings/sequential_counter.hpp"
#include "encodings/sequential_weight_counter.hpp"
#include "encodings/totalizer.hpp"
#include "error.hpp"

namespace clausewright {

enum class method_id : std::uint8_t {
  pairwise,
  ladder,
  bitwise,
  commander,
  product,
  bimander,
  sequential_counter,
  totalizer,
  modulo_totalizer,
  cardinality_network,
  sorting_network,
  binomial,
  bdd,
  adder,
  generalized_totalizer,
  sequential_weight_counter,
};

// Kinds a method applies to, as a bit set.
enum class applies : std::uint8_t { at_most_one = 1, cardinality = 2, linear = 4 };
[[nodiscard]] constexpr std::uint8_t operator|(applies a, applies b) noexcept {
  return static_cast<std::uint8_t>(static_cast<std::uint8_t>(a) | static_cast<std::uint8_t>(b));
}
[[nodiscard]] constexpr std::uint8_t operator|(std::uint8_t a, applies b) noexcept {
  return static_cast<std::uint8_t>(a | static_cast<std::uint8_t>(b));
}

struct method_info {
  method_id id;
  std::string_view name;       // the name users select it by
  std::uint8_t applies_to;     // bit set of `applies`
  bool arc_consistent;         // as measured by the harness
  std::string_view source;     // the publication it follows
  std::string_view size_note;  // closed-form size where published, else empty

  [[nodiscard]] constexpr bool applies_to_kind(applies a) const noexcept {
    return (applies_to & static_cast<std::uint8_t>(a)) != 0;
  }
};

inline constexpr std::array method_table{
    method_info{method_id::pairwise, "pairwise", static_cast<std::uint8_t>(applies::at_most_one), true,
                "folklore (binomial encoding)", "0 auxiliary variables, n(n-1)/2 clauses"},
    method_info{method_id::ladder, "ladder", static_cast<std::uint8_t>(applies::at_most_one), true,
                "Sinz 2005 (CP), k = 1; Gent & Nightingale 2004", "n-1 auxiliary variables, 3n-4 clauses"},
    method_info{method_id::bitwise, "bitwise", static_cast<std::uint8_t>(applies::at_most_one), true,
                "Frisch et al. 2005; Prestwich 2007", "ceil(log2 n) auxiliary variables, n*ceil(log2 n) clauses"},
    method_info{method_id::commander, "commander", static_cast<std::uint8_t>(applies::at_most_one), true,
                "Klieber & Kwon 2007", "groups of 3, n = 3^t: (n-3)/2 auxiliary variables, 3n-6 clauses (3.5n-6.5 "
                "for exactly-one)"},
    method_info{method_id::product, "product", static_cast<std::uint8_t>(applies::at_most_one), true,
                "Chen 2010", "2*sqrt(n) + O(n^(1/4)) auxiliary variables, 2n + 4*sqrt(n) + O(n^(1/4)) clauses"},
    method_info{method_id::bimander, "bimander", static_cast<std::uint8_t>(applies::at_most_one), true,
                "Nguyen & Mai 2015", "groups of 4, b = ceil(log2 ceil(n/4)): b auxiliary variables, n*b + 6 "
                "clauses per group of 4"},
    method_info{method_id::sequential_counter, "sequential-counter", applies::at_most_one | applies::cardinality, true,
                "Sinz 2005 (CP)", "at most k, 1 <= k < n: k(n-1) auxiliary variables, 2nk + n - 3k - 1 clauses"},
    method_info{method_id::totalizer, "totalizer", applies::at_most_one | applies::cardinality, true,
                "Bailleux & Boufkhad 2003 (CP); outputs cut at k+1, Büttner & Rintanen 2005",
                "a node joining counts of sizes a and b: (a+1)(b+1)-1 clauses per direction before cutting; "
                "O(n log k) auxiliary variables, O(nk) clauses"},
    method_info{method_id::modulo_totalizer, "modulo-totalizer", applies::at_most_one | applies::cardinality,
                false, "Ogawa, Liu, Hasegawa, Koshimura, Fujita 2013 (ICTAI)",
                "divisor p = ceil(sqrt k): O(n sqrt k) auxiliary variables and clauses"},
    method_info{method_id::cardinality_network, "cardinality-network", applies::at_most_one | applies::cardinality,
                true, "Asín, Nieuwenhuis, Oliveras, Rodríguez-Carbonell 2011 (Constraints); Batcher 1968",
                "O(n log^2 k) comparators, 3 clauses and 2 auxiliary variables each per direction"},
    method_info{method_id::sorting_network, "sorting-network", applies::at_most_one | applies::cardinality,
                true, "Batcher 1968 (odd-even merge sort); Eén & Sörensson 2006 (JSAT)",
                "n = 2^m: (m^2 - m + 4) * 2^(m-2) - 1 comparators, 3 clauses and 2 auxiliary variables each per "
                "direction (inputs padded with false to a power of two)"},
    method_info{method_id::binomial, "binomial", applies::at_most_one | applies::cardinality, true,
                "folklore (direct encoding)", "0 auxiliary variables; C(n, k+1) clauses for <=, C(n, n-k+1) for >="},
    method_info{method_id::bdd, "bdd", applies::at_most_one | applies::cardinality | applies::linear, true,
                "Abío, Nieuwenhuis, Oliveras, Rodríguez-Carbonell, Mayer-Eichberger 2012 (JAIR); "
                "Eén & Sörensson 2006 (JSAT)",
                "one node per distinct interval of bounds, O(nK); per node 2 clauses (<=, >=), 3 (=), 6 (full)"},
    method_info{method_id::adder, "adder", applies::at_most_one | applies::cardinality | applies::linear, false,
                "Warners 1998 (IPL); Eén & Sörensson 2006 (JSAT)",
                "O(n log a_max): full adder 8 + 6 clauses, half adder 4 + 3 (one direction: 4 + 3, 2 + 1 or 2 + 2)"},
    method_info{method_id::generalized_totalizer, "generalized-totalizer",
                applies::at_most_one | applies::cardinality | applies::linear, true,
                "Joshi, Martins, Manquinho 2015 (CP)",
                "a node of children with p and q distinct sums (cut at K+1): (p+1)(q+1)-1 clauses per direction"},
    method_info{method_id::sequential_weight_counter, "sequential-weight-counter",
                applies::at_most_one | applies::cardinality | applies::linear, true,
                "Hölldobler, Manthey, Steinke 2012 (KI)", "<= K: K(n-1) registers, O(nK) clauses"},
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
    case constraint_kind::clause: return true;
    case constraint_kind::at_most_one:
    case constraint_kind::exactly_one:
      return m.applies_to_kind(applies::at_most_one) || m.applies_to_kind(applies::cardinality) ||
             m.applies_to_kind(applies::linear);
    case constraint_kind::cardinality:
      return m.applies_to_kind(applies::cardinality) || m.applies_to_kind(applies::linear);
    case constraint_kind::linear: return m.applies_to_kind(applies::linear);
  }
  return false;
}

// Throws method_not_applicable, naming the constraint, unless `id` can
// encode `c`.
inline void require_applicable(method_id id, const normalized_constraint& c) {
  if (!can_encode(id, c))
    throw error(error_id::method_not_applicable,
                "method " + std::string(info(id).name) + " cannot encode a " + std::string(to_string(c.kind)) +
                    " constraint",
                c.where());
}

// Encodes a normalised constraint with the given method: its units as unit
// clauses, the empty clause when it is impossible, nothing when it is
// trivially true, and otherwise the method's clauses.
template <class Sink>
void encode_with(method_id id, Sink& out, variable_pool& pool, const normalized_constraint& c,
                 const encode_options& options = {}) {
  static_assert(check_clause_sink<Sink>());
  if (c.kind == constraint_kind::constant_false) {
    out.add_clause(std::span<const literal>());
    return;
  }
  for (const literal u : c.units) emit(out, u);
  switch (c.kind) {
    case constraint_kind::constant_true: return;
    case constraint_kind::clause: out.add_clause(std::span<const literal>(c.literals)); return;
    default: break;
  }
  require_applicable(id, c);
  switch (id) {
    case method_id::pairwise: encode_pairwise(out, pool, c, options); return;
    case method_id::ladder: encode_ladder(out, pool, c, options); return;
    case method_id::bitwise: encode_bitwise(out, pool, c, options); return;
    case method_id::commander: encode_commander(out, pool, c, options); return;
    case method_id::product: encode_product(out, pool, c, options); return;
    case method_id::bimander: encode_bimander(out, pool, c, options); return;
    case method_id::sequential_counter: encode_sequential_counter(out, pool, c, options); return;
    case method_id::totalizer: encode_totalizer(out, pool, c, options); return;
    case method_id::modulo_totalizer: encode_modulo_totalizer(out, pool, c, options); return;
    case method_id::cardinality_network: encode_cardinality_network(out, pool, c, options); return;
    case method_id::sorting_network: encode_sorting_network(out, pool, c, options); return;
    case method_id::binomial: encode_binomial(out, pool, c, options); return;
    case method_id::bdd: encode_bdd(out, pool, c, options); return;
    case method_id::adder: encode_adder(out, pool, c, options); return;
    case method_id::generalized_totalizer: encode_generalized_totalizer(out, pool, c, options); return;
    case method_id::sequential_weight_counter: encode_sequential_weight_counter(out, pool, c, options); return;
  }
}

}  // namespace clausewright
