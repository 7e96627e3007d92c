// The split-operator kernels for baseline: compiled with no flags beyond the build's own (x86-64: SSE2)
// (CMakeLists.txt); chosen at run time when the CPU supports it
// (libgcc's CPU feature check, which also asks the OS whether it saves the
// wide registers).
namespace gapwise::kernels_baseline {
inline bool supported() {
  return true;
}
}  // namespace gapwise::kernels_baseline
#define GW_KERNEL_NS kernels_baseline
#define GW_KERNEL_NAME "baseline"
#define GW_KERNEL_GETTER split_kernels_baseline
#define GW_KERNEL_SUPPORTED supported
#include "dynamics/split_kernels_body.inc"
