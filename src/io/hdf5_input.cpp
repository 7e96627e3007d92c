#include "io/hdf5_input.hpp"

#include <atomic>
#include <cerrno>
#include <csignal>
#include <cmath>
#include <cstring>

#include <H5Cpp.h>
#include <fmt/format.h>
#include <sys/wait.h>
#include <unistd.h>

#include "io/hdf5_seal.hpp"
#include "io/hdf5_transfer.hpp"
#include "io/input_error.hpp"
#include "io/toml_reader.hpp"

namespace gapwise {

struct Hdf5Input::Impl {
  std::unique_ptr<H5::H5File> file;
};

namespace {
constexpr std::string_view kSignature("\x89HDF\r\n\x1a\n", 8);
const char* const kRewrite = "check that the file was written by this version of gapwise";
}  // namespace

bool looks_like_hdf5(std::string_view bytes) {
  for (std::size_t at = 0; at < bytes.size(); at = at == 0 ? 512 : 2 * at)
    if (bytes.substr(at, kSignature.size()) == kSignature) return true;
  return false;
}

Hdf5Input::Hdf5Input() : impl_(std::make_unique<Impl>()) {}

Hdf5Input::Hdf5Input(const std::string& path) : impl_(std::make_unique<Impl>()), path_(path) {
  H5::Exception::dontPrint();
  try {
    if (!H5::H5File::isHdf5(path.c_str())) throw H5::FileIException("isHdf5", "not HDF5");
    impl_->file = std::make_unique<H5::H5File>(path, H5F_ACC_RDONLY);
  } catch (const H5::Exception&) {
    throw InputError({path, 0, 0, ""}, "not a readable HDF5 file", "give a result file written by gapwise --out");
  }
}

Hdf5Input::Hdf5Input(const std::string& path, const std::string& sealed_format)
    : Hdf5Input(from_bytes(read_text_file(path), path, sealed_format)) {}

Hdf5Input Hdf5Input::from_bytes(std::string_view bytes, const std::string& name, const std::string& sealed_format) {
  H5::Exception::dontPrint();
  const bool annotated = !sealed_format.empty() && check_hdf5_seal(bytes, name, sealed_format) == SealMatch::Annotated;
  if (!looks_like_hdf5(bytes))
    throw InputError({name, 0, 0, ""}, "this is not an HDF5 file (no HDF5 signature)", "give an HDF5 file written by gapwise");
  Hdf5Input in;
  in.path_ = name;
  // The core driver refuses the name of a file that exists on disk ("file already
  // exists"), so the image is opened under a name of its own; messages use `name`.
  static std::atomic<unsigned long> images{0};
  const std::string image_name = fmt::format("gapwise-in-memory-image-{}-{}", static_cast<long>(::getpid()), images++);
  try {
    H5::FileAccPropList fapl;
    if (H5Pset_fapl_core(fapl.getId(), 1 << 16, 0) < 0 ||
        H5Pset_file_image(fapl.getId(), const_cast<char*>(bytes.data()), bytes.size()) < 0)
      throw std::runtime_error("HDF5: cannot set up an in-memory file");
    in.impl_->file = std::make_unique<H5::H5File>(image_name, H5F_ACC_RDONLY, H5::FileCreatPropList::DEFAULT, fapl);
  } catch (const H5::Exception&) {
    throw InputError({name, 0, 0, ""}, "the HDF5 file is damaged or truncated and cannot be opened",
                     "write it again (gapwise writes atomically, so a finished file is whole)");
  }
  if (annotated) {
    check_annotated_in_child(bytes, name);  // HDF5 may crash on damaged bytes: find out in a child process
    in.check_manifest(hdf5_seal_manifest(bytes));
  }
  return in;
}

// A sealed file another client changed is parsed by HDF5 first in a forked
// child: HDF5 1.10 aborts or loops on some damaged images
// (fuzz/known-hdf5-crashes/), and a damaged file must be an InputError, never a
// crash. The child opens the image and checks the manifest; its InputError
// comes back through a pipe, a crash or a time-out becomes an InputError here.
void Hdf5Input::check_annotated_in_child(std::string_view bytes, const std::string& name) {
  const std::string fix = "write the file again with gapwise (other HDF5 clients may add attributes and datasets, "
                          "not change gapwise's)";
  int fds[2];
  if (::pipe(fds) != 0) throw std::runtime_error("cannot create a pipe to check '" + name + "'");
  const pid_t pid = ::fork();
  if (pid < 0) throw std::runtime_error("cannot fork to check '" + name + "'");
  if (pid == 0) {
    ::close(fds[0]);
    for (int sig : {SIGABRT, SIGSEGV, SIGBUS, SIGFPE, SIGILL, SIGALRM}) std::signal(sig, SIG_DFL);  // no inherited handlers
    ::alarm(120);
    int status = 0;
    std::string report;
    try {
      Hdf5Input in = from_bytes(bytes, name);
      in.check_manifest(hdf5_seal_manifest(bytes));
    } catch (const InputError& e) {
      report = e.place().key + '\0' + e.problem() + '\0' + e.fix();
      status = 1;
    } catch (...) {
      status = 2;
    }
    for (std::size_t done = 0; done < report.size();) {
      const ssize_t n = ::write(fds[1], report.data() + done, report.size() - done);
      if (n <= 0) break;
      done += static_cast<std::size_t>(n);
    }
    ::_exit(status);
  }
  ::close(fds[1]);
  std::string report;
  char buf[4096];
  for (ssize_t n; (n = ::read(fds[0], buf, sizeof buf)) > 0;) report.append(buf, static_cast<std::size_t>(n));
  ::close(fds[0]);
  int status = 0;
  while (::waitpid(pid, &status, 0) < 0 && errno == EINTR) {}
  if (WIFEXITED(status) && WEXITSTATUS(status) == 0) return;
  if (WIFEXITED(status) && WEXITSTATUS(status) == 1) {
    const auto a = report.find('\0'), b = report.find('\0', a == std::string::npos ? 0 : a + 1);
    if (a != std::string::npos && b != std::string::npos)
      throw InputError({name, 0, 0, report.substr(0, a)}, report.substr(a + 1, b - a - 1), report.substr(b + 1));
  }
  throw InputError({name, 0, 0, ""},
                   "the file was changed after gapwise wrote it and the HDF5 library cannot read it (it "
                   "crashed or stalled on these bytes)",
                   fix);
}

namespace {
std::uint64_t hash_of(const void* data, std::size_t n) {
  return fnv1a64(std::string_view(static_cast<const char*>(data), n));
}
}  // namespace

// An annotated sealed file (io/hdf5_seal.hpp): every object gapwise wrote must
// still be there with the checksum it had.
void Hdf5Input::check_manifest(std::uint64_t expected) const {
  const std::string fix = "the file was changed after gapwise wrote it: write it again with gapwise "
                          "(other HDF5 clients may add attributes and datasets, not change gapwise's)";
  if (!has(kSealManifest)) fail(kSealManifest, "the seal's manifest is missing", fix);
  const auto lines = read_strings(kSealManifest);
  if (hdf5_strings_checksum(lines) != expected) fail(kSealManifest, "the seal's manifest does not match the seal", fix);
  for (const auto& line : lines) {
    if (line.size() < 18 || line[16] != ' ') fail(kSealManifest, "a manifest line is malformed", fix);
    const std::uint64_t want = std::stoull(line.substr(0, 16), nullptr, 16);
    const std::string key = line.substr(17);
    const auto at = key.find('@');
    std::uint64_t got = 0;
    try {
      if (at == std::string::npos) {
        if (!has(key)) fail(key, "a dataset gapwise wrote is missing", fix);
        H5::DataSet ds = impl_->file->openDataSet(key);
        const H5T_class_t c = ds.getTypeClass();
        if (c == H5T_STRING) {
          got = hdf5_strings_checksum(read_strings(key));
        } else if (c == H5T_INTEGER) {
          const auto n = static_cast<std::size_t>(ds.getSpace().getSimpleExtentNpoints());
          std::vector<long long> v(n);
          if (n) ds.read(v.data(), H5::PredType::NATIVE_LLONG);
          got = hash_of(v.data(), n * sizeof(long long));
        } else {
          const auto v = read(key);
          got = hash_of(v.data(), v.size() * sizeof(double));
        }
      } else {
        const std::string object = at == 0 ? "/" : key.substr(0, at), name = key.substr(at + 1);
        if (!has_attribute(object, name)) fail(attr_key_text(object, name), "an attribute gapwise wrote is missing", fix);
        got = with_attribute_class(object, name) == H5T_STRING ? [&] { const auto v = attribute_string(object, name); return hash_of(v.data(), v.size()); }()
              : with_attribute_class(object, name) == H5T_INTEGER ? [&] { const long long v = attribute_int(object, name); return hash_of(&v, sizeof v); }()
                                                                 : [&] { const double v = attribute_double(object, name); return hash_of(&v, sizeof v); }();
      }
    } catch (const H5::Exception& e) {
      fail(key, "cannot read it back: " + e.getDetailMsg(), fix);
    }
    if (got != want) fail(at == std::string::npos ? key : attr_key_text(key.substr(0, at == 0 ? 1 : at), key.substr(at + 1)),
                          "its content differs from what gapwise wrote", fix);
  }
}

Hdf5Input::~Hdf5Input() = default;
Hdf5Input::Hdf5Input(Hdf5Input&&) noexcept = default;
Hdf5Input& Hdf5Input::operator=(Hdf5Input&&) noexcept = default;

void Hdf5Input::fail(const std::string& key, const std::string& problem, const std::string& fix) const {
  throw InputError({path_, 0, 0, key}, problem, fix);
}

bool Hdf5Input::has(const std::string& object) const {
  // Check each prefix: nameExists fails on missing intermediate groups.
  if (object == "/") return true;
  if (object.empty() || object[0] != '/') return false;
  std::string cur;
  std::size_t pos = 1;
  try {
    while (pos <= object.size()) {
      const std::size_t next = object.find('/', pos);
      cur = object.substr(0, next == std::string::npos ? object.size() : next);
      if (!impl_->file->nameExists(cur)) return false;
      if (next == std::string::npos) break;
      pos = next + 1;
    }
  } catch (const H5::Exception&) {
    return false;
  }
  return true;
}

namespace {
template <class F>
auto with_object(H5::H5File& f, const std::string& path, F fn) {
  H5O_info_t info;
  if (H5Oget_info_by_name(f.getId(), path.c_str(), &info, H5P_DEFAULT) < 0) throw H5::GroupIException("open", "missing");
  if (info.type == H5O_TYPE_DATASET) { H5::DataSet d = f.openDataSet(path); return fn(static_cast<H5::H5Object&>(d)); }
  H5::Group g = f.openGroup(path);
  return fn(static_cast<H5::H5Object&>(g));
}

std::string attr_key(const std::string& object, const std::string& name) {
  return object == "/" ? "@" + name : object + "@" + name;
}
// The in-memory string type that reads a stored one without a character-set
// conversion (HDF5 refuses ASCII <-> UTF-8).
H5::StrType memory_string_type(H5T_cset_t cset) {
  H5::StrType st(H5::PredType::C_S1, H5T_VARIABLE);
  st.setCset(cset);
  return st;
}
}  // namespace

std::string Hdf5Input::attr_key_text(const std::string& object, const std::string& name) { return attr_key(object, name); }

int Hdf5Input::with_attribute_class(const std::string& object, const std::string& name) const {
  return with_object(*impl_->file, object, [&](H5::H5Object& o) { return static_cast<int>(o.openAttribute(name).getTypeClass()); });
}

bool Hdf5Input::has_attribute(const std::string& object, const std::string& name) const {
  if (!has(object)) return false;
  try {
    return with_object(*impl_->file, object, [&](H5::H5Object& o) { return o.attrExists(name); });
  } catch (const H5::Exception&) {
    return false;
  }
}

std::vector<std::size_t> Hdf5Input::shape(const std::string& dataset) const {
  if (!has(dataset)) fail(dataset, "required dataset is missing", kRewrite);
  try {
    H5::DataSet ds = impl_->file->openDataSet(dataset);
    H5::DataSpace sp = ds.getSpace();
    std::vector<hsize_t> d(static_cast<std::size_t>(sp.getSimpleExtentNdims()));
    sp.getSimpleExtentDims(d.data());
    return {d.begin(), d.end()};
  } catch (const H5::Exception& e) {
    fail(dataset, "cannot read this dataset's shape: " + e.getDetailMsg(), kRewrite);
  }
}

std::vector<double> Hdf5Input::read(const std::string& dataset) const {
  if (!has(dataset)) fail(dataset, "required dataset is missing", kRewrite);
  try {
    H5::DataSet ds = impl_->file->openDataSet(dataset);
    const H5T_class_t c = ds.getTypeClass();
    if (c != H5T_FLOAT && c != H5T_INTEGER) fail(dataset, "expected numbers", kRewrite);
    const auto n = static_cast<std::size_t>(ds.getSpace().getSimpleExtentNpoints());
    if (n > (std::size_t{1} << 32)) fail(dataset, "implausibly large dataset", kRewrite);
    std::vector<double> v(n);
    if (n) ds.read(v.data(), H5::PredType::NATIVE_DOUBLE);
    return v;
  } catch (const H5::Exception& e) {
    fail(dataset, "cannot read this dataset: " + e.getDetailMsg(), kRewrite);
  }
}

namespace {
const char* kNonFiniteFix =
    "gapwise writes NaN or infinity only in datasets that say what they mean (attributes nan_meaning, "
    "inf_meaning); the file was changed after it was written: run the command again to rewrite it";
}  // namespace

std::vector<double> Hdf5Input::read_finite(const std::string& dataset) const {
  std::vector<double> v = read(dataset);
  const bool nan_ok = has_attribute(dataset, "nan_meaning"), inf_ok = has_attribute(dataset, "inf_meaning");
  for (std::size_t k = 0; k < v.size(); ++k)
    if (!std::isfinite(v[k]) && !(std::isnan(v[k]) && nan_ok) && !(std::isinf(v[k]) && v[k] > 0 && inf_ok))
      fail(dataset, fmt::format("entry {} (0-based, of {}{}) is {}: a figure would draw a silent gap there", k, v.size(),
                                shape(dataset).size() > 1 ? ", row-major" : "", v[k]),
           kNonFiniteFix);
  return v;
}

double Hdf5Input::attribute_finite(const std::string& object, const std::string& name) const {
  const double v = attribute_double(object, name);
  if (!std::isfinite(v)) fail(attr_key(object, name), fmt::format("the value is {}", v), kNonFiniteFix);
  return v;
}

namespace {
std::size_t list_length(const Hdf5Input& in, const std::string& dataset, std::optional<std::size_t> expected) {
  const auto dims = in.shape(dataset);
  if (dims.size() > 2 || (dims.size() == 2 && dims[1] != 1))
    in.fail(dataset, fmt::format("expected a list, found a dataset of rank {}", dims.size()), kRewrite);
  const std::size_t n = dims.empty() ? 1 : dims[0];
  if (expected && n != *expected)
    in.fail(dataset, fmt::format("expected {} entries, found {}", *expected, n),
            "the lengths of an object's datasets must agree; write the file with gapwise");
  return n;
}
}  // namespace

std::vector<double> Hdf5Input::read_list(const std::string& dataset, std::optional<std::size_t> expected) const {
  list_length(*this, dataset, expected);
  return read(dataset);
}

std::vector<long long> Hdf5Input::read_int_list(const std::string& dataset, std::optional<std::size_t> expected) const {
  const std::size_t n = list_length(*this, dataset, expected);
  try {
    H5::DataSet ds = impl_->file->openDataSet(dataset);
    if (ds.getTypeClass() != H5T_INTEGER) fail(dataset, "expected integers", kRewrite);
    std::vector<long long> v(n);
    if (n) ds.read(v.data(), H5::PredType::NATIVE_LLONG);
    return v;
  } catch (const H5::Exception& e) {
    fail(dataset, "cannot read this dataset: " + e.getDetailMsg(), kRewrite);
  }
}

std::vector<std::string> Hdf5Input::read_strings(const std::string& dataset, std::optional<std::size_t> expected) const {
  const std::size_t n = list_length(*this, dataset, expected);
  try {
    H5::DataSet ds = impl_->file->openDataSet(dataset);
    if (ds.getTypeClass() != H5T_STRING || !ds.getStrType().isVariableStr())
      fail(dataset, "expected variable-length strings", kRewrite);
    std::vector<char*> raw(n, nullptr);
    const H5::StrType st = memory_string_type(ds.getStrType().getCset());
    if (n) ds.read(raw.data(), st, H5::DataSpace::ALL, H5::DataSpace::ALL, small_conversion_buffer());
    std::vector<std::string> out;
    for (char* c : raw) out.emplace_back(c ? c : "");
    if (n) H5Dvlen_reclaim(st.getId(), ds.getSpace().getId(), H5P_DEFAULT, raw.data());
    return out;
  } catch (const H5::Exception& e) {
    fail(dataset, "cannot read these strings: " + e.getDetailMsg(), kRewrite);
  }
}

double Hdf5Input::attribute_double(const std::string& object, const std::string& name) const {
  try {
    return with_object(*impl_->file, object, [&](H5::H5Object& o) {
      H5::Attribute a = o.openAttribute(name);
      const H5T_class_t c = a.getTypeClass();
      if ((c != H5T_FLOAT && c != H5T_INTEGER) || a.getSpace().getSimpleExtentNpoints() != 1)
        fail(attr_key(object, name), "expected a single number", kRewrite);
      double v = 0;
      a.read(H5::PredType::NATIVE_DOUBLE, &v);
      return v;
    });
  } catch (const H5::Exception&) {
    throw InputError({path_, 0, 0, attr_key(object, name)}, "missing or unreadable attribute", kRewrite);
  }
}

long long Hdf5Input::attribute_int(const std::string& object, const std::string& name) const {
  try {
    return with_object(*impl_->file, object, [&](H5::H5Object& o) {
      H5::Attribute a = o.openAttribute(name);
      if (a.getTypeClass() != H5T_INTEGER || a.getSpace().getSimpleExtentNpoints() != 1)
        fail(attr_key(object, name), "expected a single integer", kRewrite);
      long long v = 0;
      a.read(H5::PredType::NATIVE_LLONG, &v);
      return v;
    });
  } catch (const H5::Exception&) {
    throw InputError({path_, 0, 0, attr_key(object, name)}, "missing or unreadable attribute", kRewrite);
  }
}

std::string Hdf5Input::attribute_string(const std::string& object, const std::string& name) const {
  try {
    return with_object(*impl_->file, object, [&](H5::H5Object& o) {
      H5::Attribute a = o.openAttribute(name);
      if (a.getTypeClass() != H5T_STRING || a.getSpace().getSimpleExtentNpoints() != 1 || !a.getStrType().isVariableStr())
        fail(attr_key(object, name), "expected a single string", kRewrite);
      std::string v;
      a.read(memory_string_type(a.getStrType().getCset()), v);
      return v;
    });
  } catch (const H5::Exception&) {
    throw InputError({path_, 0, 0, attr_key(object, name)}, "missing or unreadable attribute", kRewrite);
  }
}

std::vector<std::string> Hdf5Input::members(const std::string& group) const {
  try {
    H5::Group g = impl_->file->openGroup(group);
    std::vector<std::string> out;
    for (hsize_t k = 0; k < g.getNumObjs(); ++k) out.push_back(g.getObjnameByIdx(k));
    return out;
  } catch (const H5::Exception&) {
    fail(group, "missing or unreadable group", kRewrite);
  }
}

}  // namespace gapwise
