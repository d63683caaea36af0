// At-most-one and cardinality encodings into a counting sink (Google
// Benchmark; run from a Release build).
//
//   bench_cardinality [--benchmark_filter=REGEX] [other Google Benchmark flags]
//
// Every method of the table that applies to at-most-one or cardinality
// constraints (methods added to the table later appear by themselves) on
// sum x_1..x_n <= k for n = 10^2, 10^3, 10^4, 10^5 and k = 1, floor(sqrt n),
// n/2; cases the method cannot encode (an at-most-one method with k > 1) are
// not registered. Counters: clauses, aux_vars (per encoding) and
// clauses_per_second (a rate over the timed iterations).
//
// The counting sink never reads a literal, so for simple loops (pairwise,
// the sequential counter) the compiler drops the literal arithmetic and the
// rate is not a per-clause cost. Each case runs a second time as
// ".../checksum" into a sink that also folds every literal into a checksum,
// which keeps the clauses' contents computed.
//
// A case over 10^8 clauses is skipped without being run: the size comes from
// predict_size() where a closed form is known, otherwise from a dry run that
// stops at 10^8 clauses (measure() with that budget), done once per case
// before its first timing. A method that throws over_budget on its own (the
// binomial estimate, node or output budgets) or runs out of variables is
// skipped the same way.
#include <benchmark/benchmark.h>

#include <clausewright/clausewright.hpp>
#include <cmath>
#include <cstdint>
#include <map>
#include <span>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

namespace cw = clausewright;

namespace {

constexpr std::uint64_t clause_limit = 100'000'000;

// Counts clauses and folds every literal in, so no literal can be optimised away.
class checksum_sink {
 public:
  void add_clause(std::span<const cw::literal> clause) noexcept {
    ++clauses_;
    for (const cw::literal l : clause) sum_ = sum_ * 31 + static_cast<std::uint32_t>(l.dimacs());
  }
  [[nodiscard]] std::uint64_t clauses() const noexcept { return clauses_; }
  [[nodiscard]] std::uint64_t sum() const noexcept { return sum_; }

 private:
  std::uint64_t clauses_ = 0;
  std::uint64_t sum_ = 0;
};

cw::normalized_constraint at_most(std::int32_t n, std::int64_t k) {
  std::vector<cw::literal> xs;
  xs.reserve(static_cast<std::size_t>(n));
  for (std::int32_t v = 1; v <= n; ++v) xs.push_back(cw::lit(v));
  return cw::normalize_cardinality(xs, cw::relation::le, k);
}

// Empty when the case fits in the limit, else why it is skipped.
std::string skip_reason(cw::method_id id, std::int32_t n, const cw::normalized_constraint& c) {
  if (const auto predicted = cw::predict_size(id, c)) {
    if (predicted->clauses > clause_limit)
      return "skipped: predicted " + std::to_string(predicted->clauses) + " clauses > 1e8";
    return {};
  }
  try {
    const cw::method_measurement m = cw::measure(id, cw::variable_pool(n), c, {}, clause_limit);
    if (m.over_budget)
      return m.size.clauses >= clause_limit ? "skipped: over 1e8 clauses in a budgeted dry run"
                                            : "skipped: over the method's own budget in a dry run";
  } catch (const cw::error& e) {
    if (e.id() != cw::error_id::overflow) throw;
    return std::string("skipped: ") + e.detail();
  }
  return {};
}

template <class Sink>
void run_case(benchmark::State& state, cw::method_id id, std::int32_t n, std::int64_t k) {
  static std::map<std::pair<cw::method_id, std::pair<std::int32_t, std::int64_t>>, std::string> decided;
  const cw::normalized_constraint c = at_most(n, k);
  const auto key = std::make_pair(id, std::make_pair(n, k));
  auto found = decided.find(key);
  if (found == decided.end()) found = decided.emplace(key, skip_reason(id, n, c)).first;
  if (!found->second.empty()) {
    state.SkipWithError(found->second.c_str());
    return;
  }
  std::uint64_t clauses = 0;
  std::int64_t aux = 0;
  for (auto _ : state) {
    cw::variable_pool pool(n);
    Sink sink;
    cw::encode_with(id, sink, pool, c);
    clauses = sink.clauses();
    aux = pool.auxiliary_variables();
    if constexpr (std::is_same_v<Sink, checksum_sink>) benchmark::DoNotOptimize(sink.sum());
    benchmark::DoNotOptimize(clauses);
    benchmark::DoNotOptimize(aux);
  }
  state.counters["clauses"] = static_cast<double>(clauses);
  state.counters["aux_vars"] = static_cast<double>(aux);
  state.counters["clauses_per_second"] = benchmark::Counter(
      static_cast<double>(clauses) * static_cast<double>(state.iterations()), benchmark::Counter::kIsRate);
}

void register_cases() {
  for (const cw::method_info& m : cw::method_table) {
    if (!m.applies_to_kind(cw::applies::at_most_one) && !m.applies_to_kind(cw::applies::cardinality)) continue;
    for (std::int32_t n = 100; n <= 100'000; n *= 10) {
      const auto root = static_cast<std::int64_t>(std::sqrt(static_cast<double>(n)));
      for (const std::int64_t k : {std::int64_t{1}, root, std::int64_t{n / 2}}) {
        if (!cw::can_encode(m.id, at_most(n, k))) continue;
        const std::string name = std::string(m.name) + "/n:" + std::to_string(n) + "/k:" + std::to_string(k);
        benchmark::RegisterBenchmark(name.c_str(), run_case<cw::counting_sink>, m.id, n, k)
            ->Unit(benchmark::kMillisecond);
        benchmark::RegisterBenchmark((name + "/checksum").c_str(), run_case<checksum_sink>, m.id, n, k)
            ->Unit(benchmark::kMillisecond);
      }
    }
  }
}

}  // namespace

int main(int argc, char** argv) {
  register_cases();
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
