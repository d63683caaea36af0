// README, "Using the library": assumptions and incremental use. One solver
// keeps its clauses between calls; assumptions hold for the next call only,
// and failed() names the assumptions an unsatisfiable answer rests on.
// A scenario of our own: four lamps, at most two on; lamps 1 and 2 are
// wired together.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>

#include <cstdio>
#include <vector>

namespace cw = clausewright;

int main() {
  cw::cadical_solver solver;
  cw::variable_pool pool(4);
  cw::encoder enc(solver, pool);
  const std::vector<cw::literal> lamps{cw::lit(1), cw::lit(2), cw::lit(3), cw::lit(4)};
  enc.at_most(lamps, 2);
  solver.add_clause({~cw::lit(1), cw::lit(2)});  // lamp 1 on -> lamp 2 on

  // Lamps 1 and 3 on: lamp 2 must follow, three lamps on -> unsatisfiable.
  if (solver.solve({cw::lit(1), cw::lit(3)}) != cw::solve_result::unsatisfiable) return 1;
  const bool blamed_1 = solver.failed(cw::lit(1));
  const bool blamed_3 = solver.failed(cw::lit(3));
  std::printf("lamps 1 and 3 together: unsatisfiable (failed: %s%s)\n", blamed_1 ? "1 " : "", blamed_3 ? "3" : "");
  if (!blamed_1 || !blamed_3) return 1;  // neither alone is impossible, so both take part

  // The assumptions are gone; the clauses stay. Lamp 3 alone is fine.
  if (solver.solve({cw::lit(3)}) != cw::solve_result::satisfiable) return 1;
  if (!solver.value(cw::lit(3)) || solver.value(cw::lit(1))) return 1;  // 1 would force 3 lamps
  int on = 0;
  for (const cw::literal l : lamps) on += solver.value(l) ? 1 : 0;
  if (on > 2) return 1;

  // Incremental: a new constraint added between calls. Lamp 4 must be on.
  enc.at_least_one(std::vector{cw::lit(4)});
  if (solver.solve({cw::lit(3)}) != cw::solve_result::satisfiable) return 1;
  if (!solver.value(cw::lit(4)) || solver.value(cw::lit(2))) return 1;  // 3 and 4 fill the two places
  std::printf("lamp 3 assumed, lamp 4 required: lamps 3 and 4 on\n");
  return 0;
}
