// clausewright: the linear relaxation's bound on COIN-OR CLP.
//
// Only this header includes CLP: the rest of the library does not need it.
// Link the CMake target clausewright::lp (the library plus CLP) to use it.
//
//   options.rows = ...;                               // the model's linear constraints
//   options.relax = clausewright::clp_relaxation;     // the LP engine
//   clausewright::minimize(solver, pool, goal, options);
//
// The relaxation (common practice in integer programming): every variable in
// [0, 1], ~x as 1 - x, the rows as given, the objective minimised by CLP's
// dual simplex. Its minimum bounds every solution from below; the optimiser
// rounds it up for the integral objective, and fixes variables by the
// reduced costs of the optimal basis.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

#include <ClpSimplex.hpp>
#include <CoinPackedMatrix.hpp>

#include "optimize.hpp"

namespace clausewright {

[[nodiscard]] inline std::optional<relaxation_answer> clp_relaxation(const relaxation_problem& p) {
  const int columns = p.variables;
  if (columns <= 0) return std::nullopt;
  std::vector<int> row_index;
  std::vector<int> column_index;
  std::vector<double> element;
  std::vector<double> row_lower;
  std::vector<double> row_upper;
  for (const linear_row& r : p.rows) {
    // a * ~x = a - a * x: the constant moves to the right side.
    double shift = 0;
    const auto row = static_cast<int>(row_lower.size());
    for (const term& t : r.terms) {
      if (t.coefficient == 0) continue;
      const auto a = static_cast<double>(t.coefficient);
      row_index.push_back(row);
      column_index.push_back(t.lit.var() - 1);
      element.push_back(t.lit.negative() ? -a : a);
      if (t.lit.negative()) shift += a;
    }
    const double rhs = static_cast<double>(r.bound) - shift;
    row_lower.push_back(r.rel == relation::le ? -COIN_DBL_MAX : rhs);
    row_upper.push_back(r.rel == relation::ge ? COIN_DBL_MAX : rhs);
  }
  std::vector<double> cost(static_cast<std::size_t>(columns), 0.0);
  double constant = 0;
  for (std::size_t i = 0; i < p.literals.size(); ++i) {
    const auto c = static_cast<double>(p.coefficients[i]);
    const auto column = static_cast<std::size_t>(p.literals[i].var() - 1);
    if (p.literals[i].negative()) {
      constant += c;
      cost[column] -= c;
    } else {
      cost[column] += c;
    }
  }
  const std::vector<double> lower(static_cast<std::size_t>(columns), 0.0);
  const std::vector<double> upper(static_cast<std::size_t>(columns), 1.0);
  const CoinPackedMatrix matrix(true, row_index.data(), column_index.data(), element.data(),
                                static_cast<CoinBigIndex>(element.size()));
  ClpSimplex lp;
  lp.setLogLevel(0);
  // The matrix is column-ordered: its minor dimension (rows) must be given
  // explicitly, rows without terms included.
  CoinPackedMatrix full(matrix);
  full.setDimensions(static_cast<int>(row_lower.size()), columns);
  lp.loadProblem(full, lower.data(), upper.data(), cost.data(), row_lower.data(), row_upper.data());
  lp.setOptimizationDirection(1);
  lp.dual();
  if (!lp.isProvenOptimal()) return std::nullopt;
  relaxation_answer answer;
  answer.value = lp.objectiveValue() + constant;
  const double* x = lp.primalColumnSolution();
  answer.values.assign(static_cast<std::size_t>(columns) + 1, 0.0);
  for (int v = 0; v < columns; ++v) answer.values[static_cast<std::size_t>(v) + 1] = x[v];
  // The reduced costs of the optimal basis, for reduced-cost fixing.
  const double* d = lp.dualColumnSolution();
  answer.reduced_costs.assign(static_cast<std::size_t>(columns) + 1, 0.0);
  for (int v = 0; v < columns; ++v) answer.reduced_costs[static_cast<std::size_t>(v) + 1] = d[v];
  return answer;
}

}  // namespace clausewright
