// The split-operator kernels for avx2: compiled with -march=x86-64-v3 (AVX2, FMA)
// (CMakeLists.txt); chosen at run time when the CPU supports it
// (libgcc's CPU feature check, which also asks the OS whether it saves the
// wide registers).
namespace gapwise::kernels_avx2 {
inline bool supported() {
  return __builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma");
}
}  // namespace gapwise::kernels_avx2
#define GW_KERNEL_NS kernels_avx2
#define GW_KERNEL_NAME "avx2"
#define GW_KERNEL_GETTER split_kernels_avx2
#define GW_KERNEL_SUPPORTED supported
#include "dynamics/split_kernels_body.inc"
