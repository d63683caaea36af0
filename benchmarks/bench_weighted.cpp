// Weighted encodings on knapsack-style constraints: prints a table (run from
// a Release build).
//
//   bench_weighted [--max-n N] [--clause-budget C]
//
// For n = 10^2 .. 10^5 inputs and coefficient ranges 1..10, 1..10^3 and
// 1..10^6 (fixed-seed random weights, bound = half their sum, <=), every
// method of the table that encodes linear constraints is measured by the
// budgeted dry run: clauses, auxiliary variables and seconds. A method that
// passes the clause budget (default 10^8) or its own budget (BDD nodes,
// totalizer outputs, the variable range for registers) is skipped for the
// larger n of that range.
#include <clausewright/clausewright.hpp>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <random>
#include <string>
#include <vector>

namespace cw = clausewright;

namespace {

cw::normalized_constraint knapsack(std::int32_t n, std::int64_t max_weight, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> weight(1, max_weight);
  std::vector<cw::term> terms;
  terms.reserve(static_cast<std::size_t>(n));
  std::int64_t total = 0;
  for (std::int32_t v = 1; v <= n; ++v) {
    terms.push_back({weight(rng), cw::lit(v)});
    total += terms.back().coefficient;
  }
  return cw::normalize(terms, cw::relation::le, total / 2, 0, "knapsack");
}

}  // namespace

int main(int argc, char** argv) {
  std::int64_t max_n = 100'000;
  std::uint64_t clause_budget = 100'000'000;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string a = argv[i];
    if (a == "--max-n") max_n = std::atoll(argv[i + 1]);
    else if (a == "--clause-budget") clause_budget = std::strtoull(argv[i + 1], nullptr, 10);
  }
  std::printf(
      "knapsack <=, bound = half the weight sum; budgets: %llu clauses, %llu BDD nodes, %llu totalizer outputs, "
      "the variable range for counter registers\n",
      static_cast<unsigned long long>(clause_budget), static_cast<unsigned long long>(cw::default_bdd_node_budget),
      static_cast<unsigned long long>(cw::default_generalized_totalizer_output_budget));
  std::printf("%-10s %-7s %-26s %14s %14s %10s\n", "weights", "n", "method", "clauses", "aux vars", "seconds");
  for (const std::int64_t range : {std::int64_t{10}, std::int64_t{1'000}, std::int64_t{1'000'000}}) {
    std::vector<bool> skipped(cw::method_table.size(), false);
    const std::string weights = "1.." + std::to_string(range);
    for (std::int64_t n = 100; n <= max_n; n *= 10) {
      const auto c = knapsack(static_cast<std::int32_t>(n), range, 42 + static_cast<std::uint64_t>(n));
      const cw::variable_pool pool(static_cast<std::int32_t>(n));
      for (std::size_t i = 0; i < cw::method_table.size(); ++i) {
        const cw::method_info& m = cw::method_table[i];
        if (!m.applies_to_kind(cw::applies::linear) || !cw::can_encode(m.id, c)) continue;
        const std::string name(m.name);
        if (skipped[i]) {
          std::printf("%-10s %-7lld %-26s %14s %14s %10s\n", weights.c_str(),
                      static_cast<long long>(n), name.c_str(), "skipped", "-", "-");
          continue;
        }
        const cw::method_measurement r = cw::measure(m.id, pool, c, {}, clause_budget);
        if (r.over_budget) {
          skipped[i] = true;
          const char* which = r.size.clauses >= clause_budget ? ">clause budget" : ">own budget";
          std::printf("%-10s %-7lld %-26s %14s %14s %10.2f\n", weights.c_str(),
                      static_cast<long long>(n), name.c_str(), which, "-", r.seconds);
        } else {
          std::printf("%-10s %-7lld %-26s %14llu %14llu %10.3f\n", weights.c_str(),
                      static_cast<long long>(n), name.c_str(), static_cast<unsigned long long>(r.size.clauses),
                      static_cast<unsigned long long>(r.size.variables), r.seconds);
        }
        std::fflush(stdout);
      }
    }
  }
  return 0;
}
