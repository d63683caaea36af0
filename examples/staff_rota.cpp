// Staff rota: a week of early and late shifts at a small café (invented
// data).
//
// Variables: works(p,d,s) = person p works shift s (early, late) on day d.
// Hard constraints:
//   - every shift has exactly the staff it needs (cardinality, =);
//   - nobody works more than their weekly limit (cardinality, <=);
//   - at most one shift a day, and no early shift the morning after a late
//     one (at-most-one);
//   - nobody works a shift they are unavailable for.
// Soft constraints (MaxSAT style: a relaxation literal r forces the
// constraint, and giving it up costs its weight):
//   - each unwanted shift is "not on that shift", of the weight the person
//     gave it;
//   - "at most two late shifts in the week" per person, weight 2.
// Minimise the total weight given up: the fewest (weighted) unwanted shifts.
// The same model as a file: examples/models/staff_rota.json.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/optimize.hpp>

#include <array>
#include <cstdint>
#include <cstdio>
#include <string>
#include <vector>

namespace cw = clausewright;

namespace {

constexpr int people = 5, days = 7, shifts = 2;  // shift 0 early, 1 late
const std::array<const char*, people> person{"avery", "blake", "casey", "drew", "ellis"};
const std::array<const char*, days> day{"mon", "tue", "wed", "thu", "fri", "sat", "sun"};
const std::array<const char*, shifts> shift{"early", "late"};

// Staff needed per day and shift.
const std::array<std::array<std::int64_t, shifts>, days> need{
    {{2, 1}, {2, 1}, {2, 1}, {2, 1}, {2, 2}, {2, 3}, {2, 1}}};
const std::array<std::int64_t, people> weekly_limit{6, 5, 5, 5, 4};

struct slot {
  int p, d, s;
};
// Casey is away Tuesday and Wednesday, Drew on Sunday; Ellis has no early
// shifts Monday to Wednesday.
const std::vector<slot> unavailable{{2, 1, 0}, {2, 1, 1}, {2, 2, 0}, {2, 2, 1}, {3, 6, 0},
                                    {3, 6, 1}, {4, 0, 0}, {4, 1, 0}, {4, 2, 0}};
struct wish {
  slot at;
  std::int64_t weight;
};
const std::vector<wish> unwanted{{{0, 6, 1}, 2}, {{0, 5, 1}, 1}, {{0, 4, 1}, 1}, {{1, 4, 1}, 3}, {{1, 0, 0}, 1},
                                 {{1, 6, 0}, 2}, {{2, 5, 1}, 2}, {{2, 6, 0}, 1}, {{3, 0, 0}, 1}, {{3, 1, 0}, 1},
                                 {{3, 4, 1}, 1}, {{4, 5, 1}, 2}, {{4, 6, 0}, 3}};
constexpr std::int64_t late_limit = 2, late_weight = 2;

cw::literal works(int p, int d, int s) { return cw::lit(1 + (p * days + d) * shifts + s); }

}  // namespace

int main() {
  cw::cadical_solver solver;
  cw::variable_pool pool(people * days * shifts);
  cw::encoder enc(solver, pool);

  for (int d = 0; d < days; ++d)
    for (int s = 0; s < shifts; ++s) {
      std::vector<cw::literal> staff;
      staff.reserve(people);
      for (int p = 0; p < people; ++p) staff.push_back(works(p, d, s));
      enc.exactly(staff, need[static_cast<std::size_t>(d)][static_cast<std::size_t>(s)]);
    }
  for (int p = 0; p < people; ++p) {
    std::vector<cw::literal> week;
    for (int d = 0; d < days; ++d)
      for (int s = 0; s < shifts; ++s) week.push_back(works(p, d, s));
    const auto limit = enc.at_most(week, weekly_limit[static_cast<std::size_t>(p)]);
    if (p == 0)
      std::fprintf(stderr, "weekly limit: %s, %llu clauses\n", std::string(cw::info(*limit.method).name).c_str(),
                   static_cast<unsigned long long>(limit.size.clauses));
    for (int d = 0; d < days; ++d) {
      enc.at_most_one({works(p, d, 0), works(p, d, 1)});
      if (d + 1 < days) enc.at_most_one({works(p, d, 1), works(p, d + 1, 0)});
    }
  }
  for (const slot& u : unavailable) cw::emit(solver, ~works(u.p, u.d, u.s));

  cw::objective given_up;
  for (const wish& w : unwanted) {
    const std::vector<cw::term> off{{1, works(w.at.p, w.at.d, w.at.s)}};
    static_cast<void>(cw::add_soft(solver, pool, given_up, w.weight, off, cw::relation::le, 0));
  }
  for (int p = 0; p < people; ++p) {
    std::vector<cw::term> lates;
    lates.reserve(days);
    for (int d = 0; d < days; ++d) lates.push_back({1, works(p, d, 1)});
    static_cast<void>(cw::add_soft(solver, pool, given_up, late_weight, lates, cw::relation::le, late_limit));
  }

  // The cost of an assignment on the rota's own terms, for the report of each
  // improving rota (see optimize_options::evaluate).
  auto cost_of = [](const auto& on) {
    std::int64_t cost = 0;
    for (const wish& w : unwanted)
      if (on(works(w.at.p, w.at.d, w.at.s))) cost += w.weight;
    for (int p = 0; p < people; ++p) {
      std::int64_t lates = 0;
      for (int d = 0; d < days; ++d) lates += on(works(p, d, 1)) ? 1 : 0;
      if (lates > late_limit) cost += late_weight;
    }
    return cost;
  };
  cw::optimize_options options;
  options.evaluate = [&](const std::vector<bool>& values) {
    return cost_of([&](cw::literal l) { return static_cast<bool>(values[static_cast<std::size_t>(l.var())]); });
  };
  options.on_solution = [](const cw::improving_solution& s) {
    std::fprintf(stderr, "a rota giving up weight %lld of wishes (%.3f s)\n", static_cast<long long>(s.objective),
                 s.seconds);
  };
  const cw::optimize_result result = cw::minimize(solver, pool, given_up, options);
  if (result.status != cw::optimize_status::optimal) {
    std::printf("no rota proved best: %s\n", std::string(cw::to_string(result.status)).c_str());
    return 1;
  }

  std::printf("%-6s", "");
  for (const char* d : day) std::printf(" %-13s", d);
  std::printf("\n");
  for (int s = 0; s < shifts; ++s) {
    std::printf("%-6s", shift[static_cast<std::size_t>(s)]);
    for (int d = 0; d < days; ++d) {
      std::string names;
      for (int p = 0; p < people; ++p)
        if (result.value(works(p, d, s))) names += std::string(names.empty() ? "" : ",") + person[static_cast<std::size_t>(p)][0];
      std::printf(" %-13s", names.c_str());
    }
    std::printf("\n");
  }
  std::printf("(initials: avery, blake, casey, drew, ellis)\n");
  std::printf("weight of wishes given up: %lld (optimal)\n", static_cast<long long>(*result.objective));
  for (const wish& w : unwanted)
    if (result.value(works(w.at.p, w.at.d, w.at.s)))
      std::printf("  %s works %s %s, which they asked not to (weight %lld)\n", person[static_cast<std::size_t>(w.at.p)],
                  day[static_cast<std::size_t>(w.at.d)], shift[static_cast<std::size_t>(w.at.s)],
                  static_cast<long long>(w.weight));
  for (int p = 0; p < people; ++p) {
    int lates = 0;
    for (int d = 0; d < days; ++d) lates += result.value(works(p, d, 1)) ? 1 : 0;
    if (lates > late_limit)
      std::printf("  %s works %d late shifts, more than %lld (weight %lld)\n", person[static_cast<std::size_t>(p)], lates,
                  static_cast<long long>(late_limit), static_cast<long long>(late_weight));
  }

  // Check the decoded rota on its own terms: cover, limits, rest, availability, cost.
  auto on = [&](cw::literal l) { return result.value(l); };
  bool ok = cost_of(on) == *result.objective;
  for (int d = 0; d < days; ++d)
    for (int s = 0; s < shifts; ++s) {
      std::int64_t staff = 0;
      for (int p = 0; p < people; ++p) staff += on(works(p, d, s)) ? 1 : 0;
      ok = ok && staff == need[static_cast<std::size_t>(d)][static_cast<std::size_t>(s)];
    }
  for (int p = 0; p < people; ++p) {
    std::int64_t total = 0;
    for (int d = 0; d < days; ++d) {
      total += (on(works(p, d, 0)) ? 1 : 0) + (on(works(p, d, 1)) ? 1 : 0);
      ok = ok && !(on(works(p, d, 0)) && on(works(p, d, 1)));
      ok = ok && !(d + 1 < days && on(works(p, d, 1)) && on(works(p, d + 1, 0)));
    }
    ok = ok && total <= weekly_limit[static_cast<std::size_t>(p)];
  }
  for (const slot& u : unavailable) ok = ok && !on(works(u.p, u.d, u.s));
  return ok ? 0 : 1;
}
