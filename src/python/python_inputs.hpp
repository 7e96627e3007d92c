#pragma once
// The objects the Python module hands around: a problem and a schedule, each
// read by the same readers as the command line (a dict is rendered to the
// documented TOML first, so validation and messages are the command line's).
#include <string>

#include <pybind11/pybind11.h>

#include "io/problem_file.hpp"
#include "schedule/schedule.hpp"

namespace gapwise::python {

namespace py = pybind11;

struct PyProblem {
  ProblemFile file;
  std::string source;  ///< file path, or "<problem dict>"
  std::string text;    ///< the TOML it was read from
};

struct PySchedule {
  Schedule schedule;
  std::string source;
  std::string text;
  bool is_default = false;  ///< the built-in linear 5 GHz scales (gap scans without a schedule)
};

void bind_inputs(py::module_& m);
void bind_anneal(py::module_& m);
void bind_gap(py::module_& m);
void bind_durations(py::module_& m);
void bind_pause_map(py::module_& m);
void bind_diagnose(py::module_& m);
void bind_embed_cost(py::module_& m);

}  // namespace gapwise::python
