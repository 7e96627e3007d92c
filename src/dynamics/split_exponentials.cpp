#include "dynamics/split_exponentials.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdlib>
#include <new>
#include <stdexcept>

#if defined(__AVX512F__)
#include <immintrin.h>
// GCC 12's AVX-512 permute intrinsics start from _mm512_undefined_pd(), which
// -Wmaybe-uninitialized reports inside the header (a false positive: every lane
// is written).
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#endif
#endif

namespace gapwise {
namespace {

// States this large are shared between OpenMP threads (2^18 amplitudes = 4 MiB
// as two double arrays); below, thread start-up and the barriers between
// passes (which stall when the cores are shared with other work) cost more
// than they save. Settable (SplitExponentials::set_parallel_threshold) so tests
// reach the threaded code with small states.
std::atomic<std::size_t> g_parallel_dim{std::size_t{1} << 18};
std::atomic<int> g_phase_method{static_cast<int>(PhaseMethod::Auto)};

// Sums are taken over fixed blocks of this many amplitudes, then added in block
// order, so they have the same bits whatever the number of threads (an OpenMP
// reduction's order depends on it).
constexpr std::size_t kSumBlock = std::size_t{1} << 12;

// The kernels apply the rotation cos(theta) + i sin(theta) sigma^x in the form
// u (1 + i t sigma^x) with u = cos(theta), t = tan(theta) when |cos(theta)| is
// not small (see rotate_all): the factor u per qubit commutes with everything
// and is applied once for all qubits (u^n, folded into the phase table or one
// scaling), so each output is one fused multiply-add, a + t*b, instead of a
// product and a multiply-add. Kernels take (c, s) and a flag kUnit meaning c == 1.

// Rotation on the pairs (lo[k], hi[k]), k < len; lo and hi are disjoint contiguous ranges.
template <bool kUnit>
inline void rotate_pairs(double* __restrict lr, double* __restrict li, double* __restrict hr,
                         double* __restrict hi, std::size_t len, double c, double s) {
  if constexpr (kUnit) c = 1.0;
#pragma omp simd
  for (std::size_t k = 0; k < len; ++k) {
    const double a = lr[k], b = li[k], x = hr[k], y = hi[k];
    lr[k] = c * a - s * y;
    li[k] = c * b + s * x;
    hr[k] = c * x - s * b;
    hi[k] = c * y + s * a;
  }
}

// The same rotation on qubits q and q+1 at once: quads (k, k+s1, k+2 s1, k+3 s1).
template <bool kUnit>
inline void rotate_quads(double* __restrict r0, double* __restrict i0, double* __restrict r1,
                         double* __restrict i1, double* __restrict r2, double* __restrict i2,
                         double* __restrict r3, double* __restrict i3, std::size_t len, double c, double s) {
  if constexpr (kUnit) c = 1.0;
#pragma omp simd
  for (std::size_t k = 0; k < len; ++k) {
    // qubit q: pairs (0,1), (2,3)
    double a0 = c * r0[k] - s * i1[k], b0 = c * i0[k] + s * r1[k];
    double a1 = c * r1[k] - s * i0[k], b1 = c * i1[k] + s * r0[k];
    double a2 = c * r2[k] - s * i3[k], b2 = c * i2[k] + s * r3[k];
    double a3 = c * r3[k] - s * i2[k], b3 = c * i3[k] + s * r2[k];
    // qubit q+1: pairs (0,2), (1,3)
    r0[k] = c * a0 - s * b2;  i0[k] = c * b0 + s * a2;
    r2[k] = c * a2 - s * b0;  i2[k] = c * b2 + s * a0;
    r1[k] = c * a1 - s * b3;  i1[k] = c * b1 + s * a3;
    r3[k] = c * a3 - s * b1;  i3[k] = c * b3 + s * a1;
  }
}

// Qubits 0 and 1 on consecutive groups of four amplitudes.
template <bool kUnit>
inline void rotate_low2(double* __restrict re, double* __restrict im, std::size_t count, double c, double s) {
  if constexpr (kUnit) c = 1.0;
#pragma omp simd
  for (std::size_t g = 0; g < count; g += 4) {
    const double r0 = re[g], r1 = re[g + 1], r2 = re[g + 2], r3 = re[g + 3];
    const double i0 = im[g], i1 = im[g + 1], i2 = im[g + 2], i3 = im[g + 3];
    const double a0 = c * r0 - s * i1, b0 = c * i0 + s * r1;
    const double a1 = c * r1 - s * i0, b1 = c * i1 + s * r0;
    const double a2 = c * r2 - s * i3, b2 = c * i2 + s * r3;
    const double a3 = c * r3 - s * i2, b3 = c * i3 + s * r2;
    re[g] = c * a0 - s * b2;      im[g] = c * b0 + s * a2;
    re[g + 2] = c * a2 - s * b0;  im[g + 2] = c * b2 + s * a0;
    re[g + 1] = c * a1 - s * b3;  im[g + 1] = c * b1 + s * a3;
    re[g + 3] = c * a3 - s * b1;  im[g + 3] = c * b3 + s * a1;
  }
}

// Qubits 0 .. qubits-1 on one contiguous block of 2^qubits amplitudes.
template <bool kUnit>
inline void rotate_block(double* re, double* im, int qubits, double c, double s) {
  const std::size_t count = std::size_t{1} << qubits;
  int q = 0;
  if (qubits >= 2) {
    rotate_low2<kUnit>(re, im, count, c, s);
    q = 2;
  }
  for (; q + 1 < qubits; q += 2) {
    const std::size_t s1 = std::size_t{1} << q;
    for (std::size_t base = 0; base < count; base += 4 * s1)
      rotate_quads<kUnit>(re + base, im + base, re + base + s1, im + base + s1, re + base + 2 * s1, im + base + 2 * s1,
                          re + base + 3 * s1, im + base + 3 * s1, s1, c, s);
  }
  for (; q < qubits; ++q) {
    const std::size_t s1 = std::size_t{1} << q;
    for (std::size_t base = 0; base < count; base += 2 * s1)
      rotate_pairs<kUnit>(re + base, im + base, re + base + s1, im + base + s1, s1, c, s);
  }
}

#if defined(__AVX512F__)
// The phase factors scale * exp(-i phi level) of at most 32 levels, held in
// four registers each (cos, sin) and looked up by permutes; apply() multiplies
// eight amplitudes (a, b) by the factors of their level indices idx[0..7].
struct PermutePhase {
  __m512d c0, c1, c2, c3, s0, s1, s2, s3;
  PermutePhase(const double* cs, const double* sn)
      : c0(_mm512_loadu_pd(cs)), c1(_mm512_loadu_pd(cs + 8)), c2(_mm512_loadu_pd(cs + 16)),
        c3(_mm512_loadu_pd(cs + 24)), s0(_mm512_loadu_pd(sn)), s1(_mm512_loadu_pd(sn + 8)),
        s2(_mm512_loadu_pd(sn + 16)), s3(_mm512_loadu_pd(sn + 24)) {}
  void apply(const std::uint16_t* idx, __m512d& a, __m512d& b) const {
    const __m512i j = _mm512_cvtepu16_epi64(_mm_loadu_si128(reinterpret_cast<const __m128i*>(idx)));
    const __mmask8 high = _mm512_test_epi64_mask(j, _mm512_set1_epi64(16));
    const __m512d c = _mm512_mask_blend_pd(high, _mm512_permutex2var_pd(c0, j, c1), _mm512_permutex2var_pd(c2, j, c3));
    const __m512d s = _mm512_mask_blend_pd(high, _mm512_permutex2var_pd(s0, j, s1), _mm512_permutex2var_pd(s2, j, s3));
    const __m512d a1 = _mm512_fmsub_pd(a, c, _mm512_mul_pd(b, s));
    b = _mm512_fmadd_pd(a, s, _mm512_mul_pd(b, c));
    a = a1;
  }
};

// Tangent form only (c == 1): three qubits q, q+1, q+2 at once on octets
// (k + j s1, j < 8): one pass over the block instead of two, the eight
// amplitudes held in registers between the qubits.
// Amplitudes k + j s1 for k < len (len <= s1, a multiple of 8).
inline void rotate_octs_unit(double* __restrict re, double* __restrict im, std::size_t s1, std::size_t len, double t) {
  const __m512d tv = _mm512_set1_pd(t);
  double* __restrict r0 = re;
  double* __restrict i0 = im;
  for (std::size_t k = 0; k < len; k += 8) {
#define GW_LD(j) __m512d a##j = _mm512_load_pd(r0 + (j) * s1 + k), b##j = _mm512_load_pd(i0 + (j) * s1 + k);
    GW_LD(0) GW_LD(1) GW_LD(2) GW_LD(3) GW_LD(4) GW_LD(5) GW_LD(6) GW_LD(7)
#undef GW_LD
#define GW_ROT(x, y)                                          \
  {                                                           \
    const __m512d ax = a##x, bx = b##x, ay = a##y, by = b##y; \
    a##x = _mm512_fnmadd_pd(tv, by, ax);                      \
    b##x = _mm512_fmadd_pd(tv, ay, bx);                       \
    a##y = _mm512_fnmadd_pd(tv, bx, ay);                      \
    b##y = _mm512_fmadd_pd(tv, ax, by);                       \
  }
    GW_ROT(0, 1) GW_ROT(2, 3) GW_ROT(4, 5) GW_ROT(6, 7)  // qubit q
    GW_ROT(0, 2) GW_ROT(1, 3) GW_ROT(4, 6) GW_ROT(5, 7)  // qubit q+1
    GW_ROT(0, 4) GW_ROT(1, 5) GW_ROT(2, 6) GW_ROT(3, 7)  // qubit q+2
#undef GW_ROT
#define GW_ST(j) _mm512_store_pd(r0 + (j) * s1 + k, a##j); _mm512_store_pd(i0 + (j) * s1 + k, b##j);
    GW_ST(0) GW_ST(1) GW_ST(2) GW_ST(3) GW_ST(4) GW_ST(5) GW_ST(6) GW_ST(7)
#undef GW_ST
  }
}

// The rotations of qubits 0-2 on the eight lanes of (a, b).
inline void low3_lanes(__m512d& a, __m512d& b, __m512d tv) {
  // qubit 0: swap neighbours; qubit 1: swap pairs; qubit 2: swap halves.
  __m512d pa = _mm512_permute_pd(a, 0x55), pb = _mm512_permute_pd(b, 0x55);
  a = _mm512_fnmadd_pd(tv, pb, a);
  b = _mm512_fmadd_pd(tv, pa, b);
  pa = _mm512_permutex_pd(a, 0x4E);
  pb = _mm512_permutex_pd(b, 0x4E);
  a = _mm512_fnmadd_pd(tv, pb, a);
  b = _mm512_fmadd_pd(tv, pa, b);
  pa = _mm512_shuffle_f64x2(a, a, 0x4E);
  pb = _mm512_shuffle_f64x2(b, b, 0x4E);
  a = _mm512_fnmadd_pd(tv, pb, a);
  b = _mm512_fmadd_pd(tv, pa, b);
}

// Tangent form: qubits 0, 1, 2 (the eight lanes of one register) by lane
// permutes, after the phase (idx non-null; cs, sn: the permute tables of at
// most 32 levels, scale folded in) or the plain scaling (idx null; the tables
// are not read); one pass over the block.
inline void low3_unit(double* __restrict re, double* __restrict im, const std::uint16_t* __restrict idx,
                      std::size_t count, const double* cs, const double* sn, double scale, double t) {
  const __m512d tv = _mm512_set1_pd(t);
  if (!idx) {
    const __m512d sc = _mm512_set1_pd(scale);
    for (std::size_t k = 0; k < count; k += 8) {
      __m512d a = _mm512_mul_pd(_mm512_load_pd(re + k), sc), b = _mm512_mul_pd(_mm512_load_pd(im + k), sc);
      low3_lanes(a, b, tv);
      _mm512_store_pd(re + k, a);
      _mm512_store_pd(im + k, b);
    }
    return;
  }
  const PermutePhase table(cs, sn);
  for (std::size_t k = 0; k < count; k += 8) {
    __m512d a = _mm512_load_pd(re + k), b = _mm512_load_pd(im + k);
    table.apply(idx + k, a, b);
    low3_lanes(a, b, tv);
    _mm512_store_pd(re + k, a);
    _mm512_store_pd(im + k, b);
  }
}

// Tangent form, qubits 3 .. qubits-1 of a block whose qubits 0-2 are done:
// three per pass, then two or one.
inline void rotate_block_above3_unit(double* re, double* im, int qubits, double t) {
  const std::size_t count = std::size_t{1} << qubits;
  int q = 3;
  for (; q + 2 < qubits; q += 3) {
    const std::size_t s1 = std::size_t{1} << q;
    for (std::size_t base = 0; base < count; base += 8 * s1) rotate_octs_unit(re + base, im + base, s1, s1, t);
  }
  for (; q + 1 < qubits; q += 2) {
    const std::size_t s1 = std::size_t{1} << q;
    for (std::size_t base = 0; base < count; base += 4 * s1)
      rotate_quads<true>(re + base, im + base, re + base + s1, im + base + s1, re + base + 2 * s1, im + base + 2 * s1,
                         re + base + 3 * s1, im + base + 3 * s1, s1, 1.0, t);
  }
  for (; q < qubits; ++q) {
    const std::size_t s1 = std::size_t{1} << q;
    for (std::size_t base = 0; base < count; base += 2 * s1)
      rotate_pairs<true>(re + base, im + base, re + base + s1, im + base + s1, s1, 1.0, t);
  }
}
#endif

// exp(-i x) without a library call, for loops the compiler vectorizes (a
// library sincos per element stops vectorization and costs 15-40 ns). Cody-Waite
// reduction by pi/2 (Cody and Waite, "Software Manual for the Elementary
// Functions", 1980: the constant split in three parts so that k * part1 is
// exact) to |r| <= pi/4, then the Taylor series of sin and cos to r^17 and r^16
// (next terms below 1e-18 on |r| <= pi/4: textbook bound, no fitted digits),
// and the quadrant's swap and signs. Valid for |x| <= kDirectPhaseLimit, where
// k * kPio2Hi is exact (|k| < 2^20); callers check that bound.
constexpr double kDirectPhaseLimit = 1e5;
constexpr double kTwoOverPi = 0.63661977236758134308;  // 2/pi
// pi/2 in three parts: kPio2Hi = pi/2 rounded to 33 bits; kPio2Mid = the rest of
// the double nearest pi/2; the tail pi/2 - double(pi/2) is cos(double(pi/2))
// (to double precision), taken from the library at start-up.
constexpr double kPio2Double = 1.57079632679489661923;
constexpr double kPio2Hi = static_cast<double>(static_cast<long long>(kPio2Double * 4294967296.0)) / 4294967296.0;
constexpr double kPio2Mid = kPio2Double - kPio2Hi;  // exact (Sterbenz)
const double kPio2Tail = std::cos(kPio2Double);
constexpr double kRoundMagic = 6755399441055744.0;  // 1.5 * 2^52: adding and subtracting rounds to an integer

// a * b + c: fused where the build has the instruction. Without it std::fma is
// a library call (software emulation, tens of ns: measured 0.8 GB/s for the
// per-state phases of a baseline x86-64 build); the plain form then rounds
// twice, harmless here (k * kPio2Hi is exact either way, the other parts are
// tiny, and the series' terms decrease fast).
inline double fmadd(double a, double b, double c) {
#if defined(__FMA__)
  return std::fma(a, b, c);
#else
  return a * b + c;
#endif
}

inline void exp_minus_i(double x, double& c, double& s) {
  const double kf = (x * kTwoOverPi + kRoundMagic) - kRoundMagic;  // nearest integer (|x| < 2^50)
  double r = fmadd(-kf, kPio2Hi, x);
  r = fmadd(-kf, kPio2Mid, r);
  r = fmadd(-kf, kPio2Tail, r);
  const double z = r * r;
  // sin r = r (1 - z/3! + z^2/5! - ... - z^8/17!), cos r = 1 - z/2! + ... + z^8/16!
  double p = -1.0 / 355687428096000.0;
  p = fmadd(p, z, 1.0 / 1307674368000.0);
  p = fmadd(p, z, -1.0 / 6227020800.0);
  p = fmadd(p, z, 1.0 / 39916800.0);
  p = fmadd(p, z, -1.0 / 362880.0);
  p = fmadd(p, z, 1.0 / 5040.0);
  p = fmadd(p, z, -1.0 / 120.0);
  p = fmadd(p, z, 1.0 / 6.0);
  const double sr = fmadd(-r * z, p, r);
  double q = 1.0 / 20922789888000.0;                     //  1/16!
  q = fmadd(q, z, -1.0 / 87178291200.0);              // -1/14!
  q = fmadd(q, z, 1.0 / 479001600.0);                 //  1/12!
  q = fmadd(q, z, -1.0 / 3628800.0);                  // -1/10!
  q = fmadd(q, z, 1.0 / 40320.0);                     //  1/8!
  q = fmadd(q, z, -1.0 / 720.0);                      // -1/6!
  q = fmadd(q, z, 1.0 / 24.0);                        //  1/4!
  const double cr = fmadd(z * z, q, fmadd(-0.5, z, 1.0));
  // x = k pi/2 + r: quadrant j = k mod 4 rotates (cos r, sin r) by j quarter turns.
  const long long j = static_cast<long long>(kf) & 3;
  const double cw = (j & 1) ? sr : cr, sw = (j & 1) ? cr : sr;
  c = ((j + 1) & 2) ? -cw : cw;
  s = (j & 2) ? -sw : sw;
  // exp(-i x) = cos x - i sin x
  s = -s;
}

// psi_k <- scale * exp(-i phi d_k) psi_k on count amplitudes (|phi d_k| <= kDirectPhaseLimit).
inline void phase_direct(double* __restrict re, double* __restrict im, const double* __restrict d, std::size_t count,
                         double phi, double scale) {
#pragma omp simd
  for (std::size_t k = 0; k < count; ++k) {
    double c, s;
    exp_minus_i(phi * d[k], c, s);
    c *= scale;
    s *= scale;
    const double a = re[k], b = im[k];
    re[k] = a * c - b * s;
    im[k] = a * s + b * c;
  }
}

inline void scale_block(double* __restrict re, double* __restrict im, std::size_t count, double f) {
#pragma omp simd
  for (std::size_t k = 0; k < count; ++k) {
    re[k] *= f;
    im[k] *= f;
  }
}

// f(0) .. f(count-1), shared among OpenMP threads when `parallel`. Always a
// region of its own: work-sharing constructs orphaned here would bind to a
// caller's parallel region (a sweep running one anneal per thread) and split
// one thread's work among the others.
template <class F>
inline void for_each_index(std::size_t count, bool parallel, const F& f) {
  if (parallel) {
#pragma omp parallel for schedule(static)
    for (std::size_t i = 0; i < count; ++i) f(i);
  } else {
    for (std::size_t i = 0; i < count; ++i) f(i);
  }
}

// sum_k term(k) for k < n in kSumBlock blocks added in order (see kSumBlock).
template <class F>
double ordered_sum(std::size_t n, const F& term) {
  const std::size_t blocks = (n + kSumBlock - 1) / kSumBlock;
  std::vector<double> partial(blocks, 0.0);
  for_each_index(blocks, n >= g_parallel_dim.load(std::memory_order_relaxed), [&](std::size_t b) {
    const std::size_t end = std::min(n, (b + 1) * kSumBlock);
    double sum = 0.0;
#pragma omp simd reduction(+ : sum)
    for (std::size_t k = b * kSumBlock; k < end; ++k) sum += term(k);
    partial[b] = sum;
  });
  double total = 0.0;
  for (const double x : partial) total += x;
  return total;
}

}  // namespace

void SplitExponentials::set_parallel_threshold(std::size_t dim) {
  g_parallel_dim.store(std::max<std::size_t>(dim, 1), std::memory_order_relaxed);
}

std::size_t SplitExponentials::parallel_threshold() { return g_parallel_dim.load(std::memory_order_relaxed); }

AlignedBuffer::AlignedBuffer(std::size_t n) : n_(n) {
  if (n == 0) return;
  const std::size_t bytes = ((n * sizeof(double) + 63) / 64) * 64;
  void* p = std::aligned_alloc(64, bytes);
  if (!p) throw std::bad_alloc();
  p_.reset(static_cast<double*>(p));
}

void AlignedBuffer::Free::operator()(double* p) const { std::free(p); }

SplitState SplitState::from(const QuantumState& psi) {
  SplitState s(psi.size());
  s.load(psi);
  return s;
}

void SplitState::load(const QuantumState& psi) {
  if (psi.size() != dim()) throw std::invalid_argument("SplitState::load: size mismatch");
  double* r = re.data();
  double* i = im.data();
  for (std::size_t k = 0; k < psi.size(); ++k) {
    r[k] = psi[k].real();
    i[k] = psi[k].imag();
  }
}

void SplitState::store(QuantumState& psi) const {
  if (psi.size() != dim()) throw std::invalid_argument("SplitState::store: size mismatch");
  const double* r = re.data();
  const double* i = im.data();
  for (std::size_t k = 0; k < psi.size(); ++k) psi[k] = Complex(r[k], i[k]);
}

QuantumState SplitState::to_complex() const {
  QuantumState psi(dim());
  store(psi);
  return psi;
}

void SplitState::copy_from(const SplitState& other) {
  std::copy(other.re.data(), other.re.data() + dim(), re.data());
  std::copy(other.im.data(), other.im.data() + dim(), im.data());
}

double SplitState::distance(const SplitState& other) const {
  const double *ar = re.data(), *ai = im.data(), *br = other.re.data(), *bi = other.im.data();
  return std::sqrt(ordered_sum(dim(), [=](std::size_t k) {
    const double dr = ar[k] - br[k], di = ai[k] - bi[k];
    return dr * dr + di * di;
  }));
}

double SplitState::distance_up_to_phase(const SplitState& other) const {
  const double *ar = re.data(), *ai = im.data(), *br = other.re.data(), *bi = other.im.data();
  const std::size_t n = dim();
  // z = <other|this>; the best phase is z / |z|.
  const double zr = ordered_sum(n, [=](std::size_t k) { return br[k] * ar[k] + bi[k] * ai[k]; });
  const double zi = ordered_sum(n, [=](std::size_t k) { return br[k] * ai[k] - bi[k] * ar[k]; });
  const double mod = std::hypot(zr, zi);
  const double cr = mod > 0.0 ? zr / mod : 1.0, ci = mod > 0.0 ? zi / mod : 0.0;
  return std::sqrt(ordered_sum(n, [=](std::size_t k) {
    const double dr = ar[k] - (cr * br[k] - ci * bi[k]);
    const double di = ai[k] - (cr * bi[k] + ci * br[k]);
    return dr * dr + di * di;
  }));
}

double SplitState::probability_distance(const SplitState& other) const {
  const double *ar = re.data(), *ai = im.data(), *br = other.re.data(), *bi = other.im.data();
  return 0.5 * ordered_sum(dim(), [=](std::size_t k) {
    return std::abs(ar[k] * ar[k] + ai[k] * ai[k] - br[k] * br[k] - bi[k] * bi[k]);
  });
}

double SplitState::probability_of(const std::vector<std::size_t>& states) const {
  const double *r = re.data(), *i = im.data();
  double sum = 0.0;
  for (const std::size_t b : states) sum += r[b] * r[b] + i[b] * i[b];
  return sum;
}

void SplitExponentials::set_phase_method(PhaseMethod m) {
  g_phase_method.store(static_cast<int>(m), std::memory_order_relaxed);
}

PhaseMethod SplitExponentials::phase_method() {
  return static_cast<PhaseMethod>(g_phase_method.load(std::memory_order_relaxed));
}

SplitExponentials::SplitExponentials(const TransverseIsingHamiltonian& h)
    : h_(&h), n_(h.qubits()), dim_(h.dim()) {
  const std::vector<double>& d = h.diagonal();
  for (const double x : d) max_abs_d_ = std::max(max_abs_d_, std::abs(x));
  const PhaseMethod method = phase_method();
  // The factorization of PhaseMethod::Factored (see the header): the block
  // phase D(h << L) - D(0) and, per low qubit i, w_i(h) = D(h << L | 2^i) -
  // D(h << L) - D(2^i) + D(0) = -2 g_i(h), read off the diagonal itself (D is
  // at most quadratic in the spins, so these differences are exact up to rounding).
  const auto factor = [&] {
    factored_ = true;
    lo_ = std::min(kBlockQubits, n_ - 2);
    const std::size_t blocks = dim_ >> lo_;
    cross_.resize(blocks * static_cast<std::size_t>(lo_));
    block_c_.resize(blocks);
    for (std::size_t h = 0; h < blocks; ++h) {
      const std::size_t b = h << lo_;
      block_c_[h] = d[b] - d[0];
      for (int i = 0; i < lo_; ++i) {
        const std::size_t e = std::size_t{1} << i;
        cross_[h * static_cast<std::size_t>(lo_) + static_cast<std::size_t>(i)] = d[b | e] - d[b] - d[e] + d[0];
      }
    }
  };
  if (method == PhaseMethod::Factored && n_ >= 2) {
    factor();
    return;
  }
  if (method == PhaseMethod::Direct || method == PhaseMethod::Factored) {
    direct_ = true;
    return;
  }
  std::vector<double> lv(d.begin(), d.end());
  std::sort(lv.begin(), lv.end());
  lv.erase(std::unique(lv.begin(), lv.end()), lv.end());  // exact equality: no level is ever merged
  // Auto: the table while its refill (one vectorized sine/cosine per level and
  // stage) is small beside the pass and the lookups are permutes or gathers
  // from a table in L1; the per-state computation beyond (measured, see the header).
  const std::size_t table_limit = std::max(kDirectLevels, dim_ / 16);
  if (lv.size() > 65536 || (method == PhaseMethod::Auto && lv.size() > table_limit)) {
    // Many levels: the factored phases where the blocks pay off (measured, see
    // notebooks-free-docs/method-notes.md, "Phases of many-valued diagonals").
    if (method == PhaseMethod::Auto && n_ >= kFactoredMinQubits)
      factor();
    else
      direct_ = true;
    return;
  }
  levels_ = std::move(lv);
  index_.resize(dim_);
  for (std::size_t b = 0; b < dim_; ++b)
    index_[b] = static_cast<std::uint16_t>(std::lower_bound(levels_.begin(), levels_.end(), d[b]) - levels_.begin());
}

std::size_t SplitExponentials::memory_bytes() const {
  return index_.size() * sizeof(std::uint16_t) + (levels_.size() + cross_.size() + block_c_.size()) * sizeof(double);
}

const char* SplitExponentials::phase_method_name() const {
  return factored_ ? "factored" : direct_ ? "direct" : "table";
}

void SplitExponentials::phase_factored(double* re, double* im, std::size_t begin, std::size_t count, const double* cs,
                                       const double* sn, double phi) const {
  // cs, sn: scale * exp(-i phi D(l, 0)) for l < 2^L (fill_tables). Per block h
  // of 2^L amplitudes the remaining factor V(l) = exp(-i phi (D(h << L) - D(0)))
  // times exp(-i phi w_i(h)) for every set bit i of l, built by doubling.
  const std::size_t sub = std::size_t{1} << lo_;
  alignas(64) double vr[std::size_t{1} << kBlockQubits];
  alignas(64) double vi[std::size_t{1} << kBlockQubits];
  for (std::size_t start = begin; start < begin + count; start += sub) {
    const std::size_t h = start >> lo_;
    double sv = 0, cv = 0;
    ::sincos(phi * block_c_[h], &sv, &cv);
    vr[0] = cv;
    vi[0] = -sv;
    const double* w = cross_.data() + h * static_cast<std::size_t>(lo_);
    for (int i = 0; i < lo_; ++i) {
      double sf = 0, cf = 0;
      ::sincos(phi * w[i], &sf, &cf);
      const double fr = cf, fi = -sf;
      const std::size_t half = std::size_t{1} << i;
      double* __restrict ur = vr + half;
      double* __restrict ui = vi + half;
#pragma omp simd
      for (std::size_t m = 0; m < half; ++m) {
        ur[m] = vr[m] * fr - vi[m] * fi;
        ui[m] = vr[m] * fi + vi[m] * fr;
      }
    }
    double* __restrict r = re + start;
    double* __restrict q = im + start;
#pragma omp simd
    for (std::size_t m = 0; m < sub; ++m) {
      const double c = cs[m] * vr[m] - sn[m] * vi[m], s = cs[m] * vi[m] + sn[m] * vr[m];
      const double a = r[m], b = q[m];
      r[m] = a * c - b * s;
      q[m] = a * s + b * c;
    }
  }
}

int SplitExponentials::rotate_passes() const {
  return n_ <= kBlockQubits ? 1 : 1 + (n_ - kBlockQubits + 1) / 2;
}

void SplitExponentials::phase_block(double* re, double* im, std::size_t begin, std::size_t count, const double* cs,
                                    const double* sn, double phi, double scale) const {
  double* __restrict r = re + begin;
  double* __restrict i = im + begin;
  if (factored_) {
    phase_factored(re, im, begin, count, cs, sn, phi);
  } else if (!index_.empty()) {
    const std::uint16_t* __restrict idx = index_.data() + begin;
    std::size_t k = 0;
#if defined(__AVX512F__)
    // Up to 32 levels: the tables sit in four registers and each group of eight
    // amplitudes looks its factors up by permutes (no memory gathers). The
    // tables are padded to 32 entries (fill_tables).
    if (levels_.size() <= 32) {
      const PermutePhase table(cs, sn);
      for (; k + 8 <= count; k += 8) {
        __m512d a = _mm512_loadu_pd(r + k), b = _mm512_loadu_pd(i + k);
        table.apply(idx + k, a, b);
        _mm512_storeu_pd(r + k, a);
        _mm512_storeu_pd(i + k, b);
      }
    }
#endif
#pragma omp simd
    for (std::size_t m = k; m < count; ++m) {
      const double c = cs[idx[m]], s = sn[idx[m]];  // scale * exp(-i phi D) = c + i s
      const double a = r[m], b = i[m];
      r[m] = a * c - b * s;
      i[m] = a * s + b * c;
    }
  } else if (std::abs(phi) * max_abs_d_ <= kDirectPhaseLimit) {
    phase_direct(r, i, h_->diagonal().data() + begin, count, phi, scale);
  } else {  // phases too large for the vectorized reduction: the library's sincos
    const double* __restrict d = h_->diagonal().data() + begin;
    for (std::size_t k = 0; k < count; ++k) {
      double sn = 0, cs = 0;
      ::sincos(phi * d[k], &sn, &cs);
      const double c = scale * cs, s = -scale * sn;
      const double a = r[k], b = i[k];
      r[k] = a * c - b * s;
      i[k] = a * s + b * c;
    }
  }
}

void SplitExponentials::fill_tables(double phi, double scale) const {
  if (direct_) return;  // no table: phase_block computes the factors per state
  if (factored_) {        // scale * exp(-i phi D(l, 0)) for the 2^L low states
    const std::size_t count = std::size_t{1} << lo_;
    cs_.resize(count);
    sn_.resize(count);
    double* __restrict cs = cs_.data();
    double* __restrict sn = sn_.data();
    const double* __restrict d = h_->diagonal().data();
    if (std::abs(phi) * max_abs_d_ <= kDirectPhaseLimit) {
#pragma omp simd
      for (std::size_t j = 0; j < count; ++j) {
        double c, s;
        exp_minus_i(phi * d[j], c, s);
        cs[j] = scale * c;
        sn[j] = scale * s;
      }
    } else {
      for (std::size_t j = 0; j < count; ++j) {
        double s = 0, c = 0;
        ::sincos(phi * d[j], &s, &c);
        cs[j] = scale * c;
        sn[j] = -scale * s;
      }
    }
    return;
  }
  // At least 32 entries (the permute lookup reads 32; the padding is never indexed).
  cs_.assign(std::max<std::size_t>(levels_.size(), 32), 0.0);
  sn_.assign(cs_.size(), 0.0);
  // Refilled every stage: on small problems (a few dozen amplitudes) these
  // tables are most of the propagation time, so the vectorized sine/cosine.
  double* __restrict cs = cs_.data();
  double* __restrict sn = sn_.data();
  const double* __restrict lv = levels_.data();
  const std::size_t count = levels_.size();
  if (std::abs(phi) * max_abs_d_ <= kDirectPhaseLimit) {
#pragma omp simd
    for (std::size_t j = 0; j < count; ++j) {
      double c, s;
      exp_minus_i(phi * lv[j], c, s);
      cs[j] = scale * c;
      sn[j] = scale * s;
    }
  } else {
    for (std::size_t j = 0; j < count; ++j) {
      double s = 0, c = 0;
      ::sincos(phi * lv[j], &s, &c);
      cs[j] = scale * c;
      sn[j] = -scale * s;
    }
  }
}

void SplitExponentials::phase(SplitState& psi, double phi) const {
  fill_tables(phi, 1.0);
  const double* cs = cs_.data();
  const double* sn = sn_.data();
  const std::size_t chunk = std::min<std::size_t>(dim_, std::size_t{1} << kBlockQubits);
  const std::size_t chunks = dim_ / chunk;
  double* re = psi.re.data();
  double* im = psi.im.data();
  for_each_index(chunks, dim_ >= parallel_threshold(),
                 [&](std::size_t c) { phase_block(re, im, c * chunk, chunk, cs, sn, phi, 1.0); });
}

void SplitExponentials::rotate(SplitState& psi, double theta) const { rotate_all(psi, false, 0.0, theta); }

void SplitExponentials::phase_then_rotate(SplitState& psi, double phi, double theta) const {
  rotate_all(psi, true, phi, theta);
}

template <bool kUnit>
void SplitExponentials::rotate_sweeps(SplitState& psi, bool with_phase, double phi, double c, double s,
                                      double scale) const {
  const double* cs = cs_.data();
  const double* sn = sn_.data();
  const int low = std::min(n_, kBlockQubits);
  const std::size_t block = std::size_t{1} << low;
  const std::size_t blocks = dim_ / block;
  double* re = psi.re.data();
  double* im = psi.im.data();
  const bool parallel = dim_ >= parallel_threshold();
  // Low qubits: each block is rotated while it is in L1 (after its phase, or
  // its scaling by the rotations' common factor).
#if defined(__AVX512F__)
  // Tangent form with the register kernels: phase (or scaling) and qubits 0-2
  // in one pass, then three qubits per pass (needs at least 3 low qubits, and
  // a permute table when there is a phase).
  if (kUnit && low >= 3 && (!with_phase || (!index_.empty() && levels_.size() <= 32))) {
    for_each_index(blocks, parallel, [&](std::size_t bk) {
      const std::size_t b0 = bk * block;
      low3_unit(re + b0, im + b0, with_phase ? index_.data() + b0 : nullptr, block, cs, sn, scale, s);
      rotate_block_above3_unit(re + b0, im + b0, low, s);
    });
  } else
#endif
  {
    for_each_index(blocks, parallel, [&](std::size_t bk) {
      if (with_phase)
        phase_block(re, im, bk * block, block, cs, sn, phi, scale);
      else if (kUnit)
        scale_block(re + bk * block, im + bk * block, block, scale);
      rotate_block<kUnit>(re + bk * block, im + bk * block, low, c, s);
    });
  }
  // High qubits, two per pass; chunks of `block` contiguous amplitudes (eight
  // streams per pass measured slower here: power-of-two strides crowd the
  // cache sets).
  int q = low;
  for (; q + 1 < n_; q += 2) {
    const std::size_t s1 = std::size_t{1} << q;
    const std::size_t per_group = s1 / block;  // chunks inside one quarter
    const std::size_t groups = dim_ / (4 * s1);
    for_each_index(groups * per_group, parallel, [&](std::size_t w) {
      const std::size_t base = (w / per_group) * 4 * s1 + (w % per_group) * block;
      rotate_quads<kUnit>(re + base, im + base, re + base + s1, im + base + s1, re + base + 2 * s1,
                          im + base + 2 * s1, re + base + 3 * s1, im + base + 3 * s1, block, c, s);
    });
  }
  if (q < n_) {
    const std::size_t s1 = std::size_t{1} << q;
    const std::size_t per_group = s1 / block;
    const std::size_t groups = dim_ / (2 * s1);
    for_each_index(groups * per_group, parallel, [&](std::size_t w) {
      const std::size_t base = (w / per_group) * 2 * s1 + (w % per_group) * block;
      rotate_pairs<kUnit>(re + base, im + base, re + base + s1, im + base + s1, block, c, s);
    });
  }
}

void SplitExponentials::rotate_all(SplitState& psi, bool with_phase, double phi, double theta) const {
  const double c = std::cos(theta), s = std::sin(theta);
  // Tangent form (see the kernels) while cos(theta) >= 1/2, i.e. |tan| <= sqrt(3):
  // the intermediate growth (1 + t^2)^(n/2) stays harmless and rounding stays
  // that of the plain form. Beyond (a step far past the splitting threshold,
  // which the error control rejects anyway) the plain form.
  if (std::abs(c) >= 0.5) {
    const double scale = std::pow(c, n_);
    if (with_phase) fill_tables(phi, scale);
    rotate_sweeps<true>(psi, with_phase, phi, 1.0, s / c, scale);
  } else {
    if (with_phase) fill_tables(phi, 1.0);
    rotate_sweeps<false>(psi, with_phase, phi, c, s, 1.0);
  }
}

}  // namespace gapwise
