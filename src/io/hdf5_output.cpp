#include "io/hdf5_output.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstring>
#include <map>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <stdexcept>

#include <H5Cpp.h>
#include <H5DSpublic.h>
#include <fmt/format.h>
#include <unistd.h>

#include "gapwise_version.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_seal.hpp"
#include "io/hdf5_transfer.hpp"
#include "io/units_grammar.hpp"

namespace gapwise {

// The file is built in memory (HDF5's core driver, no backing store) and written
// by commit() in one checked write to a temporary file, then renamed. HDF5 never
// touches the disk: a write that fails (full disk, quota) is our own I/O with a
// clear message, never a half-flushed HDF5 file (HDF5 1.10 crashes at exit
// after a failed flush). Sealed files get their 512-byte header in front of the
// image (the image holds no user block; its superblock still records the
// 512-byte base address, so HDF5 finds it at offset 512).
struct Hdf5Output::Impl {
  std::string final_path, image_name;
  ResultFormat format;
  std::unique_ptr<H5::H5File> file;
  bool committed = false;
  bool permit_non_finite = false;
  // Dimension scales to attach on commit: dataset -> one axis dataset per dimension.
  std::vector<std::pair<std::string, std::vector<std::string>>> scales;
  // Sealed files: a checksum of every object written, by "path" or "path@attribute"
  // (the seal's manifest, io/hdf5_seal.hpp).
  std::map<std::string, std::uint64_t> manifest;
  std::uint64_t manifest_checksum = 0;

  // Runs fn; an HDF5 failure becomes a std::runtime_error naming the file and
  // what was being written (H5::Exception is not a std::exception).
  template <class F>
  auto guarded(const std::string& what, F fn) {
    if (!file) throw std::logic_error(fmt::format("'{}' was already committed", final_path));
    try {
      return fn();
    } catch (const H5::Exception& e) {
      throw std::runtime_error(fmt::format("cannot write {} into '{}': HDF5 {} failed", what, final_path,
                                           e.getFuncName().empty() ? e.getDetailMsg() : e.getFuncName()));
    }
  }
};

Hdf5Output::Hdf5Output(std::string final_path, ResultFormat format) : impl_(std::make_unique<Impl>()) {
  check_output_path(final_path, "--out");
  impl_->final_path = std::move(final_path);
  impl_->format = std::move(format);
  static std::atomic<unsigned long> images{0};
  impl_->image_name = fmt::format("gapwise-in-memory-output-{}-{}", static_cast<long>(::getpid()), images++);
  H5::Exception::dontPrint();
  try {
    H5::FileCreatPropList fcpl;
    if (impl_->format.sealed) fcpl.setUserblock(kSealBytes);
    H5::FileAccPropList fapl;
    fapl.setCore(1 << 20, false);
    impl_->file = std::make_unique<H5::H5File>(impl_->image_name, H5F_ACC_TRUNC, fcpl, fapl);
  } catch (const H5::Exception& e) {
    throw std::runtime_error(fmt::format("cannot start '{}': HDF5 {} failed", impl_->final_path, e.getDetailMsg()));
  }
}

Hdf5Output::~Hdf5Output() {
  if (impl_ && impl_->file) {
    try { impl_->file->close(); } catch (...) {}
  }
}

void Hdf5Output::group(const std::string& path) {
  std::string cur;
  std::stringstream ss(path);
  std::string part;
  while (std::getline(ss, part, '/')) {
    if (part.empty()) continue;
    cur += "/" + part;
    impl_->guarded("group '" + cur + "'", [&] {
      if (!impl_->file->nameExists(cur)) impl_->file->createGroup(cur);
    });
  }
}

namespace {
std::string parent_of(const std::string& path) {
  const auto k = path.find_last_of('/');
  return k == std::string::npos || k == 0 ? "/" : path.substr(0, k);
}
H5::StrType utf8_string() {
  H5::StrType st(H5::PredType::C_S1, H5T_VARIABLE);
  st.setCset(H5T_CSET_UTF8);
  return st;
}
void string_attr(H5::H5Object& o, const std::string& name, const std::string& value) {
  const H5::StrType st = utf8_string();
  o.createAttribute(name, st, H5::DataSpace(H5S_SCALAR)).write(st, value);
}
// The attributes that say what a dataset's numbers mean (see the header).
void meaning_attrs(H5::DataSet& ds, const DataMeaning& m) {
  string_attr(ds, "units", m.units);
  if (!m.legend.empty()) string_attr(ds, "legend", m.legend);
  if (!m.flag_values.empty()) {
    hsize_t n = m.flag_values.size();
    ds.createAttribute("flag_values", H5::PredType::NATIVE_LLONG, H5::DataSpace(1, &n))
        .write(H5::PredType::NATIVE_LLONG, m.flag_values.data());
    string_attr(ds, "flag_meanings", m.flag_meanings);
  }
  if (!m.nan_meaning.empty()) string_attr(ds, "nan_meaning", m.nan_meaning);
  if (!m.inf_meaning.empty()) string_attr(ds, "inf_meaning", m.inf_meaning);
}
void check_meaning(const std::string& path, const DataMeaning& m) {
  if (!parseable_units(m.units))
    throw std::logic_error(fmt::format("'{}': units \"{}\" do not follow io/units_grammar.hpp", path, m.units));
  const auto words = std::count(m.flag_meanings.begin(), m.flag_meanings.end(), ' ') + (m.flag_meanings.empty() ? 0 : 1);
  if (static_cast<std::size_t>(words) != m.flag_values.size())
    throw std::logic_error(fmt::format("'{}': {} flag values but {} flag meanings", path, m.flag_values.size(), words));
}
// NaN and +inf only where the meaning says what they stand for.
void check_finite(const std::string& path, const std::vector<double>& v, const DataMeaning& m) {
  for (double x : v) {
    if (std::isnan(x) && !m.nan_meaning.empty()) continue;
    if (std::isinf(x) && x > 0 && !m.inf_meaning.empty()) continue;
    if (!std::isfinite(x))
      throw std::runtime_error(fmt::format("refusing to write a non-finite number into '{}'", path));
  }
}
std::uint64_t hash_bytes(const void* data, std::size_t n) {
  return fnv1a64(std::string_view(static_cast<const char*>(data), n));
}
}  // namespace

void Hdf5Output::write(const std::string& path, const std::vector<double>& v, const DataMeaning& meaning) {
  write_matrix(path, v, v.size(), 1, meaning);
}

void Hdf5Output::write_matrix(const std::string& path, const std::vector<double>& v, std::size_t rows,
                              std::size_t cols, const DataMeaning& meaning, std::vector<std::string> axes) {
  check_meaning(path, meaning);
  if (!impl_->permit_non_finite) check_finite(path, v, meaning);
  group(parent_of(path));
  if (rows * cols != v.size())
    throw std::logic_error(fmt::format("'{}': {} values for a {} x {} matrix", path, v.size(), rows, cols));
  impl_->guarded("dataset '" + path + "'", [&] {
    hsize_t dims[2] = {rows, cols};
    H5::DataSpace space(cols == 1 && axes.empty() ? 1 : 2, dims);  // a matrix stays 2-D with one column
    H5::DataSet ds = impl_->file->createDataSet(path, H5::PredType::NATIVE_DOUBLE, space);
    if (!v.empty()) ds.write(v.data(), H5::PredType::NATIVE_DOUBLE);
    meaning_attrs(ds, meaning);
  });
  impl_->manifest[path] = hash_bytes(v.data(), v.size() * sizeof(double));
  if (!axes.empty()) attach_scales(path, std::move(axes));
}

void Hdf5Output::write(const std::string& path, const std::vector<long long>& v, const DataMeaning& meaning) {
  check_meaning(path, meaning);
  group(parent_of(path));
  impl_->guarded("dataset '" + path + "'", [&] {
    hsize_t dims[1] = {v.size()};
    H5::DataSpace space(1, dims);
    H5::DataSet ds = impl_->file->createDataSet(path, H5::PredType::NATIVE_LLONG, space);
    if (!v.empty()) ds.write(v.data(), H5::PredType::NATIVE_LLONG);
    meaning_attrs(ds, meaning);
  });
  impl_->manifest[path] = hash_bytes(v.data(), v.size() * sizeof(long long));
}

void Hdf5Output::write_strings(const std::string& path, const std::vector<std::string>& v, const std::string& legend) {
  group(parent_of(path));
  std::vector<const char*> ptrs;
  for (const auto& s : v) ptrs.push_back(s.c_str());
  impl_->guarded("dataset '" + path + "'", [&] {
    hsize_t dims[1] = {v.size()};
    H5::DataSpace space(1, dims);
    const H5::StrType st = utf8_string();
    H5::DataSet ds = impl_->file->createDataSet(path, st, space);
    if (!v.empty()) ds.write(ptrs.data(), st, H5::DataSpace::ALL, H5::DataSpace::ALL, small_conversion_buffer());
    if (!legend.empty()) string_attr(ds, "legend", legend);
  });
  impl_->manifest[path] = hdf5_strings_checksum(v);
}

void Hdf5Output::attach_scales(const std::string& dataset, std::vector<std::string> axes) {
  impl_->scales.emplace_back(dataset, std::move(axes));
}

std::string Hdf5Output::level_axis(const std::string& group, std::size_t count) {
  const std::string path = (group == "/" ? "" : group) + "/level";
  if (impl_->manifest.count(path)) return path;
  std::vector<long long> levels(count);
  for (std::size_t k = 0; k < count; ++k) levels[k] = static_cast<long long>(k);
  write(path, levels, DataMeaning("1").described("instantaneous level index, 0 = ground level"));
  return path;
}

namespace {
// Calls f on the group or dataset at `path`.
template <class F>
void with_object(H5::H5File& f, const std::string& path, F fn) {
  if (path == "/" || path.empty()) { H5::Group g = f.openGroup("/"); fn(g); return; }
  H5O_info_t info;
  if (H5Oget_info_by_name(f.getId(), path.c_str(), &info, H5P_DEFAULT) < 0)
    throw H5::GroupIException("H5Oget_info_by_name", "no object '" + path + "'");
  if (info.type == H5O_TYPE_DATASET) { H5::DataSet d = f.openDataSet(path); fn(d); }
  else { H5::Group g = f.openGroup(path); fn(g); }
}
}  // namespace

void Hdf5Output::attribute(const std::string& object, const std::string& name, const std::string& value) {
  if (object != "/") group(object);  // creates missing parents too
  impl_->guarded("attribute '" + object + "@" + name + "'", [&] { with_object(*impl_->file, object, [&](H5::H5Object& o) {
    string_attr(o, name, value);
  }); });
  impl_->manifest[object + "@" + name] = hash_bytes(value.data(), value.size());
}

void Hdf5Output::attribute(const std::string& object, const std::string& name, double value) {
  if (!std::isfinite(value) && !impl_->permit_non_finite)
    throw std::runtime_error(fmt::format("refusing to write a non-finite number into '{}@{}'", object, name));
  if (object != "/") group(object);  // creates missing parents too
  impl_->guarded("attribute '" + object + "@" + name + "'", [&] { with_object(*impl_->file, object, [&](H5::H5Object& o) {
    o.createAttribute(name, H5::PredType::NATIVE_DOUBLE, H5::DataSpace(H5S_SCALAR)).write(H5::PredType::NATIVE_DOUBLE, &value);
  }); });
  impl_->manifest[object + "@" + name] = hash_bytes(&value, sizeof value);
}

void Hdf5Output::attribute_allowing_inf_nan(const std::string& object, const std::string& name, double value) {
  const bool permit = impl_->permit_non_finite;
  impl_->permit_non_finite = true;
  try {
    attribute(object, name, value);
  } catch (...) {
    impl_->permit_non_finite = permit;
    throw;
  }
  impl_->permit_non_finite = permit;
}

void Hdf5Output::attribute(const std::string& object, const std::string& name, long long value) {
  if (object != "/") group(object);  // creates missing parents too
  impl_->guarded("attribute '" + object + "@" + name + "'", [&] { with_object(*impl_->file, object, [&](H5::H5Object& o) {
    o.createAttribute(name, H5::PredType::NATIVE_LLONG, H5::DataSpace(H5S_SCALAR)).write(H5::PredType::NATIVE_LLONG, &value);
  }); });
  impl_->manifest[object + "@" + name] = hash_bytes(&value, sizeof value);
}

void Hdf5Output::permit_non_finite() { impl_->permit_non_finite = true; }

namespace {
std::string leaf_name(const std::string& path) { return path.substr(path.find_last_of('/') + 1); }
}  // namespace

std::string Hdf5Output::finish_image() {
  // The root's format attributes, unless the caller wrote its own (tests and
  // fuzzing build files as another HDF5 client could).
  if (!impl_->format.format.empty() && !impl_->manifest.count("/@format")) {
    attribute("/", "format", impl_->format.format);
    if (!impl_->manifest.count("/@format_version")) attribute("/", "format_version", impl_->format.version);
  }
  impl_->guarded("the dimension scales", [&] {
    for (const auto& [dataset, axes] : impl_->scales) {
      H5::DataSet ds = impl_->file->openDataSet(dataset);
      const int rank = ds.getSpace().getSimpleExtentNdims();
      std::vector<hsize_t> dims(static_cast<std::size_t>(rank));
      ds.getSpace().getSimpleExtentDims(dims.data());
      if (axes.size() != dims.size())
        throw std::logic_error(fmt::format("'{}': {} scales for {} dimensions", dataset, axes.size(), dims.size()));
      for (std::size_t d = 0; d < axes.size(); ++d) {
        if (!impl_->file->nameExists(axes[d]))
          throw std::logic_error(fmt::format("'{}': no scale dataset '{}'", dataset, axes[d]));
        H5::DataSet sc = impl_->file->openDataSet(axes[d]);
        hsize_t n = 0;
        if (sc.getSpace().getSimpleExtentNdims() != 1 || (sc.getSpace().getSimpleExtentDims(&n), n != dims[d]))
          throw std::logic_error(fmt::format("'{}': scale '{}' does not match dimension {}", dataset, axes[d], d));
        if (H5DSis_scale(sc.getId()) <= 0 && H5DSset_scale(sc.getId(), leaf_name(axes[d]).c_str()) < 0)
          throw H5::DataSetIException("H5DSset_scale", axes[d]);
        if (H5DSattach_scale(ds.getId(), sc.getId(), static_cast<unsigned>(d)) < 0)
          throw H5::DataSetIException("H5DSattach_scale", dataset);
        if (H5DSset_label(ds.getId(), static_cast<unsigned>(d), leaf_name(axes[d]).c_str()) < 0)
          throw H5::DataSetIException("H5DSset_label", dataset);
      }
    }
    if (impl_->format.sealed) {
      std::vector<std::string> lines;
      for (const auto& [key, h] : impl_->manifest) lines.push_back(fmt::format("{:016x} {}", h, key));
      impl_->manifest_checksum = hdf5_strings_checksum(lines);
      write_strings(kSealManifest, lines, "FNV-1a 64 checksums of the objects gapwise wrote (see the seal in the user block)");
    }
  });
  std::string image = impl_->guarded("the file image", [&] {
    impl_->file->flush(H5F_SCOPE_GLOBAL);
    const ssize_t size = H5Fget_file_image(impl_->file->getId(), nullptr, 0);
    if (size < 0) throw H5::FileIException("H5Fget_file_image", "no file image");
    std::string bytes(static_cast<std::size_t>(size), '\0');
    if (H5Fget_file_image(impl_->file->getId(), bytes.data(), bytes.size()) != size)
      throw H5::FileIException("H5Fget_file_image", "incomplete file image");
    impl_->file->close();
    return bytes;
  });
  impl_->file.reset();
  impl_->committed = true;
  if (impl_->format.sealed) image.insert(0, hdf5_seal_header(image, impl_->format.format, impl_->manifest_checksum));
  return image;
}

void Hdf5Output::commit() {
  write_file_atomically(impl_->final_path, finish_image());  // temporary, fsync, rename; nothing partial is left
}

void write_provenance(Hdf5Output& out, const std::string& command_line, const std::vector<std::string>& inputs) {
  out.group("/provenance");
  out.attribute("/provenance", "tool", std::string("gapwise"));
  out.attribute("/provenance", "version", std::string(kVersion));
  out.attribute("/provenance", "command_line", command_line);
  std::vector<std::string> names, texts;
  for (const auto& f : inputs) {
    std::ifstream in(f, std::ios::binary);
    std::ostringstream t;
    t << in.rdbuf();
    names.push_back(f);
    texts.push_back(t.str());
  }
  out.write_strings("/provenance/input_files", names, "input file names as given");
  out.write_strings("/provenance/input_texts", texts, "the input files' text (UTF-8)");
}

}  // namespace gapwise
