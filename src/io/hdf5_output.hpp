#pragma once
// An HDF5 result file written atomically: built in memory, written by commit()
// to a temporary file beside the target with checked I/O, then renamed over it.
// A failure (full disk, HDF5 error) throws std::runtime_error naming the file
// and what failed, and leaves the previous file (if any) untouched; nothing of
// HDF5's own error stack is printed. Results are held in memory until commit()
// (they are small: traces, maps and at most 2^n outcome probabilities).
// Readable by any HDF5 client (h5py, h5dump). The conventions every file keeps
// (notebooks-free-docs/user-guide.md, "HDF5 conventions"):
//   - the root carries `format` (e.g. "gapwise-anneal") and `format_version`;
//   - strings (datasets and attributes) are UTF-8, variable length;
//   - every numeric dataset carries `units`, parseable by the small grammar of
//     io/units_grammar.hpp ("ns", "GHz", "1", "GHz/ns"); prose goes to `legend`,
//     integer codes to `flag_values` + `flag_meanings` (CF conventions style);
//   - NaN and +inf are written only where the DataMeaning says what they mean
//     (`nan_meaning`, `inf_meaning`): +inf an infinite time to solution, NaN
//     "not applicable"; anywhere else they are refused as a bug;
//   - matrices have HDF5 dimension scales on both axes (attach_scales).
//
//   Hdf5Output out("run.h5", {"gapwise-anneal"});
//   out.write("/anneal/trace/s", s_values, "1");
//   out.write("/anneal/trace/t", t_values, "ns");
//   out.write("/x/tts_ns", tts, DataMeaning("ns").inf_means("p = 0: no number of repetitions reaches the target"));
//   out.write_matrix("/m/p", p, rows, cols, "1", {"/m/pause_s", "/m/pause_ns"});
//   out.attribute("/anneal", "ground_probability", 0.93);
//   out.commit();   // without commit() the target is left untouched
#include <memory>
#include <string>
#include <vector>

namespace gapwise {

/// What the numbers of a dataset mean: parseable units and, in their own
/// attributes, a legend, flag codes and the meaning of NaN / +inf.
struct DataMeaning {
  std::string units;
  std::string legend;
  std::vector<long long> flag_values;
  std::string flag_meanings;  ///< one word per flag value, space separated
  std::string nan_meaning, inf_meaning;
  DataMeaning(const char* u) : units(u) {}  // NOLINT: a plain unit string is the common case
  DataMeaning(std::string u) : units(std::move(u)) {}  // NOLINT
  DataMeaning described(std::string text) const { DataMeaning m = *this; m.legend = std::move(text); return m; }
  DataMeaning flagged(std::vector<long long> values, std::string meanings) const {
    DataMeaning m = *this; m.flag_values = std::move(values); m.flag_meanings = std::move(meanings); return m;
  }
  DataMeaning nan_means(std::string text) const { DataMeaning m = *this; m.nan_meaning = std::move(text); return m; }
  DataMeaning inf_means(std::string text) const { DataMeaning m = *this; m.inf_meaning = std::move(text); return m; }
};

/// The kind of result file: its root `format` and `format_version`, and whether
/// it is sealed (io/hdf5_seal.hpp: files gapwise reads back as inputs).
struct ResultFormat {
  std::string format;
  long long version = 1;
  bool sealed = false;
};

class Hdf5Output {
 public:
  /// Sealed formats get gapwise's seal (io/hdf5_seal.hpp) on commit().
  /// Without a format (tests that build files as another client would) the
  /// root gets no format attributes.
  explicit Hdf5Output(std::string final_path, ResultFormat format = {});
  ~Hdf5Output();
  Hdf5Output(const Hdf5Output&) = delete;
  Hdf5Output& operator=(const Hdf5Output&) = delete;

  /// Creates the group and its parents if needed.
  void group(const std::string& path);
  void write(const std::string& path, const std::vector<double>& values, const DataMeaning& meaning);
  void write(const std::string& path, const std::vector<long long>& values, const DataMeaning& meaning);
  /// Row-major rows x cols matrix. `axes` (when given) name the 1-D datasets
  /// along rows and columns; they become its dimension scales (attach_scales).
  void write_matrix(const std::string& path, const std::vector<double>& values, std::size_t rows,
                    std::size_t cols, const DataMeaning& meaning, std::vector<std::string> axes = {});
  /// UTF-8 strings; `legend` says what they are.
  void write_strings(const std::string& path, const std::vector<std::string>& values, const std::string& legend = {});
  /// Makes the 1-D datasets `axes` (one per dimension of `dataset`, in order)
  /// its HDF5 dimension scales. Done on commit, so the datasets may be written
  /// in any order; a missing one or a length that does not match is a bug
  /// (std::logic_error).
  void attach_scales(const std::string& dataset, std::vector<std::string> axes);
  /// Writes `<group>/level` = 0, 1, ..., count - 1 (once) and returns its path:
  /// the level axis of matrices with one column per instantaneous level.
  std::string level_axis(const std::string& group, std::size_t count);
  void attribute(const std::string& object, const std::string& name, const std::string& value);
  void attribute(const std::string& object, const std::string& name, double value);
  void attribute(const std::string& object, const std::string& name, long long value);
  /// A number attribute that may be +inf (an infinite time to solution) or NaN
  /// (not applicable); the user guide's HDF5 conventions say which attributes may.
  void attribute_allowing_inf_nan(const std::string& object, const std::string& name, double value);
  void commit();
  /// Closes the file and returns its bytes (sealed when a format was given)
  /// instead of writing them; the target is left untouched. For tests and
  /// fuzzing, which need a file image in memory.
  std::string finish_image();
  /// Lets NaN and infinities through where no meaning is declared (refused by
  /// default). Only for tests and fuzzing that must build the files another
  /// HDF5 client could write, to check that gapwise's readers refuse them.
  void permit_non_finite();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

/// /provenance: tool version, command line, and the input files' text.
void write_provenance(Hdf5Output& out, const std::string& command_line, const std::vector<std::string>& input_files);

}  // namespace gapwise
