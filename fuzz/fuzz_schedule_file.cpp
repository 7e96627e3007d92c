// libFuzzer target for the schedule file parser (parse_schedule_text). Build with
// -DGAPWISE_FUZZ=ON and clang; run as described in notebooks-free-docs/fuzzing.md:
//
//   build-fuzz/fuzz/fuzz_schedule_file -dict=fuzz/dicts/schedule.dict corpus-dir/ seeds/
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "parser_checks.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  gapwise::fuzzing::check_schedule_input(std::string_view(reinterpret_cast<const char*>(data), size));
  return 0;
}
