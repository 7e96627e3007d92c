#pragma once
// A seal on gapwise's HDF5 data files (instance sets, ensemble results): the
// file is created with a 512-byte HDF5 user block, which holds a short text
// header (written by Hdf5Output::commit() with the finished image) with the format
// name, the length and an FNV-1a checksum of everything after it. Readers check
// the seal before the HDF5 library sees a byte, so a damaged, truncated or edited
// file is refused with a clear message instead of reaching the HDF5 parser
// (which trusts its input). Any HDF5 client still reads the file: HDF5 looks for
// its signature at offsets 0, 512, 1024, ...
//
// The header, in the first 512 bytes (rest zero):
//   gapwise-sealed-hdf5 1
//   format=gapwise-instance-set
//   bytes=<length of the file after the user block>
//   fnv1a64=<16 hex digits>
//
//   Hdf5Output out(path, "gapwise-instance-set");   // creates the user block; commit() seals
//   check_hdf5_seal(bytes, path, "gapwise-instance-set");   // InputError when broken
#include <cstdint>
#include <string>
#include <string_view>

namespace gapwise {

inline constexpr std::size_t kSealBytes = 512;

/// FNV-1a, 64 bit (Fowler, Noll and Vo), over raw bytes.
std::uint64_t fnv1a64(std::string_view bytes, std::uint64_t h = 1469598103934665603ULL);

/// The 512-byte header (text, zero-padded) that seals `body`, the HDF5 image
/// that follows the user block. Hdf5Output puts it in front of the image.
std::string hdf5_seal_header(std::string_view body, const std::string& format);

/// Throws InputError (file `name`) when the bytes carry no seal, a seal for another
/// format, or a length/checksum that does not match.
void check_hdf5_seal(std::string_view bytes, const std::string& name, const std::string& format);

}  // namespace gapwise
