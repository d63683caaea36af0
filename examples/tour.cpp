// The README's tour of the library, built in CI.
//
// A small delivery-van scenario (invented data): six parcels, each on at most
// one of two vans, van capacity 10 by weight, and at most two fragile parcels
// per van. The constraints go straight into a streaming DIMACS writer; the
// sizes of the candidate encodings are measured first.
#include <clausewright/clausewright.hpp>

#include <cstdio>
#include <iostream>
#include <vector>

namespace cw = clausewright;

int main() {
  const int parcels = 6, vans = 2;
  const std::vector<std::int64_t> weight{4, 3, 5, 2, 6, 1};
  const std::vector<bool> fragile{true, false, true, true, false, true};
  auto on = [&](int p, int v) { return cw::lit(1 + p * vans + v); };  // user variables 1..12

  cw::variable_pool pool(parcels * vans);  // fresh variables start at 13
  cw::cnf_buffer cnf;                       // in memory; any clause sink works
  cw::encoder enc(cnf, pool);               // default selection policy: propagating

  for (int p = 0; p < parcels; ++p) enc.at_most_one({on(p, 0), on(p, 1)});
  for (int v = 0; v < vans; ++v) {
    std::vector<cw::term> load;
    std::vector<cw::literal> fragile_here;
    for (int p = 0; p < parcels; ++p) {
      load.push_back({weight[static_cast<std::size_t>(p)], on(p, v)});
      if (fragile[static_cast<std::size_t>(p)]) fragile_here.push_back(on(p, v));
    }
    enc.linear(load, cw::relation::le, 10);
    // Measure every applicable method on the fragile limit, then let it pick.
    const auto limit = cw::normalize_cardinality(fragile_here, cw::relation::le, 2);
    for (const auto& m : cw::measure_all(pool, limit))
      std::fprintf(stderr, "van %d fragile limit: %-26s %4llu clauses %3llu aux vars\n", v,
                   std::string(cw::info(m.method).name).c_str(), static_cast<unsigned long long>(m.size.clauses),
                   static_cast<unsigned long long>(m.size.variables));
    const auto used = enc.at_most(fragile_here, 2);
    std::fprintf(stderr, "van %d fragile limit: picked %s\n", v, std::string(cw::info(*used.method).name).c_str());
  }

  // Stream the formula as DIMACS (the counts are known, so the header is exact).
  cw::ostream_output out(std::cout);
  cw::dimacs_writer writer(out);
  writer.comment("delivery vans: 6 parcels, 2 vans");
  writer.begin(pool.top(), cnf.size());
  cnf.replay(writer);
  writer.finish(pool.top());
  return 0;
}
