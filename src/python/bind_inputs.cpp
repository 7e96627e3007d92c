// Problems and schedules for Python: from files through the command line's
// readers, or from TOML text the package renders from a dict (gapwise/__init__.py).
#include <pybind11/numpy.h>
#include <pybind11/stl.h>

#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "io/toml_reader.hpp"
#include "python/python_inputs.hpp"

namespace gapwise::python {
namespace {

/// Text rendered from a dict: its line numbers mean nothing to the caller, the
/// key does. Rethrows the reader's error without line and column.
template <class F>
auto without_lines(bool from_memory, F&& read) {
  try {
    return read();
  } catch (const InputError& e) {
    if (!from_memory) throw;
    SourcePlace place = e.place();
    place.line = 0;
    place.column = 0;
    throw InputError(place, e.problem(), e.fix());
  }
}

PyProblem problem_from_text(const std::string& text, const std::string& name, bool from_memory) {
  return without_lines(from_memory, [&] { return PyProblem{parse_problem_text(text, name), name, text}; });
}

PySchedule schedule_from_text(const std::string& text, const std::string& name, bool from_memory) {
  return without_lines(from_memory, [&] { return PySchedule{parse_schedule_text(text, name), name, text, false}; });
}

}  // namespace

void bind_inputs(py::module_& m) {
  py::class_<PyProblem>(m, "Problem",
                        "An Ising problem (a QUBO is converted exactly, as the problem reader does).\n"
                        "Make one with gapwise.problem(...); every study accepts it, a path or a dict.")
      .def_property_readonly("qubits", [](const PyProblem& p) { return p.file.ising.qubits; })
      .def_property_readonly("kind", [](const PyProblem& p) { return p.file.kind; })
      .def_property_readonly("h", [](const PyProblem& p) {
        return py::array_t<double>(static_cast<py::ssize_t>(p.file.ising.h.size()), p.file.ising.h.data());
      }, "fields h_i of the Ising form (GHz-free problem units)")
      .def_property_readonly("J", [](const PyProblem& p) {
        const auto n = static_cast<py::ssize_t>(p.file.ising.qubits);
        py::array_t<double> J({n, n});
        auto v = J.mutable_unchecked<2>();
        for (py::ssize_t i = 0; i < n; ++i)
          for (py::ssize_t j = 0; j < n; ++j) v(i, j) = 0.0;
        for (const auto& c : p.file.ising.couplings) v(c.i, c.j) += c.value;
        return J;
      }, "couplings J_ij of the Ising form as an upper-triangular (n, n) array")
      .def_property_readonly("offset", [](const PyProblem& p) { return p.file.ising.offset; })
      .def_property_readonly("description", [](const PyProblem& p) { return p.file.ising.description; })
      .def_property_readonly("labels", [](const PyProblem& p) {
        std::vector<std::string> l;
        for (int i = 0; i < p.file.ising.qubits; ++i) l.push_back(p.file.ising.label(i));
        return l;
      })
      .def_property_readonly("source", [](const PyProblem& p) { return p.source; })
      .def_property_readonly("toml", [](const PyProblem& p) { return p.text; }, "the TOML text it was read from")
      .def("energy", [](const PyProblem& p, BasisIndex b) {
        if (p.file.ising.qubits < 64 && b >> p.file.ising.qubits) throw py::value_error("basis index out of range");
        return p.file.ising.energy(b);
      }, py::arg("state"), "problem energy of basis state b (bit i = qubit i; spin s_i = 1 - 2 z_i), offset included")
      .def("__repr__", [](const PyProblem& p) {
        return "<gapwise.Problem " + p.source + ": " + std::to_string(p.file.ising.qubits) + " qubits, " +
               std::to_string(p.file.ising.couplings.size()) + " couplings>";
      });

  py::class_<PySchedule>(m, "Schedule",
                         "Energy scales A(s), B(s) and the path s(t). Make one with gapwise.schedule(...).")
      .def_property_readonly("duration_ns", [](const PySchedule& s) { return s.schedule.duration_ns; })
      .def_property_readonly("description", [](const PySchedule& s) { return s.schedule.description; })
      .def_property_readonly("source", [](const PySchedule& s) { return s.source; })
      .def_property_readonly("toml", [](const PySchedule& s) { return s.text; })
      .def("a_ghz", [](const PySchedule& s, double x) { return s.schedule.scales.a_ghz(x); }, py::arg("s"))
      .def("b_ghz", [](const PySchedule& s, double x) { return s.schedule.scales.b_ghz(x); }, py::arg("s"))
      .def("__repr__", [](const PySchedule& s) {
        return "<gapwise.Schedule " + s.source + ": " + s.schedule.scales.describe() + ">";
      });

  m.def("_problem_from_file", [](const std::string& path) {
    py::gil_scoped_release release;
    return PyProblem{parse_problem_file(path), path, read_text_file(path)};
  });
  m.def("_problem_from_text", &problem_from_text, py::arg("text"), py::arg("name"), py::arg("from_memory"));
  m.def("_schedule_from_file", [](const std::string& path) {
    py::gil_scoped_release release;
    return PySchedule{read_schedule_file(path), path, read_text_file(path), false};
  });
  m.def("_schedule_from_text", &schedule_from_text, py::arg("text"), py::arg("name"), py::arg("from_memory"));
  m.def("_default_schedule", [] { return PySchedule{Schedule{}, "(default: linear, 5 GHz)", "", true}; });
}

}  // namespace gapwise::python
