// A program outside the project that solves in-process: planning one day of
// a meetup (invented data). Eight talks were proposed, each with a length in
// minutes and the number of people who asked for it; the day has 240 minutes
// and room for at most two workshops. Choose the talks that leave the fewest
// requests unserved, with the embedded CaDiCaL, and check the optimum
// against brute force over all 2^8 programmes.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>

#include <cstdint>
#include <cstdio>
#include <vector>

namespace cw = clausewright;

namespace {

struct talk {
  std::int64_t minutes;
  std::int64_t requests;
  bool workshop;
};

const std::vector<talk> talks{{45, 30, false}, {90, 41, true},  {30, 12, false}, {60, 25, true},
                              {45, 22, false}, {90, 38, true},  {20, 9, false},  {60, 27, false}};
constexpr std::int64_t day = 240;

// The best programme by trying every subset.
std::int64_t brute_force_unserved() {
  std::int64_t best = -1;
  for (std::uint32_t set = 0; set < (1U << talks.size()); ++set) {
    std::int64_t minutes = 0, workshops = 0, unserved = 0;
    for (std::size_t i = 0; i < talks.size(); ++i) {
      if (((set >> i) & 1U) != 0) {
        minutes += talks[i].minutes;
        workshops += talks[i].workshop ? 1 : 0;
      } else {
        unserved += talks[i].requests;
      }
    }
    if (minutes <= day && workshops <= 2 && (best < 0 || unserved < best)) best = unserved;
  }
  return best;
}

}  // namespace

int main() {
  const auto n = static_cast<std::int32_t>(talks.size());
  cw::cadical_solver solver;
  cw::variable_pool pool(n);
  cw::encoder enc(solver, pool);
  std::vector<cw::term> length;
  std::vector<cw::literal> workshops;
  cw::objective unserved;
  for (std::int32_t i = 0; i < n; ++i) {
    const auto& t = talks[static_cast<std::size_t>(i)];
    const cw::literal chosen = cw::lit(i + 1);
    length.push_back({t.minutes, chosen});
    if (t.workshop) workshops.push_back(chosen);
    unserved.add(t.requests, ~chosen);
  }
  static_cast<void>(enc.linear(length, cw::relation::le, day));
  static_cast<void>(enc.at_most(workshops, 2));
  const cw::optimize_result result = cw::minimize(solver, pool, unserved);
  const std::int64_t expected = brute_force_unserved();
  if (result.status != cw::optimize_status::optimal || !result.objective || *result.objective != expected) {
    std::fprintf(stderr, "optimum %lld, brute force %lld\n",
                 static_cast<long long>(result.objective.value_or(-1)), static_cast<long long>(expected));
    return 1;
  }
  std::printf("fewest unserved requests: %lld (brute force agrees)\n", static_cast<long long>(expected));
  return 0;
}
