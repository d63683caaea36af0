// A program outside the project that links the linear relaxation's bound
// (clausewright::lp, COIN-OR CLP): packing a van for a market day (invented
// data). Ten crates, each with a weight in kilograms and the takings it is
// expected to bring; the van carries 200 kg. Leave behind the least takings,
// with the relaxation's bound and reduced costs given to the optimiser, and
// check the optimum against brute force over all 2^10 loads.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/lp_bound.hpp>

#include <cstdint>
#include <cstdio>
#include <vector>

namespace cw = clausewright;

namespace {

struct crate {
  std::int64_t kilograms;
  std::int64_t takings;
};

const std::vector<crate> crates{{40, 95}, {35, 60}, {60, 150}, {25, 41},  {50, 110},
                                {30, 70}, {45, 99}, {20, 38},  {55, 120}, {15, 30}};
constexpr std::int64_t van = 200;

// The least takings left behind, by trying every load.
std::int64_t brute_force_left() {
  std::int64_t best = -1;
  for (std::uint32_t set = 0; set < (1U << crates.size()); ++set) {
    std::int64_t weight = 0;
    std::int64_t left = 0;
    for (std::size_t i = 0; i < crates.size(); ++i) {
      if (((set >> i) & 1U) != 0)
        weight += crates[i].kilograms;
      else
        left += crates[i].takings;
    }
    if (weight <= van && (best < 0 || left < best)) best = left;
  }
  return best;
}

}  // namespace

int main() {
  const auto n = static_cast<std::int32_t>(crates.size());
  cw::cadical_solver solver;
  cw::variable_pool pool(n);
  cw::encoder enc(solver, pool);
  cw::linear_row load;
  load.rel = cw::relation::le;
  load.bound = van;
  cw::objective left;
  for (std::int32_t i = 0; i < n; ++i) {
    const auto& c = crates[static_cast<std::size_t>(i)];
    load.terms.push_back({c.kilograms, cw::lit(i + 1)});
    left.add(c.takings, ~cw::lit(i + 1));
  }
  static_cast<void>(enc.linear(load.terms, load.rel, load.bound));
  cw::optimize_options options;
  options.rows = {load};
  options.relax = cw::clp_relaxation;
  bool relaxed = false;
  options.on_bound = [&](const cw::bound_update& b) { relaxed = relaxed || b.source == cw::bound_source::relaxation; };
  const cw::optimize_result result = cw::minimize(solver, pool, left, options);
  const std::int64_t expected = brute_force_left();
  if (result.status != cw::optimize_status::optimal || !result.objective || *result.objective != expected || !relaxed) {
    std::fprintf(stderr, "optimum %lld, brute force %lld, relaxation bound %s\n",
                 static_cast<long long>(result.objective.value_or(-1)), static_cast<long long>(expected),
                 relaxed ? "reported" : "missing");
    return 1;
  }
  std::printf("least takings left behind: %lld (brute force agrees; CLP bound used)\n",
              static_cast<long long>(expected));
  return 0;
}
