// The coupled array (engine/coupling/coupling.h): one driven dipole against the
// transmission-line formulas, the power balance of a mixed array, and refusals.
#include "engine/coupling/coupling.h"

#include <cmath>

#include <gtest/gtest.h>

#include "engine/check.h"
#include "engine/coupling/self_impedance.h"
#include "engine/error.h"
#include "engine/power/radiated_power.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::OneDipoleArray;
using testing::RandomArray;
using testing::TestRng;

TEST(Coupling, OneDrivenDipoleMatchesTheLineFormulas) {
  // A triangular dipole of l = lambda/20 on a 1 mm copper wire, driven by 1 V behind
  // 50 ohm: Z_in = R_rad + R_loss + j X_self; I = V / (Z_in + Zs);
  // Gamma = (Z_in - Z0) / (Z_in + Z0), VSWR = (1 + |Gamma|) / (1 - |Gamma|) (the
  // transmission-line definitions, IEEE Std 145-2013 terms); efficiency
  // R_rad / (R_rad + R_loss).
  testing::TestArray a =
      OneDipoleArray(MakeDipole(Vec3(0, 0, 1), Vec3::UnitZ(), 0.0, Distribution::kTriangular), 0.0,
                     Ground::kNone, 100e6);
  a.dipoles[0].length_m = a.wavelength_m() / 20;
  std::vector<Port> ports = {{PortKind::kDrive, 0.0, 1.0, 50.0}};
  std::vector<Wire> wires = {{1e-3, std::numeric_limits<double>::quiet_NaN(), 5.8e7}};
  const CouplingResult r = SolveCoupling(a, ports, wires, {.reference_impedance_ohm = 75});
  const double rrad = ResistanceMatrix(a)(0, 0);
  const double rloss =
      LossResistance(a.dipoles[0], 1e-3, 5.8e7, a.angular_frequency_rad_s()).resistance_ohm;
  const double x = SelfReactance(a.dipoles[0], 1e-3, a.wavenumber_rad_m());
  const Complex zin(rrad + rloss, x);
  EXPECT_LT(std::abs(r.circuit.input_impedance_ohm[0] - zin), 1e-12 * std::abs(zin));
  const Complex i = 1.0 / (zin + 50.0);
  EXPECT_LT(std::abs(r.circuit.current_a[0] - i), 1e-12 * std::abs(i));
  const Complex g = (zin - 75.0) / (zin + 75.0);
  EXPECT_LT(std::abs(r.reflection[0] - g), 1e-12);
  EXPECT_NEAR(r.vswr[0], (1 + std::abs(g)) / (1 - std::abs(g)), 1e-9 * r.vswr[0]);
  EXPECT_NEAR(r.efficiency, rrad / (rrad + rloss), 1e-12);
  EXPECT_NEAR(r.available_w, 1.0 / (8 * 50), 1e-15);
  EXPECT_NEAR(r.radiated_w, 0.5 * std::norm(i) * rrad, 1e-12 * r.radiated_w);
}

TEST(Coupling, PowerBalanceOfAMixedArray) {
  // Supplied = radiated + ohmic + in source and load impedances (energy conservation).
  TestRng rng(90);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    testing::TestArray a = RandomArray(rng, 10, g, 0.6);
    std::vector<Port> ports(a.size());
    std::vector<Wire> wires(a.size());
    for (std::size_t m = 0; m < a.size(); ++m) {
      a.dipoles[m].distribution = Distribution::kTriangular;
      wires[m].radius_m = a.dipoles[m].length_m / 300;
      wires[m].conductivity_s_m = 3.5e7;
      ports[m].kind = static_cast<PortKind>(m % 3);
      ports[m].current_a = a.currents[static_cast<Eigen::Index>(m)];
      ports[m].voltage_v = rng.Phasor(0.5, 5.0);
      ports[m].impedance_ohm = Complex(rng.Uniform(1, 75), rng.Uniform(-100, 3000));
    }
    const CouplingResult r = SolveCoupling(a, ports, wires);
    EXPECT_NEAR(r.supplied_w, r.radiated_w + r.ohmic_w + r.load_loss_w + r.source_loss_w,
                1e-10 * r.supplied_w);
    // Accepted at the fed ports: radiated + ohmic + in the parasitic loads.
    EXPECT_NEAR(r.accepted_w, r.radiated_w + r.ohmic_w + r.load_loss_w, 1e-10 * r.accepted_w);
    EXPECT_GT(r.efficiency, 0);
    EXPECT_LT(r.efficiency, 1);
    EXPECT_EQ(r.available_w, 0);  // current-forced ports: no available power
  }
}

TEST(Coupling, WhatNeedsAWireAndWhatIsRefused) {
  testing::TestArray a = OneDipoleArray(MakeDipole(Vec3(0, 0, 1), Vec3::UnitZ(), 0.05), 0.0);
  std::vector<Port> ports = {{PortKind::kDrive, 0.0, 1.0, 50.0}};
  std::vector<Wire> wires(1);
  EXPECT_FALSE(NeedsCoupling({Port{}}, wires));
  EXPECT_TRUE(NeedsCoupling(ports, wires));
  // A uniform current has no wire formula: a reactance must be given.
  wires[0].radius_m = 1e-3;
  try {
    SolveCoupling(a, ports, wires);
    ADD_FAILURE() << "expected a refusal";
  } catch (const InvalidArgument& e) {
    EXPECT_NE(std::string(e.what()).find("dipole 0: drive needs the self reactance"),
              std::string::npos)
        << e.what();
  }
  wires[0].reactance_ohm = -1500;
  EXPECT_NO_THROW(SolveCoupling(a, ports, wires));
  wires[0] = Wire{};
  wires[0].reactance_ohm = -1500;
  wires[0].conductivity_s_m = 5.8e7;  // without a radius
  EXPECT_THROW(SolveCoupling(a, ports, wires), InvalidArgument);
  EXPECT_THROW(SolveCoupling(a, ports, {Wire{}, Wire{}}), InternalError);  // a caller bug
}

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

TEST(Coupling, ClosePairsAndSizeLimit) {
  Array a;
  a.frequency_hz = 1e8;
  a.dipoles = {testing::MakeDipole(Vec3(0, 0, 0), Vec3::UnitZ(), 0.1),
               testing::MakeDipole(Vec3(0, 0, 0), Vec3::UnitX(), 0.1),  // crossed: fine
               testing::MakeDipole(Vec3(0.05, 0, 0), Vec3::UnitZ(), 0.2),
               testing::MakeDipole(Vec3(5, 0, 0), Vec3::UnitZ(), 0.1)};
  const ClosePairs c = FindClosePairs(a);
  // (0,2) and (1,2) are 0.05 m apart, less than the longer length 0.2 m.
  EXPECT_EQ(c.count, 2u);
  ASSERT_EQ(c.first.size(), 2u);
  EXPECT_EQ(c.first[0], std::make_pair(std::size_t{0}, std::size_t{2}));
  EXPECT_DOUBLE_EQ(c.closest_ratio, 0.25);
  std::vector<Port> ports(4);
  for (int m = 0; m < 4; ++m) ports[m].current_a = 1.0;
  CouplingOptions small;
  small.max_dipoles = 3;
  // Above the limit current-forced ports stream (no matrix); a driven port is solved
  // by GMRES on streamed products (iterative_circuit.h), no matrix either.
  EXPECT_EQ(SolveCoupling(a, ports, std::vector<Wire>(4), small).impedance_ohm.size(), 0);
  ports[3] = Port{PortKind::kDrive, 0.0, 1.0, 50.0};
  std::vector<Wire> wires(4);
  wires[3].reactance_ohm = -900;
  const CouplingResult iterative = SolveCoupling(a, ports, wires, small);
  EXPECT_EQ(iterative.impedance_ohm.size(), 0);
  EXPECT_TRUE(iterative.route.iterative);
  small.force_matrix = true;  // asked for: the matrix and the LU solve at any size
  const CouplingResult direct = SolveCoupling(a, ports, wires, small);
  EXPECT_EQ(direct.impedance_ohm.rows(), 4);
  EXPECT_FALSE(direct.route.iterative);
  // One unknown: the solve is a division, both routes agree to rounding.
  EXPECT_NEAR(std::abs(iterative.circuit.current_a[3] - direct.circuit.current_a[3]), 0,
              1e-12 * std::abs(direct.circuit.current_a[3]));
}

// Above the limit a current-forced array's Z-based figures come from rows summed
// one at a time (power_large.h); with the matrix forced they come from Z. The two
// routes sum the same closed forms in different orders, so they agree to rounding
// (1e-13 relative; the stored active resistance bit for bit, one code path).
void ExpectStreamedEqualsMatrix(const Array& a, const std::vector<Port>& ports,
                                const std::vector<Wire>& wires, std::size_t limit) {
  CouplingOptions streamed_options, matrix_options;
  streamed_options.max_dipoles = limit;
  matrix_options.max_dipoles = limit;
  matrix_options.force_matrix = true;
  const CouplingResult s = SolveCoupling(a, ports, wires, streamed_options);
  const CouplingResult m = SolveCoupling(a, ports, wires, matrix_options);
  ASSERT_EQ(s.impedance_ohm.size(), 0);
  ASSERT_EQ(m.impedance_ohm.rows(), static_cast<Eigen::Index>(a.size()));
  auto close = [](const Eigen::VectorXcd& x, const Eigen::VectorXcd& y, const char* what) {
    ASSERT_EQ(x.size(), y.size());
    const double scale = y.cwiseAbs().maxCoeff();
    for (Eigen::Index e = 0; e < x.size(); ++e) {
      if (std::isnan(y[e].real()) || std::isnan(y[e].imag())) {
        EXPECT_TRUE(std::isnan(x[e].real())) << what << " " << e;
        continue;
      }
      EXPECT_LE(std::abs(x[e] - y[e]), 1e-13 * scale)
          << what << " " << e << ": " << x[e] << " vs " << y[e];
    }
  };
  close(s.active_impedance_ohm, m.active_impedance_ohm, "active impedance");
  close(s.circuit.input_impedance_ohm, m.circuit.input_impedance_ohm, "input impedance");
  close(s.circuit.terminal_voltage_v, m.circuit.terminal_voltage_v, "terminal voltage");
  close(s.reflection, m.reflection, "reflection");
  EXPECT_EQ(s.circuit.current_a, m.circuit.current_a);
  EXPECT_NEAR(s.radiated_w, m.radiated_w, 1e-13 * m.radiated_w);
  // The accepted power sums 1/2 Re(V I*) over the ports, V dominated by the self
  // reactances: its rounding scale is 1/2 sum |V| |I| (here ~1e3 times the result).
  double reactive = 0;
  for (Eigen::Index e = 0; e < m.circuit.current_a.size(); ++e) {
    const Complex v = m.circuit.terminal_voltage_v[e];
    if (!std::isnan(v.imag())) reactive += 0.5 * std::abs(v) * std::abs(m.circuit.current_a[e]);
  }
  EXPECT_NEAR(s.accepted_w, m.accepted_w, 1e-13 * reactive);
  EXPECT_NEAR(s.ohmic_w, m.ohmic_w, 1e-13 * m.ohmic_w);
  EXPECT_NEAR(s.efficiency, m.efficiency, 1e-13 * reactive / m.accepted_w);
  ASSERT_EQ(s.self_reactance_ohm.size(), m.self_reactance_ohm.size());
  for (Eigen::Index e = 0; e < s.self_reactance_ohm.size(); ++e) {
    EXPECT_TRUE(s.self_reactance_ohm[e] == m.self_reactance_ohm[e] ||
                (std::isnan(s.self_reactance_ohm[e]) && std::isnan(m.self_reactance_ohm[e])))
        << e;
  }
}

TEST(Coupling, StreamedImpedancesEqualTheMatrixRoute) {
  TestRng rng(4097);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    testing::TestArray a = RandomArray(rng, 600, g, 6.0);
    std::vector<Port> ports(a.size());
    std::vector<Wire> wires(a.size());
    for (std::size_t m = 0; m < a.size(); ++m) {
      a.dipoles[m].distribution = Distribution::kTriangular;
      ports[m].current_a = m % 97 == 5 ? Complex(0.0) : a.currents[static_cast<Eigen::Index>(m)];
      if (m % 50 == 7) continue;  // no wire: its reactance and V unknown (NaN)
      wires[m].radius_m = a.dipoles[m].length_m / 300;
      wires[m].conductivity_s_m = 3.5e7;
    }
    ExpectStreamedEqualsMatrix(a, ports, wires, 599);
  }
}

// The default threshold itself: 4097 dipoles, one above it (a 268 MB matrix).
TEST(Coupling, StreamedImpedancesAtTheDefaultLimit) {
  TestRng rng(77);
  const std::size_t limit = CouplingOptions{}.max_dipoles;
  testing::TestArray a = RandomArray(rng, static_cast<int>(limit) + 1, Ground::kNone, 12.0);
  std::vector<Port> ports(a.size());
  std::vector<Wire> wires(a.size());
  for (std::size_t m = 0; m < a.size(); ++m) {
    ports[m].current_a = a.currents[static_cast<Eigen::Index>(m)];
    wires[m].reactance_ohm = -1000.0 - static_cast<double>(m % 13);
  }
  ExpectStreamedEqualsMatrix(a, ports, wires, limit);
}

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

TEST(Coupling, LossesInParasiticLoadsLowerTheEfficiency) {
  // IEEE Std 145-2013: radiation efficiency against the net power the antenna accepts
  // from its sources, so power burnt in a parasite's resistive load counts as loss.
  Array a;
  a.frequency_hz = kSpeedOfLight_m_s;  // lambda = 1 m
  a.dipoles = {
      testing::MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.05, Distribution::kTriangular),
      testing::MakeDipole(Vec3(0.1, 0, 0), Vec3::UnitZ(), 0.05, Distribution::kTriangular)};
  std::vector<Port> ports = {{PortKind::kDrive, 0.0, 1.0, 50.0},
                             {PortKind::kLoad, 0.0, 0.0, Complex(50.0, 1400.0)}};
  std::vector<Wire> wires(2);
  for (Wire& w : wires) w.radius_m = 1e-3, w.conductivity_s_m = 5.8e7;
  const CouplingResult r = SolveCoupling(a, ports, wires);
  EXPECT_GT(r.load_loss_w, 0);
  EXPECT_NEAR(r.efficiency, r.radiated_w / (r.radiated_w + r.ohmic_w + r.load_loss_w), 1e-12);
  EXPECT_LT(r.efficiency, r.radiated_w / (r.radiated_w + r.ohmic_w));
  // A load has no feed: no reflection, no VSWR.
  EXPECT_TRUE(std::isnan(std::abs(r.reflection[1])));
  EXPECT_TRUE(std::isnan(r.vswr[1]));
  EXPECT_FALSE(std::isnan(r.vswr[0]));
}

TEST(Coupling, OwnImageDoublesTheResistanceOfALowVerticalDipole) {
  // A vertical short dipole at h -> 0 over PEC has twice its free-space radiation
  // resistance (Balanis 4th ed. sec. 4.7.2, from memory): the own-image term of Z.
  const double h = 1e-5;  // wavelengths
  Array a;
  a.frequency_hz = kSpeedOfLight_m_s;
  a.ground = Ground::kPec;
  a.dipoles = {testing::MakeDipole(Vec3(0, 0, h), Vec3::UnitZ(), 1e-3, Distribution::kTriangular)};
  std::vector<Wire> wires(1);
  wires[0].reactance_ohm = -5000;  // given: no wire formula at this length
  const CouplingResult r = SolveCoupling(a, {{PortKind::kDrive, 0.0, 1.0, 50.0}}, wires);
  Array free = a;
  free.ground = Ground::kNone;
  const double r_free = 2 * kPi / 3 * kEta0_ohm * std::pow(0.5e-3, 2);  // Le = l/2
  EXPECT_NEAR(r.circuit.input_impedance_ohm[0].real(), 2 * r_free, 1e-6 * r_free);
  // ... and the closeness caution sees the image 2h away.
  EXPECT_EQ(r.close_pairs.count, 1u);
  EXPECT_EQ(r.close_pairs.first[0], std::make_pair(std::size_t{0}, std::size_t{0}));
}

TEST(Coupling, CoincidentDipolesAreNamed) {
  Array a;
  a.frequency_hz = kSpeedOfLight_m_s;
  a.dipoles = {testing::MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.05, Distribution::kTriangular),
               testing::MakeDipole(Vec3::Zero(), Vec3(0, 1, 1), 0.05, Distribution::kTriangular)};
  std::vector<Wire> wires(2);
  for (Wire& w : wires) w.radius_m = 1e-3;
  try {
    SolveCoupling(a, {{PortKind::kDrive, 0.0, 1.0, 50.0}, {PortKind::kLoad, 0.0, 0.0, 0.0}}, wires);
    ADD_FAILURE() << "expected a refusal";
  } catch (const InvalidArgument& e) {
    EXPECT_NE(std::string(e.what()).find("dipoles 0 and 1 share a point"), std::string::npos)
        << e.what();
  }
}

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

TEST(Coupling, CountsWiresThinnerThanTheSkinDepth) {
  // Copper at 100 MHz: skin depth 6.6 um (from the formula of self_impedance.h); a
  // 2 um radius is thinner than twice that, a 1 mm one is not.
  Array a;
  a.frequency_hz = 1e8;
  a.dipoles = {testing::MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.1, Distribution::kTriangular),
               testing::MakeDipole(Vec3(2, 0, 0), Vec3::UnitZ(), 0.1, Distribution::kTriangular)};
  std::vector<Wire> wires(2);
  wires[0].radius_m = 2e-6, wires[1].radius_m = 1e-3;
  for (Wire& w : wires) w.conductivity_s_m = 5.8e7;
  std::vector<Port> ports(2);
  for (Port& p : ports) p.current_a = 1.0;
  EXPECT_EQ(SolveCoupling(a, ports, wires).thin_for_skin_effect, 1u);
  EXPECT_EQ(Vswr(Complex(0.5, 0.0)), 3.0);  // (1 + 0.5) / (1 - 0.5)
  EXPECT_TRUE(std::isinf(Vswr(Complex(0.0, 1.0))));
  EXPECT_TRUE(std::isnan(Vswr(Complex(std::nan(""), 0.0))));
}

}  // namespace
}  // namespace lobecast
