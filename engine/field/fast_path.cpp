// The fast path of the field plan (far_field.h): NUFFT plans cached per
// tolerance exponent, the tolerance search and error bound, and the forward and
// adjoint fast sums with their direct fallback.
#include <algorithm>
#include <cmath>
#include <functional>
#include <iterator>
#include <limits>
#include <optional>

#include "engine/check.h"
#include "engine/field/far_field.h"
#include "engine/field/fast_path.h"
#include "engine/field/lattice.h"
#include "engine/field/nufft.h"

namespace lobecast {

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
//
// With a fixed pass tolerance (> 0), one pass at it (rounded down), whatever the
// peak: the bound relative to the peak (infinite for a zero peak), never nullopt.
std::optional<double> SearchTolerance(double tolerance, double fixed, double unit, double placement,
                                      const std::function<double(double)>& pass) {
  const auto bound = [&](double eps) { return unit * (kErrorModel * eps + placement); };
  const auto round_down = [](double e) { return std::pow(10.0, std::floor(std::log10(e))); };
  if (fixed > 0) {
    const double eps = std::max(1e-14, round_down(fixed));
    const double peak = pass(eps);
    return peak > 0 ? bound(eps) / peak : std::numeric_limits<double>::infinity();
  }
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

Eigen::MatrixXcd FieldPlan::FastStrengths(const Eigen::VectorXcd& currents_a, double* l1) const {
  const Eigen::Index ns = source_pos_.cols();
  Eigen::MatrixXcd strengths(ns, collinear_ ? 1 : 3);
  *l1 = 0;
  for (Eigen::Index s = 0; s < ns; ++s) {
    const Complex c = currents_a[source_dipole_[static_cast<std::size_t>(s)]];
    if (collinear_) {
      strengths(s, 0) = c * signed_moment_m_[static_cast<std::size_t>(s)];
    } else {
      for (int a = 0; a < 3; ++a) strengths(s, a) = c * source_moment_(a, s);
    }
    *l1 += std::abs(c) * source_moment_.col(s).norm();
  }
  return strengths;
}

void FieldPlan::ExecuteFast(const Eigen::VectorXcd& currents_a, std::size_t first,
                            std::size_t count, FarField& out) const {
  const std::lock_guard<std::mutex> lock(fast_->mutex);
  FastCache& cache = *fast_;
  if (!cache.valid || cache.currents.size() != currents_a.size() || cache.currents != currents_a) {
    cache.valid = false;
    const Eigen::Index nd = dirs_.k_r_hat.cols();
    const int comps = collinear_ ? 1 : 3;
    double l1 = 0;
    const Eigen::MatrixXcd strengths = FastStrengths(currents_a, &l1);
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
    const std::optional<double> met =
        SearchTolerance(tolerance_relative_, fixed_pass_tolerance_,
                        prefactor_ * std::sqrt(comps) * l1, lattice_phase_error_, pass);
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
  out.error_bound_relative = cache.error_bound;
}

FarField FieldPlan::ExecuteAtFast(const Eigen::VectorXcd& currents_a, const Directions& directions,
                                  double* error_bound_v) const {
  LOBECAST_CHECK(probes_fast());
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(currents_a.size()), num_dipoles_);
  const int comps = collinear_ ? 1 : 3;
  std::shared_ptr<const PointSum> sum;
  std::shared_ptr<const PointSum::Prepared> grid;
  double bound = 0;
  {
    const std::lock_guard<std::mutex> lock(fast_->mutex);
    FastCache& cache = *fast_;
    if (!cache.probe_grid || cache.probe_currents.size() != currents_a.size() ||
        cache.probe_currents != currents_a) {
      const double asked = fixed_pass_tolerance_ > 0 ? fixed_pass_tolerance_ : tolerance_relative_;
      const double eps = std::max(1e-14, std::pow(10.0, std::floor(std::log10(asked))));
      if (!cache.probe_sum) {
        const NufftOptions o{eps, num_threads_};
        // The lattice transform takes any targets; type 3 those in the box of the
        // plan's directions.
        if (fast_transform_ == FastTransform::kLattice)
          cache.probe_sum =
              std::make_shared<const LatticeSum>(*lattice_, Eigen::Matrix3Xd(3, 0), o);
        else
          cache.probe_sum = std::make_shared<const Nufft3>(source_pos_, dirs_.k_r_hat, o);
      }
      double l1 = 0;
      cache.probe_grid = cache.probe_sum->Prepare(FastStrengths(currents_a, &l1));
      cache.probe_currents = currents_a;
      cache.probe_bound_v =
          prefactor_ * std::sqrt(comps) * l1 * (kErrorModel * eps + lattice_phase_error_);
    }
    sum = cache.probe_sum;
    grid = cache.probe_grid;
    bound = cache.probe_bound_v;
  }
  const DirectionData dirs = MakeDirectionData(directions);
  const Eigen::MatrixXcd m = sum->ExecuteAt(*grid, dirs.k_r_hat);
  const auto nd = static_cast<Eigen::Index>(directions.size());
  FarField out;
  out.e_theta.resize(nd);
  out.e_phi.resize(nd);
  const Complex minus_j_pref(0.0, -prefactor_);
  for (Eigen::Index i = 0; i < nd; ++i) {
    Complex mt = 0.0, mp = 0.0;
    if (!dirs.zeroed[static_cast<std::size_t>(i)]) {
      for (int a = 0; a < 3; ++a) {
        const Complex ma = collinear_ ? m(i, 0) * common_axis_[a] : m(i, a);
        mt += dirs.theta_hat(a, i) * ma;
        mp += dirs.phi_hat(a, i) * ma;
      }
    }
    out.e_theta[i] = minus_j_pref * mt;
    out.e_phi[i] = minus_j_pref * mp;
  }
  if (error_bound_v) *error_bound_v = bound;
  return out;
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
      SearchTolerance(tolerance_relative_, fixed_pass_tolerance_, unit, lattice_phase_error_, pass);
  if (met) return DipoleSums{y, *met};
  return DipoleSums{AdjointDirect(v), 0.0};
}

}  // namespace lobecast
