// The progress bar's text: done/total, elapsed, time left weighted by cost.
// Common practice, no outside source.
#include <doctest/doctest.h>

#include <cstdio>
#include <string>

#include <unistd.h>

#include "io/progress_bar.hpp"

using namespace gapwise;

TEST_CASE("durations are written the way people read them") {
  CHECK(format_duration_seconds(42.4) == "42s");
  CHECK(format_duration_seconds(65) == "1m05s");
  CHECK(format_duration_seconds(3725) == "1h02m");
  CHECK(format_duration_seconds(-1) == "?");
}

TEST_CASE("done/total, growing totals and the end state") {
  ProgressBar bar("durations", 0, 0.0, /*enabled=*/0);
  CHECK_FALSE(bar.enabled());
  bar.add_items(4, 10.0);
  CHECK(bar.line().find("durations 0/4 [") == 0);
  CHECK(bar.line().find("estimating time left") != std::string::npos);
  bar.finished_item(5.0);  // half the cost done
  CHECK(bar.line().find(" 1/4 [") != std::string::npos);
  CHECK(bar.line().find("left") != std::string::npos);
  CHECK(bar.line().find("[============>           ]") != std::string::npos);  // 12 of 24 cells: cost-weighted
  bar.add_items(1, 2.0);  // a bisection probe scheduled
  CHECK(bar.line().find(" 1/5 [") != std::string::npos);
  for (int k = 0; k < 4; ++k) bar.finished_item(7.0 / 4);
  CHECK(bar.line().find(" 5/5 [") != std::string::npos);
  CHECK(bar.line().find("done") != std::string::npos);
  bar.done();
  bar.done();  // idempotent
}

TEST_CASE("a bar sized as work is discovered draws nothing before the first item, never 0/0 done") {
  ProgressBar idle("durations", 0, 0.0, /*enabled=*/0);
  CHECK(idle.line().find("0/0") == std::string::npos);
  CHECK(idle.line().find("done") == std::string::npos);
  CHECK(idle.line().find("durations preparing") == 0);
  // An enabled bar (as on a terminal) writes nothing to stderr while its total is 0.
  std::FILE* capture = std::tmpfile();
  REQUIRE(capture != nullptr);
  std::fflush(stderr);
  const int saved = ::dup(STDERR_FILENO);
  ::dup2(::fileno(capture), STDERR_FILENO);
  std::string drawn;
  {
    ProgressBar bar("durations", 0, 0.0, /*enabled=*/1);
    std::fflush(stderr);
    std::fseek(capture, 0, SEEK_END);
    const long before = std::ftell(capture);
    bar.add_items(3, 3.0);
    std::fflush(stderr);
    std::fseek(capture, 0, SEEK_END);
    CHECK(before == 0);
    CHECK(std::ftell(capture) > 0);  // the real count is drawn once there is work
    bar.done();
  }
  std::fflush(stderr);
  ::dup2(saved, STDERR_FILENO);
  ::close(saved);
  std::rewind(capture);
  char buf[4096];
  const std::size_t n = std::fread(buf, 1, sizeof buf, capture);
  drawn.assign(buf, n);
  std::fclose(capture);
  CHECK(drawn.find("0/0") == std::string::npos);
  CHECK(drawn.find("durations 0/3 [") != std::string::npos);
}
