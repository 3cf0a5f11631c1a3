#include "engine/coupling/scan.h"

#include <cmath>
#include <limits>
#include <sstream>

#include "engine/check.h"
#include "engine/error.h"
#include "engine/power/impedance.h"
#include "engine/synthesis/steering.h"

namespace lobecast {

ScanImpedanceTable ScanImpedance(const Array& array, const Eigen::MatrixXcd& z,
                                 const Eigen::VectorXcd& amplitudes,
                                 const std::vector<double>& theta_rad,
                                 const std::vector<double>& phi_rad,
                                 const Eigen::VectorXcd& reference) {
  const auto n = static_cast<Eigen::Index>(array.size());
  LOBECAST_CHECK_EQ(z.rows(), n);
  LOBECAST_CHECK_EQ(z.cols(), n);
  LOBECAST_CHECK_EQ(amplitudes.size(), n);
  LOBECAST_CHECK_EQ(theta_rad.size(), phi_rad.size());
  LOBECAST_CHECK_EQ(reference.size(), n);
  const auto ns = static_cast<Eigen::Index>(theta_rad.size());
  ScanImpedanceTable t;
  t.theta_rad = theta_rad;
  t.phi_rad = phi_rad;
  t.active_impedance_ohm.resize(ns, n);
  t.reflection.resize(ns, n);
  t.accepted_w.resize(ns);
  const Eigen::MatrixXd r = z.real();
  for (Eigen::Index s = 0; s < ns; ++s) {
    const auto si = static_cast<std::size_t>(s);
    const Eigen::VectorXcd i =
        amplitudes.cwiseProduct(SteeringPhasors(array, theta_rad[si], phi_rad[si]));
    const Eigen::VectorXcd zact = ActiveImpedance(z, i);
    t.active_impedance_ohm.row(s) = zact.transpose();
    for (Eigen::Index m = 0; m < n; ++m)
      t.reflection(s, m) = PowerWaveReflection(zact[m], reference[m]);
    const Eigen::VectorXd a = i.real(), b = i.imag();
    t.accepted_w[s] = 0.5 * (a.dot(r * a) + b.dot(r * b));
  }
  return t;
}

}  // namespace lobecast
