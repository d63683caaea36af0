// In-process solving and optimisation: the solver sink, bounds on objectives,
// soft constraints and the optimiser.
//
// What each check is measured against (named again beside the checks):
// - CaDiCaL (an independent solver) decides, for every assignment of the
//   objective's inputs, whether the bound literal can be true; the objective
//   is evaluated directly on the user's terms (brute force over the inputs);
// - a dynamic program over capacities, written here, for knapsack optima;
// - brute force over item-to-bin assignments for bin packing, and over all
//   rota assignments for the staff rota, written here;
// - re-encoding "objective <= j" from scratch as a hard constraint in a new
//   solver, against tightening one bound in one solver;
// - a DPLL solver written here behind the same solver_sink template, against
//   CaDiCaL.
// Random instances use fixed seeds and print them (SCOPED_TRACE) on failure.
#include <clausewright/cadical.hpp>
#include <clausewright/optimize.hpp>
#include <gtest/gtest.h>

#include <algorithm>
#include <chrono>
#include <cstdint>
#include <limits>
#include <optional>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "harness.hpp"

namespace cw = clausewright;
using cw::lit;
using cw::relation;

namespace {

using values = std::vector<bool>;

// --- a second IPASIR solver behind solver_sink, written here -------------

// Plain DPLL (unit propagation by scanning the clauses, then a branch on the
// lowest open variable), for small formulas. The core it reports is every
// assumption, unless the clauses alone are unsatisfiable.
class dpll_solver {
 public:
  void add(int l) {
    if (l == 0) {
      clauses_.push_back(open_);
      open_.clear();
      return;
    }
    open_.push_back(l);
    note(l);
  }
  void assume(int l) {
    assumptions_.push_back(l);
    note(l);
  }
  int solve() {
    const std::vector<int> assumed = std::move(assumptions_);
    assumptions_.clear();
    failed_.clear();
    nodes_ = 0;
    std::vector<int> a(static_cast<std::size_t>(variables_) + 1, 0);
    bool consistent_assumptions = true;
    for (const int l : assumed) consistent_assumptions = consistent_assumptions && set(a, l);
    if (consistent_assumptions && search(a)) return 10;
    if (nodes_ > node_limit) return 0;
    std::vector<int> empty(a.size(), 0);
    if (!assumed.empty() && search(empty)) failed_ = assumed;
    model_.clear();
    return 20;
  }
  int val(int l) const {
    const auto v = static_cast<std::size_t>(std::abs(l));
    const bool truth = v < model_.size() && model_[v] > 0;
    return (l < 0 ? !truth : truth) ? l : -l;
  }
  bool failed(int l) const { return std::find(failed_.begin(), failed_.end(), l) != failed_.end(); }

 private:
  static constexpr std::uint64_t node_limit = 2'000'000;

  void note(int l) { variables_ = std::max(variables_, std::abs(l)); }
  static int truth(const std::vector<int>& a, int l) {
    const int v = a[static_cast<std::size_t>(std::abs(l))];
    return l < 0 ? -v : v;
  }
  static bool set(std::vector<int>& a, int l) {
    if (truth(a, l) < 0) return false;
    a[static_cast<std::size_t>(std::abs(l))] = l < 0 ? -1 : 1;
    return true;
  }
  bool propagate(std::vector<int>& a) const {
    for (bool changed = true; changed;) {
      changed = false;
      for (const auto& clause : clauses_) {
        int open = 0, last = 0;
        bool satisfied = false;
        for (const int l : clause) {
          const int t = truth(a, l);
          if (t > 0) {
            satisfied = true;
            break;
          }
          if (t == 0) {
            ++open;
            last = l;
          }
        }
        if (satisfied) continue;
        if (open == 0) return false;
        if (open == 1) {
          static_cast<void>(set(a, last));
          changed = true;
        }
      }
    }
    return true;
  }
  bool search(std::vector<int>& a) {
    if (++nodes_ > node_limit || !propagate(a)) return false;
    std::size_t v = 1;
    while (v < a.size() && a[v] != 0) ++v;
    if (v == a.size()) {
      model_ = a;
      return true;
    }
    for (const int value : {-1, 1}) {
      std::vector<int> b = a;
      b[v] = value;
      if (search(b)) return true;
    }
    return false;
  }

  std::vector<std::vector<int>> clauses_;
  std::vector<int> open_;
  std::vector<int> assumptions_;
  std::vector<int> failed_;
  std::vector<int> model_;
  int variables_ = 0;
  std::uint64_t nodes_ = 0;
};

static_assert(cw::ipasir_solver<dpll_solver>);
static_assert(cw::incremental_solver<cw::solver_sink<dpll_solver>>);

// --- models stated as plain data, with a loader and an independent checker --

struct soft_spec {
  cw_test::raw_constraint constraint;
  std::int64_t weight = 1;
};

struct model_spec {
  std::int32_t variables = 0;
  std::vector<cw_test::raw_constraint> hard;
  std::vector<soft_spec> soft;
  std::vector<cw::term> cost;  // objective terms besides the soft constraints

  [[nodiscard]] std::string describe() const {
    std::ostringstream os;
    os << variables << " variables\n";
    for (const auto& h : hard) os << "  hard " << h.describe() << "\n";
    for (const auto& s : soft) os << "  soft " << s.weight << ": " << s.constraint.describe() << "\n";
    os << "  minimise";
    for (const auto& t : cost) os << " " << t.coefficient << "*" << (t.lit.negative() ? "~x" : "x") << t.lit.var();
    return os.str();
  }
  // Independent of the encodings: the hard constraints and the cost on the
  // user's terms (nullopt when a hard constraint fails).
  [[nodiscard]] std::optional<std::int64_t> evaluate(const values& a) const {
    auto value_of = [&](std::int32_t v) { return static_cast<std::size_t>(v) < a.size() && a[static_cast<std::size_t>(v)]; };
    for (const auto& h : hard)
      if (!cw::holds(h.terms, h.rel, h.bound, value_of)) return std::nullopt;
    std::int64_t total = 0;
    for (const auto& s : soft)
      if (!cw::holds(s.constraint.terms, s.constraint.rel, s.constraint.bound, value_of)) total += s.weight;
    for (const auto& t : cost) {
      const bool v = value_of(t.lit.var());
      if (t.lit.negative() ? !v : v) total += t.coefficient;
    }
    return total;
  }
  // Brute force over every assignment of the variables (at most 20).
  [[nodiscard]] std::optional<std::int64_t> brute_force_optimum() const {
    std::optional<std::int64_t> best;
    values a(static_cast<std::size_t>(variables) + 1);
    for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << variables); ++bits) {
      for (std::int32_t v = 1; v <= variables; ++v) a[static_cast<std::size_t>(v)] = ((bits >> (v - 1)) & 1U) != 0;
      if (const auto value = evaluate(a); value && (!best || *value < *best)) best = value;
    }
    return best;
  }
};

// Encodes the model into a solver (through the encoder and add_soft) and
// returns the objective.
template <class Solver>
cw::objective load(const model_spec& m, Solver& solver, cw::variable_pool& pool,
                   std::optional<cw::method_id> method = {}) {
  pool.reserve_user(m.variables);
  cw::encoder<Solver> enc(solver, pool);
  for (const auto& h : m.hard) {
    const auto c = cw::normalize(h.terms, h.rel, h.bound);
    enc.add(c, method && cw::can_encode(*method, c) ? method : std::nullopt);
  }
  cw::objective cost(m.cost);
  for (const auto& s : m.soft) {
    const auto c = cw::normalize(s.constraint.terms, s.constraint.rel, s.constraint.bound);
    cw::add_soft(solver, pool, cost, s.weight, c, method && cw::can_encode(*method, c) ? method : std::nullopt);
  }
  return cost;
}

template <class Solver = cw::cadical_solver>
cw::optimize_result solve_model(const model_spec& m, cw::optimize_options options = {},
                                std::optional<cw::method_id> method = {}) {
  Solver solver;
  cw::variable_pool pool;
  const cw::objective cost = load(m, solver, pool, method);
  return cw::minimize(solver, pool, cost, options);
}

// The result is a solution of the model whose value is the reported one.
::testing::AssertionResult consistent(const model_spec& m, const cw::optimize_result& r) {
  if (!r.objective) return ::testing::AssertionSuccess();
  const auto value = m.evaluate(r.values);
  if (!value) return ::testing::AssertionFailure() << "the reported solution breaks a hard constraint";
  if (*value != *r.objective)
    return ::testing::AssertionFailure() << "the reported solution has value " << *value << ", reported "
                                         << *r.objective;
  return ::testing::AssertionSuccess();
}

// --- the scenarios ----------------------------------------------------------

// Knapsack: x_i = item i is packed. Weight limit hard, lost value minimised.
struct knapsack {
  std::vector<std::int64_t> weight, value;
  std::int64_t capacity = 0;

  [[nodiscard]] model_spec model() const {
    model_spec m;
    m.variables = static_cast<std::int32_t>(weight.size());
    cw_test::raw_constraint load;
    for (std::size_t i = 0; i < weight.size(); ++i) {
      load.terms.push_back({weight[i], lit(static_cast<std::int32_t>(i) + 1)});
      m.cost.push_back({value[i], ~lit(static_cast<std::int32_t>(i) + 1)});
    }
    load.rel = relation::le;
    load.bound = capacity;
    m.hard.push_back(load);
    return m;
  }
  // The textbook 0/1 knapsack dynamic program over capacities: best[c] is the
  // most value packed within weight c. Returns the least value left out.
  [[nodiscard]] std::int64_t dp_least_lost_value() const {
    std::vector<std::int64_t> best(static_cast<std::size_t>(capacity) + 1, 0);
    for (std::size_t i = 0; i < weight.size(); ++i)
      for (std::int64_t c = capacity; c >= weight[i]; --c)
        best[static_cast<std::size_t>(c)] =
            std::max(best[static_cast<std::size_t>(c)], best[static_cast<std::size_t>(c - weight[i])] + value[i]);
    std::int64_t all = 0;
    for (const auto v : value) all += v;
    return all - best[static_cast<std::size_t>(capacity)];
  }
};

knapsack random_knapsack(std::mt19937_64& rng, int items, std::int64_t max_weight, std::int64_t max_value) {
  knapsack k;
  std::uniform_int_distribution<std::int64_t> w(1, max_weight), v(1, max_value);
  std::int64_t total = 0;
  for (int i = 0; i < items; ++i) {
    k.weight.push_back(w(rng));
    k.value.push_back(v(rng));
    total += k.weight.back();
  }
  k.capacity = total / 2;
  return k;
}

// Bin packing: x(i,b) = item i in bin b, u(b) = bin b used; every item in
// exactly one bin, bin loads within the capacity, fewest bins used.
struct bin_packing {
  std::vector<std::int64_t> size;
  std::int64_t capacity = 0;
  int bins = 0;

  [[nodiscard]] std::int32_t x(int i, int b) const { return 1 + i * bins + b; }
  [[nodiscard]] std::int32_t used(int b) const { return 1 + static_cast<int>(size.size()) * bins + b; }

  [[nodiscard]] model_spec model() const {
    model_spec m;
    const int n = static_cast<int>(size.size());
    m.variables = used(bins - 1);
    for (int i = 0; i < n; ++i) {
      cw_test::raw_constraint one;
      for (int b = 0; b < bins; ++b) one.terms.push_back({1, lit(x(i, b))});
      one.rel = relation::eq;
      one.bound = 1;
      m.hard.push_back(one);
    }
    for (int b = 0; b < bins; ++b) {
      // sum size_i x(i,b) - capacity * u(b) <= 0: an empty bin need not be used.
      cw_test::raw_constraint load;
      for (int i = 0; i < n; ++i) load.terms.push_back({size[static_cast<std::size_t>(i)], lit(x(i, b))});
      load.terms.push_back({-capacity, lit(used(b))});
      load.rel = relation::le;
      load.bound = 0;
      m.hard.push_back(load);
      m.cost.push_back({1, lit(used(b))});
    }
    return m;
  }
  // Brute force over item-to-bin assignments with k bins, k = 1, 2, ...: the
  // first k that packs every item is the fewest bins (nullopt: none packs).
  [[nodiscard]] std::optional<int> brute_force_fewest_bins() const {
    const int n = static_cast<int>(size.size());
    for (int k = 1; k <= bins; ++k) {
      std::vector<int> bin_of(static_cast<std::size_t>(n), 0);
      for (;;) {
        std::vector<std::int64_t> load(static_cast<std::size_t>(k), 0);
        for (int i = 0; i < n; ++i)
          load[static_cast<std::size_t>(bin_of[static_cast<std::size_t>(i)])] += size[static_cast<std::size_t>(i)];
        if (std::all_of(load.begin(), load.end(), [&](std::int64_t l) { return l <= capacity; })) return k;
        int i = 0;
        while (i < n && ++bin_of[static_cast<std::size_t>(i)] == k) bin_of[static_cast<std::size_t>(i++)] = 0;
        if (i == n) break;
      }
    }
    return std::nullopt;
  }
};

// Staff rota: w(p,s) = person p works shift s. Every shift has exactly its
// need of staff, nobody works a shift they are unavailable for or more than
// their limit; each unwanted shift is a soft "not on it" of its weight, and a
// soft "at most `late_limit` late shifts" per person of weight 2.
struct rota {
  int people = 0, shifts = 0;
  std::vector<std::int64_t> need;   // per shift
  std::vector<std::int64_t> limit;  // per person
  std::vector<std::pair<int, int>> unavailable;
  std::vector<std::tuple<int, int, std::int64_t>> unwanted;  // person, shift, weight
  std::vector<int> late;                                      // the late shifts
  std::int64_t late_limit = 1;

  [[nodiscard]] std::int32_t w(int p, int s) const { return 1 + p * shifts + s; }

  [[nodiscard]] model_spec model() const {
    model_spec m;
    m.variables = people * shifts;
    for (int s = 0; s < shifts; ++s) {
      cw_test::raw_constraint cover;
      for (int p = 0; p < people; ++p) cover.terms.push_back({1, lit(w(p, s))});
      cover.rel = relation::eq;
      cover.bound = need[static_cast<std::size_t>(s)];
      m.hard.push_back(cover);
    }
    for (int p = 0; p < people; ++p) {
      cw_test::raw_constraint most;
      for (int s = 0; s < shifts; ++s) most.terms.push_back({1, lit(w(p, s))});
      most.rel = relation::le;
      most.bound = limit[static_cast<std::size_t>(p)];
      m.hard.push_back(most);
    }
    for (const auto& [p, s] : unavailable) m.hard.push_back({{{1, lit(w(p, s))}}, relation::le, 0});
    for (const auto& [p, s, weight] : unwanted) m.soft.push_back({{{{1, lit(w(p, s))}}, relation::le, 0}, weight});
    if (!late.empty()) {
      for (int p = 0; p < people; ++p) {
        cw_test::raw_constraint lates;
        for (const int s : late) lates.terms.push_back({1, lit(w(p, s))});
        lates.rel = relation::le;
        lates.bound = late_limit;
        m.soft.push_back({lates, 2});
      }
    }
    return m;
  }
};

rota random_rota(std::mt19937_64& rng, int people, int shifts) {
  rota r;
  r.people = people;
  r.shifts = shifts;
  std::uniform_int_distribution<int> need(1, std::max(1, people - 1)), coin(0, 3), weight(1, 3);
  for (int s = 0; s < shifts; ++s) r.need.push_back(need(rng));
  for (int p = 0; p < people; ++p) r.limit.push_back(1 + (shifts + p) / 2);
  for (int p = 0; p < people; ++p)
    for (int s = 0; s < shifts; ++s) {
      const int c = coin(rng);
      if (c == 0 && (p + s) % 3 == 0) r.unavailable.emplace_back(p, s);
      if (c == 1) r.unwanted.emplace_back(p, s, weight(rng));
    }
  for (int s = shifts - 2; s < shifts; ++s)
    if (s >= 0) r.late.push_back(s);
  return r;
}

// --- the solver sink --------------------------------------------------------

TEST(SolverSink, AnswersAndValuesFromCaDiCaL) {
  cw::cadical_solver solver;
  solver.add_clause({lit(1), lit(2)});
  solver.add_clause({lit(-1), lit(2)});
  ASSERT_EQ(solver.solve(), cw::solve_result::satisfiable);
  EXPECT_TRUE(solver.value(lit(2)));  // both clauses force x2 (resolution on x1)
  EXPECT_FALSE(solver.value(lit(-2)));
  EXPECT_FALSE(solver.value(lit(7)));  // never seen: unconstrained, reported false
  EXPECT_TRUE(solver.value(lit(-7)));
  // Assumptions hold for one call only (IPASIR).
  EXPECT_EQ(solver.solve({lit(-2)}), cw::solve_result::unsatisfiable);
  EXPECT_TRUE(solver.failed(lit(-2)));
  EXPECT_EQ(solver.solve(), cw::solve_result::satisfiable);
  solver.add_clause(std::span<const cw::literal>());
  EXPECT_EQ(solver.solve(), cw::solve_result::unsatisfiable);
  EXPECT_EQ(solver.statistics().clauses, 3U);
  EXPECT_EQ(solver.statistics().solves, 4U);
}

TEST(SolverSink, MisuseIsAnErrorNotAnAbort) {
  cw::cadical_solver solver;
  solver.add_clause({lit(1)});
  try {
    static_cast<void>(solver.value(lit(1)));
    FAIL() << "a value before any solve call must be refused";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::usage);
  }
  // A literal 0 inside a clause is refused before anything reaches the solver.
  try {
    solver.add_clause({lit(2), cw::literal(), lit(3)});
    FAIL() << "literal 0 must be refused";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::invalid_literal);
  }
  solver.add_clause({lit(-1), lit(4)});
  ASSERT_EQ(solver.solve(), cw::solve_result::satisfiable);
  EXPECT_TRUE(solver.value(lit(4)));
  // Had "x2" been left open in the solver, the clause -1 | 4 would have been x2 | -1 | 4.
  ASSERT_EQ(solver.solve({lit(-4)}), cw::solve_result::unsatisfiable);
  solver.add_clause({lit(5)});
  EXPECT_THROW(static_cast<void>(solver.failed(lit(-4))), cw::error);  // the formula changed since
  EXPECT_THROW(solver.assume(cw::literal(cw::max_variable + 1)), cw::error);
}

// The same template over a second solver type: the DPLL solver agrees
// with CaDiCaL on random small formulas, under random assumptions.
TEST(SolverSink, TemplateOverAnotherSolverAgreesWithCaDiCaL) {
  const std::uint64_t seed = 7001;
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<int> var(1, 8), sign(0, 1), width(1, 3);
  for (int round = 0; round < 60; ++round) {
    SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round));
    dpll_solver brute;
    cw::solver_sink<dpll_solver> small(brute);
    cw::cadical_solver reference;
    const int clauses = 4 + round % 20;
    for (int c = 0; c < clauses; ++c) {
      std::vector<cw::literal> clause;
      for (int k = width(rng); k > 0; --k) clause.push_back(lit(sign(rng) ? var(rng) : -var(rng)));
      small.add_clause(clause);
      reference.add_clause(clause);
    }
    const cw::literal a = lit(sign(rng) ? var(rng) : -var(rng));
    const auto mine = small.solve({a});
    ASSERT_EQ(mine, reference.solve({a}));
    if (mine == cw::solve_result::satisfiable) {
      EXPECT_TRUE(small.value(a));
    }
  }
}

// --- objectives ---------------------------------------------------------------

TEST(Objective, NormalisesSignsRepeatsAndScale) {
  // 4*x1 - 6*~x2 + 2*x1 + 0*x3 + 10 = 6*x1 + 6*x2 + 4: by hand, scale 6, offset 4.
  cw::objective goal{{4, lit(1)}, {-6, lit(-2)}, {2, lit(1)}, {0, lit(3)}};
  goal.add_constant(10);
  const auto n = cw::normalize_objective(goal);
  EXPECT_EQ(n.scale, 6);
  EXPECT_EQ(n.offset, 4);
  EXPECT_EQ(n.total, 2);
  EXPECT_TRUE(n.unit_coefficients());
  EXPECT_EQ(n.lowest(), 4);
  EXPECT_EQ(n.highest(), 16);
  // x1 with -x1 cancels; -3*x4 = -3 + 3*~x4.
  const auto m = cw::normalize_objective(cw::objective{{5, lit(1)}, {-5, lit(1)}, {-3, lit(4)}});
  ASSERT_EQ(m.size(), 1U);
  EXPECT_EQ(m.literals[0], lit(-4));
  EXPECT_EQ(m.offset, -3);
  EXPECT_THROW(cw::objective({{1, cw::literal()}}), cw::error);
  EXPECT_THROW(static_cast<void>(cw::normalize_objective(
                   cw::objective{{INT64_MAX, lit(1)}, {INT64_MAX, lit(2)}})),
               cw::error);
}

// For every bound j and every assignment of the inputs, the bound literal can
// be true exactly when the objective, evaluated on the user's terms, is at
// most j (decided by CaDiCaL over the bound's clauses, inputs assumed).
// Bounds are asked in the given order in one solver: tightening, loosening
// past a cut, and repeated questions all go through the same object.
::testing::AssertionResult bound_is_exact(const cw::objective& goal, std::int32_t inputs,
                                          const cw::bound_settings& settings,
                                          const std::vector<std::int64_t>& order) {
  cw::cadical_solver solver;
  cw::variable_pool pool(inputs);
  cw::objective_bound bound(solver, pool, goal, settings);
  std::vector<std::pair<std::int64_t, cw::literal>> asked;
  asked.reserve(order.size());
  for (const std::int64_t j : order) asked.emplace_back(j, bound.at_most(j));
  for (const auto& [j, l] : asked)
    if (bound.at_most(j) != l) return ::testing::AssertionFailure() << "bound " << j << " gave a second literal";
  values a(static_cast<std::size_t>(inputs) + 1);
  std::vector<cw::literal> assumptions;
  for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << inputs); ++bits) {
    assumptions.clear();
    for (std::int32_t v = 1; v <= inputs; ++v) {
      a[static_cast<std::size_t>(v)] = ((bits >> (v - 1)) & 1U) != 0;
      assumptions.push_back(a[static_cast<std::size_t>(v)] ? lit(v) : lit(-v));
    }
    const std::int64_t value = goal.value([&](std::int32_t v) { return a[static_cast<std::size_t>(v)]; });
    for (const auto& [j, l] : asked) {
      solver.assume(assumptions);
      solver.assume(l);
      const bool can = solver.solve() == cw::solve_result::satisfiable;
      if (can != (value <= j))
        return ::testing::AssertionFailure() << "inputs " << bits << " (objective " << value << "), bound " << j
                                             << ": the bound literal " << (can ? "can" : "cannot") << " be true";
    }
  }
  return ::testing::AssertionSuccess();
}

const cw::bound_method weighted_bounds[] = {cw::bound_method::automatic, cw::bound_method::generalized_totalizer,
                                            cw::bound_method::sequential_weight_counter, cw::bound_method::bdd,
                                            cw::bound_method::adder, cw::bound_method::reencode};

TEST(ObjectiveBound, EveryMethodIsExactOnRandomWeightedObjectives) {
  const std::uint64_t seed = 7101;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 12; ++round) {
    const std::int32_t n = 2 + round % 5;  // 2..6 inputs
    const auto raw = cw_test::random_linear(rng, n, 1 + round % 7, round % 2 == 1, round % 3 == 2);
    cw::objective goal(raw.terms);
    goal.add_constant(round - 6);
    const auto normal = cw::normalize_objective(goal);
    // Every value from below the lowest to above the highest: top down (the
    // linear search's order), then bottom up (past every cut), then again.
    std::vector<std::int64_t> order;
    for (std::int64_t j = normal.highest() + 1; j >= normal.lowest() - 1; --j) order.push_back(j);
    for (std::int64_t j = normal.lowest() - 1; j <= normal.highest() + 1; ++j) order.push_back(j);
    std::shuffle(order.begin(), order.end() - static_cast<std::ptrdiff_t>(order.size() / 2), rng);
    for (const auto method : weighted_bounds) {
      SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + " method " +
                   std::string(cw::to_string(method)) + " objective " + raw.describe());
      EXPECT_TRUE(bound_is_exact(goal, raw.max_var(), cw::bound_settings{method}, order));
    }
  }
}

TEST(ObjectiveBound, CountersOnUnitObjectivesAndTheirCuts) {
  for (const auto method : {cw::bound_method::totalizer, cw::bound_method::sequential_counter}) {
    for (std::int32_t n = 1; n <= 7; ++n) {
      SCOPED_TRACE("n " + std::to_string(n) + " method " + std::string(cw::to_string(method)));
      cw::objective goal;
      for (std::int32_t v = 1; v <= n; ++v) goal.add(3, v % 3 == 0 ? lit(-v) : lit(v));  // scale 3
      std::vector<std::int64_t> order;
      const std::int64_t top = std::int64_t{3} * n;
      for (std::int64_t j = 0; j <= top + 1; j += 2) order.push_back(j);  // bottom up: past the cut each time
      for (std::int64_t j = top; j >= 0; j -= 5) order.push_back(j);
      EXPECT_TRUE(bound_is_exact(goal, n, cw::bound_settings{method}, order));
    }
  }
  // Asked top down, one counter serves every bound; asked bottom up, the
  // totalizer is extended in place and the sequential counter rebuilt.
  cw::objective goal;
  for (std::int32_t v = 1; v <= 6; ++v) goal.add(1, lit(v));
  for (const auto method : {cw::bound_method::totalizer, cw::bound_method::sequential_counter}) {
    SCOPED_TRACE(std::string(cw::to_string(method)));
    cw::cadical_solver solver;
    cw::variable_pool pool(6);
    cw::objective_bound top_down(solver, pool, goal, method);
    for (std::int64_t j = 5; j >= 0; --j) static_cast<void>(top_down.at_most(j));
    static_cast<void>(top_down.at_most(5));  // cached
    EXPECT_EQ(top_down.rebuilds(), 0U);
    EXPECT_EQ(top_down.extensions(), 0U);
    cw::objective_bound bottom_up(solver, pool, goal, method);
    for (std::int64_t j = 0; j <= 5; ++j) static_cast<void>(bottom_up.at_most(j));
    const bool totalizer = method == cw::bound_method::totalizer;
    EXPECT_EQ(bottom_up.extensions(), totalizer ? 5U : 0U);
    EXPECT_EQ(bottom_up.rebuilds(), totalizer ? 0U : 5U);
  }
  // Weighted objectives are refused by the counters of unit coefficients.
  cw::cadical_solver solver;
  cw::variable_pool pool(2);
  cw::objective weighted{{2, lit(1)}, {3, lit(2)}};
  EXPECT_THROW(cw::objective_bound(solver, pool, weighted, cw::bound_method::sequential_counter), cw::error);
  EXPECT_THROW(cw::objective_bound(solver, pool, weighted, cw::bound_method::totalizer), cw::error);
}

TEST(ObjectiveBound, BddOverBudgetFallsBackToTheAdderWhenChosenAutomatically) {
  // Distinct powers of two make every partial sum distinct: the diagram for a
  // middle bound needs far more than 8 nodes.
  cw::objective goal;
  for (std::int32_t v = 1; v <= 10; ++v) goal.add(std::int64_t{1} << v, lit(v));
  {
    cw::cadical_solver solver;
    cw::variable_pool pool(10);
    cw::bound_settings settings;
    settings.bdd_node_budget = 8;
    cw::objective_bound bound(solver, pool, goal, settings);
    static_cast<void>(bound.at_most(1000));
    EXPECT_EQ(bound.method(), cw::bound_method::adder);
    // The bounds after the fallback are exact (CaDiCaL over every assignment).
    EXPECT_TRUE(bound_is_exact(goal, 10, settings, {1500, 1000, 700, 2, 0}));
  }
  cw::cadical_solver solver;
  cw::variable_pool pool(10);
  cw::bound_settings settings{cw::bound_method::bdd};
  settings.bdd_node_budget = 8;
  cw::objective_bound bound(solver, pool, goal, settings);
  EXPECT_THROW(static_cast<void>(bound.at_most(1000)), cw::error);  // asked for the BDD by name: no fallback
}

// --- soft constraints ---------------------------------------------------------

TEST(SoftConstraints, RelaxationLiteralForcesTheConstraintAndCarriesTheWeight) {
  cw::cadical_solver solver;
  cw::variable_pool pool(4);
  cw::objective cost;
  const std::vector<cw::term> three{{1, lit(1)}, {1, lit(2)}, {1, lit(3)}};
  const cw::literal r = cw::add_soft(solver, pool, cost, 5, three, relation::le, 1);
  EXPECT_GT(r.var(), 4);
  ASSERT_EQ(cost.terms().size(), 1U);
  EXPECT_EQ(cost.terms()[0].coefficient, 5);
  EXPECT_EQ(cost.terms()[0].lit, ~r);
  // r true forces at most one of x1..x3 (CaDiCaL under assumptions).
  EXPECT_EQ(solver.solve({r, lit(1), lit(2)}), cw::solve_result::unsatisfiable);
  EXPECT_EQ(solver.solve({r, lit(1), lit(-2), lit(-3)}), cw::solve_result::satisfiable);
  EXPECT_EQ(solver.solve({lit(-static_cast<std::int32_t>(r.var())), lit(1), lit(2), lit(3)}),
            cw::solve_result::satisfiable);
  // A single forced literal is its own relaxation literal: no new variable.
  const std::int32_t top = pool.top();
  const std::vector<cw::term> one{{1, lit(4)}};
  EXPECT_EQ(cw::add_soft(solver, pool, cost, 2, one, relation::le, 0), lit(-4));
  EXPECT_EQ(pool.top(), top);
  // An impossible soft constraint is always paid for.
  const cw::literal never = cw::add_soft(solver, pool, cost, 3, one, relation::ge, 2);
  EXPECT_EQ(solver.solve({never}), cw::solve_result::unsatisfiable);
  EXPECT_THROW(cw::add_soft(solver, pool, cost, -1, three, relation::le, 1), cw::error);
  const std::vector<cw::term> unknown{{1, lit(40)}};
  EXPECT_THROW(cw::add_soft(solver, pool, cost, 1, unknown, relation::le, 0), cw::error);
}

// --- optima against independent computations -------------------------------

TEST(Optimise, KnapsackOptimaMatchTheDynamicProgram) {
  const std::uint64_t seed = 7201;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 16; ++round) {
    const knapsack k = random_knapsack(rng, 4 + round, 5 + 2 * round, 30);
    const model_spec m = k.model();
    const std::int64_t expected = k.dp_least_lost_value();  // the dynamic program above
    for (const auto search : {cw::search_strategy::linear, cw::search_strategy::binary}) {
      cw::optimize_options options;
      options.search = search;
      options.bound.method = weighted_bounds[static_cast<std::size_t>(round) % std::size(weighted_bounds)];
      SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + " search " +
                   std::string(cw::to_string(search)) + " bound " + std::string(cw::to_string(options.bound.method)) +
                   "\n" + m.describe());
      const auto r = solve_model(m, options);
      ASSERT_EQ(r.status, cw::optimize_status::optimal);
      EXPECT_EQ(r.objective, expected);
      EXPECT_EQ(r.lower_bound, expected);
      EXPECT_TRUE(consistent(m, r));
    }
  }
}

TEST(Optimise, BinPackingOptimaMatchBruteForce) {
  const std::uint64_t seed = 7301;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 14; ++round) {
    bin_packing p;
    const int n = 2 + round % 5;  // 2..6 items
    std::uniform_int_distribution<std::int64_t> size(1, 9);
    for (int i = 0; i < n; ++i) p.size.push_back(size(rng));
    p.capacity = 10;
    p.bins = n;
    if (round % 7 == 6) p.size.back() = 11;  // one item fits no bin: unsatisfiable
    const model_spec m = p.model();
    const auto expected = p.brute_force_fewest_bins();  // brute force over assignments
    for (const auto search : {cw::search_strategy::linear, cw::search_strategy::binary}) {
      cw::optimize_options options;
      options.search = search;
      SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + " search " +
                   std::string(cw::to_string(search)) + "\n" + m.describe());
      const auto r = solve_model(m, options);
      if (!expected) {
        EXPECT_EQ(r.status, cw::optimize_status::unsatisfiable);
        EXPECT_FALSE(r.objective.has_value());
        continue;
      }
      ASSERT_EQ(r.status, cw::optimize_status::optimal);
      EXPECT_EQ(r.objective, *expected);
      EXPECT_TRUE(consistent(m, r));
    }
  }
}

TEST(Optimise, RotaOptimaMatchBruteForce) {
  const std::uint64_t seed = 7401;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 10; ++round) {
    const rota r = random_rota(rng, 3, 3 + round % 3);  // up to 15 assignment variables
    const model_spec m = r.model();
    const auto expected = m.brute_force_optimum();  // brute force over every assignment
    for (const auto search : {cw::search_strategy::linear, cw::search_strategy::binary}) {
      cw::optimize_options options;
      options.search = search;
      options.bound.method = round % 2 == 0 ? cw::bound_method::automatic : cw::bound_method::generalized_totalizer;
      SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + " search " +
                   std::string(cw::to_string(search)) + "\n" + m.describe());
      const auto result = solve_model(m, options);
      if (!expected) {
        EXPECT_EQ(result.status, cw::optimize_status::unsatisfiable);
        continue;
      }
      ASSERT_EQ(result.status, cw::optimize_status::optimal);
      EXPECT_EQ(result.objective, *expected);
      EXPECT_TRUE(consistent(m, result));
    }
  }
}

TEST(Optimise, UnsatisfiableModelsAreReportedAsSuch) {
  // Three people for a shift that needs four: no rota at all (counted by hand).
  rota r;
  r.people = 3;
  r.shifts = 2;
  r.need = {4, 1};
  r.limit = {2, 2, 2};
  r.unwanted = {{0, 1, 1}};
  const model_spec m = r.model();
  ASSERT_FALSE(m.brute_force_optimum().has_value());  // brute force agrees
  for (const auto search : {cw::search_strategy::linear, cw::search_strategy::binary}) {
    cw::optimize_options options;
    options.search = search;
    const auto result = solve_model(m, options);
    EXPECT_EQ(result.status, cw::optimize_status::unsatisfiable);
    EXPECT_FALSE(result.objective.has_value());
    EXPECT_EQ(result.solutions, 0U);
  }
  cw::cadical_solver solver;
  cw::variable_pool pool;
  static_cast<void>(load(m, solver, pool));
  EXPECT_EQ(cw::satisfy(solver, pool).status, cw::optimize_status::unsatisfiable);
}

TEST(Optimise, WithoutAnObjectiveDecidesSatisfiability) {
  const std::uint64_t seed = 7501;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 8; ++round) {
    SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round));
    rota r = random_rota(rng, 3, 4);
    r.unwanted.clear();
    r.late.clear();
    const model_spec m = r.model();
    cw::cadical_solver solver;
    cw::variable_pool pool;
    static_cast<void>(load(m, solver, pool));
    const auto result = cw::satisfy(solver, pool);
    const bool feasible = m.brute_force_optimum().has_value();  // brute force
    if (!feasible) {
      EXPECT_EQ(result.status, cw::optimize_status::unsatisfiable);
      continue;
    }
    ASSERT_EQ(result.status, cw::optimize_status::satisfiable);
    EXPECT_FALSE(result.objective.has_value());
    EXPECT_TRUE(m.evaluate(result.values).has_value());
  }
}

// Tightening one bound in one solver answers every "objective <= j" exactly
// as a new solver given the model plus "objective <= j" as a hard constraint
// (re-encoded from scratch), and both give the optimum of the search.
TEST(Optimise, IncrementalTighteningMatchesReencodingFromScratch) {
  const std::uint64_t seed = 7601;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 6; ++round) {
    const model_spec m = round % 2 == 0 ? random_knapsack(rng, 8 + round, 12, 8).model()
                                        : random_rota(rng, 3, 4).model();
    const auto method = weighted_bounds[static_cast<std::size_t>(round) % std::size(weighted_bounds)];
    SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + " bound " +
                 std::string(cw::to_string(method)) + "\n" + m.describe());
    cw::cadical_solver solver;
    cw::variable_pool pool;
    const cw::objective cost = load(m, solver, pool);
    cw::objective_bound bound(solver, pool, cost, cw::bound_settings{method});
    std::optional<std::int64_t> from_scratch_optimum;
    for (std::int64_t j = bound.highest(); j >= bound.lowest() - 1; --j) {
      // From scratch: the model and the bound as one more hard constraint.
      cw::cadical_solver fresh;
      cw::variable_pool fresh_pool;
      const cw::objective fresh_cost = load(m, fresh, fresh_pool);
      cw::encoder<cw::cadical_solver> enc(fresh, fresh_pool);
      std::vector<cw::term> terms(fresh_cost.terms().begin(), fresh_cost.terms().end());
      enc.linear(terms, relation::le, j - fresh_cost.constant());
      const auto scratch = fresh.solve();
      solver.assume(bound.at_most(j));
      ASSERT_EQ(solver.solve(), scratch) << "bound " << j;
      if (scratch == cw::solve_result::satisfiable) from_scratch_optimum = j;
    }
    cw::optimize_options options;
    options.bound.method = method;
    options.permanent_bounds = false;
    const auto result = cw::minimize(solver, pool, bound, options);
    ASSERT_EQ(result.status, from_scratch_optimum ? cw::optimize_status::optimal : cw::optimize_status::unsatisfiable);
    EXPECT_EQ(result.objective, from_scratch_optimum);
    EXPECT_TRUE(consistent(m, result));
  }
}

TEST(Optimise, LinearAndBinarySearchAgreeOnRandomModels) {
  const std::uint64_t seed = 7701;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 12; ++round) {
    const model_spec m = round % 3 == 0   ? random_knapsack(rng, 10 + round, 20, 40).model()
                         : round % 3 == 1 ? random_rota(rng, 4, 5).model()
                                          : [&] {
                                              bin_packing p;
                                              std::uniform_int_distribution<std::int64_t> size(2, 7);
                                              for (int i = 0; i < 7; ++i) p.size.push_back(size(rng));
                                              p.capacity = 10;
                                              p.bins = 7;
                                              return p.model();
                                            }();
    SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + "\n" + m.describe());
    std::vector<std::int64_t> improving;
    cw::optimize_options linear;
    linear.on_solution = [&](const cw::improving_solution& s) {
      if (!improving.empty()) {
        EXPECT_LT(s.objective, improving.back()) << "each solution improves";
      }
      // The objective counts a soft constraint as given up when its
      // relaxation literal is false, even if the solution happens to satisfy
      // it: an improving solution's value bounds its cost from above (and
      // equals it at the optimum, checked by consistent() below).
      const auto cost = m.evaluate(s.values);
      ASSERT_TRUE(cost.has_value()) << "the callback's solution satisfies the hard constraints";
      EXPECT_LE(*cost, s.objective);
      if (m.soft.empty()) {
        EXPECT_EQ(*cost, s.objective) << "without soft constraints the value is the cost";
      }
      improving.push_back(s.objective);
    };
    cw::optimize_options binary;
    binary.search = cw::search_strategy::binary;
    for (const bool permanent : {true, false}) {
      linear.permanent_bounds = binary.permanent_bounds = permanent;
      improving.clear();
      const auto a = solve_model(m, linear);
      const auto b = solve_model(m, binary);
      ASSERT_EQ(a.status, b.status);
      EXPECT_EQ(a.objective, b.objective);
      EXPECT_EQ(a.solutions, improving.size());
      if (a.objective) {
        EXPECT_EQ(improving.back(), *a.objective);
      }
      EXPECT_TRUE(consistent(m, a));
      EXPECT_TRUE(consistent(m, b));
    }
  }
}

// With the cost evaluated on the user's terms, every improving solution is
// reported at the cost of its assignment (a soft constraint that holds costs
// nothing, whatever its relaxation literal), the values strictly decrease,
// and the optimum is the brute-force one.
TEST(Optimise, EvaluatedSolutionsCarryTheCostOfTheirAssignment) {
  const std::uint64_t seed = 7751;
  std::mt19937_64 rng(seed);
  for (int round = 0; round < 8; ++round) {
    const model_spec m = random_rota(rng, 3, 4).model();
    const auto expected = m.brute_force_optimum();  // brute force over every assignment
    for (const auto search : {cw::search_strategy::linear, cw::search_strategy::binary}) {
      SCOPED_TRACE("seed " + std::to_string(seed) + " round " + std::to_string(round) + " search " +
                   std::string(cw::to_string(search)) + "\n" + m.describe());
      std::vector<std::int64_t> improving;
      cw::optimize_options options;
      options.search = search;
      options.evaluate = [&](const values& a) { return m.evaluate(a).value(); };
      options.on_solution = [&](const cw::improving_solution& s) {
        EXPECT_EQ(m.evaluate(s.values), s.objective);
        if (!improving.empty()) {
          EXPECT_LT(s.objective, improving.back());
        }
        improving.push_back(s.objective);
      };
      const auto r = solve_model(m, options);
      if (!expected) {
        EXPECT_EQ(r.status, cw::optimize_status::unsatisfiable);
        continue;
      }
      ASSERT_EQ(r.status, cw::optimize_status::optimal);
      EXPECT_EQ(r.objective, *expected);
      EXPECT_TRUE(consistent(m, r));
    }
  }
}

// The optimiser over the DPLL solver: the template takes any IPASIR solver,
// and the optimum is the dynamic program's.
TEST(Optimise, AnyIpasirSolverBehindTheSink) {
  const std::uint64_t seed = 7801;
  std::mt19937_64 rng(seed);
  const knapsack k = random_knapsack(rng, 5, 6, 9);
  const model_spec m = k.model();
  for (const auto search : {cw::search_strategy::linear, cw::search_strategy::binary}) {
    SCOPED_TRACE("seed " + std::to_string(seed) + "\n" + m.describe());
    dpll_solver brute;
    cw::solver_sink<dpll_solver> sink(brute);
    cw::variable_pool pool;
    const cw::objective cost = load(m, sink, pool);
    cw::optimize_options options;
    options.search = search;
    const auto r = cw::minimize(sink, pool, cost, options);
    ASSERT_EQ(r.status, cw::optimize_status::optimal);
    EXPECT_EQ(r.objective, k.dp_least_lost_value());  // the dynamic program
    EXPECT_TRUE(consistent(m, r));
  }
}

// --- time limits -------------------------------------------------------------

// Twelve pigeons, eleven holes, a pigeon may stay out at cost 1: a solution
// with one pigeon out comes at once, but proving that none can stay out is
// the pigeonhole principle, far beyond a fraction of a second for CDCL.
model_spec pigeons_with_an_exit(int pigeons, int holes) {
  model_spec m;
  auto in = [&](int p, int h) { return lit(1 + p * (holes + 1) + h); };
  auto out = [&](int p) { return lit(1 + p * (holes + 1) + holes); };
  m.variables = pigeons * (holes + 1);
  for (int p = 0; p < pigeons; ++p) {
    cw_test::raw_constraint one;
    for (int h = 0; h < holes; ++h) one.terms.push_back({1, in(p, h)});
    one.terms.push_back({1, out(p)});
    one.rel = relation::eq;
    one.bound = 1;
    m.hard.push_back(one);
    m.cost.push_back({1, out(p)});
  }
  for (int h = 0; h < holes; ++h) {
    cw_test::raw_constraint most;
    for (int p = 0; p < pigeons; ++p) most.terms.push_back({1, in(p, h)});
    most.rel = relation::le;
    most.bound = 1;
    m.hard.push_back(most);
  }
  return m;
}

TEST(Optimise, TimeLimitEndsTheSearchWithAValidStatus) {
  const model_spec m = pigeons_with_an_exit(12, 11);
  for (const auto search : {cw::search_strategy::linear, cw::search_strategy::binary}) {
    SCOPED_TRACE(std::string(cw::to_string(search)));
    cw::optimize_options options;
    options.search = search;
    options.time_limit = std::chrono::milliseconds(300);
    const auto start = std::chrono::steady_clock::now();
    const auto r = solve_model(m, options, cw::method_id::pairwise);
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    EXPECT_LT(seconds, 5.0) << "the search stops near its time limit";
    // The optimum is 1 (a pigeon must stay out; one suffices): either proved
    // in time, or the best so far is reported as satisfiable.
    ASSERT_TRUE(r.status == cw::optimize_status::optimal || r.status == cw::optimize_status::satisfiable)
        << cw::to_string(r.status);
    ASSERT_TRUE(r.objective.has_value());
    EXPECT_GE(*r.objective, 1);
    EXPECT_LE(r.lower_bound, 1);
    if (r.status == cw::optimize_status::optimal) {
      EXPECT_EQ(*r.objective, 1);
    }
    EXPECT_TRUE(consistent(m, r));
  }
  // No time at all: no solution, status unknown; the solver is still usable.
  cw::cadical_solver solver;
  cw::variable_pool pool;
  const cw::objective cost = load(m, solver, pool);
  cw::optimize_options none;
  none.time_limit = std::chrono::seconds(0);
  const auto r = cw::minimize(solver, pool, cost, none);
  EXPECT_EQ(r.status, cw::optimize_status::unknown);
  EXPECT_FALSE(r.objective.has_value());
  EXPECT_FALSE(solver.deadline().has_value()) << "the search restores the solver's deadline";
  EXPECT_EQ(solver.solve(), cw::solve_result::satisfiable);
}

}  // namespace
