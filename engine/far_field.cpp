// Direct superposition of elemental-dipole far fields (far_field.h).
#include "engine/far_field.h"

#include <cmath>
#include <sstream>

#include <omp.h>

#include "engine/error.h"
#include "engine/ground.h"

namespace lobecast {

FieldPlan::FieldPlan(const Array& array, const Directions& directions,
                     const FieldOptions& options)
    : num_dipoles_(array.size()), ground_(array.ground), num_threads_(options.num_threads) {
  Validate(array);
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
    source_dipole_[static_cast<std::size_t>(s)] = static_cast<int>(s % static_cast<Eigen::Index>(num_dipoles_));
  }

  const double k = array.wavenumber_rad_m();
  const auto nd = static_cast<Eigen::Index>(directions.size());
  k_r_hat_.resize(3, nd);
  theta_hat_.resize(3, nd);
  phi_hat_.resize(3, nd);
  zeroed_.assign(directions.size(), 0);
  for (Eigen::Index i = 0; i < nd; ++i) {
    const auto u = static_cast<std::size_t>(i);
    k_r_hat_.col(i) = k * directions.r_hat(u);
    theta_hat_.col(i) = directions.theta_hat(u);
    phi_hat_.col(i) = directions.phi_hat(u);
    zeroed_[u] = BelowGround(ground_, directions.theta_rad(u)) ? 1 : 0;
  }
}

FarField FieldPlan::Execute(const Eigen::VectorXcd& currents_a) const {
  FarField out;
  ExecuteRange(currents_a, 0, num_directions(), out);
  return out;
}

void FieldPlan::ExecuteRange(const Eigen::VectorXcd& currents_a, std::size_t first,
                             std::size_t count, FarField& out) const {
  if (static_cast<std::size_t>(currents_a.size()) != num_dipoles_) {
    std::ostringstream s;
    s << "currents: found " << currents_a.size() << " values, expected one per dipole ("
      << num_dipoles_ << ")";
    throw InvalidArgument(s.str());
  }
  if (first > num_directions() || count > num_directions() - first) {
    std::ostringstream s;
    s << "direction range [" << first << ", " << first + count << ") exceeds the plan's "
      << num_directions() << " directions";
    throw InvalidArgument(s.str());
  }
  out.e_theta.resize(static_cast<Eigen::Index>(count));
  out.e_phi.resize(static_cast<Eigen::Index>(count));

  // Current-weighted moments, split into real and imaginary planes so the inner
  // loop is plain double arithmetic the compiler can vectorize.
  const Eigen::Index ns = source_pos_.cols();
  Eigen::Matrix3Xd wr(3, ns), wi(3, ns);
  for (Eigen::Index s = 0; s < ns; ++s) {
    const Complex c = currents_a[source_dipole_[static_cast<std::size_t>(s)]];
    wr.col(s) = c.real() * source_moment_.col(s);
    wi.col(s) = c.imag() * source_moment_.col(s);
  }
  const double* pos = source_pos_.data();
  const double* wrp = wr.data();
  const double* wip = wi.data();
  const int threads = num_threads_ > 0 ? num_threads_ : omp_get_max_threads();
  const auto n = static_cast<std::ptrdiff_t>(count);

#pragma omp parallel for num_threads(threads) schedule(static)
  for (std::ptrdiff_t j = 0; j < n; ++j) {
    const auto i = static_cast<Eigen::Index>(first) + j;
    if (zeroed_[static_cast<std::size_t>(i)]) {
      out.e_theta[j] = 0.0;
      out.e_phi[j] = 0.0;
      continue;
    }
    const double kx = k_r_hat_(0, i), ky = k_r_hat_(1, i), kz = k_r_hat_(2, i);
    // M = sum_s I_s Le_s u_s exp(+j k r_hat . r_s), real and imaginary parts.
    double mr[3] = {0, 0, 0}, mi[3] = {0, 0, 0};
    for (Eigen::Index s = 0; s < ns; ++s) {
      const double phase = kx * pos[3 * s] + ky * pos[3 * s + 1] + kz * pos[3 * s + 2];
      const double c = std::cos(phase), sn = std::sin(phase);
      for (int a = 0; a < 3; ++a) {
        mr[a] += wrp[3 * s + a] * c - wip[3 * s + a] * sn;
        mi[a] += wrp[3 * s + a] * sn + wip[3 * s + a] * c;
      }
    }
    // r_hat x (r_hat x M) = -M_perp, so rE_theta = -j (w mu0 / 4 pi) theta_hat . M.
    const Complex m_theta(theta_hat_(0, i) * mr[0] + theta_hat_(1, i) * mr[1] + theta_hat_(2, i) * mr[2],
                          theta_hat_(0, i) * mi[0] + theta_hat_(1, i) * mi[1] + theta_hat_(2, i) * mi[2]);
    const Complex m_phi(phi_hat_(0, i) * mr[0] + phi_hat_(1, i) * mr[1] + phi_hat_(2, i) * mr[2],
                        phi_hat_(0, i) * mi[0] + phi_hat_(1, i) * mi[1] + phi_hat_(2, i) * mi[2]);
    const Complex minus_j_pref(0.0, -prefactor_);
    out.e_theta[j] = minus_j_pref * m_theta;
    out.e_phi[j] = minus_j_pref * m_phi;
  }
}

}  // namespace lobecast
