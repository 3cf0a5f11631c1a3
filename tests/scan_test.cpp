// Phase steering (engine/synthesis/steering.h) and the scan impedance
// (engine/coupling/scan.h).
#include "engine/coupling/scan.h"

#include <cmath>

#include <gtest/gtest.h>

#include "engine/field/far_field.h"
#include "engine/power/impedance.h"
#include "engine/synthesis/steering.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::TestRng;

Array Line(int n, double spacing_wavelengths) {
  Array a;
  a.frequency_hz = kSpeedOfLight_m_s;  // lambda = 1 m
  for (int i = 0; i < n; ++i) {
    a.dipoles.push_back(MakeDipole(Vec3(i * spacing_wavelengths, 0, 0), Vec3::UnitZ(), 0.05,
                                   Distribution::kTriangular));
  }
  return a;
}

TEST(Steering, TheBeamPointsWhereAsked) {
  // With I_n = a_n exp(-j k r_hat0 . r_n) every term of the far-field sum has the
  // same phase at r_hat0 (CONVENTIONS §1 and §3), so |rE(r_hat0)| = sum |a_n| times
  // one unit-current element's |rE| there: the array factor's maximum.
  TestRng rng(100);
  testing::TestArray a = testing::RandomArray(rng, 9, Ground::kNone, 3.0);
  for (Dipole& d : a.dipoles) d.orientation = Vec3::UnitZ();
  const double theta0 = 0.7, phi0 = 2.1;
  const Eigen::VectorXd amp = Eigen::VectorXd::LinSpaced(9, 0.5, 1.5);
  const Eigen::VectorXcd i = amp.cast<Complex>().cwiseProduct(SteeringPhasors(a, theta0, phi0));
  const Directions dir = Directions::FromAngles({theta0}, {phi0});
  const FarField f = FieldPlan(a, dir).Execute(i);
  double one_sum = 0;
  for (std::size_t n = 0; n < a.size(); ++n) {
    Array one = testing::OneDipoleArray(a.dipoles[n], 1.0, Ground::kNone, a.frequency_hz);
    one_sum += amp[static_cast<Eigen::Index>(n)] *
               std::abs(FieldPlan(one, dir).Execute(Eigen::VectorXcd::Ones(1)).e_theta[0]);
  }
  EXPECT_NEAR(std::abs(f.e_theta[0]), one_sum, 1e-12 * one_sum);
}

TEST(ScanImpedance, TwoElementsByHand) {
  // Z_act,0 = Z00 + Z01 (a1 / a0) exp(-j k r_hat0 . (r1 - r0)), and symmetrically.
  const Array a = Line(2, 0.3);
  Eigen::VectorXd xs(2);
  xs << -1400, -1400;
  Eigen::MatrixXcd z = ImpedanceMatrix(a, xs);
  const Eigen::VectorXcd amp = Eigen::VectorXcd::Ones(2);
  const std::vector<double> th = {0.5 * kPi, 0.5 * kPi, 0.5 * kPi}, ph = {0.0, 0.5 * kPi, 2.0};
  const ScanImpedanceTable t =
      ScanImpedance(a, z, amp, th, ph, Eigen::VectorXcd::Constant(a.size(), 50.0));
  for (int s = 0; s < 3; ++s) {
    const double kx = 2 * kPi * 0.3 * std::cos(ph[s]);  // k r_hat0 . (r1 - r0)
    const Complex z0 = z(0, 0) + z(0, 1) * std::polar(1.0, -kx);
    const Complex z1 = z(1, 1) + z(1, 0) * std::polar(1.0, kx);
    EXPECT_LT(std::abs(t.active_impedance_ohm(s, 0) - z0), 1e-12 * std::abs(z0)) << s;
    EXPECT_LT(std::abs(t.active_impedance_ohm(s, 1) - z1), 1e-12 * std::abs(z1)) << s;
    const Complex g0 = (z0 - 50.0) / (z0 + 50.0);
    EXPECT_LT(std::abs(t.reflection(s, 0) - g0), 1e-12) << s;
  }
}

TEST(ScanImpedance, MirrorSymmetryAndPower) {
  // A symmetric line steered to +theta from broadside: element m sees what element
  // N-1-m sees at -theta (mirror symmetry of the geometry); and the active
  // impedances weighted by 1/2 |I|^2 sum to the accepted power 1/2 I^H Re(Z) I.
  const Array a = Line(7, 0.45);
  Eigen::MatrixXcd z = ImpedanceMatrix(a, Eigen::VectorXd::Constant(7, -1200.0));
  z.diagonal().array() += 0.2;  // a loss resistance
  const Eigen::VectorXcd amp = Eigen::VectorXd::LinSpaced(7, 1, 1).cast<Complex>();
  const std::vector<double> th = {0.5 * kPi - 0.4, 0.5 * kPi - 0.4}, ph = {0.0, kPi};
  const ScanImpedanceTable t =
      ScanImpedance(a, z, amp, th, ph, Eigen::VectorXcd::Constant(a.size(), 50.0));
  for (int m = 0; m < 7; ++m) {
    EXPECT_LT(std::abs(t.active_impedance_ohm(0, m) - t.active_impedance_ohm(1, 6 - m)),
              1e-11 * std::abs(t.active_impedance_ohm(0, m)))
        << m;
  }
  for (int s = 0; s < 2; ++s) {
    double sum = 0;
    for (int m = 0; m < 7; ++m)
      sum += 0.5 * std::norm(amp[m]) * t.active_impedance_ohm(s, m).real();
    EXPECT_NEAR(sum, t.accepted_w[s], 1e-11 * t.accepted_w[s]);
  }
}

TEST(ScanImpedance, ConjugateMatchAtTheFirstAngle) {
  // Z_r = conj(Z_act) at the first scan angle: Gamma = 0 there (Kurokawa 1965), and
  // |Gamma| <= 1 elsewhere for a passive element (Re Z > 0).
  const Array a = Line(5, 0.5);
  const Eigen::MatrixXcd z = ImpedanceMatrix(a, Eigen::VectorXd::Constant(5, -1300.0));
  const Eigen::VectorXcd amp = Eigen::VectorXcd::Ones(5);
  const std::vector<double> th = {0.5 * kPi, 0.5 * kPi - 0.5, 0.5 * kPi - 1.0},
                            ph = {0.0, 0.0, 0.0};
  const Eigen::VectorXcd zr =
      ScanImpedance(a, z, amp, {th[0]}, {ph[0]}, Eigen::VectorXcd::Constant(5, 50.0))
          .active_impedance_ohm.row(0)
          .transpose()
          .conjugate();  // a source conjugate-matched at the first angle
  const ScanImpedanceTable t = ScanImpedance(a, z, amp, th, ph, zr);
  for (int m = 0; m < 5; ++m) {
    EXPECT_LT(std::abs(t.reflection(0, m)), 1e-12) << m;
    EXPECT_GT(std::abs(t.reflection(2, m)), 1e-3) << m;  // scanning detunes
    EXPECT_LE(std::abs(t.reflection(2, m)), 1.0) << m;
  }
}

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

// Above the coupling limit the scan table is summed row by row per direction
// (power_large.h): the same closed forms as the matrix route in another order, so
// the two agree to rounding (1e-13 of the largest impedance; the accepted power to
// 1e-13 relative), over PEC too, with an element of zero taper (NaN either way).
TEST(ScanImpedance, StreamedEqualsTheMatrixRoute) {
  TestRng rng(313);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    testing::TestArray a = testing::RandomArray(rng, 150, g, 4.0);
    const auto n = static_cast<Eigen::Index>(a.size());
    Eigen::VectorXd xs(n);
    Eigen::VectorXcd diagonal(n);
    for (Eigen::Index m = 0; m < n; ++m) {
      xs[m] = rng.Uniform(-3000, -500);
      diagonal[m] = Complex(rng.Uniform(0, 2), xs[m]);  // loss resistance, self reactance
    }
    Eigen::MatrixXcd z = ImpedanceMatrix(a, xs);
    z.diagonal().real() += diagonal.real();
    Eigen::VectorXcd amp = a.currents.cwiseAbs().cast<Complex>();
    amp[7] = 0.0;
    const std::vector<double> th = {0.0, 0.4, 1.1}, ph = {0.0, 2.0, 4.5};
    const Eigen::VectorXcd ref = Eigen::VectorXcd::Constant(n, 50.0);
    const ScanImpedanceTable m = ScanImpedance(a, z, amp, th, ph, ref);
    const ScanImpedanceTable s = ScanImpedanceStreamed(a, diagonal, amp, th, ph, ref);
    const double scale = m.active_impedance_ohm.col(0).cwiseAbs().maxCoeff();
    for (Eigen::Index r = 0; r < 3; ++r) {
      EXPECT_NEAR(s.accepted_w[r], m.accepted_w[r], 1e-13 * m.accepted_w[r]) << r;
      for (Eigen::Index e = 0; e < n; ++e) {
        if (e == 7) {
          EXPECT_TRUE(std::isnan(s.active_impedance_ohm(r, e).real()));
          EXPECT_TRUE(std::isnan(m.active_impedance_ohm(r, e).real()));
          continue;
        }
        EXPECT_LE(std::abs(s.active_impedance_ohm(r, e) - m.active_impedance_ohm(r, e)),
                  1e-13 * scale)
            << r << " " << e;
        EXPECT_LE(std::abs(s.reflection(r, e) - m.reflection(r, e)), 1e-13) << r << " " << e;
      }
    }
  }
}

}  // namespace
}  // namespace lobecast
