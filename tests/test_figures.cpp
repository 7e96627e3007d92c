// The figure command turns result files into non-empty, valid SVG and PNG
// files. Validity is checked with outside references: the PNG signature of the
// PNG specification (ISO/IEC 15948), and Python's XML parser for the SVG.
#include <doctest/doctest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>
#include <algorithm>
#include <iterator>
#include <regex>

#include "io/figure_plot.hpp"
#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace gapwise::testing {

/// Asserts that `path` is a non-empty PNG (signature) or a well-formed SVG document.
inline void check_figure_file(const std::filesystem::path& path) {
  INFO(path.string());
  REQUIRE(std::filesystem::exists(path));
  CHECK(std::filesystem::file_size(path) > 1000);
  if (path.extension() == ".png") {
    std::ifstream f(path, std::ios::binary);
    unsigned char sig[8] = {};
    f.read(reinterpret_cast<char*>(sig), 8);
    const unsigned char expect[8] = {0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'};
    CHECK(std::equal(sig, sig + 8, expect));
  } else {
    const std::string cmd = "/usr/bin/python3 -c \"import sys, xml.etree.ElementTree as E; "
                            "r = E.parse(sys.argv[1]).getroot(); sys.exit(0 if r.tag.endswith('svg') else 1)\" '" +
                            path.string() + "'";
    CHECK(std::system(cmd.c_str()) == 0);
  }
}

/// Runs `gapwise figure` on `h5` and checks <stem>-<kind>.svg and .png for every kind.
inline void check_figures(const TempDir& dir, const std::string& h5, const std::vector<std::string>& kinds) {
  const auto figs = dir.path / "figs";
  auto f = run_gapwise("figure '" + h5 + "' --out-dir '" + figs.string() + "' --format svg,png", dir);
  INFO(f.err);
  REQUIRE(f.exit_code == 0);
  const std::string stem = std::filesystem::path(h5).stem().string();
  for (const auto& kind : kinds)
    for (const char* ext : {".svg", ".png"}) {
      const auto path = figs / (stem + "-" + kind + ext);
      CHECK(f.out.find(path.string()) != std::string::npos);  // named on stdout
      check_figure_file(path);
    }
}

/// Runs a study subcommand that writes `name`.h5 in `dir` and returns that path.
inline std::string run_study(const TempDir& dir, const std::string& args, const std::string& name) {
  const std::string h5 = (dir.path / (name + ".h5")).string();
  auto r = run_gapwise(args + " --out '" + h5 + "'", dir);
  INFO(args);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  return h5;
}

}  // namespace gapwise::testing

namespace {
std::string src(const std::string& rel) { return "'" + (source_dir() / rel).string() + "'"; }
}  // namespace

using gapwise::testing::check_figures;
using gapwise::testing::run_study;

// One test per result kind that `figure` accepts: each gives every figure of its
// kind as a valid SVG and PNG.
TEST_CASE("figure: anneal results give the trace figure") {
  TempDir dir;
  const auto h5 = run_study(dir, "anneal " + src("data-samples/triangle.toml") + " " + src("schedules/pause.toml") +
                                     " -d 5 --no-check", "run");
  check_figures(dir, h5, {"anneal-trace"});
}

TEST_CASE("figure: gap results give the spectrum and gap figures") {
  TempDir dir;
  const auto h5 = run_study(dir, "gap " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                                     " --points 31", "gap");
  check_figures(dir, h5, {"spectrum", "gap"});
}

TEST_CASE("figure: durations results give the probability and time-to-solution figures") {
  TempDir dir;
  const auto h5 = run_study(dir, "durations " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                                     " -d log:1:30:4 --no-search --quiet", "dur");
  check_figures(dir, h5, {"probability", "tts"});
}

TEST_CASE("figure: pause-map and reverse-map results give heat maps") {
  TempDir dir;
  const auto pm = run_study(dir, "pause-map " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                                     " -d 2 --at 0.3,0.6 --pause-ns 0,0.5,1.5", "pm");
  check_figures(dir, pm, {"pause-map"});
  const auto rm = run_study(dir, "reverse-map " + src("data-samples/meeting-slots-qubo.toml") + " " +
                                     src("schedules/reverse-dwell.toml") + " --turn 0.4,0.7 --dwell-ns 0,5", "rm");
  check_figures(dir, rm, {"reverse-map"});
}

TEST_CASE("figure: compare-paths results give one population figure per path and duration") {
  TempDir dir;
  const auto h5 = run_study(dir, "compare-paths " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                                     " --pause 0.5:0.2 -d 2,4", "cmp");
  check_figures(dir, h5, {"populations-linear-toml-0", "populations-linear-toml-1", "populations-pause-s-0-5-for-20--0",
                          "populations-pause-s-0-5-for-20--1"});
}

TEST_CASE("figure: embed-cost results give p, duration needed and minimum gap against chain strength") {
  TempDir dir;
  const auto h5 = run_study(dir, "embed-cost " + src("data-samples/garden-beds-qubo.toml") + " " +
                                     src("data-samples/garden-beds-square-embedding.toml") + " " +
                                     src("schedules/linear.toml") + " --absolute --strengths 0.05,0.3 --search-durations log:1:100:5 -q",
                            "emb");
  check_figures(dir, h5, {"chain-probability", "chain-duration", "chain-gap"});
}

TEST_CASE("figure: diagnose results give the gap with its crossings and the ground-manifold weights") {
  TempDir dir;
  const auto h5 = run_study(dir, "diagnose " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                                     " -d 5 --samples 0 -q", "why");
  check_figures(dir, h5, {"diagnosis-gap", "diagnosis-ground-weight"});
}

TEST_CASE("figure: a file that is not a result is refused with exit code 2") {
  TempDir dir;
  const auto junk = dir.write("junk.h5", "not hdf5 at all");
  auto f = run_gapwise("figure '" + junk.string() + "' --out-dir '" + (dir.path / "figs").string() + "'", dir);
  CHECK(f.exit_code == 2);
  CHECK(f.err.find("junk.h5") != std::string::npos);
}

TEST_CASE("figure: an ensemble result gives the TTS-against-size and gap-against-size figures") {
  TempDir dir;
  const auto p = [&](const char* f) { return (dir.path / f).string(); };
  REQUIRE(run_gapwise("generate --graph ring-chords --couplings gaussian --sizes lin:3:5:3 --count 3 --seed 4 --out " + p("set.h5"), dir)
              .exit_code == 0);
  auto e = run_gapwise("ensemble " + p("set.h5") + " '" + (source_dir() / "schedules/linear.toml").string() +
                           "' -d 0.3,1,3 --gap-points 21 --resamples 200 -q --threads 1 --out " + p("study.h5"),
                       dir);
  INFO(e.err);
  REQUIRE(e.exit_code == 0);
  auto f = run_gapwise("figure " + p("study.h5") + " --out-dir '" + p("figs") + "'", dir);
  INFO(f.err);
  REQUIRE(f.exit_code == 0);
  for (const char* name : {"study-ensemble-tts.svg", "study-ensemble-tts.png", "study-ensemble-gap.svg", "study-ensemble-gap.png"})
    gapwise::testing::check_figure_file(dir.path / "figs" / name);
}

// --- What a reader sees, checked in the files themselves (SVG text is text) ---

namespace {
std::string slurp(const std::filesystem::path& p) {
  std::ifstream f(p, std::ios::binary);
  return {std::istreambuf_iterator<char>(f), std::istreambuf_iterator<char>()};
}

// PLplot's SVG device writes every character as a reference (&#x61; for "a"):
// the file with those decoded to UTF-8, tags kept.
std::string decoded_svg(const std::filesystem::path& p) {
  const std::string raw = slurp(p);
  std::string out;
  const std::regex ref("&#x([0-9a-fA-F]+);");
  auto last = raw.cbegin();
  for (auto it = std::sregex_iterator(raw.begin(), raw.end(), ref); it != std::sregex_iterator(); ++it) {
    out.append(last, raw.cbegin() + it->position());
    const unsigned long c = std::stoul((*it)[1], nullptr, 16);
    if (c < 0x80) out += static_cast<char>(c);
    else if (c < 0x800) { out += static_cast<char>(0xC0 | (c >> 6)); out += static_cast<char>(0x80 | (c & 0x3F)); }
    else {
      out += static_cast<char>(0xE0 | (c >> 12));
      out += static_cast<char>(0x80 | ((c >> 6) & 0x3F));
      out += static_cast<char>(0x80 | (c & 0x3F));
    }
    last = raw.cbegin() + it->position() + it->length();
  }
  out.append(last, raw.cend());
  return out;
}

// The numbers PLplot's SVG device wrote as tick labels of the form d.d (a linear axis).
std::vector<double> linear_tick_labels(const std::string& svg) {
  std::vector<double> v;
  const std::regex tick(">([0-9]\\.[0-9])</tspan>");  // in a decoded file
  for (auto it = std::sregex_iterator(svg.begin(), svg.end(), tick); it != std::sregex_iterator(); ++it)
    v.push_back(std::stod((*it)[1]));
  return v;
}
}  // namespace

TEST_CASE("figure: durations figures keep text as text, end the p axis at 1, add 1 - p and print the caveats") {
  TempDir dir;
  // A QUBO-derived problem with fields; the default grid runs into the random-guess limit at short t_f.
  const auto h5 = run_study(dir, "durations " + src("data-samples/meeting-slots-qubo.toml") + " " +
                                     src("schedules/linear.toml") + " --quiet", "dur");
  const auto figs = dir.path / "figs";
  auto f = run_gapwise("figure '" + h5 + "' --out-dir '" + figs.string() + "' --format svg,pdf", dir);
  INFO(f.err);
  REQUIRE(f.exit_code == 0);

  const std::string p_svg = decoded_svg(figs / "dur-probability.svg");
  CHECK(p_svg.find("<text") != std::string::npos);  // svgcairo would have outlined every glyph as a <path>
  CHECK(p_svg.find(">ground-state probability p<") != std::string::npos);
  // Subscripts go down (positive dy), the exponents of log-axis labels up.
  CHECK(std::regex_search(p_svg, std::regex(">10<tspan dy=\"-[0-9.]+\" font-size=\"[0-9]+\">-1<")));
  // t_f with a real subscript: "f" in a shifted, smaller tspan after "t" (PLplot's #d escape).
  CHECK(std::regex_search(p_svg, std::regex("anneal duration t<tspan dy=\"[0-9.]+\" font-size=\"[0-9]+\">f<")));
  CHECK(p_svg.find("\xce\x94") != std::string::npos);  // the Greek Delta of Delta_min (UTF-8 CE 94)
  CHECK(p_svg.find("t_f") == std::string::npos);
  // The probability axis ends at 1 with a little room: ticks up to 1.0, none beyond 1.1.
  const auto ticks = linear_tick_labels(p_svg);
  REQUIRE_FALSE(ticks.empty());
  CHECK(*std::max_element(ticks.begin(), ticks.end()) == doctest::Approx(1.0));

  const std::string miss = decoded_svg(figs / "dur-miss-probability.svg");
  CHECK(miss.find("1 \xe2\x88\x92 p") != std::string::npos);  // "1 − p", with a real minus sign
  CHECK(miss.find("propagator tolerance") != std::string::npos);  // p reaches 1 - 1e-6 in this grid

  const std::string tts = decoded_svg(figs / "dur-tts.svg");
  CHECK(tts.find("random-guess value") != std::string::npos);  // the caveat the terminal prints
  // Caveats are wrapped onto more lines, never cut short: the end of this one
  // (past the 95 characters of a line) is there, and no line ends in "...".
  CHECK(tts.find("only a local one") != std::string::npos);
  CHECK(tts.find(" ...") == std::string::npos);
  CHECK(p_svg.find(" ...") == std::string::npos);

  const std::string pdf = slurp(figs / "dur-tts.pdf");
  REQUIRE(pdf.size() > 1000);
  CHECK(pdf.compare(0, 5, "%PDF-") == 0);
  CHECK(pdf.find("%%EOF", pdf.size() - 16) != std::string::npos);
}

TEST_CASE("figure: an unknown format is refused naming the formats this build writes") {
  TempDir dir;
  const auto h5 = run_study(dir, "gap " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                                     " --points 11", "gap");
  auto f = run_gapwise("figure '" + h5 + "' --out-dir '" + (dir.path / "figs").string() + "' --format eps", dir);
  CHECK(f.exit_code == 2);
  CHECK(f.err.find("unknown figure format 'eps'") != std::string::npos);
  CHECK(f.err.find("png or pdf") != std::string::npos);
}

TEST_CASE("legend placement: the first corner free of data, outside when none is") {
  using L = gapwise::LinePlot::Legend;
  std::vector<std::pair<double, double>> rising;  // a curve from bottom left to top right
  for (int k = 0; k <= 100; ++k) rising.push_back({k / 100.0, k / 100.0});
  CHECK(gapwise::free_legend_corner(rising, 0.3, 0.2) == L::TopLeft);
  std::vector<std::pair<double, double>> falling;
  for (int k = 0; k <= 100; ++k) falling.push_back({k / 100.0, 1 - k / 100.0});
  CHECK(gapwise::free_legend_corner(falling, 0.3, 0.2) == L::TopRight);
  auto full = rising;
  full.insert(full.end(), falling.begin(), falling.end());
  for (int k = 0; k <= 100; ++k) { full.push_back({k / 100.0, 0.05}); full.push_back({k / 100.0, 0.95}); }
  CHECK(gapwise::free_legend_corner(full, 0.3, 0.2) == L::Outside);
  CHECK(gapwise::free_legend_corner({}, 1.2, 0.2) == L::Outside);  // wider than the frame
}
