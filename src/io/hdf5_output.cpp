#include "io/hdf5_output.hpp"

#include <atomic>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <stdexcept>

#include <H5Cpp.h>
#include <fmt/format.h>
#include <unistd.h>

#include "gapwise_version.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_seal.hpp"
#include "io/hdf5_transfer.hpp"

namespace gapwise {

// The file is built in memory (HDF5's core driver, no backing store) and written
// by commit() in one checked write to a temporary file, then renamed. HDF5 never
// touches the disk: a write that fails (full disk, quota) is our own I/O with a
// clear message, never a half-flushed HDF5 file (HDF5 1.10 crashes at exit
// after a failed flush). Sealed files get their 512-byte header in front of the
// image (the image holds no user block; its superblock still records the
// 512-byte base address, so HDF5 finds it at offset 512).
struct Hdf5Output::Impl {
  std::string final_path, image_name, sealed_format;
  std::unique_ptr<H5::H5File> file;
  bool committed = false;
  bool permit_non_finite = false;

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

Hdf5Output::Hdf5Output(std::string final_path, std::string sealed_format) : impl_(std::make_unique<Impl>()) {
  check_output_path(final_path, "--out");
  impl_->final_path = std::move(final_path);
  impl_->sealed_format = std::move(sealed_format);
  static std::atomic<unsigned long> images{0};
  impl_->image_name = fmt::format("gapwise-in-memory-output-{}-{}", static_cast<long>(::getpid()), images++);
  H5::Exception::dontPrint();
  try {
    H5::FileCreatPropList fcpl;
    if (!impl_->sealed_format.empty()) fcpl.setUserblock(kSealBytes);
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
void unit_attr(H5::DataSet& ds, const std::string& unit) {
  H5::StrType st(H5::PredType::C_S1, H5T_VARIABLE);
  ds.createAttribute("unit", st, H5::DataSpace(H5S_SCALAR)).write(st, unit);
}
void check_finite(const std::string& path, const std::vector<double>& v) {
  for (double x : v)
    if (!std::isfinite(x))
      throw std::runtime_error(fmt::format("refusing to write a non-finite number into '{}'", path));
}
}  // namespace

void Hdf5Output::write(const std::string& path, const std::vector<double>& v, const std::string& unit) {
  write_matrix(path, v, v.size(), 1, unit);
}

void Hdf5Output::write_matrix(const std::string& path, const std::vector<double>& v, std::size_t rows,
                              std::size_t cols, const std::string& unit) {
  if (!impl_->permit_non_finite) check_finite(path, v);
  group(parent_of(path));
  if (rows * cols != v.size())
    throw std::logic_error(fmt::format("'{}': {} values for a {} x {} matrix", path, v.size(), rows, cols));
  impl_->guarded("dataset '" + path + "'", [&] {
    hsize_t dims[2] = {rows, cols};
    H5::DataSpace space(cols == 1 ? 1 : 2, dims);
    H5::DataSet ds = impl_->file->createDataSet(path, H5::PredType::NATIVE_DOUBLE, space);
    if (!v.empty()) ds.write(v.data(), H5::PredType::NATIVE_DOUBLE);
    unit_attr(ds, unit);
  });
}

void Hdf5Output::write(const std::string& path, const std::vector<long long>& v, const std::string& unit) {
  group(parent_of(path));
  impl_->guarded("dataset '" + path + "'", [&] {
    hsize_t dims[1] = {v.size()};
    H5::DataSpace space(1, dims);
    H5::DataSet ds = impl_->file->createDataSet(path, H5::PredType::NATIVE_LLONG, space);
    if (!v.empty()) ds.write(v.data(), H5::PredType::NATIVE_LLONG);
    unit_attr(ds, unit);
  });
}

void Hdf5Output::write_strings(const std::string& path, const std::vector<std::string>& v) {
  group(parent_of(path));
  std::vector<const char*> ptrs;
  for (const auto& s : v) ptrs.push_back(s.c_str());
  impl_->guarded("dataset '" + path + "'", [&] {
    hsize_t dims[1] = {v.size()};
    H5::DataSpace space(1, dims);
    H5::StrType st(H5::PredType::C_S1, H5T_VARIABLE);
    H5::DataSet ds = impl_->file->createDataSet(path, st, space);
    if (!v.empty()) ds.write(ptrs.data(), st, H5::DataSpace::ALL, H5::DataSpace::ALL, small_conversion_buffer());
  });
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
    H5::StrType st(H5::PredType::C_S1, H5T_VARIABLE);
    o.createAttribute(name, st, H5::DataSpace(H5S_SCALAR)).write(st, value);
  }); });
}

void Hdf5Output::attribute(const std::string& object, const std::string& name, double value) {
  if (!std::isfinite(value) && !impl_->permit_non_finite)
    throw std::runtime_error(fmt::format("refusing to write a non-finite number into '{}@{}'", object, name));
  if (object != "/") group(object);  // creates missing parents too
  impl_->guarded("attribute '" + object + "@" + name + "'", [&] { with_object(*impl_->file, object, [&](H5::H5Object& o) {
    o.createAttribute(name, H5::PredType::NATIVE_DOUBLE, H5::DataSpace(H5S_SCALAR)).write(H5::PredType::NATIVE_DOUBLE, &value);
  }); });
}

void Hdf5Output::attribute(const std::string& object, const std::string& name, long long value) {
  if (object != "/") group(object);  // creates missing parents too
  impl_->guarded("attribute '" + object + "@" + name + "'", [&] { with_object(*impl_->file, object, [&](H5::H5Object& o) {
    o.createAttribute(name, H5::PredType::NATIVE_LLONG, H5::DataSpace(H5S_SCALAR)).write(H5::PredType::NATIVE_LLONG, &value);
  }); });
}

void Hdf5Output::permit_non_finite() { impl_->permit_non_finite = true; }

std::string Hdf5Output::finish_image() {
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
  if (!impl_->sealed_format.empty()) image.insert(0, hdf5_seal_header(image, impl_->sealed_format));
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
  out.write_strings("/provenance/input_files", names);
  out.write_strings("/provenance/input_texts", texts);
}

}  // namespace gapwise
