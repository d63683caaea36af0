// Anytime optimisation: a larger knapsack (loading a delivery van, invented
// data generated with a fixed seed), solved under a time limit with the
// optimiser's options: the default core-boosted search, the van's capacity
// as a linear row for the relaxation's bound (COIN-OR CLP, through
// clausewright::lp), and callbacks for each better load and each rise of
// the lower bound. Exits 0 when the best load found respects the capacity
// and the proved bound is not above it.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/lp_bound.hpp>
#include <clausewright/optimize.hpp>

#include <chrono>
#include <cstdint>
#include <cstdio>
#include <random>
#include <vector>

namespace cw = clausewright;

int main() {
  constexpr std::int32_t parcels = 60;
  std::mt19937 rng(7);
  std::uniform_int_distribution<std::int64_t> kilos(5, 80);
  std::uniform_int_distribution<std::int64_t> fee(10, 200);
  std::vector<std::int64_t> weight(parcels);
  std::vector<std::int64_t> value(parcels);
  cw::linear_row load{{}, cw::relation::le, 0};
  cw::objective left_behind;  // minimise the fees of the parcels not loaded
  for (std::int32_t i = 0; i < parcels; ++i) {
    weight[static_cast<std::size_t>(i)] = kilos(rng);
    value[static_cast<std::size_t>(i)] = fee(rng);
    load.terms.push_back({weight[static_cast<std::size_t>(i)], cw::lit(i + 1)});
    left_behind.add(value[static_cast<std::size_t>(i)], ~cw::lit(i + 1));
    load.bound += weight[static_cast<std::size_t>(i)];
  }
  load.bound /= 2;  // the van takes half of it

  cw::cadical_solver solver;
  cw::variable_pool pool(parcels);
  cw::encoder enc(solver, pool);
  enc.linear(load.terms, load.rel, load.bound);

  cw::optimize_options options;  // search: core-boosted
  options.time_limit = std::chrono::seconds(5);
  options.rows = {load};
  options.relax = cw::clp_relaxation;
  options.on_solution = [](const cw::improving_solution& s) {
    std::printf("%.2f s: fees left behind %lld\n", s.seconds, static_cast<long long>(s.objective));
  };
  options.on_bound = [](const cw::bound_update& b) {
    std::printf("%.2f s: at least %lld (%s)\n", b.seconds, static_cast<long long>(b.lower_bound),
                std::string(cw::to_string(b.source)).c_str());
  };
  const cw::optimize_result r = cw::minimize(solver, pool, left_behind, options);
  if (!r.objective) return 1;
  std::int64_t kilos_loaded = 0;
  for (std::int32_t i = 0; i < parcels; ++i)
    if (r.value(cw::lit(i + 1))) kilos_loaded += weight[static_cast<std::size_t>(i)];
  std::printf("%s: fees left behind %lld, lower bound %lld, %lld of %lld kg loaded\n",
              std::string(cw::to_string(r.status)).c_str(), static_cast<long long>(*r.objective),
              static_cast<long long>(r.lower_bound), static_cast<long long>(kilos_loaded),
              static_cast<long long>(load.bound));
  return kilos_loaded <= load.bound && r.lower_bound <= *r.objective ? 0 : 1;
}
