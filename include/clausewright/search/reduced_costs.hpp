// clausewright: reduced-cost fixing from the linear relaxation.
//
// Reduced-cost fixing (Dantzig, Fulkerson, Johnson 1954, "Solution of a
// large-scale traveling-salesman problem", Operations Research; in branch and
// bound since Crowder, Johnson, Padberg 1983, "Solving large-scale zero-one
// linear programming problems", Operations Research): at an optimum of the
// relaxation min c x, A x (rel) b, 0 <= x <= 1, with value z and reduced
// costs d, every point x of the relaxation (so every solution of the model)
// has value at least z + sum over the columns at their lower bound of
// d_j x_j + sum over the columns at their upper bound of -d_j (1 - x_j),
// every term non-negative. So a solution that moves column j off its bound
// has value at least z + |d_j|, and when that passes t, every solution of
// value at most t keeps column j at its bound: the fixing "x_j at its bound"
// is implied by "objective <= t" and may be added, as a clause guarded by
// the bound's literal (or a unit where that bound is asserted), while the
// search looks for a solution below t + 1. The optimality proof stays
// sound: an unsatisfiable answer under "objective <= t" and its implied
// fixings is an unsatisfiable answer under "objective <= t" alone.
//
// Values are scaled sums (the normalised objective's); the margin keeps the
// engine's tolerances (about 1e-7 per column in CLP's primal and dual
// feasibility) from rounding a reach up past its true value.
//
// Size: one clause (two literals) per fixed column and threshold; the list
// is sorted once, O(n log n).
//
// Part of optimize.hpp: include optimize.hpp, not this.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <span>
#include <vector>

#include "../literal.hpp"
#include "options.hpp"

namespace clausewright::detail {

class reduced_cost_fixing {
 public:
  struct fixing {
    std::int64_t reach;  // every solution with ~lit has a scaled sum of at least reach
    literal lit;
  };

  reduced_cost_fixing() = default;
  explicit reduced_cost_fixing(const relaxation_answer& answer) {
    const std::size_t n = std::min(answer.values.size(), answer.reduced_costs.size());
    if (n <= 1 || !std::isfinite(answer.value)) return;
    magnitude_.assign(n, 0.0);
    constexpr double zero = 1e-7;  // CLP's default dual feasibility tolerance
    for (std::size_t v = 1; v < n; ++v) {
      const double d = answer.reduced_costs[v];
      const double x = answer.values[v];
      if (!std::isfinite(d) || !std::isfinite(x)) continue;
      magnitude_[v] = std::fabs(d);
      if (std::fabs(d) <= zero) continue;
      // d > 0: nonbasic at its lower bound (x = 0); d < 0: at its upper bound.
      const bool at_lower = d > 0;
      if (at_lower ? x > 1e-6 : x < 1 - 1e-6) continue;  // not where the sign says: no claim
      const double margin =
          1e-6 * std::max(1.0, std::fabs(answer.value) + std::fabs(d)) + 1e-7 * static_cast<double>(n);
      const double reach = std::ceil(answer.value + std::fabs(d) - margin);
      if (!(reach < 9e18)) continue;
      const literal column(static_cast<std::int32_t>(v));
      fixings_.push_back({static_cast<std::int64_t>(reach), at_lower ? ~column : column});
    }
    std::sort(fixings_.begin(), fixings_.end(), [](const fixing& a, const fixing& b) { return a.reach > b.reach; });
  }

  // The fixings every solution of scaled sum at most t satisfies.
  [[nodiscard]] std::span<const fixing> implied_by(std::int64_t t) const noexcept {
    const auto end = std::find_if(fixings_.begin(), fixings_.end(), [t](const fixing& f) { return f.reach <= t; });
    return {fixings_.data(), static_cast<std::size_t>(end - fixings_.begin())};
  }
  // |d_v| per variable (index 0 unused; empty without reduced costs): small
  // for the variables whose value the relaxation leaves most open.
  [[nodiscard]] const std::vector<double>& magnitudes() const noexcept { return magnitude_; }
  [[nodiscard]] bool empty() const noexcept { return magnitude_.empty(); }

 private:
  std::vector<fixing> fixings_;
  std::vector<double> magnitude_;
};

}  // namespace clausewright::detail
