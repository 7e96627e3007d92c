#pragma once
// Exact exponentials of the two parts of the shared Hamiltonian
//
//   H = -(a/2) sum_i sigma^x_i + (b/2) D,      D = TransverseIsingHamiltonian::diagonal()
//
// for split-operator propagation. With the state stored as separate real and
// imaginary arrays (SplitState, contiguous, 64-byte aligned):
//
//   * rotate(psi, theta):   psi <- exp(+i theta sum_i sigma^x_i) psi
//       = prod_i (cos theta + i sin theta sigma^x_i): an exact 2x2 rotation on
//       every pair (b, b ^ 2^i). Qubits below kBlockQubits are applied block by
//       block while the block sits in L1; higher qubits two at a time (one pass
//       over the state per qubit pair), inner loops contiguous and branch-free.
//       Applied as cos^n(theta) prod_i (1 + i tan(theta) sigma^x_i) while
//       cos(theta) >= 1/2: one fused multiply-add per output and qubit, the
//       common factor folded into the phase table (or one scaling).
//   * phase(psi, phi):      psi_b <- exp(-i phi D_b) psi_b
//       Problem energies usually take few distinct values (integer couplings:
//       at most a few hundred): D is stored as a 16-bit index into its distinct
//       levels, and each call evaluates cos/sin once per level, not per state.
//       With many distinct levels (real-valued couplings and fields: up to one
//       per state) the factors are computed per state instead, from D itself, by
//       a vectorized sine/cosine (no table, no gathers; see PhaseMethod).
//       Tables are filled by the same vectorized sine/cosine.
//       Built with AVX-512 and at most 32 levels, the factors are looked up by
//       in-register permutes rather than memory gathers, in the same pass as
//       the rotations of qubits 0-2 (lane permutes); the block's other qubits
//       then go three per pass (eight amplitudes held in registers).
//   * phase_then_rotate(psi, phi, theta): both in one sweep (the phase is applied
//       to each block just before its low-qubit rotations).
//
// No second problem-energy computation: the levels come from H.diagonal().
//
//   TransverseIsingHamiltonian H(problem);
//   SplitExponentials ex(H);
//   SplitState psi = SplitState::from(uniform_superposition(n));
//   ex.phase_then_rotate(psi, std::numbers::pi * dt * b / 2, std::numbers::pi * dt * a);
//   QuantumState back = psi.to_complex();
#include <cstddef>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "dynamics/quantum_state.hpp"
#include "hamiltonian/transverse_ising.hpp"

namespace gapwise {

/// A 64-byte aligned array of doubles (no initialisation beyond what is asked).
class AlignedBuffer {
 public:
  AlignedBuffer() = default;
  explicit AlignedBuffer(std::size_t n);
  double* data() { return p_.get(); }
  const double* data() const { return p_.get(); }
  std::size_t size() const { return n_; }

 private:
  struct Free { void operator()(double* p) const; };
  std::unique_ptr<double[], Free> p_;
  std::size_t n_ = 0;
};

/// A state vector as two contiguous arrays (real parts, imaginary parts).
struct SplitState {
  AlignedBuffer re, im;
  SplitState() = default;
  explicit SplitState(std::size_t dim) : re(dim), im(dim) {}
  std::size_t dim() const { return re.size(); }
  static SplitState from(const QuantumState& psi);
  void load(const QuantumState& psi);      ///< sizes must match
  void store(QuantumState& psi) const;     ///< sizes must match
  QuantumState to_complex() const;
  void copy_from(const SplitState& other); ///< same dim
  /// || this - other ||_2
  double distance(const SplitState& other) const;
  /// min over a global phase f of || this - e^{i f} other ||_2: the distance of
  /// the physical states (a global phase changes no observable).
  double distance_up_to_phase(const SplitState& other) const;
  /// (1/2) sum_b | |this_b|^2 - |other_b|^2 |: the total variation distance of
  /// the outcome distributions, the largest difference of the probability of any
  /// set of basis states (the ground manifold among them).
  double probability_distance(const SplitState& other) const;
  /// Summed probability of the given basis states (indices < dim()).
  double probability_of(const std::vector<std::size_t>& states) const;
};

/// What the kernels read: the problem diagonal and the structures
/// SplitExponentials builds from it (internal; public so the kernel variants,
/// compiled separately for each instruction set, can read it).
struct SplitKernelData {
  const TransverseIsingHamiltonian* h_ = nullptr;
  int n_ = 0;
  std::size_t dim_ = 0;
  std::vector<double> levels_;       ///< distinct values of D (empty: per-state or factored phases)
  std::vector<std::uint16_t> index_; ///< D_b == levels_[index_[b]]
  bool direct_ = false;              ///< phases per state from D (index_ and levels_ empty)
  double max_abs_d_ = 0.0;           ///< largest |D_b| (range of the vectorized sine/cosine)
  bool factored_ = false;            ///< D factored by blocks (see PhaseMethod::Factored)
  int lo_ = 0;                       ///< low qubits of the factorization (L)
  std::vector<double> cross_;        ///< w_i(h) = -2 g_i(h), L per block h
  std::vector<double> block_c_;      ///< D(h << L) - D(0) per block h
  mutable std::vector<double> cs_, sn_;  ///< per-call phase tables (one object per thread)
  const std::vector<double>& diagonal() const { return h_->diagonal(); }
};

/// One instruction-set variant of the kernels (split_kernels_<name>.cpp,
/// compiled with that variant's flags).
struct SplitKernelVariant {
  const char* name;
  bool (*supported)();
  void (*phase)(const SplitKernelData&, SplitState&, double phi);
  void (*rotate_all)(const SplitKernelData&, SplitState&, bool with_phase, double phi, double theta);
};

/// The variants (split_kernels_*.cpp); avx2 and avx512 exist only in x86-64 builds.
const SplitKernelVariant& split_kernels_baseline();
const SplitKernelVariant& split_kernels_avx2();
const SplitKernelVariant& split_kernels_avx512();

/// How phase() finds exp(-i phi D_b): through the table of distinct levels
/// (16-bit index per state; permutes for at most 32 levels with AVX-512,
/// gathers above), or directly per state from D (a vectorized sine/cosine).
/// Auto: the table up to max(kDirectLevels, dim/16) levels, direct above
/// (measured, see notebooks-free-docs/method-notes.md, "Phases of many-valued
/// diagonals").
/// Factored: D_b is split by the block of the low qubits l and the rest h as
///   D(l, h) = D(l, 0) + C(h) + sum_{i low} s_i(l) g_i(h),
/// g_i(h) = sum_{j high} J_ij (s_j(h) - 1) (couplings across the split; the
/// fields sit in D(l, 0) and C(h)). A call evaluates exp(-i phi D(l, 0)) once
/// (2^L sine/cosines, L = min(kBlockQubits, n - 2)), and per block of 2^L
/// amplitudes L + 1 scalar ones, whose products (doubling, one complex multiply
/// per amplitude) give the block's remaining factors: no gathers, no per-state
/// sine/cosine, any real diagonal. Auto uses it where Direct would be chosen
/// and n >= kFactoredMinQubits.
enum class PhaseMethod { Auto, Table, Direct, Factored };

/// Not to be shared between threads (it keeps per-call scratch tables); each
/// propagator owns its own.
class SplitExponentials {
 public:
  /// Qubits rotated inside one cache-resident block (2^10 amplitudes, 16 KiB).
  static constexpr int kBlockQubits = 10;

  explicit SplitExponentials(const TransverseIsingHamiltonian& h);

  /// States of at least this many amplitudes are shared among OpenMP threads
  /// (default 2^18). Results have the same bits for any thread count: sweeps
  /// write disjoint amplitudes, and SplitState's sums add fixed blocks in order.
  /// Process-wide; for tests and benchmarks.
  static void set_parallel_threshold(std::size_t dim);
  static std::size_t parallel_threshold();

  /// Auto's switch: more distinct levels than max(this, dim/16) and the phases are computed per state.
  static constexpr std::size_t kDirectLevels = 64;
  /// Process-wide override of the phase method, for tests and benchmarks;
  /// applies to objects constructed afterwards.
  static void set_phase_method(PhaseMethod m);
  static PhaseMethod phase_method();
  /// True when this object computes phases per state (no level table).
  bool direct_phases() const { return k_.direct_; }
  /// Auto factors the diagonal (PhaseMethod::Factored) from this many qubits on.
  static constexpr int kFactoredMinQubits = 6;

  /// Instruction-set variant of the kernels ("avx512", "avx2" or "baseline"):
  /// the widest the CPU supports, chosen at run time (the build is portable), or
  /// the one named by the environment variable GAPWISE_KERNELS or by
  /// set_kernel_variant (throws std::runtime_error naming the choices when the
  /// CPU or the build lacks it). Applies to objects constructed afterwards.
  static const char* kernel_variant();
  static void set_kernel_variant(const std::string& name);
  /// Variants this CPU and build can run, widest first.
  static std::vector<std::string> available_kernel_variants();
  /// The variant this object uses.
  const char* kernels() const;
  /// True when this object factors the diagonal (PhaseMethod::Factored).
  bool factored_phases() const { return k_.factored_; }
  /// "table", "direct" or "factored": how this object finds its phases.
  const char* phase_method_name() const;

  int qubits() const { return k_.n_; }
  std::size_t dim() const { return k_.dim_; }
  /// Distinct values of the problem diagonal (0 when phases are computed per state).
  std::size_t distinct_levels() const { return k_.levels_.size(); }
  /// Bytes this object holds (the level index and table).
  std::size_t memory_bytes() const;

  void rotate(SplitState& psi, double theta) const;
  void phase(SplitState& psi, double phi) const;
  void phase_then_rotate(SplitState& psi, double phi, double theta) const;

  /// Passes over the whole state each call makes (for bandwidth accounting):
  /// reads + writes of the state's 16 bytes per amplitude, index bytes aside.
  int rotate_passes() const;
  static int phase_passes() { return 1; }

 private:
  SplitKernelData k_;
  const SplitKernelVariant* kernels_;  ///< the instruction-set variant chosen at construction
};

}  // namespace gapwise
