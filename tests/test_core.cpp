// Core types and sinks: literals, the pool, the in-memory, counting, guarded
// and DIMACS sinks. DIMACS output is read back by CaDiCaL's own parser
// (an independent reader of the DIMACS Challenge format).
#include <cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <charconv>
#include <chrono>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <random>
#include <gtest/gtest.h>
#include <sstream>
#include <thread>

namespace cw = clausewright;
using cw::lit;

TEST(Literal, DimacsConvention) {
  constexpr cw::literal a = lit(7);
  static_assert(a.var() == 7 && !a.negative());
  static_assert((~a).dimacs() == -7 && (~a).negative() && (~a).var() == 7);
  static_assert(~~a == a);
  EXPECT_FALSE(cw::literal().valid());
  EXPECT_EQ(cw::make_literal(-3).dimacs(), -3);
}

TEST(Literal, ZeroAndOutOfRangeAreErrors) {
  EXPECT_THROW((void)cw::make_literal(0), cw::error);
  EXPECT_THROW((void)cw::make_literal(std::int64_t{1} << 40), cw::error);
  try {
    (void)cw::make_literal(0);
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::invalid_literal);
  }
}

TEST(Pool, FreshVariablesComeAfterTheUsers) {
  cw::variable_pool pool(10);
  EXPECT_EQ(pool.fresh().dimacs(), 11);
  EXPECT_EQ(pool.fresh_block(5).dimacs(), 12);
  EXPECT_EQ(pool.top(), 16);
  EXPECT_EQ(pool.auxiliary_variables(), 6);
  EXPECT_EQ(pool.user_variables(), 10);
  // Claiming more user variables after auxiliaries were handed out would
  // collide with them.
  EXPECT_THROW(pool.reserve_user(20), cw::error);
}

TEST(Pool, RunsOutWithAnErrorNotAWrap) {
  cw::variable_pool pool(cw::max_variable - 1);
  (void)pool.fresh();
  EXPECT_THROW((void)pool.fresh(), cw::error);
  EXPECT_THROW((void)pool.fresh_block(2), cw::error);
}

TEST(Sinks, CnfBufferIsFlat) {
  cw::cnf_buffer cnf;
  cnf.add_clause({lit(1), lit(-2)});
  cnf.add_clause({});
  cnf.add_clause({lit(3), lit(4), lit(-5)});
  ASSERT_EQ(cnf.size(), 3U);
  EXPECT_EQ(cnf[0].size(), 2U);
  EXPECT_EQ(cnf[1].size(), 0U);
  EXPECT_EQ(cnf[2][2], lit(-5));
  EXPECT_EQ(cnf.literals().size(), 5U);
  EXPECT_EQ(cnf.max_variable(), 5);
  EXPECT_TRUE(cnf.has_empty_clause());
  std::size_t seen = 0;
  for (auto clause : cnf) seen += clause.size();
  EXPECT_EQ(seen, 5U);
}

TEST(Sinks, CountingSinkCountsWithoutStoring) {
  cw::counting_sink count;
  cw::emit(count, lit(1), lit(2));
  cw::emit(count, lit(1), lit(2), lit(3), lit(4));
  cw::emit(count, lit(-1));
  EXPECT_EQ(count.clauses(), 3U);
  EXPECT_EQ(count.literals(), 7U);
  EXPECT_EQ(count.longest_clause(), 4U);
  static_assert(sizeof(cw::counting_sink) == 3 * sizeof(std::uint64_t));
}

TEST(Sinks, GuardAppendsToEveryClause) {
  cw::cnf_buffer cnf;
  cw::guarded_sink guarded(cnf, lit(-9));
  cw::emit(guarded, lit(1));
  cw::emit(guarded, lit(2), lit(3));
  ASSERT_EQ(cnf.size(), 2U);
  EXPECT_EQ(cnf[0].size(), 2U);
  EXPECT_EQ(cnf[0][1], lit(-9));
  EXPECT_EQ(cnf[1][2], lit(-9));
}

TEST(Sinks, GuardedConstraintIsConditional) {
  // r -> (x1 + x2 + x3 <= 1) with the guard ~r: checked by CaDiCaL.
  cw::variable_pool pool(4);
  cw::cnf_buffer cnf;
  cw::guarded_sink guarded(cnf, lit(-4));
  cw::encode_with(cw::method_id::sequential_counter, guarded, pool,
                  cw::normalize_cardinality(std::vector{lit(1), lit(2), lit(3)}, cw::relation::le, 1));
  CaDiCaL::Solver s;
  for (auto c : cnf) {
    for (auto l : c) s.add(l.dimacs());
    s.add(0);
  }
  s.assume(1), s.assume(2), s.assume(-4);
  EXPECT_EQ(s.solve(), 10) << "with r false the constraint must not bind";
  s.assume(1), s.assume(2), s.assume(4);
  EXPECT_EQ(s.solve(), 20) << "with r true two of three must be refused";
}

TEST(Sinks, DynamicSinkAdapter) {
  cw::counting_sink count;
  cw::sink_adapter<cw::counting_sink> adapter(count);
  cw::dynamic_sink& dyn = adapter;
  cw::emit(dyn, lit(1), lit(2));
  EXPECT_EQ(count.clauses(), 1U);
}

namespace {
std::string temp_path(const std::string& stem) {
  return (std::filesystem::temp_directory_path() / (stem + "-" + std::to_string(::getpid()))).string();
}

// Reads a DIMACS file with CaDiCaL's strict parser and returns its verdict.
int solve_file(const std::string& path, int& vars) {
  CaDiCaL::Solver s;
  const char* err = s.read_dimacs(path.c_str(), vars, 1);
  if (err) {
    ADD_FAILURE() << "CaDiCaL rejected " << path << ": " << err;
    return -1;
  }
  return s.solve();
}
}  // namespace

TEST(Dimacs, ExactHeaderToStream) {
  std::ostringstream os;
  cw::ostream_output out(os);
  cw::dimacs_writer w(out);
  w.comment("two clauses");
  w.begin(3, 2);
  cw::emit(w, lit(1), lit(-3));
  cw::emit(w, lit(2));
  w.finish(3);
  EXPECT_EQ(os.str(), "c two clauses\np cnf 3 2\n1 -3 0\n2 0\n");
}

TEST(Dimacs, ExactHeaderMismatchIsAnError) {
  std::ostringstream os;
  cw::ostream_output out(os);
  cw::dimacs_writer w(out);
  w.begin(3, 2);
  cw::emit(w, lit(1));
  EXPECT_THROW(w.finish(3), cw::error);
}

TEST(Dimacs, PatchedHeaderIsReadByCaDiCaL) {
  const std::string path = temp_path("cw-patched.cnf");
  {
    cw::atomic_file_output out(path);
    cw::dimacs_writer w(out);
    w.comment("pigeonhole 3 into 2, unsatisfiable");
    w.begin_patched();
    // p(i,h) = 2*(i-1)+h: each pigeon in a hole, no hole twice.
    for (int i = 1; i <= 3; ++i) cw::emit(w, lit(2 * (i - 1) + 1), lit(2 * (i - 1) + 2));
    for (int h = 1; h <= 2; ++h)
      for (int i = 1; i <= 3; ++i)
        for (int j = i + 1; j <= 3; ++j) cw::emit(w, lit(-(2 * (i - 1) + h)), lit(-(2 * (j - 1) + h)));
    w.finish(6);
    out.commit();
  }
  int vars = 0;
  EXPECT_EQ(solve_file(path, vars), 20);
  EXPECT_EQ(vars, 6);
  std::ifstream in(path);
  std::string first, second;
  std::getline(in, first);
  std::getline(in, second);
  EXPECT_EQ(second.substr(0, 12), "p cnf 6 9   ");
  std::filesystem::remove(path);
}

TEST(Dimacs, LargeOutputRoundTripsThroughCaDiCaL) {
  // Enough clauses to cross many buffer flushes; satisfiable by x_i = true.
  const std::string path = temp_path("cw-large.cnf");
  const int n = 200000;
  {
    cw::atomic_file_output out(path);
    cw::dimacs_writer w(out);
    w.begin_patched();
    for (int i = 1; i < n; ++i) cw::emit(w, lit(-i), lit(i + 1), lit(-(i % 97) - 1));
    cw::emit(w, lit(1));
    w.finish(n);
    EXPECT_EQ(w.clauses(), static_cast<std::uint64_t>(n));
    out.commit();
  }
  int vars = 0;
  EXPECT_EQ(solve_file(path, vars), 10);
  EXPECT_EQ(vars, n);
  std::filesystem::remove(path);
}

TEST(Dimacs, AtomicOutputLeavesNothingWithoutCommit) {
  const std::string path = temp_path("cw-aborted.cnf");
  std::string temporary;
  {
    cw::atomic_file_output out(path);
    temporary = out.temporary_path();
    cw::dimacs_writer w(out);
    w.begin_patched();
    cw::emit(w, lit(1));
    EXPECT_TRUE(std::filesystem::exists(temporary));
  }
  EXPECT_FALSE(std::filesystem::exists(path));
  EXPECT_FALSE(std::filesystem::exists(temporary));
}

TEST(Errors, PositionIsInTheMessage) {
  const cw::error e(cw::error_id::overflow, "sum overflows", cw::at_constraint(4, "capacity"));
  EXPECT_STREQ(e.what(), "constraint 4 (capacity): sum overflows");
  cw::error_position p;
  p.file = "model.opb";
  p.line = 3;
  p.column = 14;
  EXPECT_STREQ(cw::error(cw::error_id::parse, "expected ';'", p).what(), "model.opb:3:14: expected ';'");
}

TEST(Encoder, StreamsAndReportsSizes) {
  cw::variable_pool pool(6);
  cw::cnf_buffer cnf;
  cw::encoder enc(cnf, pool);
  const std::vector<cw::literal> xs{lit(1), lit(2), lit(3), lit(4), lit(5), lit(6)};
  const auto r0 = enc.at_most(xs, 2, cw::method_id::sequential_counter);
  EXPECT_EQ(r0.index, 0U);
  EXPECT_EQ(r0.kind, cw::constraint_kind::cardinality);
  // Sinz 2005: 2nk + n - 3k - 1 clauses, k(n-1) auxiliary variables.
  EXPECT_EQ(r0.size.clauses, 2U * 6 * 2 + 6 - 3 * 2 - 1);
  EXPECT_EQ(r0.size.variables, 2U * 5);
  const auto r1 = enc.at_most_one({lit(1), lit(2), lit(3)});
  EXPECT_EQ(r1.index, 1U);
  EXPECT_TRUE(r1.method.has_value());
  EXPECT_EQ(cnf.size(), r0.size.clauses + r1.size.clauses);
}

TEST(Encoder, BadInputNamesTheConstraint) {
  cw::variable_pool pool(3);
  cw::cnf_buffer cnf;
  cw::encoder enc(cnf, pool);
  enc.at_most_one({lit(1), lit(2)});
  try {
    enc.at_most(std::vector{lit(1), lit(2)}, -1);
    FAIL() << "k < 0 must throw";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::invalid_bound);
    EXPECT_EQ(e.where().constraint, 1U);
    EXPECT_NE(std::string(e.what()).find("constraint 1"), std::string::npos);
  }
  EXPECT_THROW(enc.exactly_one(std::vector<cw::literal>{}), cw::error);
  EXPECT_THROW(enc.at_most_one({lit(1), cw::literal()}), cw::error);  // literal 0
  EXPECT_THROW(enc.at_most_one({lit(1), lit(8)}), cw::error);         // not in the pool
  EXPECT_THROW(enc.linear({{INT64_MAX, lit(1)}, {INT64_MAX, lit(2)}}, cw::relation::le, 5), cw::error);
  EXPECT_THROW(enc.linear({{3, lit(1)}, {2, lit(2)}}, cw::relation::le, 3, cw::method_id::pairwise), cw::error);
}

// threaded_output hands blocks to a second thread: the bytes must arrive
// whole and in order whatever the sizes of the writes, errors of the writing
// thread must reach the caller, and dropping it without finish() must not
// hang.
namespace {
class recording_output final : public cw::byte_output {
 public:
  void write(const char* data, std::size_t size) override {
    if (delay.count() != 0) std::this_thread::sleep_for(delay);
    if (fail_after_ != 0 && bytes.size() + size > fail_after_) throw cw::error(cw::error_id::io, "disk full");
    bytes.append(data, size);
  }
  [[nodiscard]] bool can_patch() const override { return true; }
  void patch(std::uint64_t offset, const char* data, std::size_t size) override {
    ASSERT_LE(offset + size, bytes.size());
    bytes.replace(offset, size, data, size);
  }
  std::string bytes;
  std::size_t fail_after_ = 0;
  std::chrono::microseconds delay{0};  // per write: a slow disk, so that blocks wait
};
}  // namespace

TEST(ThreadedOutput, BytesArriveWholeAndInOrder) {
  const unsigned seed = 20261202;
  std::mt19937 rng(seed);
  std::string expected;
  recording_output sink;
  {
    cw::threaded_output out(sink, 1000, 3);  // small blocks: many hand-overs
    std::string chunk;
    for (int i = 0; i < 5000; ++i) {
      chunk.assign(rng() % 2500, '\0');
      for (auto& c : chunk) c = static_cast<char>('a' + rng() % 26);
      out.write(chunk.data(), chunk.size());
      expected += chunk;
      if (i % 1000 == 999) out.finish();  // finishing in between changes nothing
    }
    out.finish();
  }
  ASSERT_EQ(sink.bytes.size(), expected.size()) << "seed " << seed;
  EXPECT_TRUE(sink.bytes == expected) << "seed " << seed;
}

TEST(ThreadedOutput, DimacsWithPatchedHeaderIsReadByCaDiCaL) {
  const std::string path = temp_path("cw-threaded.cnf");
  const int n = 100000;
  {
    cw::atomic_file_output file(path);
    cw::threaded_output out(file, 4096, 4);
    cw::dimacs_writer w(out);
    w.begin_patched();
    for (int i = 1; i < n; ++i) cw::emit(w, lit(-i), lit(i + 1));
    cw::emit(w, lit(1));
    w.finish(n);
    out.finish();
    file.commit();
  }
  int vars = 0;
  EXPECT_EQ(solve_file(path, vars), 10);
  EXPECT_EQ(vars, n);
  std::filesystem::remove(path);
}

TEST(ThreadedOutput, WriteErrorsReachTheCaller) {
  recording_output sink;
  sink.fail_after_ = 50'000;
  cw::threaded_output out(sink, 1024, 2);
  const std::string line(100, 'x');
  try {
    for (int i = 0; i < 10'000; ++i) out.write(line.data(), line.size());
    out.finish();
    FAIL() << "the error of the writing thread was lost";
  } catch (const cw::error& e) {
    EXPECT_EQ(e.id(), cw::error_id::io);
    EXPECT_NE(std::string(e.what()).find("disk full"), std::string::npos);
  }
  EXPECT_LE(sink.bytes.size(), 50'000U);
}

TEST(ThreadedOutput, DroppedWithoutFinishDoesNotHang) {
  recording_output sink;
  {
    cw::threaded_output out(sink, 64, 2);
    const std::string text(10'000, 'y');
    out.write(text.data(), text.size());
  }
  EXPECT_LE(sink.bytes.size(), 10'000U);
}

// Decimal formatting: write_decimal against the standard library's
// std::to_chars (an independent formatter), for every value up to 10^6 in
// magnitude, around every power of ten and at the ends of the range; and the
// two divisions by multiplication it relies on, for every value they meet.
TEST(Decimal, WriteDecimalAgreesWithToChars) {
  for (std::uint64_t v = 0; v < 10000; ++v) ASSERT_EQ((v * 10486) >> 20, v / 100) << v;
  for (std::uint64_t v = 0; v < 100; ++v) ASSERT_EQ((v * 103) >> 10, v / 10) << v;
  std::vector<std::int32_t> values;
  for (std::int32_t v = -1'000'000; v <= 1'000'000; ++v) values.push_back(v);
  std::int64_t power = 1;
  for (int e = 0; e <= 9; ++e, power *= 10)
    for (std::int64_t d = -2; d <= 2; ++d)
      for (const std::int64_t sign : {1, -1}) values.push_back(static_cast<std::int32_t>(sign * (power + d)));
  values.push_back(INT32_MAX);
  values.push_back(INT32_MIN);
  values.push_back(INT32_MIN + 1);
  const unsigned seed = 1202;
  std::mt19937 rng(seed);
  for (int i = 0; i < 1'000'000; ++i) values.push_back(static_cast<std::int32_t>(rng()));
  char ours[32];
  char theirs[32];
  for (const std::int32_t v : values) {
    std::memset(ours, 'x', sizeof ours);
    const char* end = cw::write_decimal(ours, v);
    const auto r = std::to_chars(theirs, theirs + sizeof theirs, v);
    ASSERT_EQ(std::string_view(ours, static_cast<std::size_t>(end - ours)),
              std::string_view(theirs, static_cast<std::size_t>(r.ptr - theirs)))
        << v << " (seed " << seed << ")";
    ASSERT_LE(end - ours, 11);
  }
}

// The DIMACS bytes are the format itself: "p cnf V C", then each clause as
// its literals in decimal, one space after each, "0" and a newline. The
// writer's output, through every kind of output (a plain one, threaded with
// blocks lent to the writer, small and default blocks), must equal that text
// built independently with snprintf from the same clauses, for literals of
// every width and for clauses longer than a block.
namespace {
// A comment line between the clauses every so often, as the tool's
// --comments writes them.
constexpr std::size_t comment_every = 4999;

std::string dimacs_by_snprintf(const cw::cnf_buffer& cnf, std::int32_t variables) {
  std::string text = "p cnf " + std::to_string(variables) + " " + std::to_string(cnf.size()) + "\n";
  char number[16];
  for (std::size_t k = 0; k < cnf.size(); ++k) {
    if (k % comment_every == comment_every - 1) text += "c before clause " + std::to_string(k) + "\n";
    for (const cw::literal l : cnf[k]) {
      std::snprintf(number, sizeof number, "%d ", l.dimacs());
      text += number;
    }
    text += "0\n";
  }
  return text;
}
}  // namespace

TEST(Dimacs, BytesEqualTheFormatWrittenIndependently) {
  const unsigned seed = 20261203;
  std::mt19937 rng(seed);
  cw::cnf_buffer cnf;
  std::int32_t top = 1;
  std::vector<cw::literal> clause;
  for (int k = 0; k < 20000; ++k) {
    clause.clear();
    const std::size_t length = k % 997 == 0 ? 3000 : rng() % 6;  // some longer than a small block
    for (std::size_t i = 0; i < length; ++i) {
      // Variables of 1 to 10 digits, either sign.
      const auto digits = static_cast<int>(rng() % 10);
      std::int64_t v = 1 + static_cast<std::int64_t>(rng() % 9);
      for (int d = 0; d < digits; ++d) v = v * 10 + static_cast<std::int64_t>(rng() % 10);
      v = std::min<std::int64_t>(v, cw::max_variable);
      top = std::max(top, static_cast<std::int32_t>(v));
      clause.push_back(cw::lit(static_cast<std::int32_t>(rng() % 2 == 0 ? v : -v)));
    }
    cnf.add_clause(std::span<const cw::literal>(clause));
  }
  // And a real encoding: the adder network of a weighted row, variables
  // numbered from 99 999 990 on so that they cross to nine digits.
  {
    cw::variable_pool pool(99'999'990);
    std::vector<cw::term> terms;
    for (std::int32_t i = 1; i <= 40; ++i) terms.push_back({(i * 37) % 101 + 1, cw::lit(99'999'950 + i)});
    cw::encoder enc(cnf, pool);
    enc.linear(terms, cw::relation::le, 700, cw::method_id::adder);
    top = std::max(top, pool.top());
  }
  const std::string expected = dimacs_by_snprintf(cnf, top);
  const auto add_all = [&](cw::dimacs_writer& w) {
    for (std::size_t k = 0; k < cnf.size(); ++k) {
      if (k % comment_every == comment_every - 1) w.comment("before clause " + std::to_string(k));
      w.add_clause(cnf[k]);
    }
  };
  {
    recording_output plain;
    cw::dimacs_writer w(plain);
    w.begin(top, cnf.size());
    add_all(w);
    w.finish(top);
    EXPECT_TRUE(plain.bytes == expected) << "plain output, seed " << seed;
    EXPECT_EQ(w.bytes(), expected.size());
  }
  // Blocks of 100 bytes are too small to lend (the writer's own buffer),
  // 4096 lend (the long clauses go as text), 2^20 take every clause as
  // numbers; a slow output makes the writing thread fall behind, so that
  // blocks are formatted on both threads.
  for (const bool slow : {false, true})
    for (const std::size_t block : {std::size_t{100}, std::size_t{4096}, std::size_t{1} << 20}) {
      recording_output sink;
      if (slow) sink.delay = std::chrono::microseconds(block > 4096 ? 2000 : 20);
      std::uint64_t bytes = 0;
      {
        cw::threaded_output out(sink, block, 4);
        cw::dimacs_writer w(out);
        w.begin(top, cnf.size());
        add_all(w);
        w.finish(top);
        out.finish();
        bytes = w.bytes();
      }
      const std::string what = "blocks of " + std::to_string(block) + (slow ? ", slow" : "") + ", seed " +
                               std::to_string(seed);
      EXPECT_EQ(sink.bytes.size(), expected.size()) << what;
      EXPECT_TRUE(sink.bytes == expected) << what;
      EXPECT_EQ(bytes, expected.size()) << what;
    }
  // The patched header through a threaded output: the same clauses after a
  // reserved line, which names the counts once the writer finishes.
  {
    recording_output sink;
    {
      cw::threaded_output out(sink, 4096, 2);
      cw::dimacs_writer w(out);
      w.begin_patched();
      add_all(w);
      w.finish(top);
      out.finish();
    }
    const std::size_t header_end = expected.find('\n');
    std::string header = expected.substr(0, header_end);
    header.resize(cw::dimacs_writer::reserved_header_width, ' ');
    EXPECT_TRUE(sink.bytes == header + expected.substr(header_end)) << "patched header, seed " << seed;
  }
}
