#include "dynamics/split_exponentials.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdlib>
#include <mutex>
#include <new>
#include <string>
#include <stdexcept>


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

// Kernel variants compiled into this build, widest first (the AVX ones only
// where CMake found an x86-64 target: GAPWISE_KERNEL_DISPATCH).
std::vector<const SplitKernelVariant*> compiled_variants() {
  return {
#if defined(GAPWISE_KERNEL_DISPATCH)
      &split_kernels_avx512(), &split_kernels_avx2(),
#endif
      &split_kernels_baseline()};
}

std::string joined(const std::vector<std::string>& names) {
  std::string out;
  for (const auto& n : names) out += (out.empty() ? "" : ", ") + n;
  return out;
}

// `source` names where the request came from, for the error message.
const SplitKernelVariant& find_variant(const std::string& name, const std::string& source) {
  std::vector<std::string> built;
  for (const SplitKernelVariant* v : compiled_variants()) {
    built.emplace_back(v->name);
    if (name != v->name) continue;
    if (!v->supported())
      throw std::runtime_error(source + "=" + name + ": this CPU lacks the instructions of the '" + name +
                               "' kernels; it runs: " + joined(SplitExponentials::available_kernel_variants()) +
                               " (leave it unset to take the widest)");
    return *v;
  }
  throw std::runtime_error(source + "=" + name + ": no such kernel variant in this build; choose one of " +
                           joined(built) + " (leave it unset to take the widest this CPU runs)");
}

std::mutex g_variant_mutex;
const SplitKernelVariant* g_variant = nullptr;  // guarded by g_variant_mutex

const SplitKernelVariant& chosen_variant() {
  std::lock_guard<std::mutex> lock(g_variant_mutex);
  if (!g_variant) {
    const char* env = std::getenv("GAPWISE_KERNELS");
    if (env && *env) {
      g_variant = &find_variant(env, "GAPWISE_KERNELS");
    } else {
      for (const SplitKernelVariant* v : compiled_variants())
        if (v->supported()) {
          g_variant = v;
          break;
        }
    }
  }
  return *g_variant;
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
    : kernels_(&chosen_variant()) {
  k_.h_ = &h;
  k_.n_ = h.qubits();
  k_.dim_ = h.dim();
  const std::vector<double>& d = h.diagonal();
  for (const double x : d) k_.max_abs_d_ = std::max(k_.max_abs_d_, std::abs(x));
  const PhaseMethod method = phase_method();
  // The factorization of PhaseMethod::Factored (see the header): the block
  // phase D(h << L) - D(0) and, per low qubit i, w_i(h) = D(h << L | 2^i) -
  // D(h << L) - D(2^i) + D(0) = -2 g_i(h), read off the diagonal itself (D is
  // at most quadratic in the spins, so these differences are exact up to rounding).
  const auto factor = [&] {
    k_.factored_ = true;
    k_.lo_ = std::min(kBlockQubits, k_.n_ - 2);
    const std::size_t blocks = k_.dim_ >> k_.lo_;
    k_.cross_.resize(blocks * static_cast<std::size_t>(k_.lo_));
    k_.block_c_.resize(blocks);
    for (std::size_t h = 0; h < blocks; ++h) {
      const std::size_t b = h << k_.lo_;
      k_.block_c_[h] = d[b] - d[0];
      for (int i = 0; i < k_.lo_; ++i) {
        const std::size_t e = std::size_t{1} << i;
        k_.cross_[h * static_cast<std::size_t>(k_.lo_) + static_cast<std::size_t>(i)] = d[b | e] - d[b] - d[e] + d[0];
      }
    }
  };
  if (method == PhaseMethod::Factored && k_.n_ >= 2) {
    factor();
    return;
  }
  if (method == PhaseMethod::Direct || method == PhaseMethod::Factored) {
    k_.direct_ = true;
    return;
  }
  std::vector<double> lv(d.begin(), d.end());
  std::sort(lv.begin(), lv.end());
  lv.erase(std::unique(lv.begin(), lv.end()), lv.end());  // exact equality: no level is ever merged
  // Auto: the table while its refill (one vectorized sine/cosine per level and
  // stage) is small beside the pass and the lookups are permutes or gathers
  // from a table in L1; the per-state computation beyond (measured, see the header).
  const std::size_t table_limit = std::max(kDirectLevels, k_.dim_ / 16);
  if (lv.size() > 65536 || (method == PhaseMethod::Auto && lv.size() > table_limit)) {
    // Many levels: the factored phases where the blocks pay off (measured, see
    // notebooks-free-docs/method-notes.md, "Phases of many-valued diagonals").
    if (method == PhaseMethod::Auto && k_.n_ >= kFactoredMinQubits)
      factor();
    else
      k_.direct_ = true;
    return;
  }
  k_.levels_ = std::move(lv);
  k_.index_.resize(k_.dim_);
  for (std::size_t b = 0; b < k_.dim_; ++b)
    k_.index_[b] = static_cast<std::uint16_t>(std::lower_bound(k_.levels_.begin(), k_.levels_.end(), d[b]) - k_.levels_.begin());
}

std::size_t SplitExponentials::memory_bytes() const {
  return k_.index_.size() * sizeof(std::uint16_t) + (k_.levels_.size() + k_.cross_.size() + k_.block_c_.size()) * sizeof(double);
}

const char* SplitExponentials::phase_method_name() const {
  return k_.factored_ ? "factored" : k_.direct_ ? "direct" : "table";
}

int SplitExponentials::rotate_passes() const {
  return k_.n_ <= kBlockQubits ? 1 : 1 + (k_.n_ - kBlockQubits + 1) / 2;
}

const char* SplitExponentials::kernel_variant() { return chosen_variant().name; }

void SplitExponentials::set_kernel_variant(const std::string& name) {
  const SplitKernelVariant& v = find_variant(name, "kernel variant");
  std::lock_guard<std::mutex> lock(g_variant_mutex);
  g_variant = &v;
}

std::vector<std::string> SplitExponentials::available_kernel_variants() {
  std::vector<std::string> names;
  for (const SplitKernelVariant* v : compiled_variants())
    if (v->supported()) names.emplace_back(v->name);
  return names;
}

const char* SplitExponentials::kernels() const { return kernels_->name; }

void SplitExponentials::phase(SplitState& psi, double phi) const { kernels_->phase(k_, psi, phi); }

void SplitExponentials::rotate(SplitState& psi, double theta) const {
  kernels_->rotate_all(k_, psi, false, 0.0, theta);
}

void SplitExponentials::phase_then_rotate(SplitState& psi, double phi, double theta) const {
  kernels_->rotate_all(k_, psi, true, phi, theta);
}

}  // namespace gapwise
