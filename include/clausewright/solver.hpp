// clausewright: a clause sink that feeds an incremental SAT solver.
//
// Any solver with the IPASIR operations (add a literal, 0 ending the clause;
// assume a literal for the next call; solve, answering 10, 20 or 0; the value
// of a literal after a satisfiable answer; whether an assumption took part in
// an unsatisfiable answer) becomes a clause sink through solver_sink, so the
// encodings write straight into the solver with nothing in between.
//
// The solver is reached through solver_traits<Solver>, which by default calls
// the members add, assume, solve, val and failed (the IPASIR names without
// their prefix, as CaDiCaL spells them). Specialise it for a solver with other
// spellings, or to stop a search at a deadline (cadical.hpp does both for
// CaDiCaL). A solver whose traits cannot stop a search still honours a
// deadline between calls.
//
// solver_sink checks what the solvers do not: literals are validated before
// they reach the solver (a 0 inside a clause would end it early), and asking
// for a value without a satisfiable answer, or for a failed assumption
// without an unsatisfiable one, is an error instead of the solver aborting.
//
// Optional controls, used where the traits offer them (cadical.hpp does):
// phases (the value a decision tries first, set from a known solution), a
// conflict limit for one call, a stop flag read during the search (set by a
// signal handler, say), and the number of conflicts a call took. A solver
// without them still works: phases are hints, and the stop flag is read
// between calls.
#pragma once

#include <atomic>
#include <chrono>
#include <concepts>
#include <cstdint>
#include <initializer_list>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"
#include "literal.hpp"
#include "sink.hpp"

namespace clausewright {

// The answers of a solve call, with the IPASIR codes.
enum class solve_result : int { unknown = 0, satisfiable = 10, unsatisfiable = 20 };

[[nodiscard]] constexpr std::string_view to_string(solve_result r) noexcept {
  switch (r) {
    case solve_result::unknown: return "unknown";
    case solve_result::satisfiable: return "satisfiable";
    case solve_result::unsatisfiable: return "unsatisfiable";
  }
  return "?";
}

using solver_clock = std::chrono::steady_clock;

// What one solve call is given and reports, for traits that take it (a
// `static int solve(Solver&, solve_controls&)` in solver_traits).
struct solve_controls {
  std::optional<solver_clock::time_point> deadline;
  const std::atomic<bool>* stop = nullptr;    // true: stop the search (read during it)
  std::optional<std::int64_t> conflict_limit;  // for this call only
  std::uint64_t conflicts = 0;                 // out: conflicts of the call (learned clauses)
};

// The members an IPASIR-style solver object has.
template <class Solver>
concept ipasir_members = requires(Solver& s, int lit) {
  s.add(lit);
  s.assume(lit);
  { s.solve() } -> std::convertible_to<int>;
  { s.val(lit) } -> std::convertible_to<int>;
  { s.failed(lit) } -> std::convertible_to<bool>;
};

template <class Solver>
struct solver_traits {
  // Whether solve() can stop a running search at the deadline.
  static constexpr bool stops_at_deadline = false;

  static void add(Solver& s, int lit)
    requires ipasir_members<Solver>
  {
    s.add(lit);
  }
  static void assume(Solver& s, int lit)
    requires ipasir_members<Solver>
  {
    s.assume(lit);
  }
  static int solve(Solver& s, std::optional<solver_clock::time_point> /*deadline*/)
    requires ipasir_members<Solver>
  {
    return static_cast<int>(s.solve());
  }
  static int val(Solver& s, int lit)
    requires ipasir_members<Solver>
  {
    return static_cast<int>(s.val(lit));
  }
  static bool failed(Solver& s, int lit)
    requires ipasir_members<Solver>
  {
    return static_cast<bool>(s.failed(lit));
  }
};

// A solver type solver_sink can drive (through its traits).
template <class Solver>
concept ipasir_solver = requires(Solver& s, int lit, std::optional<solver_clock::time_point> deadline) {
  solver_traits<Solver>::add(s, lit);
  solver_traits<Solver>::assume(s, lit);
  { solver_traits<Solver>::solve(s, deadline) } -> std::convertible_to<int>;
  { solver_traits<Solver>::val(s, lit) } -> std::convertible_to<int>;
  { solver_traits<Solver>::failed(s, lit) } -> std::convertible_to<bool>;
};

// What the optimiser needs from a solver: a clause sink that also assumes,
// solves and reads values. solver_sink and cadical_solver are such.
template <class S>
concept incremental_solver = clause_sink<S> && requires(S& s, literal l, std::optional<solver_clock::time_point> d) {
  s.assume(l);
  { s.solve() } -> std::same_as<solve_result>;
  { s.value(l) } -> std::convertible_to<bool>;
  { s.failed(l) } -> std::convertible_to<bool>;
  s.set_deadline(d);
  { s.deadline() } -> std::convertible_to<std::optional<solver_clock::time_point>>;
};

// Counters of one solver_sink.
struct solver_statistics {
  std::uint64_t clauses = 0;      // clauses added
  std::uint64_t literals = 0;     // literal occurrences in them
  std::uint64_t assumptions = 0;  // literals assumed
  std::uint64_t solves = 0;       // solve calls
  double solve_seconds = 0;       // wall time spent in solve calls
  std::uint64_t conflicts = 0;    // conflicts, where the traits report them
};

template <class Solver>
class solver_sink {
  static_assert(ipasir_solver<Solver>,
                "clausewright: solver_sink needs a solver with add, assume, solve, val and failed, "
                "or a specialisation of solver_traits for it");
  using traits = solver_traits<Solver>;

 public:
  explicit solver_sink(Solver& solver) noexcept : solver_(&solver) {}

  void add_clause(std::span<const literal> clause) {
    // Validate the whole clause first: a rejected literal must not leave a
    // half-added clause in the solver.
    for (const literal l : clause) check(l);
    for (const literal l : clause) {
      note(l);
      traits::add(*solver_, l.dimacs());
    }
    traits::add(*solver_, 0);
    ++stats_.clauses;
    stats_.literals += clause.size();
    state_ = solve_result::unknown;
  }
  void add_clause(std::initializer_list<literal> clause) {
    add_clause(std::span<const literal>(clause.begin(), clause.size()));
  }

  // Assumptions hold for the next solve call only (IPASIR). They are kept
  // here and handed to the solver by solve(), so a call that stops at an
  // expired deadline without searching drops them as a search would.
  void assume(literal l) {
    check(l);
    pending_.push_back(l);
  }
  void assume(std::span<const literal> lits) {
    for (const literal l : lits) check(l);
    pending_.insert(pending_.end(), lits.begin(), lits.end());
  }

  // Searches until an answer or the deadline (see set_deadline).
  solve_result solve() {
    ++stats_.solves;
    if (deadline_ && solver_clock::now() >= *deadline_) {
      pending_.clear();
      state_ = solve_result::unknown;
      return state_;
    }
    for (const literal l : pending_) {
      note(l);
      traits::assume(*solver_, l.dimacs());
    }
    stats_.assumptions += pending_.size();
    pending_.clear();
    const auto start = solver_clock::now();
    int code = 0;
    if constexpr (requires(solve_controls& c) { traits::solve(*solver_, c); }) {
      solve_controls controls{deadline_, stop_, conflict_limit_, 0};
      code = traits::solve(*solver_, controls);
      stats_.conflicts += controls.conflicts;
    } else if (stop_ == nullptr || !stop_->load(std::memory_order_relaxed)) {
      code = traits::solve(*solver_, deadline_);
    }
    conflict_limit_.reset();
    stats_.solve_seconds += std::chrono::duration<double>(solver_clock::now() - start).count();
    switch (code) {
      case 10: state_ = solve_result::satisfiable; break;
      case 20: state_ = solve_result::unsatisfiable; break;
      case 0: state_ = solve_result::unknown; break;
      default:
        state_ = solve_result::unknown;
        throw error(error_id::solver, "the solver answered " + std::to_string(code) + " (expected 10, 20 or 0)");
    }
    return state_;
  }
  solve_result solve(std::span<const literal> assumptions) {
    assume(assumptions);
    return solve();
  }
  solve_result solve(std::initializer_list<literal> assumptions) {
    return solve(std::span<const literal>(assumptions.begin(), assumptions.size()));
  }

  // Truth of a literal in the model of the last (satisfiable) answer. A
  // variable the solver never saw is unconstrained: false.
  [[nodiscard]] bool value(literal l) {
    if (state_ != solve_result::satisfiable)
      throw error(error_id::usage, "a value was asked for, but the last solve call did not answer satisfiable");
    check(l);
    if (l.var() > max_variable_) return l.negative();
    // Asked for the variable: IPASIR answers v or -v; asked for a negative
    // literal, solvers differ in the sign convention of the answer.
    const bool v = traits::val(*solver_, l.var()) > 0;
    return l.negative() ? !v : v;
  }
  // Values of variables 1..variables (index 0 unused).
  [[nodiscard]] std::vector<bool> model(std::int32_t variables) {
    std::vector<bool> values(static_cast<std::size_t>(variables < 0 ? 0 : variables) + 1, false);
    for (std::int32_t v = 1; v <= variables; ++v) values[static_cast<std::size_t>(v)] = value(literal(v));
    return values;
  }

  // Whether the assumed literal took part in the last unsatisfiable answer.
  [[nodiscard]] bool failed(literal l) {
    if (state_ != solve_result::unsatisfiable)
      throw error(error_id::usage, "a failed assumption was asked for, but the last solve call did not answer "
                                   "unsatisfiable");
    check(l);
    if (l.var() > max_variable_) return false;
    return traits::failed(*solver_, l.dimacs());
  }

  // A search still running at the deadline answers unknown (stopped inside
  // the solver when its traits can, otherwise at the next call).
  void set_deadline(std::optional<solver_clock::time_point> deadline) noexcept { deadline_ = deadline; }
  // From now; a limit below zero has passed already, one beyond a century
  // (past the clock's range, for some) is no limit.
  template <class Rep, class Period>
  void set_time_limit(std::chrono::duration<Rep, Period> limit) {
    const double seconds = std::chrono::duration<double>(limit).count();
    if (seconds != seconds) throw error(error_id::usage, "the time limit is not a number");
    if (seconds > 100.0 * 365 * 24 * 3600) {
      deadline_.reset();
      return;
    }
    deadline_ = solver_clock::now() + std::chrono::duration_cast<solver_clock::duration>(
                                          std::chrono::duration<double>(seconds < 0 ? 0 : seconds));
  }
  [[nodiscard]] std::optional<solver_clock::time_point> deadline() const noexcept { return deadline_; }

  // The search stops (answers unknown) once *flag is true; nullptr: no flag.
  // The flag must outlive the solve calls made while it is set.
  void set_stop_flag(const std::atomic<bool>* flag) noexcept { stop_ = flag; }
  [[nodiscard]] const std::atomic<bool>* stop_flag() const noexcept { return stop_; }
  // At most this many conflicts in the next solve call (then unknown), where
  // the traits can limit them; otherwise ignored.
  void set_conflict_limit(std::int64_t conflicts) noexcept { conflict_limit_ = conflicts; }
  // The value decisions on l's variable try first: l true. A hint only.
  void set_phase(literal l) {
    check(l);
    if constexpr (requires { traits::phase(*solver_, 1); }) traits::phase(*solver_, l.dimacs());
  }
  void clear_phase(literal l) {
    check(l);
    if constexpr (requires { traits::unphase(*solver_, 1); }) traits::unphase(*solver_, l.var());
  }
  [[nodiscard]] static constexpr bool has_phases() noexcept {
    return requires(Solver& s) { traits::phase(s, 1); };
  }

  [[nodiscard]] solve_result last_result() const noexcept { return state_; }
  [[nodiscard]] std::int32_t max_variable() const noexcept { return max_variable_; }
  [[nodiscard]] const solver_statistics& statistics() const noexcept { return stats_; }
  [[nodiscard]] Solver& solver() noexcept { return *solver_; }

 private:
  static void check(literal l) {
    const std::int32_t d = l.dimacs();
    if (d == 0 || d < -clausewright::max_variable || d > clausewright::max_variable)
      throw error(error_id::invalid_literal,
                  d == 0 ? std::string("literal 0 given to the solver")
                         : "literal " + std::to_string(d) + " is beyond the largest variable");
  }
  void note(literal l) noexcept {
    if (l.var() > max_variable_) max_variable_ = l.var();
  }

  Solver* solver_;
  std::optional<solver_clock::time_point> deadline_;
  solve_result state_ = solve_result::unknown;
  std::int32_t max_variable_ = 0;
  solver_statistics stats_;
  std::vector<literal> pending_;  // assumptions for the next solve call
  const std::atomic<bool>* stop_ = nullptr;
  std::optional<std::int64_t> conflict_limit_;
};

}  // namespace clausewright
