// Closed-form size predictions equal the dry run (the exact count of what the
// encoder emits). The formulas themselves are the published ones: pairwise
// n(n-1)/2 (folklore) and Sinz 2005's 2nk + n - 3k - 1 clauses with k(n-1)
// auxiliary variables; tests/test_encodings_core.cpp checks those against the
// papers, this test that the predictor and the encoder agree on every field.
#include <clausewright/clausewright.hpp>
#include <clausewright/predict.hpp>
#include <gtest/gtest.h>

#include "harness.hpp"

namespace cw = clausewright;

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
            const auto p = cw::predict_size(m.id, c, options);
            if (!p) continue;
            ++predicted;
            const auto dry = cw::measure(m.id, cw::variable_pool(n), c, options);
            ASSERT_EQ(*p, dry.size) << m.name << " n=" << n << " k=" << k << " rel " << cw::to_string(rel)
                                    << (full ? " full" : "") << ": predicted " << p->clauses << " clauses "
                                    << p->variables << " vars " << p->literals << " literals, dry run "
                                    << dry.size.clauses << " / " << dry.size.variables << " / "
                                    << dry.size.literals;
          }
  EXPECT_GT(predicted, 500U);
}
