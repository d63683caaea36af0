// clausewright: the embedded CaDiCaL solver as a clause sink.
//
// Only this header includes <cadical.hpp>: the rest of the library does not
// need CaDiCaL. Link the CMake target clausewright::cadical (the library plus
// CaDiCaL::CaDiCaL) to use it.
//
//   clausewright::cadical_solver solver;      // owns a CaDiCaL::Solver
//   clausewright::encoder enc(solver, pool);  // clauses go straight in
//   solver.set_time_limit(std::chrono::seconds(10));
//   if (solver.solve() == clausewright::solve_result::satisfiable) ... solver.value(x) ...
//
// CaDiCaL's own checks abort the process on misuse; solver_sink turns the
// misuses it can see (values without a model, invalid literals) into errors.
#pragma once

#include <memory>
#include <optional>

#include <cadical.hpp>

#include "solver.hpp"

namespace clausewright {

namespace detail {

// Asked by CaDiCaL, regularly during a search, whether to stop.
class deadline_terminator final : public CaDiCaL::Terminator {
 public:
  explicit deadline_terminator(solver_clock::time_point deadline) noexcept : deadline_(deadline) {}
  bool terminate() override { return solver_clock::now() >= deadline_; }

 private:
  solver_clock::time_point deadline_;
};

}  // namespace detail

template <>
struct solver_traits<CaDiCaL::Solver> {
  static constexpr bool stops_at_deadline = true;

  static void add(CaDiCaL::Solver& s, int lit) { s.add(lit); }
  static void assume(CaDiCaL::Solver& s, int lit) { s.assume(lit); }
  static int solve(CaDiCaL::Solver& s, std::optional<solver_clock::time_point> deadline) {
    if (!deadline) return s.solve();
    detail::deadline_terminator stop(*deadline);
    s.connect_terminator(&stop);
    const int result = s.solve();
    s.disconnect_terminator();
    return result;
  }
  static int val(CaDiCaL::Solver& s, int lit) { return s.val(lit); }
  static bool failed(CaDiCaL::Solver& s, int lit) { return s.failed(lit); }
};

namespace detail {
// Constructed before the solver_sink base that points at it.
struct cadical_owner {
  std::unique_ptr<CaDiCaL::Solver> owned = std::make_unique<CaDiCaL::Solver>();
};
}  // namespace detail

// A CaDiCaL solver owned together with its sink. native() gives the
// CaDiCaL::Solver for its own options (set, limit, ...).
class cadical_solver : private detail::cadical_owner, public solver_sink<CaDiCaL::Solver> {
 public:
  // Quiet: CaDiCaL otherwise writes messages of its own to standard output
  // (a contradictory unit clause, for one), where they would mix with ours.
  cadical_solver() : detail::cadical_owner(), solver_sink<CaDiCaL::Solver>(*owned) { owned->set("quiet", 1); }
  cadical_solver(const cadical_solver&) = delete;
  cadical_solver& operator=(const cadical_solver&) = delete;
  cadical_solver(cadical_solver&&) = delete;
  cadical_solver& operator=(cadical_solver&&) = delete;
  ~cadical_solver() = default;

  [[nodiscard]] CaDiCaL::Solver& native() noexcept { return *owned; }
};

using cadical_sink = solver_sink<CaDiCaL::Solver>;

static_assert(clause_sink<cadical_solver>);
static_assert(incremental_solver<cadical_solver>);

}  // namespace clausewright
