#include "engine/coupling/scan.h"

#include <cmath>
#include <limits>
#include <sstream>

#include "engine/check.h"
#include "engine/error.h"
#include "engine/power/impedance.h"
#include "engine/power/power_large.h"
#include "engine/synthesis/steering.h"

namespace lobecast {

namespace {

// The table's shape, and each direction's currents I_n = a_n exp(-j k r_hat0 . r_n).
ScanImpedanceTable EmptyTable(const Array& array, const Eigen::VectorXcd& amplitudes,
                              const std::vector<double>& theta_rad,
                              const std::vector<double>& phi_rad,
                              const Eigen::VectorXcd& reference) {
  const auto n = static_cast<Eigen::Index>(array.size());
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
  return t;
}

Eigen::VectorXcd CurrentsAt(const Array& array, const Eigen::VectorXcd& amplitudes,
                            const ScanImpedanceTable& t, Eigen::Index s) {
  const auto si = static_cast<std::size_t>(s);
  return amplitudes.cwiseProduct(SteeringPhasors(array, t.theta_rad[si], t.phi_rad[si]));
}

void SetRow(ScanImpedanceTable& t, Eigen::Index s, const Eigen::VectorXcd& zact,
            const Eigen::VectorXcd& reference) {
  t.active_impedance_ohm.row(s) = zact.transpose();
  for (Eigen::Index m = 0; m < zact.size(); ++m)
    t.reflection(s, m) = PowerWaveReflection(zact[m], reference[m]);
}

}  // namespace

ScanImpedanceTable ScanImpedance(const Array& array, const Eigen::MatrixXcd& z,
                                 const Eigen::VectorXcd& amplitudes,
                                 const std::vector<double>& theta_rad,
                                 const std::vector<double>& phi_rad,
                                 const Eigen::VectorXcd& reference) {
  const auto n = static_cast<Eigen::Index>(array.size());
  LOBECAST_CHECK_EQ(z.rows(), n);
  LOBECAST_CHECK_EQ(z.cols(), n);
  ScanImpedanceTable t = EmptyTable(array, amplitudes, theta_rad, phi_rad, reference);
  const Eigen::MatrixXd r = z.real();
  for (Eigen::Index s = 0; s < t.accepted_w.size(); ++s) {
    const Eigen::VectorXcd i = CurrentsAt(array, amplitudes, t, s);
    SetRow(t, s, ActiveImpedance(z, i), reference);
    const Eigen::VectorXd a = i.real(), b = i.imag();
    t.accepted_w[s] = 0.5 * (a.dot(r * a) + b.dot(r * b));
  }
  return t;
}

ScanImpedanceTable ScanImpedanceStreamed(const Array& array, const Eigen::VectorXcd& diagonal_ohm,
                                         const Eigen::VectorXcd& amplitudes,
                                         const std::vector<double>& theta_rad,
                                         const std::vector<double>& phi_rad,
                                         const Eigen::VectorXcd& reference, int num_threads) {
  LOBECAST_CHECK_EQ(diagonal_ohm.size(), static_cast<Eigen::Index>(array.size()));
  ScanImpedanceTable t = EmptyTable(array, amplitudes, theta_rad, phi_rad, reference);
  const double nan = std::numeric_limits<double>::quiet_NaN();
  for (Eigen::Index s = 0; s < t.accepted_w.size(); ++s) {
    const Eigen::VectorXcd i = CurrentsAt(array, amplitudes, t, s);
    const StreamedPower p = RadiatedPowerStreamed(array, i, num_threads);
    Eigen::VectorXcd zact(i.size());
    double loss_w = 0;
    for (Eigen::Index m = 0; m < i.size(); ++m) {
      zact[m] = i[m] == Complex(0.0) ? Complex(nan, nan)
                                     : (p.impedance_product_v[m] + diagonal_ohm[m] * i[m]) / i[m];
      loss_w += 0.5 * diagonal_ohm[m].real() * std::norm(i[m]);
    }
    SetRow(t, s, zact, reference);
    t.accepted_w[s] = p.radiated_power_w + loss_w;  // 1/2 I^H Re(Z) I
  }
  return t;
}

}  // namespace lobecast
