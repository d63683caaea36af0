// The command-line tool, run as a program: answers read right, outputs that
// never destroy anything, input refused or accepted for the right reasons,
// exit codes.
//
// Independent references: CaDiCaL (the library, linked here) solves the CNF
// the tool writes, and the test checks the solver's assignment against the
// generator's own record of each constraint (evaluated here, not by the
// tool); the POSIX file system (stat, lstat) tells what became of an output
// path; the kernel's own errors (ENOSPC from /dev/full, EFBIG past
// RLIMIT_FSIZE) are what the tool must report.
#include <fcntl.h>
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/sysmacros.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cadical.hpp>
#include <cerrno>
#include <chrono>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <optional>
#include <random>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "tool_run.hpp"

namespace fs = std::filesystem;

namespace {

using tool_run::run_result;
using tool_run::read_file;
using tool_run::write_file;
using tool_run::quote;
using tool_run::contains;

const std::string tool = CLAUSEWRIGHT_TOOL_PATH;

class safety : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() /
           ("clausewright-safety-" + std::to_string(::getpid()) + "-" + info->test_suite_name() + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  void TearDown() override {
    if (!HasFailure()) fs::remove_all(dir_);
  }

  fs::path file(const std::string& name) const { return dir_ / name; }
  fs::path write(const std::string& name, const std::string& text) const {
    write_file(file(name), text);
    return file(name);
  }

  // `clausewright ARGS` through the shell; standard output goes to `stdout_to`
  // when given (/dev/full), else it is captured.
  run_result run(const std::string& args, const std::string& input = "/dev/null",
                 const std::string& stdout_to = {}) const {
    const fs::path out = dir_ / ".stdout";
    const fs::path err = dir_ / ".stderr";
    std::string command = quote(tool) + " " + args + " >" + quote(stdout_to.empty() ? out.string() : stdout_to) +
                          " 2>" + quote(err.string()) + " <" + quote(input);
    const int status = std::system(command.c_str());
    run_result r;
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = stdout_to.empty() ? read_file(out) : std::string();
    r.err = read_file(err);
    return r;
  }

  // Starts the tool directly (no shell: signals reach it, with their default
  // dispositions), with an optional file-size limit.
  pid_t start(const std::vector<std::string>& args, std::optional<rlim_t> file_size_limit = std::nullopt) const {
    const std::string out = (dir_ / ".stdout").string();
    const std::string err = (dir_ / ".stderr").string();
    std::vector<std::string> all{tool};
    all.insert(all.end(), args.begin(), args.end());
    std::vector<char*> argv;
    for (auto& a : all) argv.push_back(a.data());
    argv.push_back(nullptr);
    const pid_t pid = ::fork();
    if (pid == 0) {
      const int o = ::open(out.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
      const int e = ::open(err.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
      const int i = ::open("/dev/null", O_RDONLY);
      if (o < 0 || e < 0 || i < 0) ::_exit(127);
      ::dup2(o, 1);
      ::dup2(e, 2);
      ::dup2(i, 0);
      for (const int s : {SIGINT, SIGTERM, SIGHUP, SIGXFSZ}) ::signal(s, SIG_DFL);
      if (file_size_limit) {
        const rlimit limit{*file_size_limit, *file_size_limit};
        if (::setrlimit(RLIMIT_FSIZE, &limit) != 0) ::_exit(126);
      }
      ::execv(tool.c_str(), argv.data());
      ::_exit(127);
    }
    return pid;
  }
  run_result wait_for(pid_t pid) const {
    int status = 0;
    ::waitpid(pid, &status, 0);
    run_result r;
    if (WIFEXITED(status)) r.code = WEXITSTATUS(status);
    if (WIFSIGNALED(status)) r.signal = WTERMSIG(status);
    r.out = read_file(dir_ / ".stdout");
    r.err = read_file(dir_ / ".stderr");
    return r;
  }

  // Files in the directory whose name holds ".tmp-" (left-over temporaries).
  std::vector<std::string> temporaries() const {
    std::vector<std::string> out;
    for (const auto& e : fs::directory_iterator(dir_))
      if (contains(e.path().filename().string(), ".tmp-")) out.push_back(e.path().filename().string());
    return out;
  }

  fs::path dir_;
};

// --- a model generator and its own evaluator -------------------------------------------------

struct record_term {
  std::int64_t coefficient;
  int variable;
  bool negated;
};
struct record {
  std::vector<record_term> terms;
  std::string relation;  // ">=", "<=", "="
  std::int64_t bound;
};
struct generated_model {
  int variables = 0;
  std::vector<record> constraints;
  std::string opb;
};

std::int64_t left_side(const record& c, const std::vector<bool>& value) {
  std::int64_t sum = 0;
  for (const auto& t : c.terms) {
    const bool v = value[static_cast<std::size_t>(t.variable)];
    if (t.negated ? !v : v) sum += t.coefficient;
  }
  return sum;
}
bool holds(const record& c, const std::vector<bool>& value) {
  const std::int64_t l = left_side(c, value);
  if (c.relation == ">=") return l >= c.bound;
  if (c.relation == "<=") return l <= c.bound;
  return l == c.bound;
}

// Constraints true under a hidden assignment (so the model is satisfiable),
// and unit constraints making x10, x11, x100 and x101 true: the literals
// written with 0s and 1s alone appear in every answer.
generated_model generate(std::uint32_t seed, int variables) {
  std::mt19937 rng(seed);
  generated_model m;
  m.variables = variables;
  std::vector<bool> hidden(static_cast<std::size_t>(variables) + 1);
  for (int v = 1; v <= variables; ++v) hidden[static_cast<std::size_t>(v)] = (rng() & 1U) != 0;
  for (const int v : {10, 11, 100, 101}) {
    hidden[static_cast<std::size_t>(v)] = true;
    m.constraints.push_back({{{1, v, false}}, ">=", 1});
  }
  for (int i = 0; i < 30; ++i) {
    record c;
    const int size = 2 + static_cast<int>(rng() % 12);
    for (int k = 0; k < size; ++k) {
      const int v = 1 + static_cast<int>(rng() % static_cast<std::uint32_t>(variables));
      const std::int64_t coefficient = (i % 3 == 0) ? 1 : 1 + static_cast<std::int64_t>(rng() % 9);
      c.terms.push_back({coefficient, v, (rng() & 3U) == 0});
    }
    const std::int64_t l = left_side(c, hidden);
    const int kind = static_cast<int>(rng() % 3);
    c.relation = kind == 0 ? "<=" : kind == 1 ? ">=" : "=";
    c.bound = kind == 0   ? l + static_cast<std::int64_t>(rng() % 2)
              : kind == 1 ? l - static_cast<std::int64_t>(rng() % 2)
                          : l;
    m.constraints.push_back(c);
  }
  m.opb = "* #variable= " + std::to_string(variables) + " #constraint= " + std::to_string(m.constraints.size()) + "\n";
  for (const auto& c : m.constraints) {
    for (const auto& t : c.terms) {
      m.opb += '+';
      m.opb += std::to_string(t.coefficient);
      m.opb += t.negated ? " ~x" : " x";
      m.opb += std::to_string(t.variable);
      m.opb += ' ';
    }
    m.opb += c.relation + " " + std::to_string(c.bound) + " ;\n";
  }
  return m;
}

// CaDiCaL solves a DIMACS CNF: the values of variables 1..n (index 0 unused),
// empty when unsatisfiable.
std::vector<bool> solve_cnf(const std::string& cnf, int& variables) {
  CaDiCaL::Solver solver;
  std::istringstream in(cnf);
  std::string line;
  variables = 0;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == 'c') continue;
    std::istringstream ls(line);
    if (line[0] == 'p') {
      std::string p, kind;
      ls >> p >> kind >> variables;
      continue;
    }
    int lit = 0;
    while (ls >> lit) solver.add(lit);
  }
  if (solver.solve() != 10) return {};
  std::vector<bool> value(static_cast<std::size_t>(variables) + 1);
  for (int v = 1; v <= variables; ++v) value[static_cast<std::size_t>(v)] = solver.val(v) > 0;
  return value;
}

// "s SATISFIABLE" and the literals of variables 1..n, a few per v line.
std::string answer_text(const std::vector<bool>& value, int variables) {
  std::string out = "c written by the test from CaDiCaL's model\ns SATISFIABLE\n";
  std::string line = "v";
  for (int v = 1; v <= variables; ++v) {
    line += value[static_cast<std::size_t>(v)] ? " " : " -";
    line += std::to_string(v);
    if (v % 9 == 0) {
      out += line;
      out += '\n';
      line.resize(1);  // "v"
    }
  }
  out += line;
  out += " 0\n";
  return out;
}

// The values decode printed ("x10 = 1").
std::map<std::string, int> decoded_values(const std::string& out) {
  std::map<std::string, int> values;
  std::istringstream in(out);
  std::string line;
  while (std::getline(in, line)) {
    const auto eq = line.find(" = ");
    if (eq != std::string::npos && line.size() == eq + 4) values[line.substr(0, eq)] = line.back() - '0';
  }
  return values;
}

// --- decode reads ordinary answers right ------------------------------------------------------

TEST_F(safety, DecodeRoundTripsCaDiCaLAnswersWithLiteralsOfZerosAndOnes) {
  for (std::uint32_t seed = 1; seed <= 12; ++seed) {
    SCOPED_TRACE("seed " + std::to_string(seed));
    const int n = 101 + static_cast<int>(seed % 5) * 7;
    const generated_model m = generate(seed, n);
    const fs::path model = write("m.opb", m.opb);
    const run_result enc = run("encode " + quote(model.string()) + " -o " + quote(file("m.cnf").string()));
    ASSERT_EQ(enc.code, 0) << enc.err;
    int cnf_variables = 0;
    const std::vector<bool> value = solve_cnf(read_file(file("m.cnf")), cnf_variables);
    ASSERT_FALSE(value.empty()) << "CaDiCaL finds the satisfiable model unsatisfiable";
    ASSERT_GE(cnf_variables, n);
    for (const int v : {10, 11, 100, 101}) ASSERT_TRUE(value[static_cast<std::size_t>(v)]) << "x" << v;
    // The generator's record holds under the solver's assignment.
    for (const auto& c : m.constraints) ASSERT_TRUE(holds(c, value));

    const fs::path answer = write("answer.txt", answer_text(value, cnf_variables));
    const run_result dec = run("decode " + quote(model.string()) + " " + quote(answer.string()));
    EXPECT_EQ(dec.code, 0) << dec.out << dec.err;
    EXPECT_TRUE(contains(dec.out, "all " + std::to_string(m.constraints.size()) + " constraints hold")) << dec.out;
    const auto decoded = decoded_values(dec.out);
    ASSERT_EQ(decoded.size(), static_cast<std::size_t>(n)) << dec.out;
    for (int v = 1; v <= n; ++v)
      EXPECT_EQ(decoded.at("x" + std::to_string(v)), value[static_cast<std::size_t>(v)] ? 1 : 0) << "x" << v;

    // x11 flipped: the unit constraint "x11 >= 1" (#1, numbered from 0)
    // breaks, and whatever else the test's evaluator finds broken: decode
    // names exactly those.
    std::vector<bool> flipped = value;
    flipped[11] = false;
    std::vector<std::size_t> broken;
    for (std::size_t i = 0; i < m.constraints.size(); ++i)
      if (!holds(m.constraints[i], flipped)) broken.push_back(i);
    ASSERT_FALSE(broken.empty());
    EXPECT_EQ(broken.front(), 1U);
    const fs::path bad = write("flipped.txt", answer_text(flipped, cnf_variables));
    const run_result wrong = run("decode " + quote(model.string()) + " " + quote(bad.string()) + " --violations-only");
    EXPECT_EQ(wrong.code, 1) << wrong.out << wrong.err;
    for (const std::size_t i : broken)
      EXPECT_TRUE(contains(wrong.out, "violated: #" + std::to_string(i) + " at ")) << i << "\n" << wrong.out;
    EXPECT_TRUE(contains(wrong.out, std::to_string(broken.size()) + " of " + std::to_string(m.constraints.size()) +
                                        " constraints violated"))
        << wrong.out;

    // The same assignment as the MaxSAT Evaluation's string of values.
    std::string bits = "s SATISFIABLE\nv ";
    for (int v = 1; v <= cnf_variables; ++v) bits += value[static_cast<std::size_t>(v)] ? '1' : '0';
    const fs::path as_bits = write("bits.txt", bits + "\n");
    const run_result from_bits = run("decode " + quote(model.string()) + " " + quote(as_bits.string()));
    EXPECT_EQ(from_bits.code, 0) << from_bits.out << from_bits.err;
    EXPECT_EQ(decoded_values(from_bits.out), decoded);
  }
}

TEST_F(safety, DecodeTellsTheTwoFormsApartOnTheWholeAnswer) {
  // 12 variables, x10 and x11 true: a list of literals, however it is split.
  std::string opb = "* #variable= 12 #constraint= 2\n+1 x10 >= 1 ;\n+1 x11 +1 x1 >= 2 ;\n";
  const fs::path model = write("m.opb", opb);
  for (const std::string& answer :
       {std::string("s SATISFIABLE\nv 1 -2 -3 -4 -5 -6 -7 -8 -9 10 11 -12 0\n"),
        std::string("s SATISFIABLE\nv 1 -2 -3 -4 -5 -6 -7 -8 -9\nv 10\nv 11\nv -12 0\n"),
        std::string("s SATISFIABLE\nv 10\nv 11 1 0\n"), std::string("10 11 1 0\n"), std::string("v 1 10 11\n")}) {
    SCOPED_TRACE(answer);
    const fs::path a = write("a.txt", answer);
    const run_result r = run("decode " + quote(model.string()) + " " + quote(a.string()));
    EXPECT_EQ(r.code, 0) << r.out << r.err;
    const auto values = decoded_values(r.out);
    EXPECT_EQ(values.at("x10"), 1);
    EXPECT_EQ(values.at("x11"), 1);
    EXPECT_EQ(values.at("x1"), 1);
    EXPECT_EQ(values.at("x2"), 0);
  }
  // One token of 0s and 1s, at least as long as the variable count, no
  // closing 0: the string of values (x1, x10, x11 true).
  const fs::path bits = write("bits.txt", "s OPTIMUM FOUND\nv 1000000001101\n");
  const run_result r = run("decode " + quote(model.string()) + " " + quote(bits.string()));
  EXPECT_EQ(r.code, 0) << r.out << r.err;
  EXPECT_EQ(decoded_values(r.out).at("x12"), 0);
  EXPECT_EQ(decoded_values(r.out).count("x13"), 0U) << "x13 is beyond the model; only its 12 values are kept";
}

TEST_F(safety, DecodeOfAnUnknownAnswerExitsThree) {
  const fs::path model = write("m.opb", "* #variable= 2 #constraint= 1\n+1 x1 +1 x2 >= 1 ;\n");
  for (const std::string& answer :
       {std::string("s UNKNOWN\n"), std::string("s UNKNOWN\nv 1 -2 0\n"), std::string("s UNKNOWN\nv -1 -2 0\n")}) {
    SCOPED_TRACE(answer);
    const fs::path a = write("a.txt", answer);
    const run_result r = run("decode " + quote(model.string()) + " " + quote(a.string()));
    EXPECT_EQ(r.code, 3) << r.out << r.err;
    EXPECT_TRUE(contains(r.err, "UNKNOWN")) << r.err;
    EXPECT_FALSE(contains(r.out, "constraints hold")) << r.out;
  }
}

// --- outputs that are not regular files -------------------------------------------------------

const char* small_model = "* #variable= 3 #constraint= 1\n+1 x1 +1 x2 +1 x3 <= 1 ;\n";

TEST_F(safety, DeviceNodeTargetIsWrittenNotReplaced) {
  if (::geteuid() != 0) GTEST_SKIP() << "making a device node needs root";
  const fs::path model = write("m.opb", small_model);
  const fs::path device = file("null-device");
  ASSERT_EQ(::mknod(device.c_str(), S_IFCHR | 0666, ::makedev(1, 3)), 0) << std::strerror(errno);
  const run_result r = run("encode " + quote(model.string()) + " -o " + quote(device.string()));
  EXPECT_EQ(r.code, 0) << r.err;
  struct stat st {};
  ASSERT_EQ(::lstat(device.c_str(), &st), 0);
  EXPECT_TRUE(S_ISCHR(st.st_mode)) << "the device node was replaced";
  EXPECT_EQ(::major(st.st_rdev), 1U);
  EXPECT_EQ(::minor(st.st_rdev), 3U);
  EXPECT_TRUE(temporaries().empty());
}

TEST_F(safety, FifoTargetGetsTheWholeFormula) {
  const fs::path model = write("m.opb", small_model);
  const fs::path fifo = file("pipe.cnf");
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0644), 0);
  std::string received;
  std::thread reader([&] {
    std::ifstream in(fifo, std::ios::binary);
    std::stringstream s;
    s << in.rdbuf();
    received = s.str();
  });
  const run_result r = run("encode " + quote(model.string()) + " -o " + quote(fifo.string()));
  reader.join();
  EXPECT_EQ(r.code, 0) << r.err;
  struct stat st {};
  ASSERT_EQ(::lstat(fifo.c_str(), &st), 0);
  EXPECT_TRUE(S_ISFIFO(st.st_mode)) << "the FIFO was replaced";
  // The exact header (a FIFO cannot be patched) and the three pairwise
  // clauses of "at most one of three" (CaDiCaL finds 4 of the 8 assignments).
  EXPECT_EQ(received.rfind("p cnf 3 3\n", 0), 0U) << received;
  int variables = 0;
  EXPECT_FALSE(solve_cnf(received, variables).empty());
  EXPECT_TRUE(temporaries().empty());
}

TEST_F(safety, SymbolicLinkTargetIsFollowed) {
  const fs::path model = write("m.opb", small_model);
  write("real.cnf", "old\n");
  fs::create_symlink("real.cnf", file("link.cnf"));
  const run_result r = run("encode " + quote(model.string()) + " -o " + quote(file("link.cnf").string()));
  EXPECT_EQ(r.code, 0) << r.err;
  EXPECT_TRUE(fs::is_symlink(file("link.cnf"))) << "the link was replaced by a file";
  EXPECT_EQ(read_file(file("real.cnf")).rfind("p cnf 3 3 ", 0), 0U);
  // A dangling link: the file it names is created.
  fs::create_symlink("made.cnf", file("dangling.cnf"));
  const run_result d = run("encode " + quote(model.string()) + " -o " + quote(file("dangling.cnf").string()));
  EXPECT_EQ(d.code, 0) << d.err;
  EXPECT_TRUE(fs::is_symlink(file("dangling.cnf")));
  EXPECT_EQ(read_file(file("made.cnf")).rfind("p cnf 3 3 ", 0), 0U);
  EXPECT_TRUE(temporaries().empty());
}

TEST_F(safety, ExistingFileKeepsItsPermissions) {
  const fs::path model = write("m.opb", small_model);
  for (const mode_t mode : {mode_t{0600}, mode_t{0640}, mode_t{0604}}) {
    const fs::path out = write("out.cnf", "old\n");
    ASSERT_EQ(::chmod(out.c_str(), mode), 0);
    const run_result r = run("encode " + quote(model.string()) + " -o " + quote(out.string()));
    EXPECT_EQ(r.code, 0) << r.err;
    struct stat st {};
    ASSERT_EQ(::stat(out.c_str(), &st), 0);
    EXPECT_EQ(st.st_mode & 07777, mode);
    EXPECT_EQ(read_file(out).rfind("p cnf 3 3 ", 0), 0U);  // a patched header, padded
  }
}

TEST_F(safety, TheModelIsNeverItsOwnOutput) {
  const fs::path model = write("m.opb", small_model);
  fs::create_symlink("m.opb", file("link.opb"));
  fs::create_hard_link(model, file("hard.opb"));
  const std::string path = quote(model.string());
  for (const std::string& args :
       {"encode " + path + " -o " + path, "encode " + path + " -o " + quote(file("link.opb").string()),
        "encode " + path + " -o " + quote(file("hard.opb").string()),
        "encode " + quote(file("link.opb").string()) + " -o " + path}) {
    SCOPED_TRACE(args);
    const run_result r = run(args);
    EXPECT_EQ(r.code, 2) << r.err;
    EXPECT_TRUE(contains(r.err, "is the model file")) << r.err;
    EXPECT_EQ(read_file(model), small_model);
  }
  // Standard input redirected from the model file is the model file too.
  const run_result r = run("encode - -o " + path, model.string());
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_EQ(read_file(model), small_model);
  EXPECT_TRUE(temporaries().empty());
}

// --- standard output that fails -----------------------------------------------------------------

TEST_F(safety, FullStandardOutputIsAnError) {
  const fs::path model = write("m.opb", small_model);
  const fs::path answer = write("a.txt", "s SATISFIABLE\nv 1 -2 -3 0\n");
  const std::string m = quote(model.string());
  std::vector<std::string> commands{
      "stats " + m, "stats " + m + " --json", "methods", "methods --json", "decode " + m + " " + quote(answer.string()),
      "encode " + m};
#ifdef CLAUSEWRIGHT_TOOL_HAS_SOLVE
  commands.push_back("solve " + m);
  commands.push_back("solve " + m + " --json");
#endif
  for (const std::string& args : commands) {
    SCOPED_TRACE(args);
    const run_result r = run(args, "/dev/null", "/dev/full");
    EXPECT_EQ(r.code, 2) << r.err;
    // The system's message for ENOSPC, as strerror gives it.
    EXPECT_TRUE(contains(r.err, std::strerror(ENOSPC))) << r.err;
  }
}

// --- interruption and the file-size limit --------------------------------------------------

// One cardinality constraint over 4000 variables, forced to the sequential
// counter: about 8 million clauses, 345 MB of CNF, a few seconds of writing.
std::string large_model() {
  std::string opb = "* #variable= 4000 #constraint= 1\n";
  for (int v = 1; v <= 4000; ++v) opb += "+1 x" + std::to_string(v) + " ";
  return opb + "<= 2000 ;\n";
}

TEST_F(safety, SignalsRemoveTheTemporaryFile) {
  const fs::path model = write("big.opb", large_model());
  for (const int sig : {SIGINT, SIGTERM, SIGHUP}) {
    SCOPED_TRACE(::strsignal(sig));
    const fs::path out = write("out.cnf", "keep\n");
    const pid_t pid = start({"encode", model.string(), "--method", "sequential-counter", "-o", out.string()});
    ASSERT_GT(pid, 0);
    // Waits until the temporary exists and has some bytes.
    const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(60);
    bool seen = false;
    while (!seen && std::chrono::steady_clock::now() < deadline) {
      for (const auto& name : temporaries())
        if (fs::file_size(file(name)) > (1U << 20)) seen = true;
      if (!seen) std::this_thread::sleep_for(std::chrono::milliseconds(5));
    }
    ASSERT_TRUE(seen) << "no temporary output appeared";
    ASSERT_EQ(::kill(pid, sig), 0);
    const run_result r = wait_for(pid);
    EXPECT_EQ(r.signal, sig) << "ends by the signal's default action; exit " << r.code << " " << r.err;
    EXPECT_TRUE(temporaries().empty()) << temporaries().front();
    EXPECT_EQ(read_file(out), "keep\n") << "the target is untouched";
  }
}

TEST_F(safety, FileSizeLimitIsAnErrorAndRemovesTheTemporary) {
  const fs::path model = write("big.opb", large_model());
  const fs::path out = write("out.cnf", "keep\n");
  const pid_t pid =
      start({"encode", model.string(), "--method", "sequential-counter", "-o", out.string()}, rlim_t{8} << 20);
  ASSERT_GT(pid, 0);
  const run_result r = wait_for(pid);
  EXPECT_EQ(r.signal, 0) << "killed by " << ::strsignal(r.signal);
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_TRUE(contains(r.err, std::strerror(EFBIG))) << r.err;
  EXPECT_TRUE(temporaries().empty());
  EXPECT_EQ(read_file(out), "keep\n");
}

// --- input -------------------------------------------------------------------------------------

TEST_F(safety, BudgetMustBeAPositiveIntegerWithinTheMaximum) {
  const fs::path model = write("m.opb", small_model);
  const std::string m = quote(model.string());
  for (const std::string command : {"encode", "stats"}) {
    for (const std::string value : {"-1", "0", "99999999999999999999999", "1000000000000001", "12x", "''", "1e6"}) {
      SCOPED_TRACE(command + " --budget " + value);
      const run_result r = run(command + " " + m + " --budget " + value);
      EXPECT_EQ(r.code, 2) << r.out << r.err;
      EXPECT_TRUE(contains(r.err, "expected a clause budget from 1 to 1000000000000000")) << r.err;
    }
    // The smallest budget is accepted as a value (encode then finds every
    // method over it: an error of its own, not a usage error).
    for (const std::string value : {"1000", "1000000000000000"}) {
      SCOPED_TRACE(command + " --budget " + value);
      EXPECT_EQ(run(command + " " + m + " --budget " + value).code, 0);
    }
  }
}

TEST_F(safety, RepeatedJsonKeysAreRejectedWhereTheSecondIs) {
  struct sample {
    std::string text;
    std::string at;  // file:line:column of the second key
    std::string key;
  };
  const std::vector<sample> samples{
      {"{\"constraints\": [],\n \"constraints\": [{\"type\": \"clause\", \"literals\": [\"a\"]}]}", "2:2",
       "constraints"},
      {"{\"constraints\": [{\"type\": \"at-most\", \"literals\": [\"a\", \"b\"], \"k\": 1,\n   \"k\": 2}]}", "2:4",
       "k"},
      {"{\"constraints\": [\n  {\"type\": \"at-most\", \"type\": \"at-least\", \"literals\": [\"a\"], \"k\": 1}]}",
       "2:23", "type"},
      // The same key spelt with an escape.
      {"{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"a\"], \"\\u0074ype\": \"clause\"}]}", "1:56",
       "type"},
      {"{\"variables\": [\"a\"], \"objective\": [[1, \"a\"]], \"objective\": [[2, \"a\"]], \"constraints\": []}",
       "1:47", "objective"},
  };
  for (const auto& s : samples) {
    SCOPED_TRACE(s.text);
    const fs::path p = write("m.json", s.text);
    const run_result r = run("encode " + quote(p.string()));
    EXPECT_EQ(r.code, 2) << r.out;
    EXPECT_TRUE(contains(r.err, "m.json:" + s.at + ":")) << r.err;
    EXPECT_TRUE(contains(r.err, "\"" + s.key + "\" appears twice")) << r.err;
  }
  // The same key in two different objects is no repeat.
  const fs::path ok = write("ok.json",
                            "{\"constraints\": [{\"type\": \"clause\", \"literals\": [\"a\"]}, {\"type\": \"clause\", "
                            "\"literals\": [\"b\"]}]}");
  EXPECT_EQ(run("encode " + quote(ok.string())).code, 0);
}

TEST_F(safety, ByteOrderMarkIsSkipped) {
  const std::string bom = "\xEF\xBB\xBF";
  const std::string json = R"({"constraints": [{"type": "at-most-one", "literals": ["a", "b", "c"]}]})";
  const std::string expected = run("encode " + quote(write("plain.json", json).string())).out;
  ASSERT_EQ(expected.rfind("p cnf 3 3\n", 0), 0U) << expected;
  // By content (no .json extension), by extension, and on standard input.
  const fs::path no_extension = write("model", bom + json);
  EXPECT_EQ(run("encode " + quote(no_extension.string())).out, expected);
  EXPECT_EQ(run("encode " + quote(write("m.json", bom + json).string())).out, expected);
  EXPECT_EQ(run("encode -", no_extension.string()).out, expected);
  // OPB, and a position after the mark is counted from the first character.
  const run_result opb = run("encode " + quote(write("m.opb", bom + small_model).string()));
  EXPECT_EQ(opb.code, 0) << opb.err;
  EXPECT_EQ(opb.out.rfind("p cnf 3 3\n", 0), 0U) << opb.out;
  const run_result broken = run("encode " + quote(write("b.opb", bom + "+1 x1 +1 x2 <= ;\n").string()));
  EXPECT_EQ(broken.code, 2);
  EXPECT_TRUE(contains(broken.err, "b.opb:1:16:")) << broken.err;
  const run_result bad_json = run("encode " + quote(write("b.json", bom + "{\"constraints\": 3}").string()));
  EXPECT_EQ(bad_json.code, 2);
  EXPECT_TRUE(contains(bad_json.err, "b.json:1:17:")) << bad_json.err;
}

TEST_F(safety, PipesAndFifosAreModelPaths) {
  const fs::path model = write("m.opb", small_model);
  const std::string expected = run("encode " + quote(model.string())).out;
  ASSERT_EQ(expected.rfind("p cnf 3 3\n", 0), 0U);
  // A pipe given as a path: bash's process substitution.
  const std::string command = "bash -c " + quote(quote(tool) + " encode <(cat " + quote(model.string()) + ") >" +
                                                 quote(file("out.cnf").string()) + " 2>" + quote(file("err").string()));
  const int status = std::system(command.c_str());
  ASSERT_TRUE(WIFEXITED(status));
  EXPECT_EQ(WEXITSTATUS(status), 0) << read_file(file("err"));
  EXPECT_EQ(read_file(file("out.cnf")), expected);
  // A FIFO, also for the answer of decode.
  const fs::path fifo = file("model.fifo");
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0644), 0);
  std::thread writer([&] { write_file(fifo, small_model); });
  const run_result r = run("encode " + quote(fifo.string()));
  writer.join();
  EXPECT_EQ(r.code, 0) << r.err;
  EXPECT_EQ(r.out, expected);
  const fs::path answer_fifo = file("answer.fifo");
  ASSERT_EQ(::mkfifo(answer_fifo.c_str(), 0644), 0);
  std::thread answer_writer([&] { write_file(answer_fifo, "s SATISFIABLE\nv -1 2 -3 0\n"); });
  const run_result d = run("decode " + quote(model.string()) + " " + quote(answer_fifo.string()));
  answer_writer.join();
  EXPECT_EQ(d.code, 0) << d.err;
  EXPECT_TRUE(contains(d.out, "x2 = 1")) << d.out;
}

// --- exit codes ----------------------------------------------------------------------------------

// Help text as one line: the help is wrapped to the terminal, so a phrase
// may continue on the next (indented) line.
std::string unwrapped(const std::string& text) {
  std::string out;
  for (const char c : text) {
    const bool space = c == ' ' || c == '\n';
    if (space && !out.empty() && out.back() == ' ') continue;
    out += space ? ' ' : c;
  }
  return out;
}

TEST_F(safety, ExitCodesAreDocumented) {
  const run_result help = run("--help");
  EXPECT_EQ(help.code, 0);
  for (const std::string part :
       {"0 success", "1 a negative answer", "2 bad input", "3 no answer", "4 a solution not proved optimal"})
    EXPECT_TRUE(contains(unwrapped(help.out), part)) << part << "\n" << help.out;
  EXPECT_TRUE(contains(unwrapped(run("decode --help").out), "3 the answer is UNKNOWN"));
  // Wrapped: no help line of any command passes 100 columns (CLI11 2.1
  // would print each description on one line).
  for (const std::string command : {"", "encode", "stats", "solve", "decode", "report", "methods"}) {
    std::istringstream lines(run(command + " --help").out);
    for (std::string line; std::getline(lines, line);) EXPECT_LE(line.size(), 100U) << command << ": " << line;
  }
}

#ifdef CLAUSEWRIGHT_TOOL_HAS_SOLVE
TEST_F(safety, SolveWithoutAnAnswerInTheTimeLimitExitsThree) {
  const fs::path model = write("m.opb", small_model);
  const run_result none = run("solve " + quote(model.string()) + " --time-limit 0");
  EXPECT_EQ(none.code, 3) << none.out << none.err;
  EXPECT_TRUE(contains(none.out, "status unknown")) << none.out;
  // Without a limit the same model is satisfiable: exit 0.
  const run_result sat = run("solve " + quote(model.string()));
  EXPECT_EQ(sat.code, 0) << sat.err;
  EXPECT_TRUE(contains(sat.out, "status satisfiable")) << sat.out;
  EXPECT_TRUE(contains(run("solve --help").out, "4 satisfiable, not proved optimal"));
}
#endif

}  // namespace
