// The method table's arc-consistency column against measurement: for every
// method, propagation is measured over cardinality constraints (and weighted
// ones for linear methods) with <= and >=, exhaustively over partial
// assignments for small n. A claimed arc-consistent method must show no missed
// implication; a method claimed not arc-consistent must show one.
// Equalities are measured and printed but not part of the claim: for weighted
// equalities no polynomial encoding can be arc-consistent unless P = NP
// (deciding whether a subset sum hits k exactly is NP-complete), which is why
// the published claims are stated for <= and >=.
#include <clausewright/clausewright.hpp>
#include <gtest/gtest.h>

#include <random>
#include <string>

#include "harness.hpp"

namespace cw = clausewright;

namespace {

struct measured {
  bool arc_consistent = true;
  std::uint64_t constraints = 0;
  std::string counterexample;
};

measured measure_method(cw::method_id method, bool equalities) {
  measured m;
  const bool grouped = cw::info(method).needs_groups;
  auto take = [&](const cw_test::raw_constraint& c, std::uint32_t seed) {
    if ((c.rel == cw::relation::eq) != equalities) return;
    // A group method is measured with the at-most-one sets it relies on in
    // the formula; the others on rows alone.
    if (c.amos.empty() == grouped) return;
    if (!cw::can_encode(method, c.normalized())) return;
    const auto r = cw_test::measure_propagation(c, method, {}, seed);
    ++m.constraints;
    EXPECT_EQ(r.counterexample.rfind("UNSOUND", 0), std::string::npos) << c.describe() << ": " << r.counterexample;
    if (!r.arc_consistent && m.arc_consistent) {
      m.arc_consistent = false;
      m.counterexample = c.describe() + ": " + r.counterexample;
    }
  };
  for (std::int32_t n = 2; n <= 8; ++n)
    for (std::int64_t k = 0; k <= n; ++k)
      for (const auto rel : {cw::relation::le, cw::relation::ge, cw::relation::eq})
        for (const bool negated : {false, true}) take(cw_test::cardinality(n, rel, k, negated), 1);
  // Weighted constraints for methods that take them (seeded).
  for (std::uint32_t seed = 1; seed <= 200; ++seed) {
    std::mt19937_64 rng(seed);
    const auto c = cw_test::random_linear(rng, static_cast<std::int32_t>(2 + rng() % 6), 9, true, false);
    take(c, seed);
  }
  // Rows over at-most-one groups (seeded), for the group methods.
  for (std::uint32_t seed = 1; grouped && seed <= 300; ++seed) {
    std::mt19937_64 rng(seed);
    const auto c = cw_test::random_grouped(rng, static_cast<std::int32_t>(3 + rng() % 6), 9, seed % 5 == 0);
    take(c, seed);
  }
  return m;
}

}  // namespace

TEST(MethodTable, NamesAreUniqueAndFindable) {
  for (const auto& m : cw::method_table) {
    EXPECT_EQ(cw::find_method(m.name), m.id) << m.name;
    EXPECT_EQ(&cw::info(m.id), &m);
  }
  EXPECT_FALSE(cw::find_method("no-such-method").has_value());
  try {
    (void)cw::method_by_name("no-such-method");
    FAIL();
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::unknown_method);
    EXPECT_NE(std::string(e.what()).find("pairwise"), std::string::npos) << "the error lists the valid names";
  }
}

TEST(MethodTable, ArcConsistencyClaimsMatchMeasurement) {
  for (const auto& info : cw::method_table) {
    const measured m = measure_method(info.id, false);
    const measured eq = measure_method(info.id, true);
    EXPECT_GT(m.constraints, 0U) << info.name << " was measured on nothing";
    EXPECT_EQ(info.arc_consistent, m.arc_consistent)
        << info.name << ": the table says " << (info.arc_consistent ? "arc-consistent" : "not arc-consistent")
        << ", measured " << (m.arc_consistent ? "arc-consistent" : "not: " + m.counterexample);
    std::printf("[ measured ] %-28s %-20s over %4llu <=/>= constraints; on equalities: %s\n",
                std::string(info.name).c_str(), m.arc_consistent ? "arc-consistent" : "not arc-consistent",
                static_cast<unsigned long long>(m.constraints),
                eq.arc_consistent ? "arc-consistent" : ("not (" + eq.counterexample + ")").c_str());
  }
}

// Semantics and full equivalence of the group methods with their at-most-one
// sets in the formula: exhaustively over the inputs (CaDiCaL decides each
// assignment, the row and the sets are evaluated directly), and with
// full_equivalence every auxiliary variable a function of the inputs.
TEST(MethodTable, GroupMethodsEquivalentWithTheirAtMostOneSets) {
  for (const auto& info : cw::method_table) {
    if (!info.needs_groups) continue;
    std::uint64_t checked = 0;
    for (std::uint32_t seed = 1; seed <= 150; ++seed) {
      std::mt19937_64 rng(seed);
      const auto c = cw_test::random_grouped(rng, static_cast<std::int32_t>(2 + rng() % 9), 7, seed % 4 == 0);
      if (!cw::can_encode(info.id, c.normalized())) continue;
      for (const bool full : {false, true}) {
        EXPECT_TRUE(cw_test::equivalent(c, info.id, cw::encode_options{full}, "seed " + std::to_string(seed)));
        ++checked;
      }
    }
    EXPECT_GT(checked, 100U) << info.name;
  }
}

// A group method does not apply to a row without a group of two literals.
TEST(MethodTable, GroupMethodsNeedGroups) {
  std::mt19937_64 rng(7);
  const auto c = cw_test::random_linear(rng, 6, 9, false, false);
  for (const auto& info : cw::method_table)
    if (info.needs_groups) {
      EXPECT_FALSE(cw::can_encode(info.id, c.normalized())) << info.name;
    }
}
