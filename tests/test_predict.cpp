// Closed-form size predictions equal the dry run (the exact count of what the
// encoder emits). The formulas themselves are the published ones: pairwise
// n(n-1)/2 (folklore), Sinz 2005's 2nk + n - 3k - 1 clauses with k(n-1)
// auxiliary variables, the ladder's 3n-4 clauses, bitwise n*ceil(log2 n),
// Batcher's (t^2 - t + 4) 2^(t-2) - 1 comparators; tests/test_encodings_core.cpp
// and tests/test_cardinality.cpp check those against the papers, this test
// that the predictor and the encoder agree on every field.
#include <gtest/gtest.h>
#include <clausewright/clausewright.hpp>
#include <clausewright/predict.hpp>

#include <random>
#include <string>

#include "harness.hpp"

namespace cw = clausewright;

namespace {

// Compares the closed form of `id` on `c` with the dry run over a pool of
// `users` variables; false when `id` has no closed form for `c`. A mismatch
// is a test failure, described by `what` and both sizes.
template <class Describe>
bool prediction_matches_dry_run(cw::method_id id, std::int32_t users, const cw::normalized_constraint& c,
                                const cw::encode_options& options, Describe what) {
  const auto p = cw::predict_size(id, c, options);
  if (!p) return false;
  const auto dry = cw::dry_run(id, cw::variable_pool(users), c, options);
  EXPECT_EQ(*p, dry.size) << cw::info(id).name << (options.full_equivalence ? " full" : "") << " " << what()
                          << ": predicted " << p->clauses << " clauses " << p->variables << " vars " << p->literals
                          << " literals, dry run " << dry.size.clauses << " / " << dry.size.variables << " / "
                          << dry.size.literals;
  return true;
}

}  // namespace

TEST(Predict, EqualsTheDryRunWheneverItPredicts) {
  std::uint64_t predicted = 0;
  for (const auto& m : cw::method_table)
    for (std::int32_t n = 1; n <= 30; ++n)
      for (std::int64_t k = 0; k <= n + 1; ++k)
        for (const auto rel : {cw::relation::le, cw::relation::ge, cw::relation::eq})
          for (const bool full : {false, true}) {
            const auto c = cw_test::cardinality(n, rel, k, n % 2 == 0).normalized();
            if (!cw::can_encode(m.id, c)) continue;
            const cw::encode_options options{full};
            if (prediction_matches_dry_run(m.id, n, c, options, [&] {
                  return "n=" + std::to_string(n) + " k=" + std::to_string(k) + " rel " +
                         std::string(cw::to_string(rel));
                }))
              ++predicted;
            ASSERT_FALSE(HasFailure());
          }
  EXPECT_GT(predicted, 500U);
}

// The networks at sizes beyond the exhaustive range: the predictor mirrors
// the merge recursion, so large cut points (m up to 128) are where it could
// drift from the encoder.
TEST(Predict, NetworksEqualTheDryRunAtLargerSizes) {
  std::uint64_t predicted = 0;
  for (const auto id : {cw::method_id::cardinality_network, cw::method_id::sorting_network})
    for (const std::int32_t n : {32, 48, 64, 96, 128, 192, 256})
      for (const std::int64_t k : {1, 2, 3, 7, 8, 15, 16, 31, 33, 63, 64, 100, 127})
        for (const auto rel : {cw::relation::le, cw::relation::ge, cw::relation::eq})
          for (const bool full : {false, true}) {
            if (k > n) continue;
            const auto c = cw_test::cardinality(n, rel, k, false).normalized();
            const cw::encode_options options{full};
            if (prediction_matches_dry_run(id, n, c, options, [&] {
                  return "n=" + std::to_string(n) + " k=" + std::to_string(k) + " rel " +
                         std::string(cw::to_string(rel));
                }))
              ++predicted;
            ASSERT_FALSE(HasFailure());
          }
  EXPECT_GT(predicted, 100U);
}

// The weighted closed forms (the adder network's buckets and comparator,
// the one-directional sequential weight counter) against the dry run, on
// seeded random constraints of every relation, with and without full
// equivalence.
TEST(Predict, WeightedClosedFormsEqualTheDryRun) {
  std::mt19937_64 rng(41);
  std::uint64_t predicted = 0;
  for (int i = 0; i < 400; ++i) {
    const auto n = static_cast<std::int32_t>(2 + rng() % 14);
    const std::int64_t most = i % 3 == 0 ? 9 : 200;
    const auto raw = cw_test::random_linear(rng, n, most, true, false);
    const auto c = raw.normalized();
    for (const auto id : {cw::method_id::adder, cw::method_id::sequential_weight_counter})
      for (const bool full : {false, true}) {
        if (!cw::can_encode(id, c)) continue;
        const cw::encode_options options{full};
        if (prediction_matches_dry_run(id, n, c, options,
                                       [&] { return "seed 41 case " + std::to_string(i) + " on " + raw.describe(); }))
          ++predicted;
        ASSERT_FALSE(HasFailure());
      }
  }
  EXPECT_GT(predicted, 300U);
}

// The cheap lower bounds (the totalizer's and the generalized totalizer's
// root, the BDD's sampled levels) never pass the dry run; and on a weighted
// capacity row they are far above the smallest method, which is what makes
// the choice cheap.
TEST(Predict, LowerBoundsNeverPassTheDryRun) {
  std::mt19937_64 rng(43);
  std::uint64_t positive = 0;
  for (int i = 0; i < 300; ++i) {
    const auto n = static_cast<std::int32_t>(2 + rng() % 14);
    const auto raw = i % 2 == 0
                         ? cw_test::random_linear(rng, n, 1 + static_cast<std::int64_t>(rng() % 60), true, false)
                         : cw_test::cardinality(n, static_cast<cw::relation>(i % 3),
                                                static_cast<std::int64_t>(rng() % static_cast<std::uint64_t>(n + 1)));
    const auto c = raw.normalized();
    for (const auto& m : cw::method_table)
      for (const bool full : {false, true}) {
        if (!cw::can_encode(m.id, c)) continue;
        const cw::encode_options options{full};
        const std::uint64_t least = cw::clause_lower_bound(m.id, c, options);
        const auto dry = cw::dry_run(m.id, cw::variable_pool(n), c, options);
        ASSERT_FALSE(dry.over_budget);
        ASSERT_LE(least, dry.size.clauses)
            << "seed 43 case " << i << " " << m.name << (full ? " full" : "") << " on " << raw.describe();
        positive += least > 0 ? 1 : 0;
      }
  }
  EXPECT_GT(positive, 1000U);
}

// Batcher 1968: (t^2 - t + 4) 2^(t-2) - 1 comparators sort 2^t inputs; the
// predictor's count (clauses / 6 with both sides, every comparator full).
TEST(Predict, SortingNetworkCountIsBatchers) {
  // From t = 2: two inputs with k = 1 normalise to a clause.
  for (std::int32_t t = 2; t <= 12; ++t) {
    const std::int32_t n = 1 << t;
    const auto c = cw_test::cardinality(n, cw::relation::le, n / 2, false).normalized();
    const auto p = cw::predict_size(cw::method_id::sorting_network, c, cw::encode_options{true});
    ASSERT_TRUE(p.has_value());
    const std::uint64_t batcher = (static_cast<std::uint64_t>(t * t - t + 4) << (t - 2)) - 1;
    EXPECT_EQ(p->variables, 2 * batcher) << "t=" << t;
    EXPECT_EQ(p->clauses, 6 * batcher + 1) << "t=" << t;  // and the unit ~c_(k+1)
  }
}

// The group methods' predictions (rows over at-most-one groups, seeded):
// every field equal to the dry run.
TEST(Predict, GroupMethodsEqualTheDryRun) {
  std::uint64_t predicted = 0;
  for (std::uint32_t seed = 1; seed <= 300; ++seed) {
    std::mt19937_64 rng(seed);
    const auto raw = cw_test::random_grouped(rng, static_cast<std::int32_t>(2 + rng() % 14), 12, seed % 6 == 0);
    const cw::normalized_constraint c = raw.normalized();
    for (const auto& m : cw::method_table) {
      if (!m.needs_groups || !cw::can_encode(m.id, c)) continue;
      for (const bool full : {false, true}) {
        const cw::encode_options options{full};
        const auto p = cw::predict_size(m.id, c, options);
        if (!p) continue;
        const auto d = cw::dry_run(m.id, cw::variable_pool(raw.max_var()), c, options);
        EXPECT_EQ(*p, d.size) << m.name << " seed " << seed << ": " << raw.describe();
        ++predicted;
      }
    }
  }
  EXPECT_GT(predicted, 50U);
}
