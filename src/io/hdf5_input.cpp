#include "io/hdf5_input.hpp"

#include <H5Cpp.h>
#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

struct Hdf5Input::Impl {
  std::unique_ptr<H5::H5File> file;
};

Hdf5Input::Hdf5Input(const std::string& path) : impl_(std::make_unique<Impl>()), path_(path) {
  H5::Exception::dontPrint();
  try {
    if (!H5::H5File::isHdf5(path.c_str())) throw H5::FileIException("isHdf5", "not HDF5");
    impl_->file = std::make_unique<H5::H5File>(path, H5F_ACC_RDONLY);
  } catch (const H5::Exception&) {
    throw InputError({path, 0, 0, ""}, "not a readable HDF5 file", "give a result file written by gapwise --out");
  }
}

Hdf5Input::~Hdf5Input() = default;

bool Hdf5Input::has(const std::string& object) const {
  // Check each prefix: nameExists fails on missing intermediate groups.
  std::string cur;
  std::size_t pos = 1;
  while (pos <= object.size()) {
    const std::size_t next = object.find('/', pos);
    cur = object.substr(0, next == std::string::npos ? object.size() : next);
    if (!impl_->file->nameExists(cur)) return false;
    if (next == std::string::npos) break;
    pos = next + 1;
  }
  return true;
}

namespace {
template <class F>
auto with_object(H5::H5File& f, const std::string& path, F fn) {
  H5O_info_t info;
  H5Oget_info_by_name(f.getId(), path.c_str(), &info, H5P_DEFAULT);
  if (info.type == H5O_TYPE_DATASET) { H5::DataSet d = f.openDataSet(path); return fn(static_cast<H5::H5Object&>(d)); }
  H5::Group g = f.openGroup(path);
  return fn(static_cast<H5::H5Object&>(g));
}
}  // namespace

bool Hdf5Input::has_attribute(const std::string& object, const std::string& name) const {
  if (!has(object)) return false;
  return with_object(*impl_->file, object, [&](H5::H5Object& o) { return o.attrExists(name); });
}

std::vector<std::size_t> Hdf5Input::shape(const std::string& dataset) const {
  H5::DataSet ds = impl_->file->openDataSet(dataset);
  H5::DataSpace sp = ds.getSpace();
  std::vector<hsize_t> d(static_cast<std::size_t>(sp.getSimpleExtentNdims()));
  sp.getSimpleExtentDims(d.data());
  return {d.begin(), d.end()};
}

std::vector<double> Hdf5Input::read(const std::string& dataset) const {
  try {
    H5::DataSet ds = impl_->file->openDataSet(dataset);
    const auto n = static_cast<std::size_t>(ds.getSpace().getSimpleExtentNpoints());
    std::vector<double> v(n);
    if (n) ds.read(v.data(), H5::PredType::NATIVE_DOUBLE);
    return v;
  } catch (const H5::Exception& e) {
    throw InputError({path_, 0, 0, dataset}, "cannot read this dataset: " + e.getDetailMsg(),
                     "check that the file was written by this version of gapwise");
  }
}

std::vector<std::string> Hdf5Input::read_strings(const std::string& dataset) const {
  H5::DataSet ds = impl_->file->openDataSet(dataset);
  const auto n = static_cast<std::size_t>(ds.getSpace().getSimpleExtentNpoints());
  std::vector<char*> raw(n, nullptr);
  H5::StrType st(H5::PredType::C_S1, H5T_VARIABLE);
  if (n) ds.read(raw.data(), st);
  std::vector<std::string> out;
  for (char* c : raw) out.emplace_back(c ? c : "");
  if (n) H5Dvlen_reclaim(st.getId(), ds.getSpace().getId(), H5P_DEFAULT, raw.data());
  return out;
}

double Hdf5Input::attribute_double(const std::string& object, const std::string& name) const {
  try {
    return with_object(*impl_->file, object, [&](H5::H5Object& o) {
      double v = 0;
      o.openAttribute(name).read(H5::PredType::NATIVE_DOUBLE, &v);
      return v;
    });
  } catch (const H5::Exception&) {
    throw InputError({path_, 0, 0, object + "@" + name}, "missing or unreadable attribute",
                     "check that the file was written by this version of gapwise");
  }
}

std::string Hdf5Input::attribute_string(const std::string& object, const std::string& name) const {
  try {
    return with_object(*impl_->file, object, [&](H5::H5Object& o) {
      std::string v;
      o.openAttribute(name).read(H5::StrType(H5::PredType::C_S1, H5T_VARIABLE), v);
      return v;
    });
  } catch (const H5::Exception&) {
    throw InputError({path_, 0, 0, object + "@" + name}, "missing or unreadable attribute",
                     "check that the file was written by this version of gapwise");
  }
}

std::vector<std::string> Hdf5Input::members(const std::string& group) const {
  H5::Group g = impl_->file->openGroup(group);
  std::vector<std::string> out;
  for (hsize_t k = 0; k < g.getNumObjs(); ++k) out.push_back(g.getObjnameByIdx(k));
  return out;
}

}  // namespace gapwise
