#pragma once
// Copies of result vectors as NumPy arrays (call with the GIL held).
#include <initializer_list>
#include <utility>
#include <vector>

#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>

namespace gapwise::python {

template <class T>
pybind11::array_t<T> to_numpy(const std::vector<T>& v) {
  return pybind11::array_t<T>(static_cast<pybind11::ssize_t>(v.size()), v.data());
}

/// A row-major (rows, cols) array from a flat vector.
inline pybind11::array_t<double> to_numpy(const std::vector<double>& v, std::size_t rows, std::size_t cols) {
  pybind11::array_t<double> a({static_cast<pybind11::ssize_t>(rows), static_cast<pybind11::ssize_t>(cols)});
  std::copy(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(rows * cols), a.mutable_data());
  return a;
}

/// A dict of NumPy columns from a vector of structs, one per (name, double member):
///   columns_dict(r.minima, {{"s", &GapMinimum::s}, {"gap", &GapMinimum::gap_ghz}})
template <class Row>
pybind11::dict columns_dict(const std::vector<Row>& rows,
                            std::initializer_list<std::pair<const char*, double Row::*>> columns) {
  pybind11::dict d;
  for (const auto& [name, member] : columns) {
    std::vector<double> v;
    v.reserve(rows.size());
    for (const Row& r : rows) v.push_back(r.*member);
    d[name] = to_numpy(v);
  }
  return d;
}

}  // namespace gapwise::python
