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

#include <algorithm>
#include <atomic>
#include <cstdint>
#include <memory>
#include <optional>

#include <cadical.hpp>

#include "solver.hpp"

namespace clausewright {

namespace detail {

// Asked by CaDiCaL, regularly during a search, whether to stop.
class deadline_terminator final : public CaDiCaL::Terminator {
 public:
  deadline_terminator(std::optional<solver_clock::time_point> deadline, const std::atomic<bool>* stop) noexcept
      : deadline_(deadline), stop_(stop) {}
  bool terminate() override {
    if (stop_ != nullptr && stop_->load(std::memory_order_relaxed)) return true;
    return deadline_ && solver_clock::now() >= *deadline_;
  }

 private:
  std::optional<solver_clock::time_point> deadline_;
  const std::atomic<bool>* stop_;
};

// Counts the clauses CaDiCaL learns (one per conflict) without taking them.
class conflict_counter final : public CaDiCaL::Learner {
 public:
  bool learning(int /*size*/) override {
    ++count;
    return false;
  }
  void learn(int /*lit*/) override {}
  std::uint64_t count = 0;
};

}  // namespace detail

template <>
struct solver_traits<CaDiCaL::Solver> {
  static constexpr bool stops_at_deadline = true;

  static void add(CaDiCaL::Solver& s, int lit) { s.add(lit); }
  static void assume(CaDiCaL::Solver& s, int lit) { s.assume(lit); }
  static int solve(CaDiCaL::Solver& s, std::optional<solver_clock::time_point> deadline) {
    solve_controls controls{deadline, nullptr, std::nullopt, 0};
    return solve(s, controls);
  }
  static int solve(CaDiCaL::Solver& s, solve_controls& controls) {
    const bool watched = controls.deadline || controls.stop != nullptr;
    detail::deadline_terminator stop(controls.deadline, controls.stop);
    detail::conflict_counter counter;
    if (watched) s.connect_terminator(&stop);
    s.connect_learner(&counter);
    if (controls.conflict_limit) s.limit("conflicts", static_cast<int>(std::min<std::int64_t>(
                                                          std::max<std::int64_t>(*controls.conflict_limit, 0), INT32_MAX)));
    const int result = s.solve();
    s.disconnect_learner();
    if (watched) s.disconnect_terminator();
    controls.conflicts = counter.count;
    return result;
  }
  static void phase(CaDiCaL::Solver& s, int lit) { s.phase(lit); }
  static void unphase(CaDiCaL::Solver& s, int lit) { s.unphase(lit); }
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
  //
  // Decisions start from the lowest variable ("reverse": CaDiCaL's first
  // decision order is otherwise the highest variable first). The encodings
  // number their auxiliary variables from the inputs up, so with the inputs
  // assumed (a constructed start, a neighbourhood) and the auxiliary phases
  // false, the first decisions follow the circuit from the inputs and meet
  // no conflict: a one-sided adder network over a 200-item knapsack row took
  // CaDiCaL over two million conflicts to accept a feasible assignment of its
  // inputs highest variable first, none lowest first. Only settable before
  // the first variable exists.
  cadical_solver() : detail::cadical_owner(), solver_sink<CaDiCaL::Solver>(*owned) {
    owned->set("quiet", 1);
    owned->set("reverse", 1);
  }
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
