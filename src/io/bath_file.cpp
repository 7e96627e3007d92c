#include "io/bath_file.hpp"

#include <fmt/format.h>

#include "io/toml_reader.hpp"

namespace gapwise {
namespace {

constexpr const char* kFormat = "gapwise-bath";

// The value under `key` when present (must be a finite number), checked against
// [low, high] (low inclusive or not), else nullopt.
std::optional<double> bounded(const TomlReader& r, const toml::table& t, const char* key, double low,
                              bool low_inclusive, double high, const std::string& meaning, const std::string& fix) {
  const auto v = r.get_double(t, key, "");
  if (!v) return std::nullopt;
  const bool too_low = low_inclusive ? *v < low : *v <= low;
  if (too_low)
    r.fail(t.get(key), key, fmt::format("{} {:g} is {}", meaning, *v, low_inclusive ? "negative" : "not positive"),
           fix);
  if (*v > high)
    r.fail(t.get(key), key, fmt::format("{} {:g} is above {:g}, the largest gapwise accepts", meaning, *v, high), fix);
  return v;
}

}  // namespace

OhmicBath parse_bath_text(std::string_view text, const std::string& name) {
  const TomlReader r = TomlReader::from_string(text, name);
  const toml::table& t = r.root();
  r.allow_keys(t, "", {"format", "format_version", "description", "temperature_mk", "coupling", "cutoff_ghz"});
  r.check_format(t, kFormat, "bath", /*required=*/true);

  OhmicBath bath;
  bath.source = name;
  bath.description = r.get_string(t, "description", "").value_or("");
  if (auto v = bounded(r, t, "temperature_mk", 0.0, true, kMaxBathTemperatureMk, "temperature",
                       "give the bath temperature in millikelvin, 0 to 10000 (annealing hardware runs at about "
                       "10-20 mK)"))
    bath.temperature_mk = *v;
  else
    bath.temperature_defaulted = true;
  if (auto v = bounded(r, t, "coupling", 0.0, true, kMaxBathCoupling, "coupling eta",
                       "give the dimensionless system-bath coupling eta, 0 to 1; the master equation assumes weak "
                       "coupling (eta << 1, e.g. 1e-3); 0 gives the closed system"))
    bath.coupling = *v;
  else
    bath.coupling_defaulted = true;
  if (auto v = bounded(r, t, "cutoff_ghz", 0.0, false, kMaxBathCutoffGhz, "cutoff frequency",
                       "give the ohmic cutoff f_c in GHz, > 0 and well above the problem's energy scales (e.g. 8)"))
    bath.cutoff_ghz = *v;
  else
    bath.cutoff_defaulted = true;
  return bath;
}

OhmicBath read_bath_file(const std::string& path) { return parse_bath_text(read_text_file(path), path); }

std::string format_bath_toml(const OhmicBath& bath) {
  std::string out = fmt::format("format = \"{}\"\nformat_version = 1\n", kFormat);
  if (!bath.description.empty()) out += fmt::format("description = {}\n", toml_quoted(bath.description));
  out += fmt::format("temperature_mk = {}   # k_B T/h = {:.4f} GHz\n", bath.temperature_mk, bath.theta_ghz());
  out += fmt::format("coupling = {}\ncutoff_ghz = {}\n", bath.coupling, bath.cutoff_ghz);
  return out;
}

}  // namespace gapwise
