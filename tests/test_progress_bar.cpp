// The progress bar's text: done/total, elapsed, time left weighted by cost.
// Common practice, no outside source.
#include <doctest/doctest.h>

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
