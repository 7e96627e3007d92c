#pragma once
// The transfer settings gapwise's HDF5 reader and writer share.
//
//   ds.read(raw.data(), str_type, H5::DataSpace::ALL, H5::DataSpace::ALL, small_conversion_buffer());
#include <H5Cpp.h>

namespace gapwise {

/// A data-transfer property list with a 64 KiB type-conversion buffer instead
/// of HDF5's default 1 MiB, which HDF5 allocates zero-filled on every
/// variable-length string read or write (profiling the instance-set reader:
/// most of its time went into that memset). HDF5 converts in strips when a
/// dataset needs more.
inline const H5::DSetMemXferPropList& small_conversion_buffer() {
  static const H5::DSetMemXferPropList xfer = [] {
    H5::DSetMemXferPropList p;
    p.setBuffer(std::size_t{1} << 16, nullptr, nullptr);
    return p;
  }();
  return xfer;
}

}  // namespace gapwise
