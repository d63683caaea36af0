// README, "Using the library": exactly_one, terms, >= and =, a plain clause,
// and what each enc.*() call returns. A seating plan of our own: three
// guests, three chairs; guest g on chair c is variable 3 * g + c + 1.
// Checks every answer of the solver against the constraints by hand and
// returns non-zero on a wrong one.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>

#include <cstdio>
#include <vector>

namespace cw = clausewright;

namespace {

cw::literal seat(int guest, int chair) { return cw::lit(3 * guest + chair + 1); }

}  // namespace

int main() {
  cw::cadical_solver solver;  // any clause sink works; the solver lets us check the result
  cw::variable_pool pool(9);  // variables 1..9 are ours, auxiliary ones come after
  cw::encoder enc(solver, pool);

  for (int g = 0; g < 3; ++g)  // every guest on exactly one chair: sum of the literals = 1
    enc.exactly_one({seat(g, 0), seat(g, 1), seat(g, 2)});
  for (int c = 0; c < 3; ++c)  // at most one guest per chair
    enc.at_most_one({seat(0, c), seat(1, c), seat(2, c)});

  // A term is a coefficient times a literal; ~l is "not l".
  // ">=": guest 0 sits on chair 2, or guest 1 does not sit on chair 0 (2 x + 1 ~y >= 1).
  const std::vector<cw::term> wish{{2, seat(0, 2)}, {1, ~seat(1, 0)}};
  enc.linear(wish, cw::relation::ge, 1);
  // "=": exactly two of these three placements hold (1 a + 1 b + 1 c = 2).
  const cw::encoded_constraint e = enc.linear({{1, seat(0, 2)}, {1, seat(1, 1)}, {1, seat(2, 1)}}, cw::relation::eq, 2);
  // What enc.*() returns: the constraint's index, its kind after normalising,
  // the method that encoded it (none for constants and single clauses) and
  // the clauses and auxiliary variables it added.
  std::printf("constraint #%zu: %s, %llu clauses, %llu auxiliary variables\n", e.index,
              e.method ? cw::info(*e.method).name.data() : "no method", static_cast<unsigned long long>(e.size.clauses),
              static_cast<unsigned long long>(e.size.variables));

  // A plain clause goes straight into the sink: guest 2 is not on chair 0.
  solver.add_clause({~seat(2, 0)});

  if (solver.solve() != cw::solve_result::satisfiable) return 1;
  // Check the answer on the constraints' own terms.
  for (int g = 0; g < 3; ++g) {
    int chairs = 0;
    for (int c = 0; c < 3; ++c) chairs += solver.value(seat(g, c)) ? 1 : 0;
    if (chairs != 1) return 1;
  }
  for (int c = 0; c < 3; ++c) {
    int guests = 0;
    for (int g = 0; g < 3; ++g) guests += solver.value(seat(g, c)) ? 1 : 0;
    if (guests > 1) return 1;
  }
  if (2 * static_cast<int>(solver.value(seat(0, 2))) + static_cast<int>(solver.value(~seat(1, 0))) < 1) return 1;
  const int two = static_cast<int>(solver.value(seat(0, 2))) + static_cast<int>(solver.value(seat(1, 1))) +
                  static_cast<int>(solver.value(seat(2, 1)));
  if (two != 2 || solver.value(seat(2, 0))) return 1;
  if (e.index != 7) return 1;  // the eighth constraint added (indices count from 0)
  for (int g = 0; g < 3; ++g)
    for (int c = 0; c < 3; ++c)
      if (solver.value(seat(g, c))) std::printf("guest %d on chair %d\n", g, c);
  return 0;
}
