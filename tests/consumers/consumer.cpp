// A program outside the project: at most 2 of 5 into DIMACS on standard
// output, and a check that the counts match Sinz 2005 (2nk + n - 3k - 1 = 18
// clauses, k(n-1) = 8 auxiliary variables for n = 5, k = 2).
#include <clausewright/clausewright.hpp>
#include <cstdio>
#include <iostream>
#include <vector>

int main() {
  namespace cw = clausewright;
  cw::variable_pool pool(5);
  cw::cnf_buffer cnf;
  cw::encoder enc(cnf, pool);
  const std::vector<cw::literal> xs{cw::lit(1), cw::lit(2), cw::lit(3), cw::lit(4), cw::lit(5)};
  const auto r = enc.at_most(xs, 2, cw::method_id::sequential_counter);
  if (r.size.clauses != 18 || r.size.variables != 8) {
    std::fprintf(stderr, "unexpected size: %llu clauses, %llu variables\n",
                 static_cast<unsigned long long>(r.size.clauses), static_cast<unsigned long long>(r.size.variables));
    return 1;
  }
  cw::ostream_output out(std::cout);
  cw::dimacs_writer writer(out);
  writer.begin(pool.top(), cnf.size());
  cnf.replay(writer);
  writer.finish(pool.top());
  return 0;
}
