// Streaming at scale: prints its figures (run from a Release build).
//
//   bench_streaming [--clauses N] [--items N] [--warm-up MIB] [--tool PATH] [--generator PATH] [--dir DIR]
//
// Files go to DIR (default /dev/shm, a tmpfs, where there is one: a file in
// the page cache that writeback does not throttle; else the temporary
// directory). --items sets the size of the bin-packing model (4800 items
// make about 10^8 clauses). --warm-up MIB (default 8192, 0 for none) first
// writes and removes that much in DIR, so that the figures are not those of
// memory touched for the first time.
//
// 1. DIMACS writing throughput into a file in the page cache (MB/s), from a
//    sequential counter re-encoded until N clauses are written.
// 2. Peak resident memory of a child process that streams N clauses to a
//    DIMACS file (target: under 200 MiB for N = 10^8).
// 3. End-to-end `clausewright encode` of a generated bin-packing model, against
//    copying the same output bytes with cp in the same run: the throughput
//    ratio encode/cp (target: at least 0.5), and the encoder's peak memory.
#include <clausewright/clausewright.hpp>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <vector>

#include "child_process.hpp"

namespace cw = clausewright;
using clausewright_bench::child_result;
using clausewright_bench::in_child;
using clausewright_bench::now;
using clausewright_bench::run_command;

namespace {

// Writes about `clauses` clauses: sequential counters over 10^4 inputs, k = 100.
std::uint64_t write_counters(const std::string& path, std::uint64_t clauses) {
  const std::int32_t n = 10000;
  std::vector<cw::literal> xs;
  xs.reserve(n);
  for (std::int32_t v = 1; v <= n; ++v) xs.push_back(cw::lit(v));
  cw::variable_pool pool(n);
  cw::atomic_file_output out(path);
  cw::dimacs_writer writer(out);
  writer.begin_patched();
  while (writer.clauses() < clauses) {
    cw::variable_pool scratch(n);  // each copy reuses the same auxiliary range
    cw::encode_sequential_at_most(writer, scratch, xs, 100);
    pool = scratch;
  }
  writer.finish(pool.top());
  out.commit();
  return writer.bytes();
}

}  // namespace

int main(int argc, char** argv) {
  std::uint64_t clauses = 100'000'000;
#ifdef CLAUSEWRIGHT_TOOL_PATH
  std::string tool = CLAUSEWRIGHT_TOOL_PATH, generator = CLAUSEWRIGHT_GENERATOR_PATH;
#else
  std::string tool, generator;
#endif
  // tmpfs is the page cache and nothing else; a disk-backed temporary
  // directory measures the disk once dirty pages are written back.
  std::string dir = std::filesystem::is_directory("/dev/shm") ? "/dev/shm" : std::filesystem::temp_directory_path().string();
  std::int64_t items = 3000;
  std::uint64_t warm_up_mib = 8192;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string a = argv[i];
    if (a == "--clauses") clauses = std::strtoull(argv[i + 1], nullptr, 10);
    else if (a == "--tool") tool = argv[i + 1];
    else if (a == "--generator") generator = argv[i + 1];
    else if (a == "--dir") dir = argv[i + 1];
    else if (a == "--items") items = std::atoll(argv[i + 1]);
    else if (a == "--warm-up") warm_up_mib = std::strtoull(argv[i + 1], nullptr, 10);
  }
  const std::string cnf = dir + "/cw-bench-stream.cnf";
  std::printf("files in %s\n", dir.c_str());
  // Memory a virtual machine touches for the first time can cost more than
  // the writing itself (seen here: 350 MB/s for a first 6 GB into tmpfs,
  // 1.1 GB/s the second time). Writing and removing a file of zeros first
  // makes every figure below a page-cache figure.
  if (warm_up_mib != 0) {
    const std::string warm = dir + "/cw-bench-warm-up";
    std::FILE* f = std::fopen(warm.c_str(), "wb");
    if (f != nullptr) {
      const std::vector<char> zeros(std::size_t{8} << 20, 0);
      const double start = now();
      for (std::uint64_t mib = 0; mib < warm_up_mib; mib += 8) std::fwrite(zeros.data(), 1, zeros.size(), f);
      std::fclose(f);
      std::filesystem::remove(warm);
      std::printf("warm-up: %llu MiB of zeros written and removed in %.2f s\n",
                  static_cast<unsigned long long>(warm_up_mib), now() - start);
    }
  }
  int failures = 0;

  // 0. Formatting alone, into an output that drops the bytes (CPU only).
  {
    class null_output final : public cw::byte_output {
     public:
      void write(const char*, std::size_t size) override { bytes += size; }
      [[nodiscard]] bool can_patch() const override { return true; }
      void patch(std::uint64_t, const char*, std::size_t) override {}
      std::uint64_t bytes = 0;
    } sink;
    const std::int32_t n = 10000;
    std::vector<cw::literal> xs;
    xs.reserve(n);
    for (std::int32_t v = 1; v <= n; ++v) xs.push_back(cw::lit(v));
    cw::dimacs_writer writer(sink);
    writer.begin_patched();
    const double start = now();
    std::int32_t top = n;
    while (writer.clauses() < clauses / 4) {
      cw::variable_pool scratch(n);
      cw::encode_sequential_at_most(writer, scratch, xs, 100);
      top = scratch.top();
    }
    writer.finish(top);
    const double seconds = now() - start;
    std::printf("dimacs formatting: %llu clauses, %.1f MB in %.2f s = %.0f MB/s (no file)\n",
                static_cast<unsigned long long>(writer.clauses()), static_cast<double>(sink.bytes) / 1e6, seconds,
                static_cast<double>(sink.bytes) / seconds / 1e6);
  }

  // 1 + 2: library streaming in a child, for its peak memory.
  const child_result lib = in_child([&] {
    (void)write_counters(cnf, clauses);
    return 0;
  });
  const auto written = std::filesystem::file_size(cnf);
  const double mbps = static_cast<double>(written) / lib.seconds / 1e6;
  std::printf("dimacs writing:   %llu clauses, %.1f MB in %.2f s = %.0f MB/s (target >= 400)\n",
              static_cast<unsigned long long>(clauses), static_cast<double>(written) / 1e6, lib.seconds, mbps);
  std::printf("peak memory:      %.1f MiB while writing (target < 200)\n", static_cast<double>(lib.max_rss_kib) / 1024);
  if (lib.status != 0) ++failures;

  const std::string copy = dir + "/cw-bench-stream-copy.cnf";
  const child_result cp = run_command({"/bin/cp", cnf, copy});
  std::printf("cp of that file:  %.2f s = %.0f MB/s; writer/cp throughput ratio %.2f\n", cp.seconds,
              static_cast<double>(written) / cp.seconds / 1e6, cp.seconds / lib.seconds);
  std::filesystem::remove(copy);
  std::filesystem::remove(cnf);

  // 3: the tool end to end.
  if (!tool.empty() && !generator.empty()) {
    const std::string model = dir + "/cw-bench-binpacking.opb";
    const std::string out = dir + "/cw-bench-binpacking.cnf";
    const child_result gen = run_command({generator, "bin-packing", std::to_string(items), "7"}, model);
    if (gen.status != 0) {
      std::printf("generator failed\n");
      return 1;
    }
    const child_result enc = run_command({tool, "encode", model, "-o", out});
    if (enc.status != 0) {
      std::printf("encode failed with status %d\n", enc.status);
      return 1;
    }
    const auto size = std::filesystem::file_size(out);
    const child_result cp2 = run_command({"/bin/cp", out, out + ".copy"});
    std::printf("encode bin-packing (%lld items): %.1f MB in %.2f s = %.0f MB/s, peak %.1f MiB\n",
                static_cast<long long>(items), static_cast<double>(size) / 1e6, enc.seconds,
                static_cast<double>(size) / enc.seconds / 1e6, static_cast<double>(enc.max_rss_kib) / 1024);
    std::printf("cp of the output: %.2f s; encode/cp throughput ratio %.2f (target >= 0.5)\n", cp2.seconds,
                cp2.seconds / enc.seconds);
    std::filesystem::remove(out + ".copy");
    std::filesystem::remove(out);
    std::filesystem::remove(model);
  }
  return failures == 0 ? 0 : 1;
}
