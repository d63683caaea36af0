// Sequential weight counter: Hölldobler, Manthey, Steinke 2012, "A compact
// encoding of pseudo-Boolean constraints into SAT" (KI).
//
// Sinz's sequential counter with weights: register s(i,j) means "the inputs
// x1..xi weigh at least j". For sum w_i x_i <= K (every w_i <= K) the
// published clauses over rows i = 1..n-1, j = 1..K are
//     ~xi | s(i,j)                       for j <= w_i;
//     ~s(i-1,j) | s(i,j)                 (i > 1);
//     ~xi | ~s(i-1,j) | s(i,j+w_i)       for j <= K - w_i (i > 1);
//     ~xi | ~s(i-1,K+1-w_i)              for i = 2..n;
// that is K(n-1) registers and O(nK) clauses. Arc-consistent (measured).
//
// >= is encoded as <= over the negated inputs (negated_view), as Sinz does.
// = and full_equivalence use one counter over all n rows with registers up
// to K+1 ("at least K+1" collapses the rest), defined in both directions,
// where row i holds only the registers its prefix can reach; then = is the
// two unit clauses ~s(n,K+1) and s(n,K). The lower direction is
//     s(i,j) -> s(i-1,j) | xi,   s(i,j) -> s(i-1,j) | s(i-1,j-w_i).
// The register count is checked against the variable range before anything
// is emitted: a bound too large for O(nK) registers is over budget.
#pragma once

#include <algorithm>
#include <cstdint>
#include <optional>
#include <span>
#include <string>

#include "common.hpp"
#include "descriptor.hpp"

namespace clausewright {

namespace detail {

inline void check_register_count(std::int64_t rows, std::int64_t width, const variable_pool& pool,
                                 const error_position& where) {
  std::int64_t registers = 0;
  const std::int64_t left = max_variable - pool.top();
  const bool overflow = __builtin_mul_overflow(rows, width, &registers);
  if (overflow || registers > left)
    throw error(error_id::over_budget,
                "the sequential weight counter needs " +
                    (overflow ? std::string("more than 2^63") : std::to_string(registers)) + " registers, beyond the " +
                    std::to_string(left) + " variables left",
                where);
}

}  // namespace detail

// The published one-directional counter for sum <= k (1 <= w_i <= k).
template <class Sink>
void encode_sequential_weight_at_most(Sink& out, variable_pool& pool, std::span<const literal> x,
                                      std::span<const std::int64_t> w, std::int64_t k,
                                      const error_position& where = {}) {
  const std::size_t n = x.size();
  if (w.size() != n) throw error(error_id::usage, "the sequential weight counter needs one weight per literal", where);
  for (const std::int64_t a : w)
    if (a <= 0 || a > k)
      throw error(error_id::usage, "the sequential weight counter takes weights in 1..k (a normalised constraint)",
                  where);
  if (n < 2) return;  // a single weight <= k always holds
  detail::check_register_count(static_cast<std::int64_t>(n - 1), k, pool, where);
  const std::int32_t first = pool.fresh_block(k * static_cast<std::int64_t>(n - 1)).dimacs();
  auto s = [first, k](std::size_t i, std::int64_t j) {  // 1 <= i <= n-1, 1 <= j <= k
    return literal(first + static_cast<std::int32_t>(static_cast<std::int64_t>(i - 1) * k + (j - 1)));
  };
  for (std::size_t i = 1; i <= n; ++i) {
    const literal xi = x[i - 1];
    const std::int64_t wi = w[i - 1];
    if (i < n) {
      for (std::int64_t j = 1; j <= wi; ++j) emit(out, ~xi, s(i, j));
      if (i > 1) {
        for (std::int64_t j = 1; j <= k; ++j) emit(out, ~s(i - 1, j), s(i, j));
        for (std::int64_t j = 1; j <= k - wi; ++j) emit(out, ~xi, ~s(i - 1, j), s(i, j + wi));
      }
    }
    if (i > 1) emit(out, ~xi, ~s(i - 1, k + 1 - wi));
  }
}

// A counter over all inputs with registers up to `cut` (>= 1), in the given
// sides. Returns the last row: outputs[j-1] <-> "the inputs weigh at least j"
// for j up to the row's width (upper side: weight >= j sets it; lower: it
// implies weight >= j).
template <class Sink>
unary_outputs build_sequential_weight_counter(Sink& out, variable_pool& pool, std::span<const literal> x,
                                              std::span<const std::int64_t> w, std::int64_t cut, sides which,
                                              const error_position& where = {}) {
  if (w.size() != x.size())
    throw error(error_id::usage, "the sequential weight counter needs one weight per literal", where);
  if (cut < 1) throw error(error_id::usage, "the sequential weight counter needs a cut of at least 1", where);
  // Registers row i can reach: min(prefix weight, cut); check the total first.
  std::int64_t total = 0;
  std::int64_t prefix = 0;
  for (const std::int64_t a : w) {
    if (a <= 0)
      throw error(error_id::usage, "the sequential weight counter takes positive weights (a normalised constraint)",
                  where);
    prefix = detail::checked_add(prefix, a, where, "the sum of the coefficients");
    total = detail::checked_add(total, std::min(prefix, cut), where, "the register count");
  }
  detail::check_register_count(1, total, pool, where);
  unary_outputs result;
  result.built = which;
  std::int32_t previous = 0;  // first register of row i-1
  std::int64_t previous_width = 0;
  prefix = 0;
  for (std::size_t i = 0; i < x.size(); ++i) {
    const literal xi = x[i];
    const std::int64_t wi = w[i];
    prefix += wi;
    const std::int64_t width = std::min(prefix, cut);
    const std::int32_t current = pool.fresh_block(width).dimacs();
    auto s = [current](std::int64_t j) { return literal(current + static_cast<std::int32_t>(j - 1)); };
    auto p = [previous](std::int64_t j) { return literal(previous + static_cast<std::int32_t>(j - 1)); };
    if (has_upper(which)) {
      for (std::int64_t j = 1; j <= std::min(wi, width); ++j) emit(out, ~xi, s(j));
      for (std::int64_t j = 1; j <= previous_width; ++j) emit(out, ~p(j), s(j));
      for (std::int64_t j = 1; j <= std::min(previous_width, cut - wi); ++j) emit(out, ~xi, ~p(j), s(j + wi));
    }
    if (has_lower(which)) {
      for (std::int64_t j = 1; j <= width; ++j) {
        const bool kept = j <= previous_width;  // s(i-1,j) exists
        if (kept)
          emit(out, ~s(j), p(j), xi);
        else
          emit(out, ~s(j), xi);
        if (j - wi >= 1) {
          if (kept)
            emit(out, ~s(j), p(j), p(j - wi));
          else
            emit(out, ~s(j), p(j - wi));
        }
      }
    }
    previous = current;
    previous_width = width;
  }
  result.outputs.reserve(static_cast<std::size_t>(previous_width));
  for (std::int64_t j = 1; j <= previous_width; ++j)
    result.outputs.push_back(literal(previous + static_cast<std::int32_t>(j - 1)));
  return result;
}

template <class Sink>
void encode_sequential_weight_counter(Sink& out, variable_pool& pool, const normalized_constraint& c,
                                      const encode_options& options) {
  detail::encode_as_at_most(out, c, [&](const normalized_constraint& le) {
    if (!options.full_equivalence && le.rel == relation::le) {
      if (le.bound == 0) {
        for (const literal l : le.literals) emit(out, ~l);
        return;
      }
      // Weights above the bound (possible after negated_view) force their input false.
      bool clipped = false;
      for (const std::int64_t a : le.coefficients) clipped = clipped || a > le.bound;
      if (!clipped) {
        encode_sequential_weight_at_most(out, pool, le.literals, le.coefficients, le.bound, c.where());
        return;
      }
      std::vector<literal> kept;
      std::vector<std::int64_t> weights;
      for (std::size_t i = 0; i < le.size(); ++i) {
        if (le.coefficients[i] > le.bound) {
          emit(out, ~le.literals[i]);
        } else {
          kept.push_back(le.literals[i]);
          weights.push_back(le.coefficients[i]);
        }
      }
      encode_sequential_weight_at_most(out, pool, kept, weights, le.bound, c.where());
      return;
    }
    const std::int64_t cut = detail::checked_add(le.bound, 1, c.where(), "the bound plus one");
    const unary_outputs row =
        build_sequential_weight_counter(out, pool, le.literals, le.coefficients, cut, sides::both, c.where());
    const auto k = static_cast<std::size_t>(le.bound);
    if (k < row.size()) emit(out, row.at_most(k));
    if (le.rel == relation::eq) {
      if (k == 0) {
        for (const literal l : le.literals) emit(out, ~l);
      } else if (k <= row.size()) {
        emit(out, row.at_least(k));
      } else {
        out.add_clause(std::span<const literal>());
      }
    }
  });
}

// The exact size of the published one-directional counter (<= without
// full equivalence), from the clause list above: rows i < n give w_i binary
// clauses, rows 1 < i < n another K binary and K - w_i ternary ones, rows
// i > 1 one binary clause; K(n-1) registers. Empty for other cases.
[[nodiscard]] inline std::optional<encoding_size> sequential_weight_counter_size(const normalized_constraint& c,
                                                                                 const encode_options& options) {
  if (options.full_equivalence || c.rel != relation::le || c.kind == constraint_kind::clause) return std::nullopt;
  const auto k = static_cast<std::uint64_t>(c.bound);
  std::uint64_t binary = 0;
  std::uint64_t ternary = 0;
  std::uint64_t forced = 0;  // weights above the bound: unit clauses
  std::vector<std::uint64_t> kept;
  kept.reserve(c.size());
  for (const std::int64_t a : c.coefficients) {
    if (static_cast<std::uint64_t>(a) > k)
      ++forced;
    else
      kept.push_back(static_cast<std::uint64_t>(a));
  }
  const std::uint64_t n = kept.size();
  encoding_size s;
  if (n >= 2) {
    for (std::uint64_t i = 1; i <= n; ++i) {
      const std::uint64_t w = kept[i - 1];
      if (i < n) {
        binary += w;
        if (i > 1) {
          binary += k;
          ternary += k - w;
        }
      }
      if (i > 1) ++binary;
    }
    s.variables = k * (n - 1);
  }
  s.clauses = forced + binary + ternary;
  s.literals = forced + 2 * binary + 3 * ternary;
  s.longest_clause = ternary != 0 ? 3 : (binary != 0 ? 2 : (forced != 0 ? 1 : 0));
  return s;
}

// The method table's entry (methods.hpp) and what the pipeline knows of its size.
struct sequential_weight_counter_encoding {
  static constexpr encoding_descriptor descriptor{"sequential-weight-counter",
                                                  applies::at_most_one | applies::cardinality | applies::linear,
                                                  true,
                                                  "Hölldobler, Manthey, Steinke 2012 (KI)",
                                                  "<= K: K(n-1) registers, O(nK) clauses",
                                                  "K(n-1) registers must fit the variable range",
                                                  true};
  template <class Sink>
  static void encode(Sink& out, variable_pool& pool, const normalized_constraint& c, const encode_options& options) {
    encode_sequential_weight_counter(out, pool, c, options);
  }
  [[nodiscard]] static std::optional<encoding_size> predict(const normalized_constraint& c,
                                                            const encode_options& options) {
    return sequential_weight_counter_size(c, options);
  }
};

}  // namespace clausewright
