// The field plan (far_field.h): sources, images and directions, the method and
// transform choice, and the public entry points, which hand over to the direct
// sums (direct_sum.cpp) or the fast path (fast_path.cpp).
#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>

#include <Eigen/Geometry>

#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/field/fast_path.h"
#include "engine/field/lattice.h"
#include "engine/ground.h"
#include "engine/threads.h"

namespace lobecast {
namespace {

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

FieldPlan::FieldPlan(const Array& array, const Directions& directions, const FieldOptions& options)
    : num_dipoles_(array.size()),
      ground_(array.ground),
      tolerance_relative_(options.tolerance_relative),
      fixed_pass_tolerance_(options.fixed_pass_tolerance),
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
        static_cast<int>(DipoleOfSource(static_cast<std::size_t>(s), num_dipoles_));
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

  if (options.method != FieldMethod::kDirect) {
    // A lattice within kLatticeOffsetPhase * tolerance of phase of every source;
    // with a fixed pass tolerance eps, within eps plus the rounding of the
    // coordinates themselves (64 ulp of the largest, in phase), which the
    // placement error then adds to the bound.
    double max_offset = kLatticeOffsetPhase * tolerance_relative_ / k;
    if (fixed_pass_tolerance_ > 0) {
      const double extent = source_pos_.size() ? source_pos_.cwiseAbs().maxCoeff() : 0.0;
      max_offset =
          fixed_pass_tolerance_ / k + 64.0 * std::numeric_limits<double>::epsilon() * extent;
    }
    const double max_sites = kMaxSitesPerSource * static_cast<double>(num_sources()) + 1024.0;
    auto lat =
        options.use_lattice ? FindAxisLattice(source_pos_, max_offset, max_sites) : std::nullopt;
    if (lat) {
      lattice_ = std::make_shared<const AxisLattice>(std::move(*lat));
      lattice_phase_error_ = k * lattice_->max_offset;
    }
    const double type3 = EstimatedType3Seconds(), on_lattice = EstimatedLatticeSeconds();
    const double fast = std::min(type3, on_lattice);
    if (options.method == FieldMethod::kFast || FastPays(fast, EstimatedDirectSeconds())) {
      method_used_ = FieldMethod::kFast;
      fast_transform_ = on_lattice < type3 ? FastTransform::kLattice : FastTransform::kType3;
    } else {
      method_used_ = FieldMethod::kDirect;
    }
    if (fast_transform_ != FastTransform::kLattice) lattice_.reset(), lattice_phase_error_ = 0;
  }
  if (method_used_ == FieldMethod::kFast) fast_ = std::make_shared<FastCache>();
  weights_ = MakeWeightCache();
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
  const auto at = [&](Eigen::Index i) {
    const auto u = static_cast<std::size_t>(i);
    const double t = directions.theta_rad(u), p = directions.phi_rad(u);
    const double st = std::sin(t), ct = std::cos(t), sp = std::sin(p), cp = std::cos(p);
    d.k_r_hat.col(i) << k * (st * cp), k * (st * sp), k * ct;
    d.theta_hat.col(i) << ct * cp, ct * sp, -st;
    d.phi_hat.col(i) << -sp, cp, 0.0;
    d.zeroed[u] = BelowGround(ground_, t) ? 1 : 0;
  };
  // A few directions (a probe's): no parallel region to start.
  if (nd < 4096) {
    for (Eigen::Index i = 0; i < nd; ++i) at(i);
    return d;
  }
  const int threads = ResolveThreads(num_threads_);
#pragma omp parallel for num_threads(threads) schedule(static)
  for (Eigen::Index i = 0; i < nd; ++i) at(i);
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
    out.error_bound_relative = 0.0;
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

}  // namespace lobecast
