#include "io/infinite_tts.hpp"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "io/text_table.hpp"

namespace gapwise {

double stored_tts(double tts) { return std::isinf(tts) && tts > 0 ? kInfiniteTtsMarker : tts; }

std::vector<double> stored_tts(std::vector<double> tts) {
  for (double& x : tts) x = stored_tts(x);
  return tts;
}

double tts_from_stored(double stored) {
  return stored == kInfiniteTtsMarker ? std::numeric_limits<double>::infinity() : stored;
}

std::string tts_unit(std::string_view unit) { return fmt::format("{} ({:g}: infinite, p = 0)", unit, kInfiniteTtsMarker); }

std::string tts_text(double tts, int digits) { return std::isinf(tts) && tts > 0 ? "inf" : fmt_num(tts, digits); }

void put_tts(toml::table& json, std::string_view key, double tts) {
  if (!(std::isinf(tts) && tts > 0)) put(json, key, tts);
}

}  // namespace gapwise
