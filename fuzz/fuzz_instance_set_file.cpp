// libFuzzer target for the instance-set reader (parse_instance_set_bytes: sealed HDF5).
// Build with -DGAPWISE_FUZZ=ON and clang; run with scripts/fuzz.sh (see DEVELOPERS.md):
//
//   bash scripts/fuzz.sh 60 instance-set
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "parser_checks.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  gapwise::fuzzing::check_instance_set_input(std::string_view(reinterpret_cast<const char*>(data), size));
  return 0;
}
