#include "io/infinite_tts.hpp"

#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "io/text_table.hpp"

namespace gapwise {

double stored_tts(double tts) { return tts; }

std::vector<double> stored_tts(std::vector<double> tts) { return tts; }

DataMeaning tts_meaning(std::string units) {
  return DataMeaning(std::move(units)).inf_means("infinite: p = 0, no number of repetitions reaches the target");
}

DataMeaning not_applicable(std::string units, std::string why) {
  return DataMeaning(std::move(units)).nan_means("not applicable: " + why);
}

std::string tts_text(double tts, int digits) { return std::isinf(tts) && tts > 0 ? "inf" : fmt_num(tts, digits); }

void put_tts(toml::table& json, std::string_view key, double tts) {
  if (!(std::isinf(tts) && tts > 0)) put(json, key, tts);
}

}  // namespace gapwise
