// The array circuit (engine/coupling/circuit.h): power balance, the current-forced
// case, an independent 2 x 2 solve, and the two-element parasitic array.
#include "engine/coupling/circuit.h"

#include <cmath>

#include <gtest/gtest.h>

#include "engine/check.h"
#include "engine/coupling/self_impedance.h"
#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/power/impedance.h"
#include "engine/power/radiated_power.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::RandomArray;
using testing::TestRng;

// Z with self reactances from a 0.5 mm wire radius (triangular) or -2000 ohm
// (uniform), and a loss resistance on the diagonal.
Eigen::MatrixXcd ZOf(const Array& a, double loss_ohm) {
  Eigen::VectorXd xs(a.size());
  for (std::size_t m = 0; m < a.size(); ++m) {
    const Dipole& d = a.dipoles[m];
    xs[m] = d.distribution == Distribution::kTriangular
                ? SelfReactance(d, d.length_m / 200, a.wavenumber_rad_m())
                : -2000.0;
  }
  Eigen::MatrixXcd z = ImpedanceMatrix(a, xs);
  z.diagonal().array() += loss_ohm;
  return z;
}

TEST(Circuit, PowerBalance) {
  // Supplied = radiated (closed form, 1/2 I^H R I) + ohmic + source and load losses.
  TestRng rng(80);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = RandomArray(rng, 12, g, 0.5);
    const double loss = 0.05;
    const Eigen::MatrixXcd z = ZOf(a, loss);
    std::vector<Port> ports(a.size());
    for (std::size_t m = 0; m < ports.size(); ++m) {
      Port& p = ports[m];
      p.kind = static_cast<PortKind>(m % 3);
      p.current_a = rng.Phasor(0.1, 1.0);
      p.voltage_v = rng.Phasor(1.0, 10.0);
      p.impedance_ohm = Complex(rng.Uniform(0, 50), rng.Uniform(-500, 500));
    }
    const CircuitSolution s = SolveCircuit(z, ports);
    const double radiated = RadiatedPower(ResistanceMatrix(a), s.current_a);
    const double ohmic = 0.5 * loss * s.current_a.squaredNorm();
    const double supplied = s.supplied_w.sum();
    EXPECT_NEAR(supplied, radiated + ohmic + s.port_loss_w.sum(), 1e-10 * std::abs(supplied));
    EXPECT_NEAR(s.accepted_w.sum(), radiated + ohmic, 1e-10 * (radiated + ohmic));
    // Each port's own equation holds.
    for (std::size_t m = 0; m < ports.size(); ++m) {
      const Complex v = s.terminal_voltage_v[m], i = s.current_a[m];
      const Port& p = ports[m];
      const Complex residual = p.kind == PortKind::kDrive  ? v - (p.voltage_v - p.impedance_ohm * i)
                               : p.kind == PortKind::kLoad ? v + p.impedance_ohm * i
                                                           : i - p.current_a;
      EXPECT_LT(std::abs(residual), 1e-9 * (std::abs(v) + std::abs(p.voltage_v) + 1e-30)) << m;
    }
  }
}

TEST(Circuit, ForcedCurrentsGiveTheActiveImpedance) {
  TestRng rng(81);
  const testing::TestArray a = RandomArray(rng, 7, Ground::kPec);
  const Eigen::MatrixXcd z = ZOf(a, 0.0);
  std::vector<Port> ports(a.size());
  for (std::size_t m = 0; m < ports.size(); ++m)
    ports[m].current_a = a.currents[static_cast<Eigen::Index>(m)];
  const CircuitSolution s = SolveCircuit(z, ports);
  EXPECT_EQ(s.current_a, a.currents);
  const Eigen::VectorXcd act = ActiveImpedance(z, a.currents);
  EXPECT_LT((s.input_impedance_ohm - act).cwiseAbs().maxCoeff(), 1e-12 * act.cwiseAbs().maxCoeff());
}

TEST(Circuit, DrivenAndParasiticPairMatchesAnIndependentSolve) {
  // V_s = (Z11 + Zs) I1 + Z12 I2,  0 = Z21 I1 + (Z22 + ZL) I2, by Cramer's rule.
  const double lambda = 1.0, k = 2 * kPi / lambda;
  Array a;
  a.frequency_hz = kSpeedOfLight_m_s / lambda;
  a.dipoles = {MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.05, Distribution::kTriangular),
               MakeDipole(Vec3(0.1, 0, 0), Vec3::UnitZ(), 0.05, Distribution::kTriangular)};
  const Eigen::MatrixXcd z = ZOf(a, 0.01);
  const Complex vs(2.0, 0.5), zs(50, 0), zl(1.0, 1200.0);
  std::vector<Port> ports(2);
  ports[0] = {PortKind::kDrive, 0.0, vs, zs};
  ports[1] = {PortKind::kLoad, 0.0, 0.0, zl};
  const CircuitSolution s = SolveCircuit(z, ports);
  const Complex a11 = z(0, 0) + zs, a12 = z(0, 1), a21 = z(1, 0), a22 = z(1, 1) + zl;
  const Complex det = a11 * a22 - a12 * a21;
  EXPECT_LT(std::abs(s.current_a[0] - vs * a22 / det), 1e-12 * std::abs(s.current_a[0]));
  EXPECT_LT(std::abs(s.current_a[1] + vs * a21 / det), 1e-12 * std::abs(s.current_a[1]));
  (void)k;
}

TEST(Circuit, InductiveParasiteReflectsCapacitiveDirects) {
  // Two-element parasitic array (the Yagi-Uda principle; from memory): a parasitic
  // element tuned inductive (above resonance) acts as a reflector, the beam leaves
  // on the side away from it; tuned capacitive it acts as a director, the beam goes
  // its way. Driven element at the origin, parasite at x = -0.1 lambda.
  const double lambda = 1.0;
  Array a;
  a.frequency_hz = kSpeedOfLight_m_s / lambda;
  a.dipoles = {MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.05, Distribution::kTriangular),
               MakeDipole(Vec3(-0.1, 0, 0), Vec3::UnitZ(), 0.05, Distribution::kTriangular)};
  const Eigen::MatrixXcd z = ZOf(a, 0.0);
  const double x_self = z(1, 1).imag();
  const Directions dirs =
      Directions::FromAngles({0.5 * kPi, 0.5 * kPi}, {0.0, kPi});  // +x (front), -x (back)
  for (double detune : {+20.0, -20.0}) {  // net reactance of the parasite, ohm
    std::vector<Port> ports(2);
    ports[0] = {PortKind::kDrive, 0.0, 1.0, 50.0};
    ports[1] = {PortKind::kLoad, 0.0, 0.0, Complex(0.0, -x_self + detune)};
    const CircuitSolution s = SolveCircuit(z, ports);
    const FarField f = FieldPlan(a, dirs).Execute(s.current_a);
    const double front = std::abs(f.e_theta[0]), back = std::abs(f.e_theta[1]);
    if (detune > 0) {
      EXPECT_GT(front, back) << "inductive parasite should reflect";
    } else {
      EXPECT_LT(front, back) << "capacitive parasite should direct";
    }
  }
}

TEST(Circuit, Refusals) {
  const Eigen::MatrixXcd z = Eigen::MatrixXcd::Identity(2, 2);
  EXPECT_THROW(SolveCircuit(z, std::vector<Port>(3)), InternalError);  // a caller bug
  std::vector<Port> open(2);
  open[0] = {PortKind::kLoad, 0.0, 0.0, Complex(-1.0, 0.0)};  // cancels Z11: singular
  open[1] = {PortKind::kDrive, 0.0, 1.0, 0.0};
  EXPECT_THROW(SolveCircuit(z, open), InvalidArgument);
  Eigen::MatrixXcd bad = z;
  bad(0, 0) = Complex(1.0, std::nan(""));
  std::vector<Port> driven(2);
  driven[0] = {PortKind::kDrive, 0.0, 1.0, 50.0};
  EXPECT_THROW(SolveCircuit(bad, driven), InvalidArgument);  // the NaN is in a solved row
  EXPECT_NO_THROW(SolveCircuit(bad, std::vector<Port>(2)));  // forced currents only
}

}  // namespace
}  // namespace lobecast
