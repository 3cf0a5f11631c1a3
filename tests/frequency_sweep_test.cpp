// Frequency sweeps (engine/sweep/frequency_sweep.h): how the currents follow
// frequency, and the beam squint of phase steering against the array factor.
#include "engine/sweep/frequency_sweep.h"

#include <gtest/gtest.h>

#include <cmath>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/synthesis/steering.h"
#include "test_util.h"

namespace lobecast {
namespace {

constexpr double kF0 = 10e9;

// A line of n z-directed short dipoles along x, pitch d = lambda0 / 2 at kF0, centred,
// uniform currents steered to (theta 90, phi0) at kF0.
struct SteeredLine {
  Array array;
  SweepExcitation excitation;
};

SteeredLine MakeLine(int n, double phi0_deg, SteeringMode mode) {
  SteeredLine s;
  s.array.frequency_hz = kF0;
  const double d = 0.5 * kSpeedOfLight_m_s / kF0;
  std::vector<Vec3> positions;
  for (int i = 0; i < n; ++i) {
    Dipole dip;
    dip.position_m = Vec3((i - 0.5 * (n - 1)) * d, 0, 0);
    dip.orientation = Vec3::UnitZ();
    dip.length_m = 0.02 * kSpeedOfLight_m_s / kF0;
    s.array.dipoles.push_back(dip);
    positions.push_back(dip.position_m);
  }
  Steering st;
  st.direction = UnitVectorAt(90 * kDegree, phi0_deg * kDegree);
  st.mode = mode;
  st.design_frequency_hz = kF0;
  s.excitation.design_currents_a = SteeringPhasorsAt(positions, st, kF0);
  s.excitation.steering = st;
  s.excitation.steered_first = 0;
  s.excitation.steered_count = static_cast<std::size_t>(n);
  return s;
}

TEST(FrequencySweep, CurrentsAtTheDesignFrequencyAreTheDesignCurrentsExactly) {
  for (SteeringMode mode : {SteeringMode::kPhase, SteeringMode::kDelay}) {
    const SteeredLine s = MakeLine(8, 60, mode);
    const Eigen::VectorXcd at = SweepCurrentsAt(s.array, s.excitation, kF0);
    for (Eigen::Index i = 0; i < at.size(); ++i) {
      EXPECT_EQ(at[i].real(), s.excitation.design_currents_a[i].real());
      EXPECT_EQ(at[i].imag(), s.excitation.design_currents_a[i].imag());
    }
  }
}

// Delay mode: I_n(f0) exp(-j 2 pi (f - f0) tau_n) must equal the steering phasors the
// engine computes directly at f (exp(-j 2 pi f tau_n), steering.h), to rounding of
// the phase (|2 pi f tau| < 100 rad here, so ~1e-13).
TEST(FrequencySweep, DelayModeKeepsTheTrueTimeDelays) {
  const SteeredLine s = MakeLine(16, 60, SteeringMode::kDelay);
  std::vector<Vec3> positions;
  for (const Dipole& d : s.array.dipoles) positions.push_back(d.position_m);
  for (double f : {9e9, 10.5e9, 11e9}) {
    const Eigen::VectorXcd got = SweepCurrentsAt(s.array, s.excitation, f);
    const Eigen::VectorXcd want = SteeringPhasorsAt(positions, *s.excitation.steering, f);
    EXPECT_LT((got - want).cwiseAbs().maxCoeff(), 1e-12) << "f = " << f;
  }
  // Phase mode keeps the design phasors at every frequency.
  const SteeredLine p = MakeLine(16, 60, SteeringMode::kPhase);
  EXPECT_EQ(SweepCurrentsAt(p.array, p.excitation, 11e9), p.excitation.design_currents_a);
}

// The squint of phase steering. In the plane theta = 90 deg a z dipole's element
// factor is constant (sin theta = 1), so the pattern there is the array factor
//   AF(phi) = sum_n a_n exp(j x_n (k cos phi - k0 cos phi0))
// (phases exp(-j k0 x_n cos phi0) set at f0, x_n the positions along x). Every term
// is in phase, and |AF| is largest, where k cos phi = k0 cos phi0, i.e.
//   cos phi = (f0 / f) cos phi0
// (a standard array-theory result; e.g. R. J. Mailloux, Phased Array Antenna
// Handbook, 2nd ed., 2005, ch. 1, from memory). Off that plane the element factor
// sin theta < 1 on the same cone of the array factor, so the peak over the sphere is
// in the plane. With true-time delay the phases are k x_n cos phi0 at every k, the
// condition is cos phi = cos phi0 and the peak stays at phi0 (no squint; ibid.).
// The refined peak of the analysis must meet both to its printed resolution
// (0.001 deg in the report).
TEST(FrequencySweep, PhaseSteeringSquintsAsTheArrayFactorSaysAndDelayDoesNot) {
  const double phi0 = 60;
  AngularGrid grid = AngularGrid::FromRanges(AngleRange{0, 180, 2}, AngleRange{0, 360, 1});
  SweepOptions options;
  options.pattern.field = testing::DirectMethod();
  const std::vector<double> freqs = {kF0, 9e9, 11e9};
  for (SteeringMode mode : {SteeringMode::kPhase, SteeringMode::kDelay}) {
    const SteeredLine s = MakeLine(16, phi0, mode);
    const FrequencySweep sweep = RunFrequencySweep(s.array, freqs, s.excitation, grid, options);
    ASSERT_EQ(sweep.points.size(), freqs.size());
    EXPECT_EQ(sweep.directivity.size(), freqs.size() * grid.size());
    for (const FrequencyPoint& p : sweep.points) {
      ASSERT_TRUE(p.analysed);
      const double want_phi =
          mode == SteeringMode::kPhase
              ? std::acos(kF0 / p.frequency_hz * std::cos(phi0 * kDegree)) / kDegree
              : phi0;
      EXPECT_NEAR(p.peak_phi_deg, want_phi, 5e-4)
          << ToString(mode) << " at " << p.frequency_hz << " Hz";
      EXPECT_NEAR(p.peak_theta_deg, 90.0, 5e-4);
      const double squint = SquintDeg(p, sweep.points.front());
      EXPECT_NEAR(squint, std::abs(want_phi - phi0), 5e-4);
    }
    // The squint is real: 11 GHz moves the phase-steered beam by several degrees.
    if (mode == SteeringMode::kPhase) {
      EXPECT_GT(SquintDeg(sweep.points[1], sweep.points[0]), 3);  // 9 GHz: 3.75 deg
    }
  }
}

// A steady array (no steering, fixed currents): the first point of a sweep is the
// plain pattern, bit for bit.
TEST(FrequencySweep, FirstPointIsThePlainComputation) {
  SteeredLine s = MakeLine(6, 60, SteeringMode::kPhase);
  s.excitation.steering.reset();
  AngularGrid grid = AngularGrid::FromRanges(AngleRange{0, 180, 5}, AngleRange{0, 360, 5});
  SweepOptions options;
  options.pattern.field = testing::DirectMethod();
  const FrequencySweep sweep = RunFrequencySweep(s.array, {kF0, 12e9}, s.excitation, grid, options);
  const PatternResult plain =
      ComputePattern(s.array, s.excitation.design_currents_a, grid, options.pattern);
  for (std::size_t i = 0; i < grid.size(); ++i)
    ASSERT_EQ(sweep.directivity[i], plain.directivity[static_cast<Eigen::Index>(i)]);
  EXPECT_EQ(sweep.points[0].radiated_w, plain.radiated_power_w);
}

TEST(FrequencySweep, RefusesAFirstFrequencyOtherThanTheDesign) {
  const SteeredLine s = MakeLine(4, 60, SteeringMode::kPhase);
  AngularGrid grid = AngularGrid::FromRanges(AngleRange{0, 180, 10}, AngleRange{0, 360, 10});
  EXPECT_THROW(RunFrequencySweep(s.array, {9e9, kF0}, s.excitation, grid, {}), InvalidArgument);
  EXPECT_THROW(SweepCurrentsAt(s.array, s.excitation, 0.0), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
