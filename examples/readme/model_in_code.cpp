// README, "Using the library": a cw::model built in code. The file readers
// (OPB, JSON) live in the command-line tool's sources, not in the installed
// headers, so a program builds the model itself, encodes it into a sink and
// checks an answer on the model's own terms. A scenario of our own: two
// shifts, three people, each shift needs two, "cy" works at most one.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/model.hpp>

#include <cstdio>
#include <string>
#include <vector>

namespace cw = clausewright;

int main() {
  cw::model m;
  const char* people[] = {"ann", "bob", "cy"};
  std::vector<cw::literal> early;
  std::vector<cw::literal> late;
  for (const char* p : people) {
    early.push_back(m.variable(std::string(p) + ".early"));
    late.push_back(m.variable(std::string(p) + ".late"));
  }
  const auto all_ones = [](const std::vector<cw::literal>& lits) {
    std::vector<cw::term> terms;
    terms.reserve(lits.size());
    for (const cw::literal l : lits) terms.push_back({1, l});
    return terms;
  };
  m.add_constraint(all_ones(early), cw::relation::eq, 2);
  m.add_constraint(all_ones(late), cw::relation::eq, 2);
  m.add_constraint(all_ones({early[2], late[2]}), cw::relation::le, 1);
  const std::vector<cw::term> cost{{3, early[0]}, {1, late[0]}, {2, early[1]}, {2, late[1]}};
  m.set_objective(cost);

  cw::cadical_solver solver;
  cw::variable_pool pool;
  cw::encode_model(m, solver, pool);  // hard constraints only into a plain clause sink
  if (solver.solve() != cw::solve_result::satisfiable) return 1;
  const auto value = [&solver](std::int32_t v) { return solver.value(cw::lit(v)); };
  // check() lists every violated constraint: none here.
  if (!m.check(value).empty()) return 1;
  for (std::int32_t v = 1; v <= m.variables(); ++v) std::printf("%s = %d\n", m.name_of(v).c_str(), value(v) ? 1 : 0);
  std::printf("objective %s\n", cw::to_string(m.objective_value(value)).c_str());
  // The same on our own terms: two on each shift, cy on at most one.
  int on_early = 0;
  int on_late = 0;
  for (int p = 0; p < 3; ++p) {
    on_early += value(early[static_cast<std::size_t>(p)].var()) ? 1 : 0;
    on_late += value(late[static_cast<std::size_t>(p)].var()) ? 1 : 0;
  }
  if (on_early != 2 || on_late != 2 || (value(early[2].var()) && value(late[2].var()))) return 1;
  // Everyone on both shifts breaks all three constraints, and check() says so.
  const auto everyone = [](std::int32_t) { return true; };
  if (m.check(everyone).size() != 3) return 1;
  return 0;
}
