// clausewright report: the HTML page, checked in a real browser.
//
// Independent references: headless Chromium (/usr/bin/chromium, installed by
// scripts/install-deps.sh) parses the page, runs its script and draws it; its
// screenshot is decoded here (PNG by the specification: zlib streams, the
// five row filters) and its pixels counted; its console log shows script
// errors (a page with a deliberate error proves that check can fail). The
// numbers on the page must equal those `clausewright stats --json` prints for
// the same model; the grouping of a bin-packing model written here is known
// from its construction (one shape for the items, one for the bins); the
// model's size comes from the file system.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>
#include <zlib.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <random>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <tuple>
#include <vector>

#include "tool_run.hpp"

namespace fs = std::filesystem;
using json = nlohmann::json;

namespace {

using tool_run::run_result;
using tool_run::read_file;
using tool_run::write_file;
using tool_run::quote;

const std::string tool = CLAUSEWRIGHT_TOOL_PATH;
const fs::path examples = CLAUSEWRIGHT_EXAMPLES_DIR;
const std::string chromium = "/usr/bin/chromium";

// Budget of the dry runs in these tests: small enough that the 3000-item
// model is measured in seconds, large enough that most methods fit.
const std::string stats_budget = "--budget 1000000";
const std::string report_budget = stats_budget + " --curve-budget 200000";

// --- PNG ------------------------------------------------------------------------------

struct image {
  std::uint32_t width = 0;
  std::uint32_t height = 0;
  std::vector<std::uint32_t> pixels;  // 0xRRGGBB
};

std::uint32_t be32(const std::string& s, std::size_t at) {
  return (static_cast<std::uint32_t>(static_cast<unsigned char>(s[at])) << 24U) |
         (static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 1])) << 16U) |
         (static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 2])) << 8U) |
         static_cast<std::uint32_t>(static_cast<unsigned char>(s[at + 3]));
}

// Decodes 8-bit RGB or RGBA, not interlaced (what Chromium writes); throws
// on anything else.
image decode_png(const std::string& png) {
  if (png.size() < 8 || png.compare(0, 8, "\x89PNG\r\n\x1a\n") != 0) throw std::runtime_error("not a PNG file");
  image img;
  int channels = 0;
  std::string compressed;
  for (std::size_t at = 8; at + 12 <= png.size();) {
    const std::uint32_t length = be32(png, at);
    const std::string type = png.substr(at + 4, 4);
    if (at + 12 + length > png.size()) throw std::runtime_error("truncated chunk " + type);
    const std::string body = png.substr(at + 8, length);
    if (type == "IHDR") {
      img.width = be32(body, 0);
      img.height = be32(body, 4);
      const int depth = static_cast<unsigned char>(body[8]);
      const int colour = static_cast<unsigned char>(body[9]);
      const int interlace = static_cast<unsigned char>(body[12]);
      if (depth != 8 || interlace != 0 || (colour != 2 && colour != 6))
        throw std::runtime_error("unsupported PNG: depth " + std::to_string(depth) + ", colour type " +
                                 std::to_string(colour));
      channels = colour == 6 ? 4 : 3;
    } else if (type == "IDAT") {
      compressed += body;
    } else if (type == "IEND") {
      break;
    }
    at += 12 + length;
  }
  if (channels == 0) throw std::runtime_error("no IHDR chunk");
  const std::size_t stride = static_cast<std::size_t>(img.width) * static_cast<std::size_t>(channels);
  std::vector<unsigned char> raw((stride + 1) * img.height);
  uLongf raw_size = raw.size();
  if (uncompress(raw.data(), &raw_size, reinterpret_cast<const Bytef*>(compressed.data()), compressed.size()) != Z_OK ||
      raw_size != raw.size())
    throw std::runtime_error("the image data does not inflate to its size");
  std::vector<unsigned char> previous(stride, 0);
  std::vector<unsigned char> row(stride);
  const auto bpp = static_cast<std::size_t>(channels);
  img.pixels.reserve(static_cast<std::size_t>(img.width) * img.height);
  for (std::size_t y = 0; y < img.height; ++y) {
    const unsigned char filter = raw[y * (stride + 1)];
    const unsigned char* in = &raw[y * (stride + 1) + 1];
    for (std::size_t x = 0; x < stride; ++x) {
      const int a = x >= bpp ? row[x - bpp] : 0;
      const int b = previous[x];
      const int c = x >= bpp ? previous[x - bpp] : 0;
      int predicted = 0;
      switch (filter) {
        case 0:
          predicted = 0;
          break;
        case 1:
          predicted = a;
          break;
        case 2:
          predicted = b;
          break;
        case 3:
          predicted = (a + b) / 2;
          break;
        case 4: {
          const int p = a + b - c;
          const int pa = std::abs(p - a);
          const int pb = std::abs(p - b);
          const int pc = std::abs(p - c);
          predicted = (pa <= pb && pa <= pc) ? a : (pb <= pc ? b : c);
          break;
        }
        default:
          throw std::runtime_error("bad row filter " + std::to_string(filter));
      }
      row[x] = static_cast<unsigned char>((in[x] + predicted) & 0xff);
    }
    for (std::size_t x = 0; x < img.width; ++x)
      img.pixels.push_back((static_cast<std::uint32_t>(row[x * bpp]) << 16U) |
                           (static_cast<std::uint32_t>(row[x * bpp + 1]) << 8U) | row[x * bpp + 2]);
    previous = row;
  }
  return img;
}

std::uint32_t parse_color(const std::string& hex) {
  return static_cast<std::uint32_t>(std::stoul(hex.substr(1), nullptr, 16));
}

// --- the fixture --------------------------------------------------------------------------

class report : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() / ("clausewright-report-" + std::to_string(::getpid()) + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  void TearDown() override {
    if (!HasFailure()) fs::remove_all(dir_);
  }

  [[nodiscard]] fs::path file(const std::string& name) const { return dir_ / name; }

  run_result shell(const std::string& command) const {
    const fs::path out = dir_ / ".stdout";
    const fs::path err = dir_ / ".stderr";
    const int status = std::system((command + " >" + quote(out) + " 2>" + quote(err) + " </dev/null").c_str());
    run_result r;
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = read_file(out);
    r.err = read_file(err);
    return r;
  }
  run_result run(const std::string& args) const { return shell(quote(tool) + " " + args); }

  // Chromium headless on `page` with the given action (--dump-dom or
  // --screenshot=...); a fresh profile, no network activity of its own.
  run_result browse(const fs::path& page, const std::string& action) const {
    const fs::path profile = dir_ / (".profile-" + std::to_string(++profiles_));
    fs::create_directories(profile);
    const std::string command = quote(chromium) +
                                " --headless --no-sandbox --disable-gpu --disable-quic --no-first-run"
                                " --disable-background-networking --disable-component-update --disable-sync"
                                " --hide-scrollbars --enable-logging=stderr --v=0 --window-size=1200,1600"
                                " --user-data-dir=" +
                                quote(profile.string()) + " " + action + " " + quote("file://" + page.string());
    return shell(command);
  }

  fs::path dir_;
  mutable int profiles_ = 0;
};

// The page data block.
json page_data(const std::string& html) {
  const std::string open = "<script type=\"application/json\" id=\"report-data\">";
  const std::size_t start = html.find(open);
  if (start == std::string::npos) throw std::runtime_error("no report-data block");
  const std::size_t end = html.find("</script>", start);
  return json::parse(html.substr(start + open.size(), end - start - open.size()));
}

bool trivial_kind(const std::string& kind) { return kind == "clause" || kind == "true" || kind == "false"; }

// The page's numbers against the statistics of the same model.
void expect_same_numbers(const json& data, const json& stats, const fs::path& model) {
  const json& constraints = stats["constraints"];
  EXPECT_EQ(data["constraints"], constraints.size());
  EXPECT_EQ(data["model_bytes"], fs::file_size(model));

  // Methods shown: those that encode some constraint beyond a single clause.
  std::set<std::string> applying;
  for (const json& c : constraints) {
    if (!trivial_kind(c["kind"])) {
      for (const json& m : c["methods"]) applying.insert(m["name"]);
    }
  }
  // The bytes of the CNF output past its header, as stats counts them
  // (test_cli_stats checks those against encode's files).
  const bool picked_bytes_known = stats["totals"]["picked"]["cnf"]["bytes"].is_number();
  const std::uint64_t picked_bytes =
      picked_bytes_known ? stats["totals"]["picked"]["cnf"]["bytes"].get<std::uint64_t>() : 0;
  std::set<std::string> shown;
  for (const json& m : data["methods"]) shown.insert(m["name"]);
  EXPECT_EQ(shown, applying);

  // Totals: the picked encoding and each method alone.
  const json& totals = data["totals"];
  ASSERT_EQ(totals.size(), applying.size() + 1);
  EXPECT_EQ(totals[0]["name"], "picked");
  for (const char* field : {"clauses", "vars", "literals", "cnf", "wcnf", "over_budget"})
    EXPECT_EQ(totals[0][field], stats["totals"]["picked"][field]) << field;
  if (picked_bytes_known) {
    EXPECT_EQ(totals[0]["dimacs_bytes"], picked_bytes);
    EXPECT_NEAR(totals[0]["blowup_bytes"].get<double>(),
                static_cast<double>(picked_bytes) / static_cast<double>(fs::file_size(model)), 1e-9);
  } else {  // a method was stopped: no exact size
    EXPECT_TRUE(totals[0]["dimacs_bytes"].is_null());
    EXPECT_TRUE(totals[0]["blowup_bytes"].is_null());
  }
  for (std::size_t i = 1; i < totals.size(); ++i) {
    const json* by = nullptr;
    for (const json& t : stats["totals"]["by_method"])
      if (t["name"] == totals[i]["name"]) by = &t;
    ASSERT_NE(by, nullptr) << totals[i]["name"];
    for (const char* field : {"clauses", "vars", "literals", "cnf", "wcnf", "over_budget", "fallbacks"})
      EXPECT_EQ(totals[i][field], (*by)[field]) << totals[i]["name"] << " " << field;
  }

  // Groups: a refinement of (kind, relation, bound, inputs, soft) that
  // covers every constraint once, with the same sums per method and pick.
  using key = std::tuple<std::string, std::string, std::int64_t, std::uint64_t, bool>;
  std::map<key, std::map<std::string, std::uint64_t>> from_stats;
  std::map<key, std::map<std::string, std::uint64_t>> from_page;
  for (const json& c : constraints) {
    auto& sums = from_stats[{c["kind"], c["relation"], c["bound"], c["inputs"], c["soft"]}];
    ++sums["#count"];
    for (const json& m : c["methods"]) {
      sums[m["name"].get<std::string>() + " clauses"] += m["clauses"].get<std::uint64_t>();
      sums[m["name"].get<std::string>() + " vars"] += m["vars"].get<std::uint64_t>();
    }
    if (c["picked"].is_string()) ++sums["pick " + c["picked"].get<std::string>()];
  }
  ASSERT_EQ(data["groups_omitted"], 0);
  for (const json& g : data["groups"]) {
    auto& sums = from_page[{g["kind"], g["relation"], g["bound"], g["inputs"], g["soft"]}];
    sums["#count"] += g["count"].get<std::uint64_t>();
    for (const json& m : g["methods"]) {
      sums[m["name"].get<std::string>() + " clauses"] += m["clauses"].get<std::uint64_t>();
      sums[m["name"].get<std::string>() + " vars"] += m["vars"].get<std::uint64_t>();
    }
    for (const auto& [name, count] : g["picks"].items()) sums["pick " + name] += count.get<std::uint64_t>();
  }
  EXPECT_EQ(from_page, from_stats);
}

// The rendered total rows (data attributes in the DOM after load).
std::map<std::string, std::pair<std::uint64_t, std::uint64_t>> rendered_totals(const std::string& dom) {
  std::map<std::string, std::pair<std::uint64_t, std::uint64_t>> out;
  const std::regex row(
      R"re(<g class="total" data-method="([^"]+)" data-total-clauses="(\d+)" data-total-vars="(\d+)")re");
  for (auto it = std::sregex_iterator(dom.begin(), dom.end(), row); it != std::sregex_iterator(); ++it)
    out[(*it)[1]] = {std::stoull((*it)[2]), std::stoull((*it)[3])};
  return out;
}

// Nothing on the page is fetched: no external resource can be named.
void expect_self_contained(const std::string& html) {
  EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0U);
  for (const char* banned : {"<link", " src=", "href=", "@import", "url(http", "<iframe", "<img"})
    EXPECT_EQ(html.find(banned), std::string::npos) << banned;
  // The one URL is the SVG namespace name, which is never fetched.
  std::size_t at = 0;
  while ((at = html.find("://", at)) != std::string::npos) {
    EXPECT_TRUE(at >= 4 && html.compare(at - 4, 26, "http://www.w3.org/2000/svg") == 0)
        << html.substr(at < 10 ? 0 : at - 10, 60);
    at += 3;
  }
}

// Loads the page in Chromium: its script ran (the marker it sets), no script
// error in the console log; returns the DOM after load.
std::string expect_runs_cleanly(const run_result& dom) {
  EXPECT_EQ(dom.code, 0) << dom.err;
  EXPECT_EQ(dom.err.find("Uncaught"), std::string::npos) << dom.err;
  EXPECT_NE(dom.out.find("data-script=\"ran\""), std::string::npos);
  return dom.out;
}

// The screenshot is a drawn page: many colours, a good part not background,
// and the methods' colours in the charts.
void expect_drawn(const fs::path& png, const json& data, std::size_t min_methods_seen) {
  const image img = decode_png(read_file(png));
  ASSERT_EQ(img.width, 1200U);
  ASSERT_EQ(img.height, 1600U);
  std::map<std::uint32_t, std::uint64_t> histogram;
  for (const std::uint32_t p : img.pixels) ++histogram[p];
  std::uint64_t background = 0;
  for (const auto& [colour, count] : histogram) background = std::max(background, count);
  const double drawn = 1.0 - static_cast<double>(background) / static_cast<double>(img.pixels.size());
  EXPECT_GT(histogram.size(), 300U) << "distinct colours";
  EXPECT_GT(drawn, 0.12) << "fraction of pixels that are not background";
  std::size_t seen = 0;
  for (const json& m : data["methods"]) {
    const auto it = histogram.find(parse_color(m["color"]));
    if (it != histogram.end() && it->second >= 150) ++seen;
  }
  EXPECT_GE(seen, min_methods_seen) << "methods whose colour fills at least 150 pixels";
}

// A bin packing of our own: `items` items of weight 1..40 (fixed seed) into
// `bins` bins of one capacity; x(i,b) = i*bins + b + 1, y(b) after them.
std::string bin_packing(int items, int bins) {
  std::mt19937_64 rng(20261202);
  std::uniform_int_distribution<int> weight(1, 40);
  std::vector<int> w(static_cast<std::size_t>(items));
  long total = 0;
  for (auto& x : w) total += x = weight(rng);
  const long capacity = total / bins + 40;
  // Appended piece by piece: g++ 12 warns falsely (-Wrestrict) on chains of
  // std::string operator+.
  std::ostringstream s;
  s << "* #variable= " << items * bins + bins << " #constraint= " << items + bins << "\nmin:";
  for (int b = 0; b < bins; ++b) s << " +1 x" << items * bins + b + 1;
  s << " ;\n";
  for (int i = 0; i < items; ++i) {
    for (int b = 0; b < bins; ++b) s << "+1 x" << i * bins + b + 1 << ' ';
    s << "= 1 ;\n";
  }
  for (int b = 0; b < bins; ++b) {
    s << '+' << capacity << " x" << items * bins + b + 1;
    for (int i = 0; i < items; ++i) s << " -" << w[static_cast<std::size_t>(i)] << " x" << i * bins + b + 1;
    s << " >= 0 ;\n";
  }
  return s.str();
}

TEST(report_browser, chromium_is_installed) {
  // scripts/install-deps.sh installs it; without it nothing here is checked.
  ASSERT_TRUE(fs::exists(chromium)) << chromium << " is missing: run scripts/install-deps.sh";
}

TEST_F(report, browser_check_catches_script_errors) {
  // The checks below rest on Chromium reporting errors: a page whose script
  // fails must be caught by them.
  const fs::path page = file("broken.html");
  write_file(page,
             "<!DOCTYPE html><html><body><span id=\"s\"></span><script>"
             "document.getElementById('s').setAttribute('data-script', 'ran'); no_such_function();"
             "</script></body></html>");
  const run_result dom = browse(page, "--dump-dom");
  ASSERT_EQ(dom.code, 0) << dom.err;
  EXPECT_NE(dom.err.find("Uncaught ReferenceError"), std::string::npos) << dom.err;
}

TEST_F(report, bundled_models_show_the_numbers_of_stats) {
  for (const char* name : {"demo.json", "knapsack.json", "bin_packing.json", "staff_rota.json"}) {
    SCOPED_TRACE(name);
    const fs::path model = examples / "models" / name;
    const fs::path page = file(std::string(name) + ".html");
    const run_result stats = run("stats --json " + stats_budget + " " + quote(model.string()));
    ASSERT_EQ(stats.code, 0) << stats.err;
    const run_result made =
        run("report " + report_budget + " " + quote(model.string()) + " -o " + quote(page.string()));
    ASSERT_EQ(made.code, 0) << made.err;
    EXPECT_EQ(made.out, "");
    const std::string html = read_file(page);
    expect_self_contained(html);
    const json data = page_data(html);
    expect_same_numbers(data, json::parse(stats.out), model);
    EXPECT_FALSE(data["curves"].empty());
  }
  // One of them in the browser, drawn.
  const fs::path page = file("demo.json.html");
  const json data = page_data(read_file(page));
  const std::string dom = expect_runs_cleanly(browse(page, "--dump-dom"));
  const auto totals = rendered_totals(dom);
  ASSERT_EQ(totals.size(), data["totals"].size());
  for (const json& t : data["totals"])
    EXPECT_EQ(totals.at(t["name"]), std::make_pair(t["clauses"].get<std::uint64_t>(), t["vars"].get<std::uint64_t>()));
  const run_result shot = browse(page, "--screenshot=" + quote(file("demo.png").string()));
  ASSERT_EQ(shot.code, 0) << shot.err;
  expect_drawn(file("demo.png"), data, 10);
}

TEST_F(report, bin_packing_of_3000_items_is_grouped_by_shape) {
  const fs::path model = file("bins.opb");
  write_file(model, bin_packing(3000, 12));
  const fs::path page = file("bins.html");
  const run_result stats = run("stats --json " + stats_budget + " " + quote(model.string()));
  ASSERT_EQ(stats.code, 0) << stats.err;
  const run_result made = run("report " + report_budget + " " + quote(model.string()) + " -o " + quote(page.string()));
  ASSERT_EQ(made.code, 0) << made.err;
  const std::string html = read_file(page);
  expect_self_contained(html);
  EXPECT_LT(html.size(), 400U * 1024) << "the page lists groups, not 3012 constraints";
  const json data = page_data(html);
  const json st = json::parse(stats.out);
  expect_same_numbers(data, st, model);

  // By construction: the 3000 item constraints share one shape (exactly one
  // of 12), the 12 capacities another (the same weights in every bin).
  ASSERT_EQ(data["groups"].size(), 2U);
  std::map<std::string, const json*> by_kind;
  for (const json& g : data["groups"]) by_kind[g["kind"]] = &g;
  ASSERT_TRUE(by_kind.contains("exactly-one"));
  ASSERT_TRUE(by_kind.contains("linear"));
  EXPECT_EQ((*by_kind["exactly-one"])["count"], 3000);
  EXPECT_EQ((*by_kind["exactly-one"])["inputs"], 12);
  EXPECT_EQ((*by_kind["linear"])["count"], 12);
  EXPECT_EQ((*by_kind["linear"])["inputs"], 3001);

  // The growth curves at the model's own size are the library's dry runs of
  // the group's first constraint: for hard constraints within the budget
  // they equal the measurement of stats.
  ASSERT_FALSE(data["curves"].empty());
  std::size_t compared = 0;
  for (const json& c : data["curves"]) {
    const json* group = nullptr;
    for (const json& g : data["groups"])
      if (g["id"] == c["group"]) group = &g;
    ASSERT_NE(group, nullptr);
    for (const json& s : c["series"]) {
      for (const json& p : s["points"]) {
        if (p[0] != c["own"]) continue;
        for (const json& m : (*group)["methods"]) {
          if (m["name"] != s["method"] || m["over_budget"] != 0 || m["clauses_min"] != m["clauses_max"]) continue;
          EXPECT_EQ(p[1], m["clauses_min"]) << s["method"];
          EXPECT_EQ(p[2], m["vars_min"]) << s["method"];
          ++compared;
        }
      }
      // Each point of a curve is under the curve budget; a cut curve ends
      // before the point where it was cut.
      for (const json& p : s["points"]) EXPECT_LE(p[1].get<std::uint64_t>(), data["curve_budget"].get<std::uint64_t>());
      if (s["cut_at"].is_number() && !s["points"].empty()) {
        EXPECT_LT(s["points"].back()[0].get<std::int64_t>(), s["cut_at"].get<std::int64_t>());
      }
    }
  }
  EXPECT_GE(compared, 10U);

  // In the browser: the script ran, the rendered numbers are stats', and
  // the page is drawn with the methods' colours.
  const std::string dom = expect_runs_cleanly(browse(page, "--dump-dom"));
  EXPECT_NE(dom.find("data-rows=\"2\""), std::string::npos);
  const auto totals = rendered_totals(dom);
  EXPECT_EQ(totals.at("picked"), std::make_pair(st["totals"]["picked"]["clauses"].get<std::uint64_t>(),
                                                st["totals"]["picked"]["vars"].get<std::uint64_t>()));
  for (const json& t : st["totals"]["by_method"])
    if (totals.contains(t["name"])) {
      EXPECT_EQ(totals.at(t["name"]),
                std::make_pair(t["clauses"].get<std::uint64_t>(), t["vars"].get<std::uint64_t>()));
    }
  EXPECT_EQ(totals.size(), data["totals"].size());
  const std::regex group_row(R"re(<tr data-group="\d+" data-count="(\d+)")re");
  std::multiset<std::uint64_t> counts;
  for (auto it = std::sregex_iterator(dom.begin(), dom.end(), group_row); it != std::sregex_iterator(); ++it)
    counts.insert(std::stoull((*it)[1]));
  EXPECT_EQ(counts, (std::multiset<std::uint64_t>{12, 3000}));
  const run_result shot = browse(page, "--screenshot=" + quote(file("bins.png").string()));
  ASSERT_EQ(shot.code, 0) << shot.err;
  expect_drawn(file("bins.png"), data, 12);
}

TEST_F(report, model_strings_are_escaped) {
  const std::string nasty = R"(</script><img src=x onerror=\"document.title='owned'\"> & 'q' <b id=\"injected\">)";
  const fs::path model = file("nasty.json");
  write_file(model, R"({"format": "clausewright-model", "version": 1, "constraints": [
    {"type": "at-most", "name": ")" +
                        nasty + R"(", "literals": ["a", "b", "c", "d"], "k": 2},
    {"type": "exactly-one", "name": "plain", "literals": ["a", "b", "c"]}]})");
  const fs::path page = file("nasty.html");
  const run_result made = run("report " + quote(model.string()) + " -o " + quote(page.string()));
  ASSERT_EQ(made.code, 0) << made.err;
  // (Its name names a src attribute in text, so expect_self_contained does
  // not apply; the browser checks below show nothing was made of it.)
  const std::string html = read_file(page);
  EXPECT_EQ(html.find("<b id"), std::string::npos);
  const json data = page_data(html);
  bool found = false;
  for (const json& g : data["groups"])
    for (const json& e : g["examples"])
      found = found || e == R"(</script><img src=x onerror="document.title='owned'"> & 'q' <b id="injected">)";
  EXPECT_TRUE(found) << "the name comes back intact from the data block";
  const std::string dom = expect_runs_cleanly(browse(page, "--dump-dom"));
  // (Text keeps its quotes when serialised; an element would start with "<".)
  EXPECT_EQ(dom.find("<b id="), std::string::npos);
  EXPECT_EQ(dom.find("<img"), std::string::npos);
  EXPECT_EQ(dom.find("owned</title>"), std::string::npos);
}

TEST_F(report, a_failed_report_leaves_no_file) {
  const fs::path good = examples / "models" / "knapsack.json";
  // The directory of the output does not exist.
  const fs::path missing = file("no-such-dir") / "page.html";
  const run_result r1 = run("report " + quote(good.string()) + " -o " + quote(missing.string()));
  EXPECT_EQ(r1.code, 2);
  EXPECT_FALSE(fs::exists(missing.parent_path()));
  // A bad model: the existing page stays as it was, no temporary is left.
  const fs::path bad = file("bad.opb");
  write_file(bad, "* #variable= 2 #constraint= 1\n+1 x1 +1 x2 >= 1\n+1 x1 +q x2 >= 1 ;\n");
  const fs::path page = file("page.html");
  write_file(page, "the old page");
  const run_result r2 = run("report " + quote(bad.string()) + " -o " + quote(page.string()));
  EXPECT_EQ(r2.code, 2);
  EXPECT_NE(r2.err.find("bad.opb:"), std::string::npos) << r2.err;
  EXPECT_EQ(read_file(page), "the old page");
  std::vector<std::string> files;
  for (const auto& e : fs::directory_iterator(dir_))
    if (e.path().filename().string()[0] != '.') files.push_back(e.path().filename().string());
  std::sort(files.begin(), files.end());
  EXPECT_EQ(files, (std::vector<std::string>{"bad.opb", "page.html"}));
  // The output is required.
  const run_result r3 = run("report " + quote(good.string()));
  EXPECT_EQ(r3.code, 2);
}

}  // namespace
