#include "io/bath_attributes.hpp"

namespace gapwise {

void write_bath_attributes(Hdf5Output& h5, const std::string& group, const OhmicBath& bath) {
  h5.attribute(group, "bath_file", bath.source);
  h5.attribute(group, "temperature_mk", bath.temperature_mk);
  h5.attribute(group, "theta_ghz", bath.theta_ghz());
  h5.attribute(group, "coupling", bath.coupling);
  h5.attribute(group, "cutoff_ghz", bath.cutoff_ghz);
  h5.attribute(group, "illustrative_defaults_used",
               static_cast<long long>(bath.temperature_defaulted || bath.coupling_defaulted || bath.cutoff_defaulted));
}

}  // namespace gapwise
