// libFuzzer target for the instance-set reader (parse_instance_set_bytes: sealed HDF5).
// Build with -DGAPWISE_FUZZ=ON and clang; run with scripts/fuzz.sh (see DEVELOPERS.md):
//
//   bash scripts/fuzz.sh 60 instance-set                          # the seal and our reader
//   GAPWISE_FUZZ_RESEAL=1 bash scripts/fuzz.sh 60 instance-set    # also behind the seal
//
// Inputs whose first byte is odd are sealed by the target (fuzz/parser_checks.hpp),
// so HDF5 parses fuzzed bytes. That mode is off unless GAPWISE_FUZZ_RESEAL is set:
// HDF5 1.10 (Debian's libhdf5-103) overflows a heap buffer in H5HG_read on a
// crafted vlen-string attribute within a few hundred runs (kept in
// fuzz/known-hdf5-crashes/), a bug in the library that no gapwise check can
// prevent once a file carries a valid seal. A damaged file never gets that far:
// the seal's length and checksum refuse it first, which the default mode fuzzes.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "parser_checks.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static const bool reseal = std::getenv("GAPWISE_FUZZ_RESEAL") != nullptr;
  if (!reseal && size > 0 && (data[0] & 1) != 0) return 0;
  gapwise::fuzzing::check_instance_set_input(std::string_view(reinterpret_cast<const char*>(data), size));
  return 0;
}
