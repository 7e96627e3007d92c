// A pause is kept or refused, never dropped. A pause within a rounding step of
// the whole run left a ramp so short that the time after the pause rounded onto
// the pause's end; the path builder merged the two points and overwrote the
// pause's s, so the pause silently disappeared from the path. Checked here on
// every combination of run length, pause position and pause lengths a few
// rounding steps (ulps) short of the run, through the library and through
// schedule files.
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include <fmt/format.h>

#include "io/input_error.hpp"
#include "io/schedule_file.hpp"
#include "schedule/path_shapes.hpp"

using namespace gapwise;

namespace {

/// The longest stretch of the path held at exactly s.
double held_at(const AnnealPath& p, double s) {
  double longest = 0;
  for (std::size_t k = 0; k + 1 < p.points().size(); ++k)
    if (p.points()[k].s == s && p.points()[k + 1].s == s)
      longest = std::max(longest, p.points()[k + 1].t_ns - p.points()[k].t_ns);
  return longest;
}

}  // namespace

TEST_CASE("forward_shape keeps a pause a few rounding steps shorter than the run, or refuses it") {
  const AnnealPath ramp({{0.0, 0.0}, {1.0, 1.0}});
  int kept = 0, refused = 0;
  for (double total : {1.0, 10.0, 100.0, 3.7}) {
    for (double s : {0.2, 0.5, 0.9}) {
      double pause = total;
      for (int ulps = 1; ulps <= 6; ++ulps) {
        pause = std::nextafter(pause, 0.0);
        INFO("total " << total << ", pause at " << s << ", pause " << ulps << " ulp(s) short");
        try {
          const AnnealPath p = forward_shape(ramp, {.pause = PauseSpec{s, pause}}, total);
          // Kept: a stretch at s as long as the pause (to rounding of the end time).
          CHECK(held_at(p, s) >= pause * (1 - 1e-12));
          CHECK(p.duration_ns() == total);
          ++kept;
        } catch (const InputError& e) {
          CHECK(e.place().key == "pause.duration");
          ++refused;
        }
      }
    }
  }
  MESSAGE("kept " << kept << ", refused " << refused);
  CHECK(kept + refused == 4 * 3 * 6);
}

TEST_CASE("insert_pause never merges the point after a pause into the pause's end") {
  // A base path whose last piece is far shorter than the pause: t + pause rounds
  // onto the pause's end time.
  const AnnealPath base({{0.0, 0.0}, {1e-17, 0.5}, {2e-17, 1.0}});
  try {
    const AnnealPath p = insert_pause(base, 0.5, 1.0);
    CHECK(held_at(p, 0.5) >= 1.0 * (1 - 1e-12));
  } catch (const InputError& e) {
    CHECK(e.place().key == "pause.duration");
  }
}

TEST_CASE("a schedule file's pause of nearly the whole run is kept or refused at its line") {
  const std::string text = fmt::format(
      "[scales]\nkind = \"linear\"\na_max_ghz = 5\nb_max_ghz = 5\n[path]\nduration_ns = 20\n[path.pause]\ns = 0.5\n"
      "duration = {:.17g}\n",
      std::nextafter(1.0, 0.0));
  try {
    const Schedule s = parse_schedule_text(text, "nearly.toml");
    CHECK(held_at(s.shape, 0.5) >= std::nextafter(1.0, 0.0) * (1 - 1e-12));
  } catch (const InputError& e) {
    CHECK(e.place().file == "nearly.toml");
    CHECK(e.place().key == "path.pause.duration");
    CHECK(e.place().line == 9);
  }
}
