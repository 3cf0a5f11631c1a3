// The field plan's exact sums (far_field.h): vectorized tile kernels (inlined
// sincos, engine/field/sincos.h), threaded over targets in a fixed order, for the
// forward sum (over directions) and the adjoint (over sources).
#include <algorithm>
#include <array>
#include <cstring>
#include <memory>
#include <mutex>
#include <vector>

#include <omp.h>

#include "engine/field/far_field.h"
#include "engine/field/kernel_clones.h"
#include "engine/field/sincos.h"
#include "engine/threads.h"

namespace lobecast {
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

// SumCollinearTile for one direction: the tiles' remainder (a probe of one
// direction used to pay for a whole tile of copies). Each direction's arithmetic
// is the tile's, term for term, so a direction's sum does not depend on the
// kernel that took it (tests/far_field_test.cpp, "BatchingDoesNotChangeABit").
LOBECAST_KERNEL_CLONES
void SumCollinearOne(const SourceArrays& src, std::size_t begin, std::size_t end, const double* k,
                     double* acc) {
  const double k0x = k[0], k0y = k[1], k0z = k[2];
  const double* x = src.x;
  const double* y = src.y;
  const double* z = src.z;
  const double* wr = src.wr;
  const double* wi = src.wi;
  double r0 = 0, i0 = 0;
#pragma omp simd reduction(+ : r0, i0)
  for (std::size_t s = begin; s < end; ++s) {
    const double xs = x[s], ys = y[s], zs = z[s], a = wr[s], b = wi[s];
    double sn, cs;
    SinCos(k0x * xs + k0y * ys + k0z * zs, sn, cs);
    r0 += a * cs - b * sn;
    i0 += a * sn + b * cs;
  }
  acc[0] += r0, acc[1] += i0;
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

// SumGeneralTile for one direction (as SumCollinearOne).
LOBECAST_KERNEL_CLONES
void SumGeneralOne(const SourceArrays& src, std::size_t begin, std::size_t end, const double* k,
                   double* acc) {
  const double k0x = k[0], k0y = k[1], k0z = k[2];
  const double* x = src.x;
  const double* y = src.y;
  const double* z = src.z;
  const double* wr = src.wr;
  const double* wi = src.wi;
  const double* mx = src.mx;
  const double* my = src.my;
  const double* mz = src.mz;
  double xr0 = 0, xi0 = 0, yr0 = 0, yi0 = 0, zr0 = 0, zi0 = 0;
#pragma omp simd reduction(+ : xr0, xi0, yr0, yi0, zr0, zi0)
  for (std::size_t s = begin; s < end; ++s) {
    const double xs = x[s], ys = y[s], zs = z[s], a = wr[s], b = wi[s];
    const double ux = mx[s], uy = my[s], uz = mz[s];
    double sn, cs;
    SinCos(k0x * xs + k0y * ys + k0z * zs, sn, cs);
    const double pr = a * cs - b * sn, pi = a * sn + b * cs;
    xr0 += ux * pr, xi0 += ux * pi, yr0 += uy * pr, yi0 += uy * pi, zr0 += uz * pr, zi0 += uz * pi;
  }
  acc[0] += xr0, acc[1] += xi0, acc[2] += yr0, acc[3] += yi0, acc[4] += zr0, acc[5] += zi0;
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

// SumVectorTile for one target (as SumCollinearOne).
LOBECAST_KERNEL_CLONES
void SumVectorOne(const VectorStream& src, std::size_t begin, std::size_t end, const double* q,
                  double* acc) {
  const double q0x = q[0], q0y = q[1], q0z = q[2];
  const double* x = src.x;
  const double* y = src.y;
  const double* z = src.z;
  const double *vxr = src.vr[0], *vyr = src.vr[1], *vzr = src.vr[2];
  const double *vxi = src.vi[0], *vyi = src.vi[1], *vzi = src.vi[2];
  double xr0 = 0, xi0 = 0, yr0 = 0, yi0 = 0, zr0 = 0, zi0 = 0;
#pragma omp simd reduction(+ : xr0, xi0, yr0, yi0, zr0, zi0)
  for (std::size_t s = begin; s < end; ++s) {
    const double xs = x[s], ys = y[s], zs = z[s];
    const double ax = vxr[s], bx = vxi[s], ay = vyr[s], by = vyi[s], az = vzr[s], bz = vzi[s];
    double sn, cs;
    SinCos(q0x * xs + q0y * ys + q0z * zs, sn, cs);
    xr0 += ax * cs - bx * sn, xi0 += ax * sn + bx * cs;
    yr0 += ay * cs - by * sn, yi0 += ay * sn + by * cs;
    zr0 += az * cs - bz * sn, zi0 += az * sn + bz * cs;
  }
  acc[0] += xr0, acc[1] += xi0, acc[2] += yr0, acc[3] += yi0, acc[4] += zr0, acc[5] += zi0;
}

// The direct sums' loop: for each of `targets` targets (load(t, q) writes its 3
// coordinates), sums over the whole stream by a tile kernel (tile targets at a
// time, per accumulators each; the remainder of a chunk by `single`, one target at
// a time) and hands the accumulators to store(t, acc).
// Threads take chunks of kChunkDirections targets; each target's sum runs over
// the stream in blocks of kBlockSources in a fixed order, so the result does not
// depend on the thread count.
template <auto kernel, auto single, class Stream, class Load, class Store>
void TiledSums(const Stream& stream, std::size_t stream_size, std::size_t targets, int tile,
               int per, int threads, Load load, Store store) {
  const auto num_chunks =
      static_cast<std::ptrdiff_t>((targets + kChunkDirections - 1) / kChunkDirections);
  // No more threads than chunks: a probe of a few directions runs on one.
  threads = static_cast<int>(
      std::clamp<std::ptrdiff_t>(threads, 1, std::max<std::ptrdiff_t>(1, num_chunks)));
  const auto chunk = [&](std::ptrdiff_t c) {
    const std::size_t d0 = static_cast<std::size_t>(c) * kChunkDirections;
    const std::size_t nd = std::min(kChunkDirections, targets - d0);
    // Whole tiles, then the rest one by one.
    const std::size_t tiled = nd - nd % static_cast<std::size_t>(tile);
    std::array<double, 3 * kChunkDirections> q;
    std::array<double, 6 * kChunkDirections> acc;
    std::fill_n(acc.begin(), static_cast<std::size_t>(per) * nd, 0.0);
    for (std::size_t t = 0; t < nd; ++t) load(d0 + t, &q[3 * t]);
    for (std::size_t b = 0; b < stream_size; b += kBlockSources) {
      const std::size_t e = std::min(stream_size, b + kBlockSources);
      for (std::size_t o = 0; o < tiled; o += static_cast<std::size_t>(tile)) {
        kernel(stream, b, e, &q[3 * o], &acc[static_cast<std::size_t>(per) * o]);
      }
      for (std::size_t o = tiled; o < nd; ++o) {
        single(stream, b, e, &q[3 * o], &acc[static_cast<std::size_t>(per) * o]);
      }
    }
    for (std::size_t t = 0; t < nd; ++t) store(d0 + t, &acc[static_cast<std::size_t>(per) * t]);
  };
  // One thread: no parallel region to start (a probe's call is a few microseconds).
  if (threads == 1) {
    for (std::ptrdiff_t c = 0; c < num_chunks; ++c) chunk(c);
    return;
  }
#pragma omp parallel for num_threads(threads) schedule(dynamic, 1)
  for (std::ptrdiff_t c = 0; c < num_chunks; ++c) chunk(c);
}

}  // namespace

struct FieldPlan::SourceWeights {
  Eigen::VectorXcd currents;  // the key
  std::vector<double> wr, wi;
};

struct FieldPlan::WeightCache {
  std::mutex mutex;
  std::shared_ptr<const SourceWeights> last;
};

std::shared_ptr<FieldPlan::WeightCache> FieldPlan::MakeWeightCache() {
  return std::make_shared<WeightCache>();
}

std::shared_ptr<const FieldPlan::SourceWeights> FieldPlan::WeightsFor(
    const Eigen::VectorXcd& currents_a) const {
  const auto bytes = static_cast<std::size_t>(currents_a.size()) * sizeof(Complex);
  std::shared_ptr<const SourceWeights> last;
  {
    const std::lock_guard<std::mutex> lock(weights_->mutex);
    last = weights_->last;
  }
  // The same bits, the same weights.
  if (last && last->currents.size() == currents_a.size() &&
      (bytes == 0 || std::memcmp(last->currents.data(), currents_a.data(), bytes) == 0)) {
    return last;
  }
  auto w = std::make_shared<SourceWeights>();
  w->currents = currents_a;
  const std::size_t ns = num_sources();
  w->wr.resize(ns);
  w->wi.resize(ns);
  for (std::size_t s = 0; s < ns; ++s) {
    const Complex c = currents_a[source_dipole_[s]];
    const double m = collinear_ ? signed_moment_m_[s] : 1.0;
    w->wr[s] = c.real() * m;
    w->wi[s] = c.imag() * m;
  }
  const std::lock_guard<std::mutex> lock(weights_->mutex);
  weights_->last = w;
  return w;
}

void FieldPlan::ExecuteDirect(const Eigen::VectorXcd& currents_a, std::size_t first,
                              std::size_t count, FarField& out) const {
  SumDirect(currents_a, dirs_, first, count, out);
}

void FieldPlan::SumDirect(const Eigen::VectorXcd& currents_a, const DirectionData& dirs,
                          std::size_t first, std::size_t count, FarField& out) const {
  const std::size_t ns = num_sources();
  const std::shared_ptr<const SourceWeights> w = WeightsFor(currents_a);
  const SourceArrays src{soa_[0].data(), soa_[1].data(), soa_[2].data(), w->wr.data(),
                         w->wi.data(),   soa_[3].data(), soa_[4].data(), soa_[5].data()};

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
    TiledSums<SumCollinearTile, SumCollinearOne>(src, ns, live.size(), kTileCollinear, 2, threads,
                                                 load, store);
  } else {
    TiledSums<SumGeneralTile, SumGeneralOne>(src, ns, live.size(), kTileGeneral, 6, threads, load,
                                             store);
  }
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
    TiledSums<SumCollinearTile, SumCollinearOne>(stream, nl, ns, kTileCollinear, 2, threads, load,
                                                 store);
  } else {
    const VectorStream stream{soa[0].data(),
                              soa[1].data(),
                              soa[2].data(),
                              {soa[3].data(), soa[5].data(), soa[7].data()},
                              {soa[4].data(), soa[6].data(), soa[8].data()}};
    TiledSums<SumVectorTile, SumVectorOne>(stream, nl, ns, kTileGeneral, 6, threads, load, store);
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

}  // namespace lobecast
