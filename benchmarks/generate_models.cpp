// Scalable models of our own scenarios, for benchmarks and tests, in OPB (the
// Pseudo-Boolean Competition input format).
//
//   generate_models bin-packing ITEMS SEED      items of weight 1..40 into bins of capacity 100,
//                                               exactly one bin per item, fewest bins used
//   generate_models bins ITEMS BINS SEED        items of weight 1..1000 into BINS bins of equal
//                                               capacity (10% above the average load), exactly
//                                               one bin per item (feasibility, no objective)
//   generate_models knapsack ITEMS SEED         one capacity, weights 1..1000, most value
//   generate_models rota PEOPLE SEED            7*3 shifts a week for PEOPLE people: each shift
//                                               needs PEOPLE/4 people, each person at most 6
//                                               shifts and one shift a day, fewest unwanted shifts
//
// Writes to standard output. The data are invented (a fixed-seed generator).
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <random>
#include <string>
#include <string_view>
#include <vector>

namespace {

struct opb_out {
  std::string text;
  std::uint64_t constraints = 0;
  // Appends piece by piece: g++ 12 at -O3 warns falsely (-Wrestrict) on
  // chains of std::string operator+.
  void term(std::int64_t a, std::int64_t var) {
    if (a >= 0) text += '+';
    text += std::to_string(a);
    text += " x";
    text += std::to_string(var);
    text += ' ';
  }
  void variable(const char* sign, std::int64_t a, std::int64_t var) {
    text += ' ';
    text += sign;
    text += std::to_string(a);
    text += " x";
    text += std::to_string(var);
  }
  void end(const char* rel, std::int64_t k) {
    text += rel;
    text += ' ';
    text += std::to_string(k);
    text += " ;\n";
    ++constraints;
  }
  void comment(const std::string& what, std::int64_t a, const char* middle, std::int64_t b, const char* tail) {
    text += "* ";
    text += what;
    text += std::to_string(a);
    text += middle;
    text += std::to_string(b);
    text += tail;
  }
  void flush() {
    std::fwrite(text.data(), 1, text.size(), stdout);
    text.clear();
  }
};

void header(std::int64_t vars, std::uint64_t constraints) {
  std::printf("* #variable= %lld #constraint= %llu\n", static_cast<long long>(vars),
              static_cast<unsigned long long>(constraints));
}

int bin_packing(std::int64_t items, std::mt19937_64& rng) {
  std::uniform_int_distribution<std::int64_t> weight(1, 40);
  std::vector<std::int64_t> w(static_cast<std::size_t>(items));
  std::int64_t total = 0;
  for (auto& x : w) total += x = weight(rng);
  const std::int64_t capacity = 100;
  const std::int64_t bins = total / capacity + 2 + items / 50;
  // x(i,b) = i*bins + b + 1; y(b) = items*bins + b + 1
  auto x = [&](std::int64_t i, std::int64_t b) { return i * bins + b + 1; };
  auto y = [&](std::int64_t b) { return items * bins + b + 1; };
  header(items * bins + bins, static_cast<std::uint64_t>(items + bins));
  opb_out out;
  out.comment("bin packing: ", items, " items, ", bins, " bins of capacity 100\n");
  out.text += "min:";
  for (std::int64_t b = 0; b < bins; ++b) out.variable("+", 1, y(b));
  out.text += " ;\n";
  for (std::int64_t i = 0; i < items; ++i) {
    for (std::int64_t b = 0; b < bins; ++b) out.term(1, x(i, b));
    out.end("=", 1);
    if (out.text.size() > (1U << 20)) out.flush();
  }
  for (std::int64_t b = 0; b < bins; ++b) {
    // sum w_i x(i,b) <= 100 y(b), written as  100 y(b) - sum w_i x(i,b) >= 0
    out.term(capacity, y(b));
    for (std::int64_t i = 0; i < items; ++i) out.term(-w[static_cast<std::size_t>(i)], x(i, b));
    out.end(">=", 0);
    if (out.text.size() > (1U << 20)) out.flush();
  }
  out.flush();
  return 0;
}

int fixed_bins(std::int64_t items, std::int64_t bins, std::mt19937_64& rng) {
  std::uniform_int_distribution<std::int64_t> weight(1, 1000);
  std::vector<std::int64_t> w(static_cast<std::size_t>(items));
  std::int64_t total = 0;
  for (auto& x : w) total += x = weight(rng);
  const std::int64_t capacity = total * 11 / (10 * bins) + 1;
  auto x = [&](std::int64_t i, std::int64_t b) { return i * bins + b + 1; };
  header(items * bins, static_cast<std::uint64_t>(items + bins));
  opb_out out;
  out.comment("bin packing: ", items, " items, ", bins, " bins\n");
  for (std::int64_t i = 0; i < items; ++i) {
    for (std::int64_t b = 0; b < bins; ++b) out.term(1, x(i, b));
    out.end("=", 1);
    if (out.text.size() > (1U << 20)) out.flush();
  }
  for (std::int64_t b = 0; b < bins; ++b) {
    for (std::int64_t i = 0; i < items; ++i) out.term(w[static_cast<std::size_t>(i)], x(i, b));
    out.end("<=", capacity);
    if (out.text.size() > (1U << 20)) out.flush();
  }
  out.flush();
  return 0;
}

int knapsack(std::int64_t items, std::mt19937_64& rng) {
  std::uniform_int_distribution<std::int64_t> weight(1, 1000), value(1, 1000);
  header(items, 1);
  opb_out out;
  out.text += "* knapsack: ";
  out.text += std::to_string(items);
  out.text += " items\n";
  std::vector<std::int64_t> w(static_cast<std::size_t>(items));
  std::int64_t total = 0;
  for (auto& x : w) total += x = weight(rng);
  out.text += "min:";
  for (std::int64_t i = 0; i < items; ++i) out.variable("-", value(rng), i + 1);
  out.text += " ;\n";
  for (std::int64_t i = 0; i < items; ++i) out.term(-w[static_cast<std::size_t>(i)], i + 1);
  out.end(">=", -(total / 2));
  out.flush();
  return 0;
}

int rota(std::int64_t people, std::mt19937_64& rng) {
  const std::int64_t days = 7, per_day = 3, shifts = days * per_day;
  auto x = [&](std::int64_t p, std::int64_t s) { return p * shifts + s + 1; };
  const std::int64_t need = std::max<std::int64_t>(1, people / 4);
  header(people * shifts, static_cast<std::uint64_t>(shifts + people + people * days));
  opb_out out;
  out.comment("staff rota: ", people, " people, ", shifts, " shifts\n");
  out.text += "min:";
  for (std::int64_t p = 0; p < people; ++p)
    for (std::int64_t s = 0; s < shifts; ++s)
      if (rng() % 5 == 0) out.variable("+", 1, x(p, s));  // an unwanted shift
  out.text += " ;\n";
  for (std::int64_t s = 0; s < shifts; ++s) {
    for (std::int64_t p = 0; p < people; ++p) out.term(1, x(p, s));
    out.end(">=", need);
  }
  for (std::int64_t p = 0; p < people; ++p) {
    for (std::int64_t s = 0; s < shifts; ++s) out.term(-1, x(p, s));
    out.end(">=", -6);
    for (std::int64_t d = 0; d < days; ++d) {
      for (std::int64_t t = 0; t < per_day; ++t) out.term(-1, x(p, d * per_day + t));
      out.end(">=", -1);
    }
    if (out.text.size() > (1U << 20)) out.flush();
  }
  out.flush();
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc == 5 && std::string_view(argv[1]) == "bins") {
    const std::int64_t items = std::atoll(argv[2]);
    const std::int64_t bins = std::atoll(argv[3]);
    std::mt19937_64 rng(std::strtoull(argv[4], nullptr, 10));
    if (items <= 0 || bins <= 0) {
      std::fprintf(stderr, "generate_models: ITEMS and BINS must be positive\n");
      return 2;
    }
    return fixed_bins(items, bins, rng);
  }
  if (argc != 4) {
    std::fprintf(stderr,
                 "usage: generate_models bin-packing|knapsack|rota SIZE SEED > model.opb\n"
                 "       generate_models bins ITEMS BINS SEED > model.opb\n");
    return 2;
  }
  const std::string_view kind = argv[1];
  const std::int64_t size = std::atoll(argv[2]);
  std::mt19937_64 rng(std::strtoull(argv[3], nullptr, 10));
  if (size <= 0) {
    std::fprintf(stderr, "generate_models: SIZE must be positive\n");
    return 2;
  }
  if (kind == "bin-packing") return bin_packing(size, rng);
  if (kind == "knapsack") return knapsack(size, rng);
  if (kind == "rota") return rota(size, rng);
  std::fprintf(stderr, "generate_models: unknown model kind '%s'\n", argv[1]);
  return 2;
}
