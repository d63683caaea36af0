// The model and its encoding (include/clausewright/model.hpp), checked
// against CaDiCaL and brute force over the model's own variables:
//   - CNF: under every assignment of the user's variables, the clauses are
//     satisfiable exactly when every hard constraint holds (evaluated here,
//     on the user's terms, products included);
//   - weighted: a soft unit is satisfiable together with an assignment
//     exactly when its soft constraint (or objective literal) holds under it,
//     the weighted MaxSAT reading of soft constraints and objectives;
//   - objective bounds, method overrides and the selection cache.
#include <gtest/gtest.h>

#include <cadical.hpp>
#include <clausewright/model.hpp>
#include <cstdint>
#include <optional>
#include <random>
#include <sstream>
#include <string>
#include <vector>

namespace cw = clausewright;
using cw::lit;

namespace {

// A weighted sink for the tests: hard clauses and soft clauses kept apart.
struct weighted_buffer {
  cw::cnf_buffer hard;
  cw::cnf_buffer soft;
  std::vector<std::int64_t> weights;
  void add_clause(std::span<const cw::literal> c) { hard.add_clause(c); }
  void add_soft_clause(std::int64_t w, std::span<const cw::literal> c) {
    soft.add_clause(c);
    weights.push_back(w);
  }
};

// A random model over n user variables, with its description for messages.
struct generated {
  cw::model m;
  std::string text;
};

std::int64_t random_in(std::mt19937_64& rng, std::int64_t lo, std::int64_t hi) {
  return lo + static_cast<std::int64_t>(rng() % static_cast<std::uint64_t>(hi - lo + 1));
}

generated random_model(std::uint64_t seed, std::int32_t n, int constraints, int soft, bool products) {
  std::mt19937_64 rng(seed);
  generated g;
  g.m.reserve_variables(n);
  std::vector<cw::literal> product_vars;
  if (products) {
    for (int p = 0; p < 2; ++p) {
      const auto a = static_cast<std::int32_t>(random_in(rng, 1, n));
      auto b = static_cast<std::int32_t>(random_in(rng, 1, n));
      if (b == a) b = a % n + 1;
      const std::vector<cw::literal> f{lit(a), rng() % 2 ? lit(b) : lit(-b)};
      product_vars.push_back(g.m.add_product(f));
    }
  }
  std::ostringstream os;
  auto random_literal = [&]() {
    if (!product_vars.empty() && rng() % 5 == 0) return product_vars[rng() % product_vars.size()];
    const auto v = static_cast<std::int32_t>(random_in(rng, 1, n));
    return rng() % 3 == 0 ? lit(-v) : lit(v);
  };
  for (int i = 0; i < constraints + soft; ++i) {
    std::vector<cw::term> terms;
    const int size = static_cast<int>(random_in(rng, 1, 5));
    const bool unit = rng() % 2 == 0;
    std::int64_t total = 0;
    for (int j = 0; j < size; ++j) {
      const std::int64_t a = unit ? 1 : random_in(rng, -4, 6);
      terms.push_back({a, random_literal()});
      total += a < 0 ? -a : a;
    }
    const auto rel = static_cast<cw::relation>(rng() % 3);
    const std::int64_t bound = random_in(rng, -1, total + 1);
    cw::constraint_settings s;
    s.weight = i >= constraints ? random_in(rng, 1, 9) : 0;
    g.m.add_constraint(terms, rel, bound, s);
    for (const auto& t : terms) os << t.coefficient << "*" << t.lit.dimacs() << " ";
    os << cw::to_string(rel) << " " << bound << (s.weight ? " soft " + std::to_string(s.weight) : "") << "; ";
  }
  std::vector<cw::term> objective;
  for (std::int32_t v = 1; v <= n; ++v)
    if (rng() % 2 == 0) objective.push_back({random_in(rng, -5, 5), rng() % 2 ? lit(v) : lit(-v)});
  g.m.set_objective(objective);
  g.text = os.str();
  return g;
}

// Evaluation done here, apart from the model's own check().
bool literal_true(const cw::model& m, cw::literal l, std::uint32_t bits) {
  bool v = false;
  if (l.var() <= m.variables()) {
    v = ((bits >> (l.var() - 1)) & 1U) != 0;
  } else {
    v = true;
    for (const cw::literal f : m.product_factors(static_cast<std::size_t>(l.var() - m.variables() - 1))) {
      const bool fv = ((bits >> (f.var() - 1)) & 1U) != 0;
      v = v && (f.negative() ? !fv : fv);
    }
  }
  return l.negative() ? !v : v;
}

bool constraint_holds(const cw::model& m, const cw::constraint_view& c, std::uint32_t bits) {
  std::int64_t sum = 0;
  for (const auto& t : c.terms)
    if (literal_true(m, t.lit, bits)) sum += t.coefficient;
  switch (c.rel) {
    case cw::relation::le: return sum <= c.bound;
    case cw::relation::ge: return sum >= c.bound;
    case cw::relation::eq: return sum == c.bound;
  }
  return false;
}

bool hard_holds(const cw::model& m, std::uint32_t bits) {
  for (std::size_t i = 0; i < m.constraints(); ++i)
    if (!m.constraint(i).soft() && !constraint_holds(m, m.constraint(i), bits)) return false;
  return true;
}

std::int64_t objective_of(const cw::model& m, std::uint32_t bits) {
  std::int64_t sum = 0;
  for (const auto& t : m.objective())
    if (literal_true(m, t.lit, bits)) sum += t.coefficient;
  return sum;
}

void add_all(CaDiCaL::Solver& s, const cw::cnf_buffer& cnf) {
  for (const auto clause : cnf) {
    for (const auto l : clause) s.add(l.dimacs());
    s.add(0);
  }
}

void assume_bits(CaDiCaL::Solver& s, std::int32_t n, std::uint32_t bits) {
  for (std::int32_t v = 1; v <= n; ++v) s.assume(((bits >> (v - 1)) & 1U) ? v : -v);
}

}  // namespace

TEST(Model, NamesAreNumberedInOrderOfFirstAppearance) {
  cw::model m;
  EXPECT_EQ(m.variable("b"), lit(1));
  EXPECT_EQ(m.variable("a"), lit(2));
  EXPECT_EQ(m.variable("b"), lit(1));
  EXPECT_EQ(m.name_of(2), "a");
  ASSERT_TRUE(m.find_variable("a").has_value());
  EXPECT_FALSE(m.find_variable("c").has_value());
  m.reserve_variables(4);  // 3 and 4 unnamed: OPB style names
  EXPECT_EQ(m.name_of(4), "x4");
  const std::vector<cw::literal> f{lit(1), lit(-2)};
  EXPECT_EQ(m.add_product(f), lit(5));
  // User variables after a product would collide with its number.
  EXPECT_THROW((void)m.variable("late"), cw::error);
  EXPECT_THROW(m.reserve_variables(9), cw::error);
  // Constraints over unknown variables are refused.
  const std::vector<cw::term> t{{1, lit(6)}};
  EXPECT_THROW((void)m.add_constraint(t, cw::relation::ge, 1), cw::error);
}

TEST(Model, CheckNamesEachViolatedConstraint) {
  cw::model m;
  const auto a = m.variable("a");
  const auto b = m.variable("b");
  const std::vector<cw::term> both{{1, a}, {1, b}};
  cw::constraint_settings named;
  named.name = "at most one";
  m.add_constraint(both, cw::relation::le, 1, named);
  m.add_constraint(both, cw::relation::ge, 1);
  cw::constraint_settings soft;
  soft.weight = 3;
  m.add_constraint(both, cw::relation::eq, 0, soft);
  // a = b = 1: the first and the soft third fail, with their sums.
  const auto v = m.check([](std::int32_t) { return true; });
  ASSERT_EQ(v.size(), 2U);
  EXPECT_EQ(v[0].label, "at most one");
  EXPECT_EQ(cw::to_string(v[0].left_side), "2");
  EXPECT_FALSE(v[0].soft());
  EXPECT_EQ(v[1].label, "#2");
  EXPECT_EQ(v[1].weight, 3);
  // a = b = 0: only the second fails.
  const auto w = m.check([](std::int32_t) { return false; });
  ASSERT_EQ(w.size(), 1U);
  EXPECT_EQ(w[0].index, 1U);
}

TEST(Model, ObjectiveValueIsExactBeyond64Bits) {
  cw::model m;
  const auto a = m.variable("a");
  const auto b = m.variable("b");
  const std::vector<cw::term> obj{{INT64_MAX, a}, {INT64_MAX, b}};
  m.set_objective(obj);
  // 2 * (2^63 - 1) = 18446744073709551614
  EXPECT_EQ(cw::to_string(m.objective_value([](std::int32_t) { return true; })), "18446744073709551614");
}

TEST(ModelEncoding, CnfIsEquivalentToTheHardConstraints) {
  // Brute force over the 6 user variables against CaDiCaL, 60 seeded models.
  for (std::uint64_t seed = 1; seed <= 60; ++seed) {
    const generated g = random_model(seed, 6, 5, 2, seed % 2 == 0);
    cw::cnf_buffer cnf;
    cw::variable_pool pool;
    cw::model_encoding_settings settings;
    settings.policy = static_cast<cw::selection_policy>(seed % 3);
    const auto summary = cw::encode_model(g.m, cnf, pool, settings);
    EXPECT_EQ(summary.skipped_soft, 2U);
    EXPECT_EQ(summary.hard_clauses, cnf.size());
    CaDiCaL::Solver solver;
    add_all(solver, cnf);
    for (std::uint32_t bits = 0; bits < 64; ++bits) {
      assume_bits(solver, 6, bits);
      const bool sat = solver.solve() == 10;
      ASSERT_EQ(sat, hard_holds(g.m, bits)) << "seed " << seed << " assignment " << bits << ": " << g.text;
    }
  }
}

TEST(ModelEncoding, SoftConstraintsAndObjectiveFollowTheMaxSatReading) {
  for (std::uint64_t seed = 100; seed < 140; ++seed) {
    const generated g = random_model(seed, 5, 3, 3, seed % 2 == 1);
    weighted_buffer w;
    cw::variable_pool pool;
    const auto summary = cw::encode_model(g.m, w, pool);
    // Soft units: one per soft constraint, one per non-zero objective term.
    std::size_t objective_terms = 0;
    std::int64_t offset = 0;
    for (const auto& t : g.m.objective()) {
      if (t.coefficient != 0) ++objective_terms;
      if (t.coefficient < 0) offset += t.coefficient;
    }
    ASSERT_EQ(w.soft.size(), objective_terms + 3) << "seed " << seed;
    EXPECT_EQ(cw::to_string(summary.objective_offset), std::to_string(offset));
    CaDiCaL::Solver solver;
    add_all(solver, w.hard);
    for (std::uint32_t bits = 0; bits < 32; ++bits) {
      assume_bits(solver, 5, bits);
      const bool sat = solver.solve() == 10;
      ASSERT_EQ(sat, hard_holds(g.m, bits)) << "seed " << seed << ": " << g.text;
      if (!sat) continue;
      // The cost of the cheapest completion: objective minus offset plus the
      // weights of the soft constraints that fail. Each soft unit is
      // satisfiable with the assignment exactly when what it stands for holds.
      std::int64_t cost = 0;
      for (std::size_t k = 0; k < w.soft.size(); ++k) {
        ASSERT_EQ(w.soft[k].size(), 1U);
        assume_bits(solver, 5, bits);
        solver.assume(w.soft[k][0].dimacs());
        if (solver.solve() != 10) cost += w.weights[k];
      }
      std::int64_t expected = objective_of(g.m, bits) - offset;
      for (std::size_t i = 0; i < g.m.constraints(); ++i) {
        const auto c = g.m.constraint(i);
        if (c.soft() && !constraint_holds(g.m, c, bits)) expected += c.weight;
      }
      ASSERT_EQ(cost, expected) << "seed " << seed << " assignment " << bits << ": " << g.text;
    }
  }
}

TEST(ModelEncoding, ObjectiveBoundIsAHardConstraint) {
  for (std::uint64_t seed = 200; seed < 230; ++seed) {
    const generated g = random_model(seed, 6, 2, 0, false);
    const std::int64_t bound = static_cast<std::int64_t>(seed % 7) - 3;
    cw::cnf_buffer cnf;
    cw::variable_pool pool;
    cw::model_encoding_settings settings;
    settings.objective_bound = bound;
    (void)cw::encode_model(g.m, cnf, pool, settings);
    CaDiCaL::Solver solver;
    add_all(solver, cnf);
    for (std::uint32_t bits = 0; bits < 64; ++bits) {
      assume_bits(solver, 6, bits);
      const bool expected = hard_holds(g.m, bits) && objective_of(g.m, bits) <= bound;
      ASSERT_EQ(solver.solve() == 10, expected) << "seed " << seed << " bound " << bound << ": " << g.text;
    }
  }
  cw::model none;
  (void)none.variable("a");
  cw::cnf_buffer cnf;
  cw::variable_pool pool;
  cw::model_encoding_settings settings;
  settings.objective_bound = 1;
  EXPECT_THROW((void)cw::encode_model(none, cnf, pool, settings), cw::error);
}

TEST(ModelEncoding, MethodOverridesTakeTurns) {
  cw::model m;
  std::vector<cw::literal> xs;
  xs.reserve(6);
  for (int i = 0; i < 6; ++i) xs.push_back(m.variable("v" + std::to_string(i)));
  std::vector<cw::term> terms;
  terms.reserve(xs.size());
  for (const auto x : xs) terms.push_back({1, x});
  cw::constraint_settings own;
  own.method = cw::method_id::ladder;
  m.add_constraint(terms, cw::relation::le, 1, own);                  // at-most-one, own choice ladder
  m.add_constraint(terms, cw::relation::le, 3);                       // cardinality, no choice
  std::vector<cw::method_id> used;
  const auto record = [&used](const cw::constraint_outcome& o) { used.push_back(o.method.value()); };
  {
    cw::counting_sink sink;
    cw::variable_pool pool;
    (void)cw::encode_model(m, sink, pool, {}, record);
    ASSERT_EQ(used.size(), 2U);
    EXPECT_EQ(used[0], cw::method_id::ladder);
  }
  {
    // The asked-for list wins where it applies; pairwise cannot encode the
    // cardinality constraint, so the next in the list takes it.
    used.clear();
    cw::counting_sink sink;
    cw::variable_pool pool;
    cw::model_encoding_settings s;
    s.methods = {cw::method_id::pairwise, cw::method_id::sequential_counter};
    (void)cw::encode_model(m, sink, pool, s, record);
    ASSERT_EQ(used.size(), 2U);
    EXPECT_EQ(used[0], cw::method_id::pairwise);
    EXPECT_EQ(used[1], cw::method_id::sequential_counter);
  }
  // A model's own choice that cannot encode its constraint is an error
  // naming the constraint.
  cw::model bad;
  std::vector<cw::term> t3;
  t3.reserve(4);
  for (int i = 0; i < 4; ++i) t3.push_back({1, bad.variable("w" + std::to_string(i))});
  cw::constraint_settings wrong;
  wrong.method = cw::method_id::pairwise;
  wrong.name = "three of four";
  bad.add_constraint(t3, cw::relation::le, 2, wrong);
  cw::counting_sink sink;
  cw::variable_pool pool;
  try {
    (void)cw::encode_model(bad, sink, pool);
    ADD_FAILURE() << "no error";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::method_not_applicable);
    EXPECT_NE(std::string(e.what()).find("three of four"), std::string::npos) << e.what();
  }
}

TEST(ModelEncoding, PickCacheAgreesWithSelection) {
  // The cache keys on the shape; its picks must be the ones select_method
  // makes afresh (seeded random linear and cardinality constraints).
  std::mt19937_64 rng(77);
  cw::pick_cache cache;
  for (int i = 0; i < 300; ++i) {
    std::vector<cw::term> terms;
    const int n = 2 + static_cast<int>(rng() % 6);
    const bool unit = i % 2 == 0;
    terms.reserve(static_cast<std::size_t>(n));
    for (int j = 0; j < n; ++j) terms.push_back({unit ? 1 : 1 + static_cast<std::int64_t>(rng() % 5), lit(j + 1)});
    const auto rel = static_cast<cw::relation>(rng() % 3);
    const auto c = cw::normalize(terms, rel, static_cast<std::int64_t>(rng() % static_cast<std::uint64_t>(2 * n)));
    if (c.is_constant() || c.kind == cw::constraint_kind::clause) continue;
    cw::variable_pool pool(8);
    for (const auto policy :
         {cw::selection_policy::smallest, cw::selection_policy::smallest_arc_consistent, cw::selection_policy::balanced}) {
      cw::model_encoding_settings s;
      s.policy = policy;
      ASSERT_EQ(cache.pick(pool, c, s), cw::select_method(pool, c, policy)) << "case " << i;
    }
  }
}

TEST(ModelEncoding, StoppedDryRunsPickAsFullMeasurement) {
  // The cheap choice measures in order of expected size and stops each dry
  // run where its method can no longer win; its pick must be the one made on
  // every method measured in full (seeded random constraints, every policy,
  // generous and tight budgets).
  std::mt19937_64 rng(91);
  std::uint64_t compared = 0;
  for (int i = 0; i < 250; ++i) {
    std::vector<cw::term> terms;
    const int n = 2 + static_cast<int>(rng() % 11);
    const bool unit = i % 3 == 0;
    for (int j = 0; j < n; ++j)
      terms.push_back({unit ? 1 : 1 + static_cast<std::int64_t>(rng() % 40), lit(j + 1)});
    const auto rel = static_cast<cw::relation>(rng() % 3);
    std::int64_t total = 0;
    for (const auto& t : terms) total += t.coefficient;
    const auto c = cw::normalize(terms, rel, static_cast<std::int64_t>(rng() % static_cast<std::uint64_t>(total + 1)));
    if (c.is_constant() || c.kind == cw::constraint_kind::clause) continue;
    const cw::variable_pool pool(16);
    for (const std::uint64_t budget : {cw::default_clause_budget, std::uint64_t{60}})
      for (const auto policy : cw::all_policies) {
        const auto full = cw::measure_all(pool, c, {}, budget);
        const auto cut = cw::measure_for_policy(pool, c, policy, {}, budget);
        ASSERT_EQ(full.size(), cut.size());
        std::optional<cw::method_id> expected;
        std::optional<cw::method_id> got;
        try {
          expected = cw::pick(full, policy, c);
        } catch (const cw::error&) {
        }
        try {
          got = cw::pick(cut, policy, c);
        } catch (const cw::error&) {
        }
        ASSERT_EQ(expected, got) << "seed 91 case " << i << " policy " << cw::to_string(policy) << " budget "
                                 << budget;
        // What was measured in full is exact; what was stopped is below the truth.
        for (std::size_t m = 0; m < full.size(); ++m) {
          if (!cut[m].over_budget) {
            EXPECT_EQ(cut[m].size, full[m].size) << cw::info(cut[m].method).name;
          } else if (!full[m].over_budget) {
            EXPECT_LE(cut[m].size.clauses, full[m].size.clauses) << cw::info(cut[m].method).name;
          }
        }
        ++compared;
      }
  }
  EXPECT_GT(compared, 1000U);
}

TEST(ModelEncoding, PickCacheKeysOnTheCoefficientMultiset) {
  // The same coefficients in another order, over other literals, are one
  // shape: measured once. The pick is then the one select_method makes.
  cw::pick_cache cache;
  cw::model_encoding_settings s;
  const cw::variable_pool pool(8);
  const auto a = cw::normalize(std::vector<cw::term>{{3, lit(1)}, {5, lit(2)}, {4, lit(3)}, {2, lit(4)}},
                               cw::relation::le, 9);
  const auto b = cw::normalize(std::vector<cw::term>{{2, lit(8)}, {4, lit(-6)}, {3, lit(5)}, {5, lit(7)}},
                               cw::relation::le, 9);
  EXPECT_EQ(cw::shape_of(a, s), cw::shape_of(b, s));
  EXPECT_NE(cw::shape_of(a, s, true), cw::shape_of(b, s, true));  // the order is part of the exact shape
  const auto c = cw::normalize(std::vector<cw::term>{{3, lit(1)}, {5, lit(2)}, {4, lit(3)}, {2, lit(4)}},
                               cw::relation::le, 10);
  EXPECT_NE(cw::shape_of(a, s), cw::shape_of(c, s));
  EXPECT_EQ(cache.pick(pool, a, s), cw::select_method(pool, a, s.policy));
  EXPECT_EQ(cache.pick(pool, b, s), cw::select_method(pool, b, s.policy));
}

TEST(ModelEncoding, MeasurementEqualsWhatIsWritten) {
  // measure_model_constraint is a dry run of encode_model_constraint: equal
  // counts for every method, hard and soft.
  std::mt19937_64 rng(5);
  for (int i = 0; i < 60; ++i) {
    std::vector<cw::term> terms;
    const int n = 2 + static_cast<int>(rng() % 6);
    terms.reserve(static_cast<std::size_t>(n));
    for (int j = 0; j < n; ++j) terms.push_back({1 + static_cast<std::int64_t>(rng() % 4), lit(j + 1)});
    const auto c = cw::normalize(terms, static_cast<cw::relation>(i % 3), static_cast<std::int64_t>(rng() % 10));
    for (const auto& m : cw::method_table) {
      if (!cw::can_encode(m.id, c)) continue;
      for (const std::int64_t weight : {std::int64_t{0}, std::int64_t{4}}) {
        cw::variable_pool pool(8);
        const auto measured = cw::measure_model_constraint(m.id, pool, c, weight, {}, cw::default_clause_budget);
        weighted_buffer w;
        cw::variable_pool real(8);
        cw::encode_model_constraint(w, real, c, m.id, weight, {});
        ASSERT_EQ(measured.size.clauses, w.hard.size() + w.soft.size()) << m.name << " case " << i;
        ASSERT_EQ(measured.size.variables, static_cast<std::uint64_t>(real.top() - 8)) << m.name << " case " << i;
        ASSERT_EQ(weight > 0 ? 1U : 0U, w.soft.size());
      }
    }
  }
}
