#pragma once
// Reading gapwise result files back (for figures, resumption and tests).
//
//   Hdf5Input in("run.h5");
//   if (in.has("/anneal/trace/s")) { auto s = in.read("/anneal/trace/s"); }
//   double p = in.attribute_double("/anneal", "ground_probability");
#include <memory>
#include <string>
#include <vector>

namespace gapwise {

class Hdf5Input {
 public:
  /// Throws InputError naming the path when it is not a readable HDF5 file.
  explicit Hdf5Input(const std::string& path);
  ~Hdf5Input();
  Hdf5Input(const Hdf5Input&) = delete;
  Hdf5Input& operator=(const Hdf5Input&) = delete;

  bool has(const std::string& object) const;
  bool has_attribute(const std::string& object, const std::string& name) const;
  /// Whole dataset as doubles (any numeric type), row-major.
  std::vector<double> read(const std::string& dataset) const;
  std::vector<std::string> read_strings(const std::string& dataset) const;
  /// Dimensions of a dataset.
  std::vector<std::size_t> shape(const std::string& dataset) const;
  double attribute_double(const std::string& object, const std::string& name) const;
  std::string attribute_string(const std::string& object, const std::string& name) const;
  /// Names of the members of a group.
  std::vector<std::string> members(const std::string& group) const;
  const std::string& path() const { return path_; }

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
  std::string path_;
};

}  // namespace gapwise
