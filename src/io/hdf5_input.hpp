#pragma once
// Reading gapwise's HDF5 files back (figures, instance sets, ensemble results,
// resumption, tests), from a path or from bytes in memory (tests, fuzzing).
// Failures — not HDF5, a broken seal, a missing object, a wrong type or length —
// are InputErrors naming the file, the object path as key, and what to do.
//
// Files gapwise writes in order to read them again (instance sets, ensemble
// results) carry a seal (io/hdf5_seal.hpp); giving its format checks the seal
// before the HDF5 library parses a byte.
//
//   Hdf5Input in("run.h5");
//   if (in.has("/anneal/trace/s")) { auto s = in.read("/anneal/trace/s"); }
//   double p = in.attribute_double("/anneal", "ground_probability");
//
//   Hdf5Input set = Hdf5Input::from_bytes(bytes, "set.h5", "gapwise-instance-set");
//   std::vector<double> h = set.read_list("/instances/n08-003/fields", 8);   // length checked
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace gapwise {

/// True when `bytes` hold the HDF5 signature at offset 0 or after a user block
/// of 512, 1024, ... bytes (the places HDF5 itself looks).
bool looks_like_hdf5(std::string_view bytes);

class Hdf5Input {
 public:
  /// Throws InputError naming the path when it is not a readable HDF5 file.
  explicit Hdf5Input(const std::string& path);
  /// The file's bytes, seal checked first when `sealed_format` is given.
  Hdf5Input(const std::string& path, const std::string& sealed_format);
  /// An in-memory image; `name` stands in for the file name in messages.
  static Hdf5Input from_bytes(std::string_view bytes, const std::string& name, const std::string& sealed_format = {});
  ~Hdf5Input();
  Hdf5Input(Hdf5Input&&) noexcept;
  Hdf5Input& operator=(Hdf5Input&&) noexcept;
  Hdf5Input(const Hdf5Input&) = delete;
  Hdf5Input& operator=(const Hdf5Input&) = delete;

  bool has(const std::string& object) const;
  bool has_attribute(const std::string& object, const std::string& name) const;
  /// Whole dataset as doubles (any numeric type), row-major.
  std::vector<double> read(const std::string& dataset) const;
  /// Variable-length strings; `expected` checks the count when given.
  std::vector<std::string> read_strings(const std::string& dataset, std::optional<std::size_t> expected = {}) const;
  /// read(), refusing (InputError naming the dataset and the first bad index) a
  /// NaN or an infinity the dataset does not declare: gapwise writes NaN ("not
  /// applicable") only with a `nan_meaning` attribute and +inf (an infinite time
  /// to solution) only with `inf_meaning`, so any other one means the file was
  /// altered or damaged.
  std::vector<double> read_finite(const std::string& dataset) const;
  /// Dimensions of a dataset.
  std::vector<std::size_t> shape(const std::string& dataset) const;
  double attribute_double(const std::string& object, const std::string& name) const;
  /// attribute_double(), refusing a NaN or an infinity.
  double attribute_finite(const std::string& object, const std::string& name) const;
  std::string attribute_string(const std::string& object, const std::string& name) const;
  /// An integer attribute (a floating-point one is refused).
  long long attribute_int(const std::string& object, const std::string& name) const;
  /// Names of the members of a group.
  std::vector<std::string> members(const std::string& group) const;
  const std::string& path() const { return path_; }

  /// A 1-D (or n x 1) numeric dataset, its length checked against `expected` when given.
  std::vector<double> read_list(const std::string& dataset, std::optional<std::size_t> expected = {}) const;
  /// The same for integer datasets (a floating-point dataset is refused).
  std::vector<long long> read_int_list(const std::string& dataset, std::optional<std::size_t> expected = {}) const;

  /// Throws InputError for this file, with `key` (an object path) as the place.
  [[noreturn]] void fail(const std::string& key, const std::string& problem, const std::string& fix) const;

 private:
  Hdf5Input();
  void check_manifest(std::uint64_t expected) const;
  static void check_annotated_in_child(std::string_view bytes, const std::string& name);
  int with_attribute_class(const std::string& object, const std::string& name) const;
  static std::string attr_key_text(const std::string& object, const std::string& name);
  struct Impl;
  std::unique_ptr<Impl> impl_;
  std::string path_;
};

}  // namespace gapwise
