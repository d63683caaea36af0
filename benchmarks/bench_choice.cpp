// The cost of choosing an encoding: prints its figures (run from a Release
// build).
//
//   bench_choice [--items N] [--bins N] [--api-items N] [--api-bins N] [--repeat N] [--dir DIR]
//                [--tool PATH] [--generator PATH]
//
// 1. Choice overhead on the command line: `clausewright encode` of a
//    generated bin packing model (ITEMS items of weight 1..1000 into BINS
//    bins, an exactly-one per item and a capacity per bin; default 3000 x 12)
//    with the default policy, divided by the same with the methods the
//    default picked given by --method; the two outputs must be identical
//    (target: ratio <= 1.2). Median of --repeat runs each, interleaved.
// 2. `clausewright stats` of that model: seconds (target: under 1 s).
// 3. Default-path streaming: `encode` of that model with no --method in
//    MB/s, against cp of its output in the same run (target: >= 0.5).
// 4. Choice overhead through the API: the encoder with the default policy
//    against the encoder with the methods given, the same model built in
//    process (default 10 000 x 50), into a counting sink (the cheapest sink,
//    so the choice weighs most); clause and variable counts must agree.
#include <algorithm>
#include <clausewright/clausewright.hpp>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <optional>
#include <random>
#include <set>
#include <string>
#include <vector>

#include "child_process.hpp"

namespace cw = clausewright;
using clausewright_bench::median;
using clausewright_bench::now;
using clausewright_bench::run_command;

namespace {

std::string read_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

// The methods named in the comment lines of `encode --comments` ("method NAME,").
std::set<std::string> methods_in_comments(const std::string& text) {
  std::set<std::string> out;
  for (std::size_t at = text.find(", method "); at != std::string::npos; at = text.find(", method ", at + 1)) {
    const std::size_t from = at + 9;
    const std::size_t to = text.find(',', from);
    const std::string name = text.substr(from, to - from);
    if (name != "none") out.insert(name);
  }
  return out;
}

// --method options that make `encode` use exactly these methods: the ones for
// the narrowest kinds first, since the first that applies wins.
std::vector<std::string> method_options(const std::set<std::string>& names) {
  std::vector<const cw::method_info*> chosen;
  for (const auto& m : cw::method_table)
    if (names.count(std::string(m.name)) != 0) chosen.push_back(&m);
  std::stable_sort(chosen.begin(), chosen.end(),
                   [](const cw::method_info* a, const cw::method_info* b) { return a->applies_to < b->applies_to; });
  std::vector<std::string> out;
  for (const auto* m : chosen) {
    out.emplace_back("--method");
    out.emplace_back(m->name);
  }
  return out;
}

// The API part: ITEMS x BINS bin packing into a counting sink.
struct api_model {
  std::vector<std::vector<cw::literal>> items;  // building the model, not a hot path
  std::vector<std::vector<cw::term>> capacities;
  std::int64_t capacity = 0;
  std::int32_t variables = 0;
};

api_model make_api_model(std::int64_t items, std::int64_t bins, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<std::int64_t> weight(1, 1000);
  api_model m;
  std::vector<std::int64_t> w(static_cast<std::size_t>(items));
  std::int64_t total = 0;
  for (auto& x : w) total += x = weight(rng);
  m.capacity = total * 11 / (10 * bins) + 1;
  auto x = [bins](std::int64_t i, std::int64_t b) { return cw::lit(static_cast<std::int32_t>(i * bins + b + 1)); };
  m.items.resize(static_cast<std::size_t>(items));
  for (std::int64_t i = 0; i < items; ++i)
    for (std::int64_t b = 0; b < bins; ++b) m.items[static_cast<std::size_t>(i)].push_back(x(i, b));
  m.capacities.resize(static_cast<std::size_t>(bins));
  for (std::int64_t b = 0; b < bins; ++b)
    for (std::int64_t i = 0; i < items; ++i)
      m.capacities[static_cast<std::size_t>(b)].push_back({w[static_cast<std::size_t>(i)], x(i, b)});
  m.variables = static_cast<std::int32_t>(items * bins);
  return m;
}

struct api_run {
  double seconds = 0;
  std::uint64_t clauses = 0;
  std::int32_t top = 0;
  std::optional<cw::method_id> item_method;
  std::optional<cw::method_id> capacity_method;
};

api_run encode_api(const api_model& m, std::optional<cw::method_id> item_method,
                   std::optional<cw::method_id> capacity_method) {
  cw::counting_sink sink;
  cw::variable_pool pool(m.variables);
  cw::encoder<cw::counting_sink> enc(sink, pool);
  api_run r;
  const double start = now();
  for (const auto& lits : m.items) r.item_method = enc.exactly_one(lits, item_method).method;
  for (const auto& terms : m.capacities)
    r.capacity_method = enc.linear(terms, cw::relation::le, m.capacity, capacity_method).method;
  r.seconds = now() - start;
  r.clauses = sink.clauses();
  r.top = pool.top();
  return r;
}

}  // namespace

int main(int argc, char** argv) {
  std::int64_t items = 3000;
  std::int64_t bins = 12;
  std::int64_t api_items = 10000;
  std::int64_t api_bins = 50;
  int repeat = 5;
#ifdef CLAUSEWRIGHT_TOOL_PATH
  std::string tool = CLAUSEWRIGHT_TOOL_PATH, generator = CLAUSEWRIGHT_GENERATOR_PATH;
#else
  std::string tool, generator;
#endif
  std::string dir =
      std::filesystem::is_directory("/dev/shm") ? "/dev/shm" : std::filesystem::temp_directory_path().string();
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string a = argv[i];
    const char* v = argv[i + 1];
    if (a == "--items")
      items = std::atoll(v);
    else if (a == "--bins")
      bins = std::atoll(v);
    else if (a == "--api-items")
      api_items = std::atoll(v);
    else if (a == "--api-bins")
      api_bins = std::atoll(v);
    else if (a == "--repeat")
      repeat = std::max(1, std::atoi(v));
    else if (a == "--dir")
      dir = v;
    else if (a == "--tool")
      tool = v;
    else if (a == "--generator")
      generator = v;
    else {
      std::fprintf(stderr, "unknown option %s\n", a.c_str());
      return 2;
    }
  }
  int failures = 0;

  if (!tool.empty() && !generator.empty()) {
    const std::string model = dir + "/cw-choice.opb";
    const std::string by_default = dir + "/cw-choice-default.cnf";
    const std::string explicitly = dir + "/cw-choice-explicit.cnf";
    const std::string copy = dir + "/cw-choice-copy.cnf";
    if (run_command({generator, "bins", std::to_string(items), std::to_string(bins), "1"}, model).status != 0) {
      std::printf("generator failed\n");
      return 1;
    }
    // The methods the default picks, from the comment lines.
    const std::string commented = dir + "/cw-choice-comments.cnf";
    if (run_command({tool, "encode", model, "--comments", "-o", commented}).status != 0) {
      std::printf("encode failed\n");
      return 1;
    }
    const std::set<std::string> picked = methods_in_comments(read_file(commented));
    std::filesystem::remove(commented);
    std::vector<std::string> given{tool, "encode", model, "-o", explicitly};
    const std::vector<std::string> options = method_options(picked);
    given.insert(given.end(), options.begin(), options.end());
    std::string shown;
    for (const auto& o : options) shown += " " + o;

    std::vector<double> t_default;
    std::vector<double> t_given;
    std::vector<double> t_cp;
    std::vector<double> t_stats;
    for (int r = 0; r < repeat; ++r) {
      t_default.push_back(run_command({tool, "encode", model, "-o", by_default}).seconds);
      t_given.push_back(run_command(given).seconds);
      t_cp.push_back(run_command({"/bin/cp", by_default, copy}).seconds);
      t_stats.push_back(run_command({tool, "stats", model}, "/dev/null").seconds);
    }
    const bool same = read_file(by_default) == read_file(explicitly);
    const auto bytes = static_cast<double>(std::filesystem::file_size(by_default));
    const double d = median(t_default);
    const double g = median(t_given);
    const double c = median(t_cp);
    const double s = median(t_stats);
    std::printf("model: bin packing, %lld items x %lld bins (weights 1..1000), %.1f MB of CNF\n",
                static_cast<long long>(items), static_cast<long long>(bins), bytes / 1e6);
    std::printf("1. encode, default policy:      %.3f s (median of %d)\n", d, repeat);
    std::printf("   encode,%s: %.3f s; outputs %s\n", shown.c_str(), g, same ? "identical" : "DIFFER");
    std::printf("   choice overhead (default / given): %.2f (target <= 1.2)\n", d / g);
    std::printf("2. stats: %.3f s (target < 1 s)\n", s);
    std::printf("3. default encode %.0f MB/s, cp of its output %.0f MB/s: ratio %.2f (target >= 0.5)\n",
                bytes / d / 1e6, bytes / c / 1e6, c / d);
    failures += same ? 0 : 1;
    for (const auto& f : {model, by_default, explicitly, copy}) std::filesystem::remove(f);
  } else {
    std::printf("(no tool or generator: command-line figures skipped)\n");
  }

  const api_model m = make_api_model(api_items, api_bins, 2);
  std::vector<double> t_default;
  std::vector<double> t_given;
  api_run first = encode_api(m, std::nullopt, std::nullopt);
  bool agree = true;
  for (int r = 0; r < repeat; ++r) {
    const api_run d = encode_api(m, std::nullopt, std::nullopt);
    const api_run g = encode_api(m, first.item_method, first.capacity_method);
    agree = agree && d.clauses == g.clauses && d.top == g.top && d.clauses == first.clauses;
    t_default.push_back(d.seconds);
    t_given.push_back(g.seconds);
  }
  std::printf("4. API, %lld items x %lld bins into a counting sink: %llu clauses; picks %s and %s\n",
              static_cast<long long>(api_items), static_cast<long long>(api_bins),
              static_cast<unsigned long long>(first.clauses),
              first.item_method ? cw::info(*first.item_method).name.data() : "none",
              first.capacity_method ? cw::info(*first.capacity_method).name.data() : "none");
  std::printf("   default %.3f s, given %.3f s: choice overhead %.2f (target <= 1.2); sizes %s\n", median(t_default),
              median(t_given), median(t_default) / median(t_given), agree ? "agree" : "DIFFER");
  failures += agree ? 0 : 1;
  return failures == 0 ? 0 : 1;
}
