#include "io/hdf5_seal.hpp"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <stdexcept>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {
namespace {
constexpr std::string_view kMagic = "gapwise-sealed-hdf5 1\n";
}

std::uint64_t fnv1a64(std::string_view bytes, std::uint64_t h) {
  for (unsigned char c : bytes) { h ^= c; h *= 1099511628211ULL; }
  return h;
}

std::uint64_t hdf5_strings_checksum(const std::vector<std::string>& values) {
  std::uint64_t h = fnv1a64({});
  for (const auto& v : values) {
    const std::uint64_t n = v.size();
    h = fnv1a64(std::string_view(reinterpret_cast<const char*>(&n), sizeof n), h);
    h = fnv1a64(v, h);
  }
  return h;
}

std::string hdf5_seal_header(std::string_view body, const std::string& format, std::uint64_t manifest) {
  std::string header = fmt::format("{}format={}\nbytes={}\nfnv1a64={:016x}\nmanifest={:016x}\n", kMagic, format,
                                   body.size(), fnv1a64(body), manifest);
  if (header.size() > kSealBytes) throw std::logic_error("seal header too long (format name too long)");
  header.resize(kSealBytes, '\0');
  return header;
}

namespace {
std::string seal_field(std::string_view bytes, std::string_view key) {
  const std::string_view header = bytes.substr(0, kSealBytes);
  const std::string k = std::string("\n") + std::string(key) + "=";
  const auto p = header.find(k);
  if (p == std::string_view::npos) return {};
  const auto e = header.find('\n', p + k.size());
  return e == std::string_view::npos ? std::string() : std::string(header.substr(p + k.size(), e - p - k.size()));
}
}  // namespace

std::uint64_t hdf5_seal_manifest(std::string_view bytes) {
  const std::string m = seal_field(bytes, "manifest");
  return m.empty() ? 0 : std::stoull(m, nullptr, 16);
}

SealMatch check_hdf5_seal(std::string_view bytes, const std::string& name, const std::string& format) {
  const SourcePlace place{name, 0, 0, ""};
  const std::string fix_rewrite = "write the file again with gapwise (it writes atomically, so a finished file is whole)";
  if (bytes.size() < kSealBytes || bytes.substr(0, kMagic.size()) != kMagic)
    throw InputError(place, fmt::format("this is not a {} file written by gapwise (no gapwise seal at the start)", format),
                     format == "gapwise-instance-set"
                         ? "give a file written by `gapwise generate`; to assemble a set by hand, use a directory of problem files"
                         : "give a file written by gapwise");
  auto field = [&](std::string_view key) { return seal_field(bytes, key); };
  const std::string got_format = field("format");
  if (got_format != format)
    throw InputError(place, fmt::format("this gapwise file holds a \"{}\", not a \"{}\"", got_format, format),
                     "give the right file");
  const std::string_view body = bytes.substr(kSealBytes);
  const std::string written = field("bytes");
  const bool digits = !written.empty() && written.size() < 19 && written.find_first_not_of("0123456789") == std::string::npos;
  const bool has_manifest = field("manifest").size() == 16 &&
                            field("manifest").find_first_not_of("0123456789abcdef") == std::string::npos;
  if (!digits || body.size() < std::stoull(written) || (!has_manifest && std::to_string(body.size()) != written))
    throw InputError(place, fmt::format("the file is {} bytes long but was written {} bytes long (truncated{})",
                                        bytes.size(), digits ? written + " + 512" : "?", has_manifest ? "" : " or appended to"),
                     fix_rewrite);
  if (std::to_string(body.size()) == written && field("fnv1a64") == fmt::format("{:016x}", fnv1a64(body)))
    return SealMatch::Exact;
  if (!has_manifest)
    throw InputError(place, "the checksum does not match: the file was changed or damaged after gapwise wrote it",
                     fix_rewrite);
  return SealMatch::Annotated;
}

}  // namespace gapwise
