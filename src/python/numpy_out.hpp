#pragma once
// Copies of result vectors as NumPy arrays (call with the GIL held).
#include <vector>

#include <pybind11/numpy.h>

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

}  // namespace gapwise::python
