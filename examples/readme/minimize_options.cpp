// README, "Using the library": cw::minimize with a time limit and a
// callback for every improving solution. A scenario of our own: choose
// delivery slots; each slot has a cost, at least three of six must be taken,
// and slots 1 and 2 exclude each other.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/optimize.hpp>

#include <chrono>
#include <cstdint>
#include <cstdio>
#include <vector>

namespace cw = clausewright;

int main() {
  const std::vector<std::int64_t> cost{4, 1, 3, 5, 2, 6};
  cw::cadical_solver solver;
  cw::variable_pool pool(6);
  cw::encoder enc(solver, pool);
  std::vector<cw::literal> slots;
  cw::objective total;
  for (int i = 0; i < 6; ++i) {
    slots.push_back(cw::lit(i + 1));
    total.add(cost[static_cast<std::size_t>(i)], cw::lit(i + 1));
  }
  enc.at_least(slots, 3);
  enc.at_most_one({cw::lit(1), cw::lit(2)});

  cw::optimize_options options;
  options.time_limit = std::chrono::seconds(10);  // for the whole search
  std::int64_t previous = INT64_MAX;
  bool improving = true;
  options.on_solution = [&](const cw::improving_solution& s) {
    std::printf("solution of cost %lld after %.3f s\n", static_cast<long long>(s.objective), s.seconds);
    improving = improving && s.objective < previous;  // each one better than the last
    previous = s.objective;
  };
  const cw::optimize_result r = cw::minimize(solver, pool, total, options);

  // The optimum by brute force over the 64 choices.
  std::int64_t best = INT64_MAX;
  for (unsigned bits = 0; bits < 64; ++bits) {
    if ((bits & 3U) == 3U) continue;
    int taken = 0;
    std::int64_t sum = 0;
    for (unsigned i = 0; i < 6; ++i)
      if ((bits >> i) & 1U) {
        ++taken;
        sum += cost[i];
      }
    if (taken >= 3 && sum < best) best = sum;
  }
  if (r.status != cw::optimize_status::optimal || !r.objective || *r.objective != best) return 1;
  if (!improving || previous != best || r.solutions == 0) return 1;
  std::int64_t check = 0;
  for (int i = 0; i < 6; ++i)
    if (r.value(cw::lit(i + 1))) check += cost[static_cast<std::size_t>(i)];
  if (check != best) return 1;
  std::printf("optimal cost %lld\n", static_cast<long long>(*r.objective));
  return 0;
}
