// Far field of elemental dipoles (far_field.h): plan, method choice, the
// vectorized direct sum, and the glue to the NUFFT fast path (nufft.h).
#include "engine/field/far_field.h"
#include "engine/threads.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <functional>
#include <iterator>
#include <map>
#include <mutex>
#include <sstream>

#include <omp.h>
#include <Eigen/Geometry>

#include "engine/error.h"
#include "engine/field/kernel_clones.h"
#include "engine/field/lattice.h"
#include "engine/field/nufft.h"
#include "engine/field/sincos.h"
#include "engine/ground.h"
#include "engine/text_case.h"

namespace lobecast {

std::string_view ToString(FieldMethod m) {
  switch (m) {
    case FieldMethod::kDirect:
      return "direct";
    case FieldMethod::kFast:
      return "fast";
    case FieldMethod::kAuto:
      return "auto";
  }
  return "unknown";
}

std::string_view ToString(FastTransform t) {
  switch (t) {
    case FastTransform::kNone:
      return "none";
    case FastTransform::kType3:
      return "type-3";
    case FastTransform::kLattice:
      return "lattice";
  }
  return "unknown";
}

std::optional<FieldMethod> FieldMethodFromString(std::string_view s) {
  const std::string lower = Lower(s);
  for (FieldMethod m : {FieldMethod::kDirect, FieldMethod::kFast, FieldMethod::kAuto}) {
    if (lower == ToString(m)) return m;
  }
  return std::nullopt;
}

bool FieldOptions::IsValid(std::string* why) const {
  std::ostringstream m;
  if (num_threads < 0) {
    m << "num_threads: found " << num_threads << ", expected 0 (OpenMP default) or more";
  } else if (!(tolerance_relative >= 1e-14 && tolerance_relative <= 1e-2)) {
    m << "tolerance_relative: found " << tolerance_relative << ", expected 1e-14 to 1e-2";
  } else {
    return true;
  }
  if (why) *why = m.str();
  return false;
}

namespace {

// Directions per tile (register blocking: each source's data is loaded once for
// the whole tile), directions per cache chunk, and sources per cache block
// (five or seven arrays of doubles: 1024 sources stay in a 48 KiB L1).
constexpr int kTileCollinear = 4;
constexpr int kTileGeneral = 2;
constexpr std::size_t kChunkDirections = 64;
constexpr std::size_t kBlockSources = 1024;

// Source data for one execution, structure of arrays.
struct SourceArrays {
  const double* x;
  const double* y;
  const double* z;
  const double* wr;  // weight, real part: I * signed moment (collinear) or I (general)
  const double* wi;
  const double* mx;  // general only: moment Le u
  const double* my;
  const double* mz;
};

// acc[2t], acc[2t+1] += sum_s w_s exp(j k_t . r_s) for 4 directions k_t = k[3t..3t+2].
LOBECAST_KERNEL_CLONES
void SumCollinearTile(const SourceArrays& src, std::size_t begin, std::size_t end, const double* k,
                      double* acc) {
  const double k0x = k[0], k0y = k[1], k0z = k[2], k1x = k[3], k1y = k[4], k1z = k[5];
  const double k2x = k[6], k2y = k[7], k2z = k[8], k3x = k[9], k3y = k[10], k3z = k[11];
  const double* x = src.x;
  const double* y = src.y;
  const double* z = src.z;
  const double* wr = src.wr;
  const double* wi = src.wi;
  double r0 = 0, i0 = 0, r1 = 0, i1 = 0, r2 = 0, i2 = 0, r3 = 0, i3 = 0;
#pragma omp simd reduction(+ : r0, i0, r1, i1, r2, i2, r3, i3)
  for (std::size_t s = begin; s < end; ++s) {
    const double xs = x[s], ys = y[s], zs = z[s], a = wr[s], b = wi[s];
    double sn, cs;
    SinCos(k0x * xs + k0y * ys + k0z * zs, sn, cs);
    r0 += a * cs - b * sn;
    i0 += a * sn + b * cs;
    SinCos(k1x * xs + k1y * ys + k1z * zs, sn, cs);
    r1 += a * cs - b * sn;
    i1 += a * sn + b * cs;
    SinCos(k2x * xs + k2y * ys + k2z * zs, sn, cs);
    r2 += a * cs - b * sn;
    i2 += a * sn + b * cs;
    SinCos(k3x * xs + k3y * ys + k3z * zs, sn, cs);
    r3 += a * cs - b * sn;
    i3 += a * sn + b * cs;
  }
  acc[0] += r0, acc[1] += i0, acc[2] += r1, acc[3] += i1;
  acc[4] += r2, acc[5] += i2, acc[6] += r3, acc[7] += i3;
}

// acc[6t + 2a], acc[6t + 2a + 1] += sum_s m_s[a] I_s exp(j k_t . r_s), a = x, y, z,
// for 2 directions.
LOBECAST_KERNEL_CLONES
void SumGeneralTile(const SourceArrays& src, std::size_t begin, std::size_t end, const double* k,
                    double* acc) {
  const double k0x = k[0], k0y = k[1], k0z = k[2], k1x = k[3], k1y = k[4], k1z = k[5];
  const double* x = src.x;
  const double* y = src.y;
  const double* z = src.z;
  const double* wr = src.wr;
  const double* wi = src.wi;
  const double* mx = src.mx;
  const double* my = src.my;
  const double* mz = src.mz;
  double xr0 = 0, xi0 = 0, yr0 = 0, yi0 = 0, zr0 = 0, zi0 = 0;
  double xr1 = 0, xi1 = 0, yr1 = 0, yi1 = 0, zr1 = 0, zi1 = 0;
#pragma omp simd reduction(+ : xr0, xi0, yr0, yi0, zr0, zi0, xr1, xi1, yr1, yi1, zr1, zi1)
  for (std::size_t s = begin; s < end; ++s) {
    const double xs = x[s], ys = y[s], zs = z[s], a = wr[s], b = wi[s];
    const double ux = mx[s], uy = my[s], uz = mz[s];
    double sn, cs;
    SinCos(k0x * xs + k0y * ys + k0z * zs, sn, cs);
    double pr = a * cs - b * sn, pi = a * sn + b * cs;
    xr0 += ux * pr, xi0 += ux * pi, yr0 += uy * pr, yi0 += uy * pi, zr0 += uz * pr, zi0 += uz * pi;
    SinCos(k1x * xs + k1y * ys + k1z * zs, sn, cs);
    pr = a * cs - b * sn, pi = a * sn + b * cs;
    xr1 += ux * pr, xi1 += ux * pi, yr1 += uy * pr, yi1 += uy * pi, zr1 += uz * pr, zi1 += uz * pi;
  }
  acc[0] += xr0, acc[1] += xi0, acc[2] += yr0, acc[3] += yi0, acc[4] += zr0, acc[5] += zi0;
  acc[6] += xr1, acc[7] += xi1, acc[8] += yr1, acc[9] += yi1, acc[10] += zr1, acc[11] += zi1;
}

// The general adjoint's stream: per direction its k vector and a complex
// 3-vector weight, structure of arrays.
struct VectorStream {
  const double* x;
  const double* y;
  const double* z;
  std::array<const double*, 3> vr, vi;  // weight per axis, real and imaginary parts
};

// acc[6t + 2a], acc[6t + 2a + 1] += sum_i v_i[a] exp(j q_t . x_i), a = x, y, z, for 2
// targets q_t = q[3t..3t+2] (the adjoint: q = -r_s, x_i = k r_hat_i).
LOBECAST_KERNEL_CLONES
void SumVectorTile(const VectorStream& src, std::size_t begin, std::size_t end, const double* q,
                   double* acc) {
  const double q0x = q[0], q0y = q[1], q0z = q[2], q1x = q[3], q1y = q[4], q1z = q[5];
  const double* x = src.x;
  const double* y = src.y;
  const double* z = src.z;
  const double *vxr = src.vr[0], *vyr = src.vr[1], *vzr = src.vr[2];
  const double *vxi = src.vi[0], *vyi = src.vi[1], *vzi = src.vi[2];
  double xr0 = 0, xi0 = 0, yr0 = 0, yi0 = 0, zr0 = 0, zi0 = 0;
  double xr1 = 0, xi1 = 0, yr1 = 0, yi1 = 0, zr1 = 0, zi1 = 0;
#pragma omp simd reduction(+ : xr0, xi0, yr0, yi0, zr0, zi0, xr1, xi1, yr1, yi1, zr1, zi1)
  for (std::size_t s = begin; s < end; ++s) {
    const double xs = x[s], ys = y[s], zs = z[s];
    const double ax = vxr[s], bx = vxi[s], ay = vyr[s], by = vyi[s], az = vzr[s], bz = vzi[s];
    double sn, cs;
    SinCos(q0x * xs + q0y * ys + q0z * zs, sn, cs);
    xr0 += ax * cs - bx * sn, xi0 += ax * sn + bx * cs;
    yr0 += ay * cs - by * sn, yi0 += ay * sn + by * cs;
    zr0 += az * cs - bz * sn, zi0 += az * sn + bz * cs;
    SinCos(q1x * xs + q1y * ys + q1z * zs, sn, cs);
    xr1 += ax * cs - bx * sn, xi1 += ax * sn + bx * cs;
    yr1 += ay * cs - by * sn, yi1 += ay * sn + by * cs;
    zr1 += az * cs - bz * sn, zi1 += az * sn + bz * cs;
  }
  acc[0] += xr0, acc[1] += xi0, acc[2] += yr0, acc[3] += yi0, acc[4] += zr0, acc[5] += zi0;
  acc[6] += xr1, acc[7] += xi1, acc[8] += yr1, acc[9] += yi1, acc[10] += zr1, acc[11] += zi1;
}

// The direct sums' loop: for each of `targets` targets (load(t, q) writes its 3
// coordinates), sums over the whole stream by a tile kernel (tile targets at a
// time, per accumulators each) and hands the accumulators to store(t, acc).
// Threads take chunks of kChunkDirections targets; each target's sum runs over
// the stream in blocks of kBlockSources in a fixed order, so the result does not
// depend on the thread count.
template <auto kernel, class Stream, class Load, class Store>
void TiledSums(const Stream& stream, std::size_t stream_size, std::size_t targets, int tile,
               int per, int threads, Load load, Store store) {
  const auto num_chunks =
      static_cast<std::ptrdiff_t>((targets + kChunkDirections - 1) / kChunkDirections);
  // No more threads than chunks: a probe of a few directions runs on one.
  threads = static_cast<int>(
      std::clamp<std::ptrdiff_t>(threads, 1, std::max<std::ptrdiff_t>(1, num_chunks)));
#pragma omp parallel for num_threads(threads) schedule(dynamic, 1)
  for (std::ptrdiff_t c = 0; c < num_chunks; ++c) {
    const std::size_t d0 = static_cast<std::size_t>(c) * kChunkDirections;
    const std::size_t nd = std::min(kChunkDirections, targets - d0);
    const std::size_t ntiles =
        (nd + static_cast<std::size_t>(tile) - 1) / static_cast<std::size_t>(tile);
    // Coordinates of the chunk, padded to whole tiles by repeating the last one.
    std::array<double, 3 * (kChunkDirections + kTileCollinear)> q{};
    std::array<double, 6 * (kChunkDirections + kTileCollinear)> acc{};
    for (std::size_t t = 0; t < ntiles * static_cast<std::size_t>(tile); ++t) {
      load(d0 + std::min(t, nd - 1), &q[3 * t]);
    }
    for (std::size_t b = 0; b < stream_size; b += kBlockSources) {
      const std::size_t e = std::min(stream_size, b + kBlockSources);
      for (std::size_t t = 0; t < ntiles; ++t) {
        const std::size_t o = t * static_cast<std::size_t>(tile);
        kernel(stream, b, e, &q[3 * o], &acc[static_cast<std::size_t>(per) * o]);
      }
    }
    for (std::size_t t = 0; t < nd; ++t) store(d0 + t, &acc[static_cast<std::size_t>(per) * t]);
  }
}

// Fast path error model: each component of the NUFFT output is within
// kErrorModel * eps * sum_j |c_j| of the exact sum, eps a power of ten. Barnett
// et al. 2019 observe errors near eps * sum |c| for one stage; with the two stages
// of type 3 we measured up to 3.5 eps (a 16-dipole array, tests/bench), so the
// factor leaves a margin of about 3 over that. Tests check that the reported bound
// is met (tests/field_methods_test.cpp).
constexpr double kErrorModel = 10.0;
// The first fast pass runs at this tolerance (cheap, w = 5) to locate the peak.
constexpr double kScoutTolerance = 1e-4;

// Cost model for kAuto: CPU seconds per unit on one core of the development
// machine (AMD EPYC at 2.1 GHz, AVX-512 clone), from tests/bench/field_bench.cpp
// process CPU times. Only their ratios matter; the 0.5 margin in the choice
// absorbs the model's roughness.
constexpr double kSecondsPerPairCollinear = 1.0 / 6.5e8;
constexpr double kSecondsPerPairGeneral = 1.0 / 4.5e8;
constexpr double kSecondsPerKernelPoint = 2.0e-9;    // spread or interpolate, per component
constexpr double kSecondsPerFftPointLog = 1.0e-9;    // per grid point and log2(size), per component
constexpr double kSecondsPerTargetPass = 1.0e-6;     // kernel transforms, phases, copies
constexpr double kSecondsPerLatticeTarget = 6.0e-7;  // lattice: phases, projection, copies
constexpr double kSecondsPerLayerTarget = 8.0e-8;    // lattice: one layer's phase and sum
constexpr double kMaxFastGridBytes = 4.0 * (1ull << 30);
// Lattice detection: the sites may hold at most this many times the sources (so
// thinned lattices qualify, scattered points on a fine raster do not), and the
// sources may sit at most kLatticeOffsetPhase * tolerance / k from their sites.
constexpr double kMaxSitesPerSource = 16.0;
constexpr double kLatticeOffsetPhase = 1e-3;

// One complex current per dipole, or InvalidArgument naming both counts.
void CheckCurrents(const Eigen::VectorXcd& currents_a, std::size_t num_dipoles) {
  if (static_cast<std::size_t>(currents_a.size()) == num_dipoles) return;
  std::ostringstream s;
  s << "currents: found " << currents_a.size() << " values, expected one per dipole ("
    << num_dipoles << ")";
  throw InvalidArgument(s.str());
}

// True when every column of m is parallel or antiparallel to one unit vector.
bool AllParallel(const Eigen::Matrix3Xd& m, Vec3* axis) {
  if (m.cols() == 0) return false;
  *axis = m.col(0).normalized();
  for (Eigen::Index s = 1; s < m.cols(); ++s) {
    if (m.col(s).cross(*axis).norm() > 1e-15 * m.col(s).norm()) return false;
  }
  return true;
}

}  // namespace

struct FieldPlan::FastCache {
  std::mutex mutex;
  bool valid = false;
  Eigen::VectorXcd currents;  // the key: the field below belongs to these currents
  FarField field;             // every plan direction
  double error_bound = 0;     // relative to the peak; 0 after a direct fallback
  // NUFFT plans by tolerance exponent (the kernel width depends only on it), kept
  // for the next current vector: O(directions) memory each, at most two in use.
  std::map<int, std::shared_ptr<const PointSum>> plans;
};

double FieldPlan::error_bound_relative() const {
  if (!fast_) return 0.0;
  const std::lock_guard<std::mutex> lock(fast_->mutex);
  return fast_->error_bound;
}

double FieldPlan::EstimatedDirectSeconds() const {
  std::size_t live = 0;
  for (unsigned char z : dirs_.zeroed) live += z ? 0 : 1;
  const double per = collinear_ ? kSecondsPerPairCollinear : kSecondsPerPairGeneral;
  const int threads = ResolveThreads(num_threads_);
  return static_cast<double>(live) * static_cast<double>(num_sources()) * per / threads;
}

// A scout pass, then one about three digits tighter than asked (the peak is
// below sum |c|, often well below for irregular currents, and the error model
// carries a factor 10): the tolerances both fast estimates cost.
static std::array<double, 2> PassTolerances(double tolerance_relative) {
  return {kScoutTolerance, std::max(1e-14, 1e-3 * tolerance_relative)};
}

double FieldPlan::EstimatedType3Seconds() const {
  const double comps = collinear_ ? 1.0 : 3.0;
  const int threads = ResolveThreads(num_threads_);
  double total = 0;
  for (double eps : PassTolerances(tolerance_relative_)) {
    const NufftGeometry g = Nufft3::GeometryFor(source_pos_, dirs_.k_r_hat, eps);
    if (g.fft_points() * comps * 16.0 > kMaxFastGridBytes) return 1e300;
    const double spread = static_cast<double>(num_sources()) * g.kernel_points() * comps;
    const double interp =
        static_cast<double>(num_directions()) * g.kernel_points() * comps / threads;
    const double fft = g.fft_points() * std::log2(std::max(2.0, g.fft_points())) * comps;
    total += (spread + interp) * kSecondsPerKernelPoint + fft * kSecondsPerFftPointLog +
             static_cast<double>(num_directions()) * kSecondsPerTargetPass / threads;
  }
  return total;
}

double FieldPlan::EstimatedLatticeSeconds() const {
  if (!lattice_) return 1e300;
  const double comps = collinear_ ? 1.0 : 3.0;
  const int threads = ResolveThreads(num_threads_);
  const auto nd = static_cast<double>(num_directions());
  double total = 0;
  for (double eps : PassTolerances(tolerance_relative_)) {
    const LatticeShape shape = LatticeSum::ShapeFor(*lattice_, eps);
    const NufftGeometry& g = shape.per_layer;
    if (g.fft_points() * comps * 16.0 > kMaxFastGridBytes) return 1e300;
    const double interp = nd * g.kernel_points() * comps / threads;
    const double fft = g.fft_points() * std::log2(std::max(2.0, g.fft_points())) * comps;
    total += shape.layers * (interp * kSecondsPerKernelPoint + fft * kSecondsPerFftPointLog +
                             nd * comps * kSecondsPerLayerTarget / threads) +
             nd * kSecondsPerLatticeTarget / threads;
  }
  return total;
}

namespace {

// The fast path's tolerance search, shared by Execute and ExecuteAdjoint.
// pass(eps) runs the transform at tolerance eps and returns the peak |output|;
// at eps the error of every output is at most unit * (kErrorModel * eps +
// placement). A scout pass (cheap, it finds the peak), then, when that does not
// meet the tolerance relative to the peak, one pass tight enough for it.
// Tolerances are rounded down to a power of ten: the kernel width depends only on
// the exponent, so nothing is lost and plans can be reused. Returns the bound
// met relative to the peak, or std::nullopt when the peak is so far below unit
// (near-total cancellation) that double precision cannot reach the tolerance:
// then the caller sums directly.
std::optional<double> SearchTolerance(double tolerance, double unit, double placement,
                                      const std::function<double(double)>& pass) {
  const auto bound = [&](double eps) { return unit * (kErrorModel * eps + placement); };
  const auto round_down = [](double e) { return std::pow(10.0, std::floor(std::log10(e))); };
  double eps = round_down(std::max(tolerance, kScoutTolerance));
  double peak = pass(eps);
  if (bound(eps) > tolerance * peak) {
    const double peak_low = peak - bound(eps);
    const double room = peak_low > 0 ? tolerance * peak_low / unit - placement : 0.0;
    eps = room > 0 ? round_down(room / kErrorModel) : 0.0;
    if (eps >= 1e-14) peak = pass(eps);
  }
  if (eps >= 1e-14 && peak > 0 && bound(eps) <= tolerance * peak) return bound(eps) / peak;
  return std::nullopt;
}

}  // namespace

std::shared_ptr<const PointSum> FieldPlan::FastPlanLocked(FastCache& cache, double eps) const {
  const int exponent = static_cast<int>(std::floor(std::log10(eps)));
  const int scout = static_cast<int>(std::floor(std::log10(kScoutTolerance)));
  auto it = cache.plans.find(exponent);
  if (it == cache.plans.end()) {
    for (auto j = cache.plans.begin(); j != cache.plans.end();) {
      j = j->first == scout ? std::next(j) : cache.plans.erase(j);
    }
    const NufftOptions nufft_options{eps, num_threads_};
    std::shared_ptr<const PointSum> sum;
    if (fast_transform_ == FastTransform::kLattice) {
      sum = std::make_shared<const LatticeSum>(*lattice_, dirs_.k_r_hat, nufft_options);
    } else {
      sum = std::make_shared<const Nufft3>(source_pos_, dirs_.k_r_hat, nufft_options);
    }
    it = cache.plans.emplace(exponent, std::move(sum)).first;
  }
  return it->second;
}

void FieldPlan::ExecuteFast(const Eigen::VectorXcd& currents_a, std::size_t first,
                            std::size_t count, FarField& out) const {
  const std::lock_guard<std::mutex> lock(fast_->mutex);
  FastCache& cache = *fast_;
  if (!cache.valid || cache.currents.size() != currents_a.size() || cache.currents != currents_a) {
    cache.valid = false;
    const Eigen::Index ns = source_pos_.cols(), nd = dirs_.k_r_hat.cols();
    const int comps = collinear_ ? 1 : 3;
    Eigen::MatrixXcd strengths(ns, comps);
    double l1 = 0;  // sum_s |I_s| |Le_s u_s|, bounds every component's sum
    for (Eigen::Index s = 0; s < ns; ++s) {
      const Complex c = currents_a[source_dipole_[static_cast<std::size_t>(s)]];
      if (collinear_) {
        strengths(s, 0) = c * signed_moment_m_[static_cast<std::size_t>(s)];
      } else {
        for (int a = 0; a < 3; ++a) strengths(s, a) = c * source_moment_(a, s);
      }
      l1 += std::abs(c) * source_moment_.col(s).norm();
    }
    const Complex minus_j_pref(0.0, -prefactor_);
    cache.field.e_theta.resize(nd);
    cache.field.e_phi.resize(nd);
    // One NUFFT pass at tolerance eps; returns the peak |rE| over live directions.
    auto pass = [&](double eps) {
      const Eigen::MatrixXcd m = FastPlanLocked(cache, eps)->Execute(strengths);
      double peak = 0;
      for (Eigen::Index i = 0; i < nd; ++i) {
        if (dirs_.zeroed[static_cast<std::size_t>(i)]) {
          cache.field.e_theta[i] = 0.0, cache.field.e_phi[i] = 0.0;
          continue;
        }
        Complex mt = 0.0, mp = 0.0;
        for (int a = 0; a < 3; ++a) {
          const Complex ma = collinear_ ? m(i, 0) * common_axis_[a] : m(i, a);
          mt += dirs_.theta_hat(a, i) * ma;
          mp += dirs_.phi_hat(a, i) * ma;
        }
        cache.field.e_theta[i] = minus_j_pref * mt;
        cache.field.e_phi[i] = minus_j_pref * mp;
        peak = std::max(
            peak, std::sqrt(std::norm(cache.field.e_theta[i]) + std::norm(cache.field.e_phi[i])));
      }
      return peak;
    };
    // Error in |rE| at tolerance eps, by the error model (same for every
    // direction), plus the lattice's placement error when it has one.
    const std::optional<double> met = SearchTolerance(
        tolerance_relative_, prefactor_ * std::sqrt(comps) * l1, lattice_phase_error_, pass);
    if (met) {
      cache.error_bound = *met;
    } else {
      // The peak is too far below sum |c| (near-total cancellation) for the NUFFT
      // to reach the tolerance in double precision: sum directly.
      ExecuteDirect(currents_a, 0, num_directions(), cache.field);
      cache.error_bound = 0.0;
    }
    cache.currents = currents_a;
    cache.valid = true;
  }
  out.e_theta = cache.field.e_theta.segment(static_cast<Eigen::Index>(first),
                                            static_cast<Eigen::Index>(count));
  out.e_phi =
      cache.field.e_phi.segment(static_cast<Eigen::Index>(first), static_cast<Eigen::Index>(count));
}

FieldPlan::FieldPlan(const Array& array, const Directions& directions, const FieldOptions& options)
    : num_dipoles_(array.size()),
      ground_(array.ground),
      tolerance_relative_(options.tolerance_relative),
      num_threads_(options.num_threads) {
  Validate(array);
  std::string why;
  if (!options.IsValid(&why)) throw InvalidArgument("field options: " + why);
  // w mu0 / (4 pi) = eta0 k / (4 pi), V per (A m) of moment.
  prefactor_ = array.angular_frequency_rad_s() * kMu0_H_m / (4.0 * kPi);

  const std::vector<Dipole> sources = RadiatingSources(array);
  const auto ns = static_cast<Eigen::Index>(sources.size());
  source_pos_.resize(3, ns);
  source_moment_.resize(3, ns);
  source_dipole_.resize(sources.size());
  for (Eigen::Index s = 0; s < ns; ++s) {
    const Dipole& d = sources[static_cast<std::size_t>(s)];
    source_pos_.col(s) = d.position_m;
    source_moment_.col(s) = d.effective_length_m() * d.orientation;
    source_dipole_[static_cast<std::size_t>(s)] =
        static_cast<int>(s % static_cast<Eigen::Index>(num_dipoles_));
  }
  collinear_ = AllParallel(source_moment_, &common_axis_);
  // The direct kernels' structure of arrays: x, y, z, then the moment's x, y, z
  // (general moments only).
  for (int d = 0; d < 3; ++d) {
    soa_[static_cast<std::size_t>(d)].assign(source_pos_.row(d).begin(), source_pos_.row(d).end());
    if (!collinear_) {
      soa_[static_cast<std::size_t>(d + 3)].assign(source_moment_.row(d).begin(),
                                                   source_moment_.row(d).end());
    }
  }
  if (collinear_) {
    signed_moment_m_.resize(sources.size());
    for (Eigen::Index s = 0; s < ns; ++s) {
      signed_moment_m_[static_cast<std::size_t>(s)] = source_moment_.col(s).dot(common_axis_);
    }
  }

  const double k = array.wavenumber_rad_m();
  wavenumber_rad_m_ = k;
  dirs_ = MakeDirectionData(directions);

  switch (options.method) {
    case FieldMethod::kDirect:
      method_used_ = FieldMethod::kDirect;
      break;
    case FieldMethod::kFast:
    case FieldMethod::kAuto:
      break;  // below, once the costs are known
  }
  if (options.method != FieldMethod::kDirect) {
    // A lattice within kLatticeOffsetPhase * tolerance of phase of every source.
    const double max_offset = kLatticeOffsetPhase * tolerance_relative_ / k;
    const double max_sites = kMaxSitesPerSource * static_cast<double>(num_sources()) + 1024.0;
    auto lat =
        options.use_lattice ? FindAxisLattice(source_pos_, max_offset, max_sites) : std::nullopt;
    if (lat) {
      lattice_ = std::make_shared<const AxisLattice>(std::move(*lat));
      lattice_phase_error_ = k * lattice_->max_offset;
    }
    const double type3 = EstimatedType3Seconds(), on_lattice = EstimatedLatticeSeconds();
    const double fast = std::min(type3, on_lattice);
    if (options.method == FieldMethod::kFast || fast < 0.5 * EstimatedDirectSeconds()) {
      method_used_ = FieldMethod::kFast;
      fast_transform_ = on_lattice < type3 ? FastTransform::kLattice : FastTransform::kType3;
    } else {
      method_used_ = FieldMethod::kDirect;
    }
    if (fast_transform_ != FastTransform::kLattice) lattice_.reset(), lattice_phase_error_ = 0;
  }
  if (method_used_ == FieldMethod::kFast) fast_ = std::make_shared<FastCache>();
}

FieldPlan::DirectionData FieldPlan::MakeDirectionData(const Directions& directions) const {
  DirectionData d;
  const double k = wavenumber_rad_m_;
  const auto nd = static_cast<Eigen::Index>(directions.size());
  d.k_r_hat.resize(3, nd);
  d.theta_hat.resize(3, nd);
  d.phi_hat.resize(3, nd);
  d.zeroed.assign(directions.size(), 0);
  // The unit vectors of grid.h's Directions, from one sin/cos pair per angle
  // (the same values as Directions::r_hat etc.: std::sin and std::cos of the
  // same arguments), in parallel: on dense grids this loop is the plan's cost.
  const int threads = nd < 4096 ? 1 : ResolveThreads(num_threads_);
#pragma omp parallel for num_threads(threads) schedule(static)
  for (Eigen::Index i = 0; i < nd; ++i) {
    const auto u = static_cast<std::size_t>(i);
    const double t = directions.theta_rad(u), p = directions.phi_rad(u);
    const double st = std::sin(t), ct = std::cos(t), sp = std::sin(p), cp = std::cos(p);
    d.k_r_hat.col(i) << k * (st * cp), k * (st * sp), k * ct;
    d.theta_hat.col(i) << ct * cp, ct * sp, -st;
    d.phi_hat.col(i) << -sp, cp, 0.0;
    d.zeroed[u] = BelowGround(ground_, t) ? 1 : 0;
  }
  return d;
}

FarField FieldPlan::ExecuteAt(const Eigen::VectorXcd& currents_a,
                              const Directions& directions) const {
  CheckCurrents(currents_a, num_dipoles_);
  FarField out;
  out.e_theta.resize(static_cast<Eigen::Index>(directions.size()));
  out.e_phi.resize(static_cast<Eigen::Index>(directions.size()));
  SumDirect(currents_a, MakeDirectionData(directions), 0, directions.size(), out);
  return out;
}

FarField FieldPlan::Execute(const Eigen::VectorXcd& currents_a) const {
  FarField out;
  ExecuteRange(currents_a, 0, num_directions(), out);
  return out;
}

void FieldPlan::ExecuteRange(const Eigen::VectorXcd& currents_a, std::size_t first,
                             std::size_t count, FarField& out) const {
  CheckCurrents(currents_a, num_dipoles_);
  if (first > num_directions() || count > num_directions() - first) {
    std::ostringstream s;
    s << "direction range [" << first << ", " << first + count << ") exceeds the plan's "
      << num_directions() << " directions";
    throw InvalidArgument(s.str());
  }
  out.e_theta.resize(static_cast<Eigen::Index>(count));
  out.e_phi.resize(static_cast<Eigen::Index>(count));
  if (method_used_ == FieldMethod::kFast) {
    ExecuteFast(currents_a, first, count, out);
  } else {
    ExecuteDirect(currents_a, first, count, out);
  }
}

void FieldPlan::ExecuteDirect(const Eigen::VectorXcd& currents_a, std::size_t first,
                              std::size_t count, FarField& out) const {
  SumDirect(currents_a, dirs_, first, count, out);
}

void FieldPlan::SumDirect(const Eigen::VectorXcd& currents_a, const DirectionData& dirs,
                          std::size_t first, std::size_t count, FarField& out) const {
  const std::size_t ns = num_sources();
  std::vector<double> wr(ns), wi(ns);
  for (std::size_t s = 0; s < ns; ++s) {
    const Complex c = currents_a[source_dipole_[s]];
    const double m = collinear_ ? signed_moment_m_[s] : 1.0;
    wr[s] = c.real() * m;
    wi[s] = c.imag() * m;
  }
  const SourceArrays src{soa_[0].data(), soa_[1].data(), soa_[2].data(), wr.data(),
                         wi.data(),      soa_[3].data(), soa_[4].data(), soa_[5].data()};

  // Directions the ground does not force to zero; the others are set here.
  std::vector<std::size_t> live;
  live.reserve(count);
  for (std::size_t j = 0; j < count; ++j) {
    if (dirs.zeroed[first + j]) {
      out.e_theta[static_cast<Eigen::Index>(j)] = 0.0;
      out.e_phi[static_cast<Eigen::Index>(j)] = 0.0;
    } else {
      live.push_back(j);
    }
  }
  const Complex minus_j_pref(0.0, -prefactor_);
  const auto load = [&](std::size_t t, double* k) {
    const auto i = static_cast<Eigen::Index>(first + live[t]);
    for (int a = 0; a < 3; ++a) k[a] = dirs.k_r_hat(a, i);
  };
  const auto store = [&](std::size_t t, const double* a) {
    const auto j = static_cast<Eigen::Index>(live[t]);
    const Eigen::Index i = static_cast<Eigen::Index>(first) + j;
    // M = sum_s I_s Le_s u_s exp(+j k r_hat . r_s).
    Eigen::Vector3d mr, mi;
    if (collinear_) {
      mr = a[0] * common_axis_;
      mi = a[1] * common_axis_;
    } else {
      mr << a[0], a[2], a[4];
      mi << a[1], a[3], a[5];
    }
    // r_hat x (r_hat x M) = -M_perp, so rE_theta = -j (w mu0 / 4 pi) theta_hat . M.
    const Complex m_theta(dirs.theta_hat.col(i).dot(mr), dirs.theta_hat.col(i).dot(mi));
    const Complex m_phi(dirs.phi_hat.col(i).dot(mr), dirs.phi_hat.col(i).dot(mi));
    out.e_theta[j] = minus_j_pref * m_theta;
    out.e_phi[j] = minus_j_pref * m_phi;
  };
  const int threads = ResolveThreads(num_threads_);
  if (collinear_) {
    TiledSums<SumCollinearTile>(src, ns, live.size(), kTileCollinear, 2, threads, load, store);
  } else {
    TiledSums<SumGeneralTile>(src, ns, live.size(), kTileGeneral, 6, threads, load, store);
  }
}

DipoleSums FieldPlan::ExecuteAdjoint(const Eigen::Matrix3Xcd& field,
                                     const Eigen::VectorXd& weights) const {
  if (static_cast<std::size_t>(field.cols()) != num_directions()) {
    std::ostringstream s;
    s << "adjoint field: found " << field.cols() << " vectors, expected one per plan direction ("
      << num_directions() << ")";
    throw InvalidArgument(s.str());
  }
  FarField f;
  f.e_theta = (dirs_.theta_hat.cast<Complex>().cwiseProduct(field)).colwise().sum().transpose();
  f.e_phi = (dirs_.phi_hat.cast<Complex>().cwiseProduct(field)).colwise().sum().transpose();
  return ExecuteAdjoint(f, weights);
}

DipoleSums FieldPlan::ExecuteAdjoint(const FarField& field, const Eigen::VectorXd& weights) const {
  const auto nd = static_cast<Eigen::Index>(num_directions());
  if (field.e_theta.size() != nd || field.e_phi.size() != nd ||
      (weights.size() != 0 && weights.size() != nd)) {
    std::ostringstream s;
    s << "adjoint field: found " << field.e_theta.size() << " e_theta, " << field.e_phi.size()
      << " e_phi and " << weights.size() << " weights, expected " << nd
      << " each (weights may be empty)";
    throw InvalidArgument(s.str());
  }
  Eigen::Matrix3Xcd v(3, nd);
  for (Eigen::Index i = 0; i < nd; ++i) {
    if (dirs_.zeroed[static_cast<std::size_t>(i)]) {
      v.col(i).setZero();
      continue;
    }
    const double w = weights.size() ? weights[i] : 1.0;
    v.col(i) = dirs_.theta_hat.col(i).cast<Complex>() * (w * field.e_theta[i]) +
               dirs_.phi_hat.col(i).cast<Complex>() * (w * field.e_phi[i]);
  }
  if (method_used_ == FieldMethod::kFast) return AdjointFast(v);
  return DipoleSums{AdjointDirect(v), 0.0};
}

Eigen::VectorXcd FieldPlan::AdjointDirect(const Eigen::Matrix3Xcd& v) const {
  // The stream: the live directions' k vectors and weights (axis . v_i for one
  // moment axis, else v_i); the targets: the sources, at q = -r_s, so that the
  // kernels' exp(j q . x) is exp(-j k_i . r_s).
  std::vector<Eigen::Index> live;
  for (Eigen::Index i = 0; i < v.cols(); ++i) {
    if (!dirs_.zeroed[static_cast<std::size_t>(i)]) live.push_back(i);
  }
  const std::size_t nl = live.size(), ns = num_sources();
  std::array<std::vector<double>, 9> soa;  // kx, ky, kz, then real and imaginary parts
  for (auto& a : soa) a.resize(nl);
  for (std::size_t t = 0; t < nl; ++t) {
    const Eigen::Index i = live[t];
    for (int a = 0; a < 3; ++a) soa[static_cast<std::size_t>(a)][t] = dirs_.k_r_hat(a, i);
    if (collinear_) {
      const Complex u = common_axis_.cast<Complex>().dot(v.col(i));  // axis real: no conjugate
      soa[3][t] = u.real(), soa[4][t] = u.imag();
    } else {
      for (std::size_t a = 0; a < 3; ++a) {
        soa[3 + 2 * a][t] = v(static_cast<Eigen::Index>(a), i).real();
        soa[4 + 2 * a][t] = v(static_cast<Eigen::Index>(a), i).imag();
      }
    }
  }
  const int per = collinear_ ? 2 : 6;
  std::vector<double> acc(static_cast<std::size_t>(per) * ns);
  const auto load = [&](std::size_t s, double* q) {
    for (int a = 0; a < 3; ++a) q[a] = -source_pos_(a, static_cast<Eigen::Index>(s));
  };
  const auto store = [&](std::size_t s, const double* a) {
    std::copy(a, a + per, acc.begin() + static_cast<std::ptrdiff_t>(per * s));
  };
  const int threads = ResolveThreads(num_threads_);
  if (collinear_) {
    const SourceArrays stream{soa[0].data(), soa[1].data(), soa[2].data(), soa[3].data(),
                              soa[4].data(), nullptr,       nullptr,       nullptr};
    TiledSums<SumCollinearTile>(stream, nl, ns, kTileCollinear, 2, threads, load, store);
  } else {
    const VectorStream stream{soa[0].data(),
                              soa[1].data(),
                              soa[2].data(),
                              {soa[3].data(), soa[5].data(), soa[7].data()},
                              {soa[4].data(), soa[6].data(), soa[8].data()}};
    TiledSums<SumVectorTile>(stream, nl, ns, kTileGeneral, 6, threads, load, store);
  }
  // Images fold onto their dipoles, in source order.
  Eigen::VectorXcd y = Eigen::VectorXcd::Zero(static_cast<Eigen::Index>(num_dipoles_));
  for (std::size_t s = 0; s < ns; ++s) {
    const double* a = &acc[static_cast<std::size_t>(per) * s];
    Complex m;
    if (collinear_) {
      m = signed_moment_m_[s] * Complex(a[0], a[1]);
    } else {
      const auto c = static_cast<Eigen::Index>(s);
      m = source_moment_(0, c) * Complex(a[0], a[1]) + source_moment_(1, c) * Complex(a[2], a[3]) +
          source_moment_(2, c) * Complex(a[4], a[5]);
    }
    y[source_dipole_[s]] += m;
  }
  return Complex(0.0, prefactor_) * y;
}

DipoleSums FieldPlan::AdjointFast(const Eigen::Matrix3Xcd& v) const {
  // The transform's values: axis . v_i for one moment axis, else v_i.
  const int comps = collinear_ ? 1 : 3;
  const Eigen::Index nd = v.cols(), ns = source_pos_.cols();
  Eigen::MatrixXcd values(nd, comps);
  if (collinear_) {
    values.col(0) = (common_axis_.cast<Complex>().transpose() * v).transpose();
  } else {
    values = v.transpose();
  }
  // |error of y_n| <= (w mu0 / 4 pi) sum over n's sources s and axes a of
  // |m_s[a]| err(g(s, a)), each err(g(s, a)) within (kErrorModel eps + placement)
  // sum_i |values(i, a)| (PointSum::Adjoint); unit is the largest such sum.
  const Eigen::VectorXd l1 = values.cwiseAbs().colwise().sum().transpose();
  Eigen::VectorXd per_dipole = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(num_dipoles_));
  for (Eigen::Index s = 0; s < ns; ++s) {
    double u = 0;
    for (int a = 0; a < comps; ++a) {
      u += (collinear_ ? std::abs(signed_moment_m_[static_cast<std::size_t>(s)])
                       : std::abs(source_moment_(a, s))) *
           l1[a];
    }
    per_dipole[source_dipole_[static_cast<std::size_t>(s)]] += u;
  }
  const double unit = prefactor_ * (per_dipole.size() ? per_dipole.maxCoeff() : 0.0);
  const Complex j_pref(0.0, prefactor_);
  Eigen::VectorXcd y;
  auto pass = [&](double eps) {
    std::shared_ptr<const PointSum> plan;
    {
      const std::lock_guard<std::mutex> lock(fast_->mutex);
      plan = FastPlanLocked(*fast_, eps);
    }
    const Eigen::MatrixXcd g = plan->Adjoint(values);
    y = Eigen::VectorXcd::Zero(static_cast<Eigen::Index>(num_dipoles_));
    for (Eigen::Index s = 0; s < ns; ++s) {
      const auto u = static_cast<std::size_t>(s);
      Complex m = 0.0;
      if (collinear_) {
        m = signed_moment_m_[u] * g(s, 0);
      } else {
        for (int a = 0; a < 3; ++a) m += source_moment_(a, s) * g(s, a);
      }
      y[source_dipole_[u]] += m;
    }
    y *= j_pref;
    return y.size() ? y.cwiseAbs().maxCoeff() : 0.0;
  };
  const std::optional<double> met =
      SearchTolerance(tolerance_relative_, unit, lattice_phase_error_, pass);
  if (met) return DipoleSums{y, *met};
  return DipoleSums{AdjointDirect(v), 0.0};
}

}  // namespace lobecast
