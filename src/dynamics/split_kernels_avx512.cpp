// The split-operator kernels for avx512: compiled with -march=x86-64-v4 (AVX-512 F/DQ/BW/VL)
// (CMakeLists.txt); chosen at run time when the CPU supports it
// (libgcc's CPU feature check, which also asks the OS whether it saves the
// wide registers).
namespace gapwise::kernels_avx512 {
inline bool supported() {
  return __builtin_cpu_supports("avx512f") && __builtin_cpu_supports("avx512dq") &&
         __builtin_cpu_supports("avx512bw") && __builtin_cpu_supports("avx512vl") && __builtin_cpu_supports("avx2") &&
         __builtin_cpu_supports("fma");
}
}  // namespace gapwise::kernels_avx512
#define GW_KERNEL_NS kernels_avx512
#define GW_KERNEL_NAME "avx512"
#define GW_KERNEL_GETTER split_kernels_avx512
#define GW_KERNEL_SUPPORTED supported
#include "dynamics/split_kernels_body.inc"
