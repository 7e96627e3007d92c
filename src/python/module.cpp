// The compiled part of the `gapwise` Python package (gapwise._core): the error
// class and the bindings of each concern, which live in their own files so that
// a change to one rebuilds one translation unit.
#include <pybind11/pybind11.h>

#include "io/input_error.hpp"
#include "python/python_inputs.hpp"

namespace py = pybind11;

PYBIND11_MODULE(_core, m) {
  m.doc() = "gapwise: exact closed-system simulation of transverse-field Ising anneals (compiled core)";
  // InputError is a ValueError carrying the command line's message (file:line:col:
  // key 'k': problem. Fix: fix) and its parts as attributes.
  static py::exception<gapwise::InputError> input_error(m, "InputError", PyExc_ValueError);
  input_error.doc() =
      "Bad input: the message names the file (or '<problem dict>' / '<schedule dict>'), line, key and the fix.\n"
      "Attributes: file, line, column, key, problem, fix (line/column 0 when unknown).";
  py::register_exception_translator([](std::exception_ptr p) {
    try {
      if (p) std::rethrow_exception(p);
    } catch (const gapwise::InputError& e) {
      py::object exc = py::handle(input_error.ptr())(e.what());
      exc.attr("file") = e.place().file;
      exc.attr("line") = e.place().line;
      exc.attr("column") = e.place().column;
      exc.attr("key") = e.place().key;
      exc.attr("problem") = e.problem();
      exc.attr("fix") = e.fix();
      PyErr_SetObject(input_error.ptr(), exc.ptr());
    }
  });
  gapwise::python::bind_inputs(m);
  gapwise::python::bind_anneal(m);
  gapwise::python::bind_gap(m);
  gapwise::python::bind_durations(m);
  gapwise::python::bind_pause_map(m);
  gapwise::python::bind_diagnose(m);
  gapwise::python::bind_embed_cost(m);
}
