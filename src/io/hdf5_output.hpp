#pragma once
// An HDF5 result file written atomically: built in memory, written by commit()
// to a temporary file beside the target with checked I/O, then renamed over it.
// A failure (full disk, HDF5 error) throws std::runtime_error naming the file
// and what failed, and leaves the previous file (if any) untouched; nothing of
// HDF5's own error stack is printed. Results are held in memory until commit()
// (they are small: traces, maps and at most 2^n outcome probabilities).
// Datasets carry a "unit" attribute; every file carries the tool version and the
// inputs for provenance (write_provenance). Readable by any HDF5 client (h5py, h5dump).
//
//   Hdf5Output out("run.h5");
//   out.write("/anneal/trace/s", s_values, "1");
//   out.write("/anneal/trace/t", t_values, "ns");
//   out.attribute("/anneal", "ground_probability", 0.93);
//   out.commit();   // without commit() the target is left untouched
#include <memory>
#include <string>
#include <vector>

namespace gapwise {

class Hdf5Output {
 public:
  /// With a `sealed_format`, the file gets gapwise's seal (io/hdf5_seal.hpp) on commit().
  explicit Hdf5Output(std::string final_path, std::string sealed_format = {});
  ~Hdf5Output();
  Hdf5Output(const Hdf5Output&) = delete;
  Hdf5Output& operator=(const Hdf5Output&) = delete;

  /// Creates the group and its parents if needed.
  void group(const std::string& path);
  void write(const std::string& path, const std::vector<double>& values, const std::string& unit);
  void write(const std::string& path, const std::vector<long long>& values, const std::string& unit);
  /// Row-major rows x cols matrix.
  void write_matrix(const std::string& path, const std::vector<double>& values, std::size_t rows,
                    std::size_t cols, const std::string& unit);
  void write_strings(const std::string& path, const std::vector<std::string>& values);
  void attribute(const std::string& object, const std::string& name, const std::string& value);
  void attribute(const std::string& object, const std::string& name, double value);
  void attribute(const std::string& object, const std::string& name, long long value);
  void commit();
  /// Closes the file and returns its bytes (sealed when a format was given)
  /// instead of writing them; the target is left untouched. For tests and
  /// fuzzing, which need a file image in memory.
  std::string finish_image();
  /// Lets NaN and infinities through (refused by default: gapwise never writes
  /// them). Only for tests and fuzzing that must build the files another HDF5
  /// client could write, to check that gapwise's readers refuse them.
  void permit_non_finite();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

/// /provenance: tool version, command line, and the input files' text.
void write_provenance(Hdf5Output& out, const std::string& command_line, const std::vector<std::string>& input_files);

}  // namespace gapwise
