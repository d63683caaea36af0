// Bin packing: copying a photo archive onto the fewest 25 GB discs
// (invented data).
//
// Sixteen folders of photos, each to go whole onto one disc. Variables:
// on(f,d) = folder f on disc d, used(d) = disc d is used. Constraints:
//   - every folder on exactly one disc (exactly-one);
//   - every disc within its capacity, and only a used disc holds anything:
//     sum size_f * on(f,d) - 25 * used(d) <= 0 (weighted);
//   - discs are used in order, used(d+1) -> used(d), which removes the
//     mirror images of every packing.
// Minimise sum used(d). The number of discs offered is what first-fit
// decreasing needs (a packing that exists), so the model is no bigger than
// it must be. The same model as a file: examples/models/bin_packing.json.
#include <clausewright/cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <clausewright/optimize.hpp>

#include <algorithm>
#include <cstdint>
#include <cstdio>
#include <numeric>
#include <string>
#include <vector>

namespace cw = clausewright;

namespace {

const std::vector<std::int64_t> folder_size{14, 13, 12, 11, 9, 9, 8, 7, 7, 6, 5, 4, 4, 3, 2, 2};  // GB
constexpr std::int64_t disc_capacity = 25;

// First-fit decreasing: each folder, largest first, onto the first disc it fits.
int first_fit_decreasing() {
  std::vector<std::int64_t> sizes = folder_size;
  std::sort(sizes.rbegin(), sizes.rend());
  std::vector<std::int64_t> free_space;
  for (const std::int64_t s : sizes) {
    auto disc = std::find_if(free_space.begin(), free_space.end(), [s](std::int64_t f) { return f >= s; });
    if (disc == free_space.end())
      free_space.push_back(disc_capacity - s);
    else
      *disc -= s;
  }
  return static_cast<int>(free_space.size());
}

}  // namespace

int main() {
  const int folders = static_cast<int>(folder_size.size());
  const int discs = first_fit_decreasing();
  auto on = [discs](int f, int d) { return cw::lit(1 + f * discs + d); };
  auto used = [folders, discs](int d) { return cw::lit(1 + folders * discs + d); };

  cw::cadical_solver solver;
  cw::variable_pool pool(folders * discs + discs);
  cw::encoder enc(solver, pool);

  for (int f = 0; f < folders; ++f) {
    std::vector<cw::literal> where;
    where.reserve(static_cast<std::size_t>(discs));
    for (int d = 0; d < discs; ++d) where.push_back(on(f, d));
    enc.exactly_one(where);
  }
  for (int d = 0; d < discs; ++d) {
    std::vector<cw::term> load;
    load.reserve(static_cast<std::size_t>(folders) + 1);
    for (int f = 0; f < folders; ++f) load.push_back({folder_size[static_cast<std::size_t>(f)], on(f, d)});
    load.push_back({-disc_capacity, used(d)});
    const auto c = enc.linear(load, cw::relation::le, 0);
    if (d == 0)
      std::fprintf(stderr, "disc capacity: %s, %llu clauses per disc\n", std::string(cw::info(*c.method).name).c_str(),
                   static_cast<unsigned long long>(c.size.clauses));
    if (d + 1 < discs) cw::emit(solver, ~used(d + 1), used(d));
  }

  cw::objective discs_used;
  for (int d = 0; d < discs; ++d) discs_used.add(1, used(d));
  cw::optimize_options options;
  options.on_solution = [](const cw::improving_solution& s) {
    std::fprintf(stderr, "a packing onto %lld discs (%.3f s)\n", static_cast<long long>(s.objective), s.seconds);
  };
  const cw::optimize_result result = cw::minimize(solver, pool, discs_used, options);
  if (result.status != cw::optimize_status::optimal) {
    std::printf("no packing proved best: %s\n", std::string(cw::to_string(result.status)).c_str());
    return 1;
  }

  const std::int64_t total = std::accumulate(folder_size.begin(), folder_size.end(), std::int64_t{0});
  std::printf("%lld GB in %d folders onto %lld discs of %lld GB (first-fit decreasing offered %d; at least %lld "
              "needed by size alone)\n",
              static_cast<long long>(total), folders, static_cast<long long>(*result.objective),
              static_cast<long long>(disc_capacity), discs,
              static_cast<long long>((total + disc_capacity - 1) / disc_capacity));
  bool ok = true;
  int discs_seen = 0;
  for (int d = 0; d < discs; ++d) {
    std::int64_t load = 0;
    std::string list;
    for (int f = 0; f < folders; ++f) {
      if (!result.value(on(f, d))) continue;
      load += folder_size[static_cast<std::size_t>(f)];
      list += " folder" + std::to_string(f + 1) + "(" + std::to_string(folder_size[static_cast<std::size_t>(f)]) + ")";
    }
    if (load == 0) continue;
    ++discs_seen;
    ok = ok && load <= disc_capacity;
    std::printf("  disc %d: %2lld GB:%s\n", d + 1, static_cast<long long>(load), list.c_str());
  }
  // Every folder on exactly one disc, within capacity, on as many discs as reported.
  for (int f = 0; f < folders; ++f) {
    int copies = 0;
    for (int d = 0; d < discs; ++d) copies += result.value(on(f, d)) ? 1 : 0;
    ok = ok && copies == 1;
  }
  return ok && discs_seen == *result.objective ? 0 : 1;
}
