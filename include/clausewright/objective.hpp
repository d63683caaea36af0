// clausewright: an objective (a weighted sum of literals to minimise) and its
// normal form, the one every objective bound takes.
#pragma once

#include <algorithm>
#include <array>
#include <chrono>
#include <cstdint>
#include <functional>
#include <initializer_list>
#include <map>
#include <memory>
#include <numeric>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "constraint.hpp"
#include "encoder.hpp"
#include "encodings/adder.hpp"
#include "encodings/bdd.hpp"
#include "encodings/common.hpp"
#include "encodings/generalized_totalizer.hpp"
#include "encodings/sequential_counter.hpp"
#include "encodings/sequential_weight_counter.hpp"
#include "encodings/totalizer.hpp"
#include "error.hpp"
#include "literal.hpp"
#include "methods.hpp"
#include "pipeline.hpp"
#include "pool.hpp"
#include "select.hpp"
#include "sink.hpp"
#include "solver.hpp"

namespace clausewright {

// --- the objective --------------------------------------------------------

// sum coefficient_i * l_i + constant, to be minimised.
class objective {
 public:
  objective() = default;
  objective(std::initializer_list<term> terms) { add(std::span<const term>(terms.begin(), terms.size())); }
  explicit objective(std::span<const term> terms) { add(terms); }

  void add(std::int64_t coefficient, literal l) {
    if (!l.valid() || l.dimacs() < -max_variable || l.dimacs() > max_variable)
      throw error(error_id::invalid_literal, "objective term " + std::to_string(terms_.size()) + " has literal " +
                                                 std::to_string(l.dimacs()) + " (variables are 1.." +
                                                 std::to_string(max_variable) + ")");
    terms_.push_back({coefficient, l});
  }
  void add(std::span<const term> terms) {
    for (const term& t : terms) add(t.coefficient, t.lit);
  }
  void add_constant(std::int64_t c) { constant_ = detail::checked_add(constant_, c, {}, "the objective's constant"); }

  [[nodiscard]] std::span<const term> terms() const noexcept { return terms_; }
  [[nodiscard]] std::int64_t constant() const noexcept { return constant_; }
  [[nodiscard]] bool empty() const noexcept { return terms_.empty(); }

  // Value under a full assignment; value_of(v) is the truth of variable v.
  template <class ValueOf>
  [[nodiscard]] std::int64_t value(ValueOf&& value_of) const {
    __extension__ using wide = __int128;
    wide sum = constant_;
    for (const term& t : terms_) {
      const bool v = value_of(t.lit.var());
      if (t.lit.negative() ? !v : v) sum += t.coefficient;
    }
    if (sum > INT64_MAX || sum < INT64_MIN)
      throw error(error_id::overflow, "the objective's value overflows the 64-bit range");
    return static_cast<std::int64_t>(sum);
  }

 private:
  std::vector<term> terms_;
  std::int64_t constant_ = 0;
};

// The objective as the bounds take it:
//   value = offset + scale * sum coefficients[i] * [literals[i]]
// with distinct variables, positive coefficients whose gcd is 1, and scale
// the gcd taken out. Its values lie in [offset, offset + scale * total].
struct normalized_objective {
  std::vector<literal> literals;
  std::vector<std::int64_t> coefficients;
  std::int64_t offset = 0;
  std::int64_t scale = 1;
  std::int64_t total = 0;  // sum of `coefficients`

  [[nodiscard]] std::size_t size() const noexcept { return literals.size(); }
  [[nodiscard]] bool unit_coefficients() const noexcept {
    return std::all_of(coefficients.begin(), coefficients.end(), [](std::int64_t a) { return a == 1; });
  }
  [[nodiscard]] std::int64_t lowest() const noexcept { return offset; }
  [[nodiscard]] std::int64_t highest() const noexcept { return offset + scale * total; }
  // The value of a solution whose scaled sum is `sum`.
  [[nodiscard]] std::int64_t value_of_sum(std::int64_t sum) const noexcept { return offset + scale * sum; }
};

[[nodiscard]] inline normalized_objective normalize_objective(const objective& goal) {
  const error_position where{};
  // Merge by variable, on the positive literal: a*~x = a - a*x.
  std::map<std::int32_t, std::int64_t> by_variable;
  std::vector<std::int32_t> order;  // first appearance, so the result follows the input
  std::int64_t offset = goal.constant();
  for (const term& t : goal.terms()) {
    if (t.coefficient == 0) continue;
    std::int64_t a = t.coefficient;
    if (t.lit.negative()) {
      offset = detail::checked_add(offset, a, where, "the objective's constant");
      if (a == INT64_MIN) throw error(error_id::overflow, "an objective coefficient overflows when negated");
      a = -a;
    }
    auto [it, fresh] = by_variable.try_emplace(t.lit.var(), 0);
    if (fresh) order.push_back(t.lit.var());
    it->second = detail::checked_add(it->second, a, where, "a merged objective coefficient");
  }
  normalized_objective out;
  std::int64_t g = 0;
  for (const std::int32_t v : order) {
    const std::int64_t a = by_variable[v];
    if (a == 0) continue;
    if (a > 0) {
      out.literals.push_back(literal(v));
      out.coefficients.push_back(a);
    } else {
      // a*x = a + |a|*~x
      offset = detail::checked_add(offset, a, where, "the objective's constant");
      if (a == INT64_MIN) throw error(error_id::overflow, "an objective coefficient overflows when negated");
      out.literals.push_back(literal(-v));
      out.coefficients.push_back(-a);
    }
    g = std::gcd(g, out.coefficients.back());
  }
  out.scale = g == 0 ? 1 : g;
  std::int64_t total = 0;
  std::int64_t raw_total = 0;
  for (std::int64_t& a : out.coefficients) {
    raw_total = detail::checked_add(raw_total, a, where, "the sum of the objective's coefficients");
    a /= out.scale;
    total += a;
  }
  static_cast<void>(detail::checked_add(offset, raw_total, where, "the objective's largest value"));
  out.offset = offset;
  out.total = total;
  return out;
}

}  // namespace clausewright
