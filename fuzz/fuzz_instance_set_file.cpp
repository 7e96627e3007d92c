// libFuzzer target for the instance-set reader (parse_instance_set_bytes: sealed HDF5).
// Build with -DGAPWISE_FUZZ=ON and clang; run with scripts/fuzz.sh (see DEVELOPERS.md):
//
//   bash scripts/fuzz.sh 60 instance-set                          # the seal and our reader
//   GAPWISE_FUZZ_RESEAL=1 bash scripts/fuzz.sh 60 instance-set    # also HDF5 on crafted bytes
//
// The first byte of an input picks the mode (fuzz/parser_checks.hpp): raw bytes
// against the seal; operations that build a valid HDF5 file of arbitrary content,
// sealed, against the reader's own checks; or (GAPWISE_FUZZ_RESEAL only) fuzzed
// bytes sealed as an HDF5 image. The last mode, and raw inputs whose seal the
// fuzzer forged by copying the checksum it saw compared, reach HDF5's parser
// with crafted bytes: HDF5 1.10 (Debian's libhdf5-103) overflows a heap buffer,
// requests absurd allocations and loops for ever on such files (kept in
// fuzz/known-hdf5-crashes/), bugs in the library that no gapwise check can
// prevent once a file carries a valid seal. A damaged file never gets that far:
// the seal's length and checksum refuse it first.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "parser_checks.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static const bool reseal = std::getenv("GAPWISE_FUZZ_RESEAL") != nullptr;
  gapwise::fuzzing::InstanceSetFuzzOptions options;
  options.reseal_images = reseal;
  options.parse_valid_seals = reseal;
  gapwise::fuzzing::check_instance_set_input(std::string_view(reinterpret_cast<const char*>(data), size), options);
  return 0;
}
