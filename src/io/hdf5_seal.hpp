#pragma once
// A seal on gapwise's HDF5 data files (instance sets, ensemble results): the
// file is created with a 512-byte HDF5 user block, which holds a short text
// header (written by Hdf5Output::commit() with the finished image) with the format
// name, the length and an FNV-1a checksum of everything after it, and the
// checksum of a manifest: the dataset /seal_manifest lists an FNV-1a checksum of
// every dataset and attribute gapwise wrote ("<16 hex> <path>" or
// "<16 hex> <path>@<attribute>"). Any HDF5 client still reads the file: HDF5
// looks for its signature at offsets 0, 512, 1024, ...
//
// Reading (Hdf5Input with a sealed format) has two ways to accept a file:
//   - exact: length and whole-file checksum match. The HDF5 library parses
//     only bytes gapwise wrote (it trusts its input: crafted bytes can crash
//     HDF5 1.10, see fuzz/known-hdf5-crashes/).
//   - annotated: another HDF5 client (h5py, h5py adding an attribute, h5repack)
//     changed the file, so the whole-file checksum differs. The file must be at
//     least as long as written (HDF5 never shrinks a file in place, so a shorter
//     one is truncated and refused before HDF5 sees a byte); HDF5 opens it (and
//     refuses an EOF short of its own end-of-address); then every object of the
//     manifest must be there with its checksum: what gapwise reads is what it
//     wrote, and added attributes or datasets are ignored.
// Why a manifest rather than HDF5's Fletcher32 filter: Fletcher32 covers
// chunked numeric data only, not attributes or variable-length strings (the
// instance names, the descriptions), and a dataset rewritten by a client comes
// without it; the manifest covers every object gapwise reads.
//
// The header, in the first 512 bytes (rest zero):
//   gapwise-sealed-hdf5 1
//   format=gapwise-instance-set
//   bytes=<length of the file after the user block>
//   fnv1a64=<16 hex digits>
//   manifest=<16 hex digits: hdf5_strings_checksum of /seal_manifest>
//
//   Hdf5Output out(path, {"gapwise-instance-set", 1, true});   // user block; commit() seals
//   if (check_hdf5_seal(bytes, path, "gapwise-instance-set") == SealMatch::Annotated)
//     ...   // Hdf5Input::from_bytes then checks the manifest
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace gapwise {

inline constexpr std::size_t kSealBytes = 512;
inline constexpr const char* kSealManifest = "/seal_manifest";

/// FNV-1a, 64 bit (Fowler, Noll and Vo), over raw bytes.
std::uint64_t fnv1a64(std::string_view bytes, std::uint64_t h = 1469598103934665603ULL);
/// The checksum of a list of strings (each one's length, then its bytes).
std::uint64_t hdf5_strings_checksum(const std::vector<std::string>& values);

/// The 512-byte header (text, zero-padded) that seals `body`, the HDF5 image
/// that follows the user block. Hdf5Output puts it in front of the image.
std::string hdf5_seal_header(std::string_view body, const std::string& format, std::uint64_t manifest);

enum class SealMatch { Exact, Annotated };

/// Throws InputError (file `name`) when the bytes carry no seal, a seal for another
/// format, fewer bytes than written (truncated), or a checksum that does not
/// match in a seal without a manifest. Annotated: the caller must check the
/// manifest (check_hdf5_manifest) once HDF5 has opened the file.
SealMatch check_hdf5_seal(std::string_view bytes, const std::string& name, const std::string& format);
/// The manifest checksum recorded in a seal (the header is checked first).
std::uint64_t hdf5_seal_manifest(std::string_view bytes);

}  // namespace gapwise
