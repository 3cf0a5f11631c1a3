// Helpers for the synthesis tests: the field map written out from the far-field
// formula of CONVENTIONS §1 (free space), independently of engine/field, and the
// directivity of a current vector from it and the closed-form power.
#pragma once

#include <cmath>

#include <Eigen/Core>

#include "engine/constants.h"
#include "engine/grid.h"
#include "engine/power/radiated_power.h"
#include "engine/types.h"
#include "test_util.h"

namespace lobecast::testing {

// n z dipoles along x from the origin, spacing and length in wavelengths, currents 1 A,
// at the tests' frequency (free space).
inline TestArray ZLineAlongX(int n, double spacing_wavelengths, double length_wavelengths) {
  TestArray a;
  a.frequency_hz = kTestFrequency_hz;
  const double l = a.wavelength_m();
  for (int i = 0; i < n; ++i)
    a.Add(Vec3(spacing_wavelengths * l * i, 0, 0), Vec3::UnitZ(), length_wavelengths * l, 1.0);
  return a;
}

// rE = (j w mu0 / 4 pi) sum_n I_n Le_n [r x (r x u_n)] exp(+j k r . r_n) and
// r x (r x u) = r (r . u) - u, so per ampere E_theta = -c theta_hat . u_n and
// E_phi = -c phi_hat . u_n with c = (j w mu0 / 4 pi) Le_n exp(j k r . r_n).
struct FieldRows {
  Eigen::RowVectorXcd theta, phi;
};
inline FieldRows FreeSpaceRows(const Array& a, double theta_rad, double phi_rad) {
  const Vec3 r = UnitVectorAt(theta_rad, phi_rad);
  const Vec3 th = ThetaHatAt(theta_rad, phi_rad), ph = PhiHatAt(phi_rad);
  const double k = a.wavenumber_rad_m();
  const Complex pre(0.0, a.angular_frequency_rad_s() * kMu0_H_m / (4.0 * kPi));
  FieldRows out{Eigen::RowVectorXcd(static_cast<Eigen::Index>(a.size())),
                Eigen::RowVectorXcd(static_cast<Eigen::Index>(a.size()))};
  for (std::size_t n = 0; n < a.size(); ++n) {
    const Dipole& d = a.dipoles[n];
    const Complex c = pre * d.effective_length_m() * std::polar(1.0, k * r.dot(d.position_m));
    out.theta[static_cast<Eigen::Index>(n)] = -c * th.dot(d.orientation);
    out.phi[static_cast<Eigen::Index>(n)] = -c * ph.dot(d.orientation);
  }
  return out;
}

// Total directivity toward (theta, phi), free space: 4 pi U / P with P = 1/2 I^H R I.
inline double FreeSpaceDirectivity(const Array& a, const Eigen::MatrixXd& r,
                                   const Eigen::VectorXcd& i, double theta_rad, double phi_rad) {
  const FieldRows f = FreeSpaceRows(a, theta_rad, phi_rad);
  const double e2 = std::norm((f.theta * i)(0)) + std::norm((f.phi * i)(0));
  return 4.0 * kPi * e2 / (2.0 * kEta0_ohm) / RadiatedPower(r, i);
}

}  // namespace lobecast::testing
