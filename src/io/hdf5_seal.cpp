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

std::string hdf5_seal_header(std::string_view body, const std::string& format) {
  std::string header = fmt::format("{}format={}\nbytes={}\nfnv1a64={:016x}\n", kMagic, format, body.size(), fnv1a64(body));
  if (header.size() > kSealBytes) throw std::logic_error("seal header too long (format name too long)");
  header.resize(kSealBytes, '\0');
  return header;
}

void check_hdf5_seal(std::string_view bytes, const std::string& name, const std::string& format) {
  const SourcePlace place{name, 0, 0, ""};
  const std::string fix_rewrite = "write the file again with gapwise (it writes atomically, so a finished file is whole)";
  if (bytes.size() < kSealBytes || bytes.substr(0, kMagic.size()) != kMagic)
    throw InputError(place, fmt::format("this is not a {} file written by gapwise (no gapwise seal at the start)", format),
                     format == "gapwise-instance-set"
                         ? "give a file written by `gapwise generate`; to assemble a set by hand, use a directory of problem files"
                         : "give a file written by gapwise");
  const std::string_view header = bytes.substr(0, kSealBytes);
  auto field = [&](std::string_view key) -> std::string {
    const std::string k = std::string("\n") + std::string(key) + "=";
    const auto p = header.find(k);
    if (p == std::string_view::npos) return {};
    const auto e = header.find('\n', p + k.size());
    return e == std::string_view::npos ? std::string() : std::string(header.substr(p + k.size(), e - p - k.size()));
  };
  const std::string got_format = field("format");
  if (got_format != format)
    throw InputError(place, fmt::format("this gapwise file holds a \"{}\", not a \"{}\"", got_format, format),
                     "give the right file");
  const std::string_view body = bytes.substr(kSealBytes);
  if (field("bytes") != std::to_string(body.size()))
    throw InputError(place, fmt::format("the file is {} bytes long but was written {} bytes long (truncated or appended to)",
                                        bytes.size(), field("bytes").empty() ? "?" : field("bytes") + " + 512"),
                     fix_rewrite);
  if (field("fnv1a64") != fmt::format("{:016x}", fnv1a64(body)))
    throw InputError(place, "the checksum does not match: the file was changed or damaged after gapwise wrote it",
                     fix_rewrite);
}

}  // namespace gapwise
