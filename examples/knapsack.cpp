// Knapsack: packing a daypack for a hike (invented data).
//
// Twelve things could go in the pack; each has a weight (in units of 100 g)
// and a value (how much it is missed when left at home). The pack carries at
// most 3 kg. Packing the most value is minimising the value left behind:
//     minimise  sum value_i * ~take_i   subject to  sum weight_i * take_i <= 30.
// The constraint and the objective go straight into the embedded CaDiCaL;
// the optimiser tightens "value left behind <= v - 1" after every solution
// until no better packing exists. The same model as a file:
// examples/models/knapsack.json (`clausewright solve examples/models/knapsack.json`).
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/optimize.hpp>

#include <cstdint>
#include <cstdio>
#include <string>
#include <vector>

namespace cw = clausewright;

namespace {

struct item {
  const char* name;
  std::int64_t weight;  // 100 g
  std::int64_t value;
};

const std::vector<item> items{
    {"water", 10, 20},  {"sandwiches", 5, 12}, {"rain-jacket", 6, 14}, {"fleece", 5, 8},
    {"first-aid-kit", 3, 10}, {"map", 1, 6},  {"camera", 7, 9},        {"binoculars", 8, 7},
    {"thermos", 9, 11}, {"snacks", 2, 6},      {"sunscreen", 1, 4},     {"book", 4, 3},
};
constexpr std::int64_t weight_limit = 30;

}  // namespace

int main() {
  const auto n = static_cast<std::int32_t>(items.size());
  auto take = [](std::size_t i) { return cw::lit(static_cast<std::int32_t>(i) + 1); };  // variables 1..12

  cw::cadical_solver solver;
  cw::variable_pool pool(n);
  cw::encoder enc(solver, pool);

  std::vector<cw::term> load;
  cw::objective left_behind;
  std::int64_t all_value = 0;
  for (std::size_t i = 0; i < items.size(); ++i) {
    load.push_back({items[i].weight, take(i)});
    left_behind.add(items[i].value, ~take(i));
    all_value += items[i].value;
  }
  const auto capacity = enc.linear(load, cw::relation::le, weight_limit);
  std::fprintf(stderr, "weight limit: %s, %llu clauses, %llu auxiliary variables\n",
               std::string(cw::info(*capacity.method).name).c_str(),
               static_cast<unsigned long long>(capacity.size.clauses),
               static_cast<unsigned long long>(capacity.size.variables));

  cw::optimize_options options;
  options.on_solution = [&](const cw::improving_solution& s) {
    std::fprintf(stderr, "packing with value %lld left behind (%.3f s)\n", static_cast<long long>(s.objective),
                 s.seconds);
  };
  const cw::optimize_result result = cw::minimize(solver, pool, left_behind, options);
  if (result.status != cw::optimize_status::optimal) {
    std::printf("no packing proved best: %s\n", std::string(cw::to_string(result.status)).c_str());
    return 1;
  }

  std::int64_t weight = 0, value = 0;
  std::printf("packed (best of all packings, proved by %llu solver calls):\n",
              static_cast<unsigned long long>(result.solves));
  for (std::size_t i = 0; i < items.size(); ++i) {
    if (!result.value(take(i))) continue;
    weight += items[i].weight;
    value += items[i].value;
    std::printf("  %-14s %4lld g  value %2lld\n", items[i].name, static_cast<long long>(items[i].weight) * 100,
                static_cast<long long>(items[i].value));
  }
  std::printf("total %lld g of %lld g, value %lld of %lld (left behind %lld)\n", static_cast<long long>(weight) * 100,
              static_cast<long long>(weight_limit) * 100, static_cast<long long>(value),
              static_cast<long long>(all_value), static_cast<long long>(*result.objective));
  // The decoded packing must respect the limit and have the value reported.
  return weight <= weight_limit && all_value - value == *result.objective ? 0 : 1;
}
