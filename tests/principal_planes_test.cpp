// The main beam as the pattern analysis sees it (engine/analysis/pattern_analysis.h,
// beam.h): principal planes chosen from the pattern, the same on 0.5, 1 and 2 deg
// grids, and the worst XPD taken over the main beam only. The automatic polarization
// reference is checked in pattern_analysis_test.cpp.
#include "engine/analysis/pattern_analysis.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/pattern.h"
#include "engine/polarization.h"
#include "engine/types.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::kTestFrequency_hz;
using testing::MakeDipole;
using testing::Separation_deg;
using testing::UniformFactor;

double Lambda() { return testing::TestWavelength_m(); }

// Half-power angle (rad) of a pattern f on [0, hi] with f(0) its peak, by a dense scan
// and bisection written here, independent of the engine.
template <typename F>
double HalfPowerAngle(F f, double hi) {
  const double half = 0.5 * f(0.0);
  double lo = 0.0;
  const int n = 20000;
  for (int i = 1; i <= n; ++i) {
    const double x = hi * i / n;
    if (f(x) < half) {
      double a = hi * (i - 1) / n, b = x;
      for (int it = 0; it < 100; ++it) {
        const double m = 0.5 * (a + b);
        (f(m) >= half ? a : b) = m;
      }
      return 0.5 * (a + b);
    }
    lo = x;
  }
  return lo;
}

// Nx x Ny dipoles of orientation u on the lattice (dx, dy), centred on (0, 0, h),
// steered to (theta0, phi0) with exp(-j k r_hat0 . r_n) (CONVENTIONS §3).
testing::TestArray Panel(int nx, int ny, double dx, double dy, const Vec3& u, double h,
                         Ground ground, double theta0_deg, double phi0_deg) {
  testing::TestArray a;
  a.frequency_hz = kTestFrequency_hz;
  a.ground = ground;
  const double k = 2 * kPi / Lambda();
  const Vec3 r0(std::sin(theta0_deg * kDegree) * std::cos(phi0_deg * kDegree),
                std::sin(theta0_deg * kDegree) * std::sin(phi0_deg * kDegree),
                std::cos(theta0_deg * kDegree));
  for (int i = 0; i < nx; ++i)
    for (int j = 0; j < ny; ++j) {
      const Vec3 p((i - 0.5 * (nx - 1)) * dx, (j - 0.5 * (ny - 1)) * dy, h);
      a.Add(p, u, Lambda() / 100, std::polar(1.0, -k * r0.dot(p)));
    }
  return a;
}

// The analysis of one array on 0.5, 1 and 2 deg grids (theta to 90 deg over ground).
std::vector<PatternAnalysis> OnThreeGrids(const testing::TestArray& a) {
  std::vector<PatternAnalysis> out;
  for (const double step : {0.5, 1.0, 2.0}) {
    const AngularGrid g = AngularGrid::FromRanges(
        {0.0, a.ground == Ground::kPec ? 90.0 : 180.0, step}, {0.0, 360.0, step});
    out.push_back(AnalyzePattern(a, a.currents, ComputePattern(a, a.currents, g)));
  }
  return out;
}

// The planes (kind, orientation) and their beamwidths agree across the grids to the
// refine tolerance (1e-6 deg; 1e-5 allows for the peak's own refinement).
void ExpectSamePlanes(const std::vector<PatternAnalysis>& r) {
  for (std::size_t i = 1; i < r.size(); ++i) {
    for (const auto& [a, b] : {std::pair{&r[0].elevation_cut, &r[i].elevation_cut},
                               std::pair{&r[0].orthogonal_cut, &r[i].orthogonal_cut}}) {
      EXPECT_EQ(a->plane, b->plane) << "grid " << i;
      if (std::isnan(a->plane_phi_deg)) {
        EXPECT_TRUE(std::isnan(b->plane_phi_deg));
      } else {
        EXPECT_NEAR(a->plane_phi_deg, b->plane_phi_deg, 1e-5) << "grid " << i;
      }
      EXPECT_EQ(a->half_power_found, b->half_power_found);
      if (a->half_power_found) {
        EXPECT_NEAR(a->half_power_width_deg, b->half_power_width_deg, 1e-5) << "grid " << i;
      }
    }
  }
}

// E-plane at e_phi_deg and H-plane at h_phi_deg on every grid, with the half-power
// widths 2 e_half_rad and 2 h_half_rad (the closed forms of the test).
void ExpectEAndHPlanes(const std::vector<PatternAnalysis>& r, double e_phi_deg, double h_phi_deg,
                       double e_half_rad, double h_half_rad) {
  ExpectSamePlanes(r);
  EXPECT_EQ(r[0].elevation_cut.plane, CutPlane::kE);
  EXPECT_NEAR(r[0].elevation_cut.plane_phi_deg, e_phi_deg, 1e-9);
  EXPECT_EQ(r[0].orthogonal_cut.plane, CutPlane::kH);
  EXPECT_NEAR(r[0].orthogonal_cut.plane_phi_deg, h_phi_deg, 1e-9);
  EXPECT_NEAR(r[0].elevation_cut.half_power_width_deg, 2 * e_half_rad / kDegree, 1e-5);
  EXPECT_NEAR(r[0].orthogonal_cut.half_power_width_deg, 2 * h_half_rad / kDegree, 1e-5);
}

TEST(PrincipalPlanes, HorizontalDipoleOverGroundUsesEAndHPlanes) {
  // x dipole lambda/4 over PEC: the image gives the factor sin(k h cos t) (Balanis 4th ed.,
  // sec. 4.7, from memory; CONVENTIONS §1), the element |E|^2 is cos^2 t in the E-plane
  // (xz, phi = 0) and 1 in the H-plane (yz). The zenith peak's phi is arbitrary, so the
  // planes must come from the field: E-plane phi = 0, H-plane phi = 90, on every grid
  // (before, the 1 and 2 deg grids swapped them).
  const testing::TestArray a = testing::OneDipoleArray(
      MakeDipole(Vec3(0, 0, 0.25 * Lambda()), Vec3::UnitX(), Lambda() / 100), 1.0, Ground::kPec);
  const std::vector<PatternAnalysis> r = OnThreeGrids(a);
  auto af = [](double t) { return std::pow(std::sin(0.5 * kPi * std::cos(t)), 2); };
  const double e = HalfPowerAngle([&](double t) { return std::pow(std::cos(t), 2) * af(t); }, 1.5);
  ExpectEAndHPlanes(r, 0.0, 90.0, e, HalfPowerAngle(af, 1.5));
  // F/B over ground never looks below it, and a zenith beam has nothing behind it
  // above the ground: undefined, not +inf and not the peak against itself.
  EXPECT_TRUE(std::isnan(r[0].front_to_back.ratio_db)) << r[0].front_to_back.ratio_db;
  EXPECT_TRUE(std::isnan(r[0].front_to_back.same_elevation_ratio_db));
}

TEST(PrincipalPlanes, BroadsidePanelWithUnequalSides) {
  // 6 x 3 y dipoles, lambda/2 lattice, free space, in phase: twin beams on the z axis.
  // E-plane (yz, phi = 90): element cos^2 t times the 3-element factor in y; H-plane
  // (xz, phi = 0): the 6-element factor in x (uniform line, Balanis 4th ed. sec. 6.3,
  // from memory). Half-power angles from UniformFactor by bisection here.
  const testing::TestArray a =
      Panel(6, 3, 0.5 * Lambda(), 0.5 * Lambda(), Vec3::UnitY(), 0.0, Ground::kNone, 0, 0);
  const std::vector<PatternAnalysis> r = OnThreeGrids(a);
  const double e = HalfPowerAngle(
      [](double t) { return std::pow(std::cos(t), 2) * UniformFactor(3, kPi * std::sin(t)); }, 1.5);
  const double h =
      HalfPowerAngle([](double t) { return UniformFactor(6, kPi * std::sin(t)); }, 1.5);
  ExpectEAndHPlanes(r, 90.0, 0.0, e, h);
  // F/B: the nadir beam is the mirror image (0 dB); "behind at the same theta" of a
  // zenith peak is the peak itself: undefined.
  EXPECT_NEAR(r[0].front_to_back.ratio_db, 0.0, 1e-6);
  EXPECT_TRUE(std::isnan(r[0].front_to_back.same_elevation_ratio_db));
}

TEST(PrincipalPlanes, SteeredAndGroundPanelsKeepElevationPlanes) {
  // Off the axis the elevation plane (through the peak and z) is fixed by the peak:
  // phi = the steering phi (the 4 x 4 ground panel of the samples, and a free-space
  // 8 x 4 steered to (30, 40) deg).
  const testing::TestArray ground = Panel(4, 4, 0.5 * Lambda(), 0.5 * Lambda(), Vec3::UnitX(),
                                          0.25 * Lambda(), Ground::kPec, 20, 0);
  const testing::TestArray steered =
      Panel(8, 4, 0.5 * Lambda(), 0.5 * Lambda(), Vec3::UnitX(), 0.0, Ground::kNone, 30, 40);
  for (const testing::TestArray* a : {&ground, &steered}) {
    const std::vector<PatternAnalysis> r = OnThreeGrids(*a);
    ExpectSamePlanes(r);
    EXPECT_EQ(r[0].elevation_cut.plane, CutPlane::kElevation);
    EXPECT_EQ(r[0].orthogonal_cut.plane, CutPlane::kOrthogonal);
    EXPECT_NEAR(r[0].elevation_cut.plane_phi_deg, r[0].peak.direction.phi_deg, 1e-12);
  }
  // Over ground F/B is taken behind the peak at the same theta, never below the
  // ground: finite here, and the same figure as the same-theta one.
  const PatternAnalysis g = OnThreeGrids(ground)[1];
  EXPECT_TRUE(std::isfinite(g.front_to_back.ratio_db)) << g.front_to_back.ratio_db;
  EXPECT_EQ(g.front_to_back.ratio_db, g.front_to_back.same_elevation_ratio_db);
  EXPECT_NEAR(g.front_to_back.back_direction.theta_deg, g.peak.direction.theta_deg, 1e-9);
  EXPECT_NEAR(g.front_to_back.back_direction.phi_deg, 180.0, 1e-6);
}

TEST(PrincipalPlanes, CircularOnAxisUsesXzAndYz) {
  // A turnstile (x and -j y) lambda/4 over PEC is circular at the zenith (IEEE Std
  // 145-2013): no E-plane; the planes are xz and yz on every grid. (In free space its
  // pattern falls to exactly half power on the horizon, a tie rounding decides.)
  testing::TestArray a;
  a.frequency_hz = kTestFrequency_hz;
  a.ground = Ground::kPec;
  a.Add(Vec3(0, 0, 0.25 * Lambda()), Vec3::UnitX(), Lambda() / 100, 1.0);
  a.Add(Vec3(0, 0, 0.25 * Lambda()), Vec3::UnitY(), Lambda() / 100, Complex(0, -1));
  const std::vector<PatternAnalysis> r = OnThreeGrids(a);
  ExpectSamePlanes(r);
  EXPECT_EQ(r[0].elevation_cut.plane, CutPlane::kXZ);
  EXPECT_EQ(r[0].orthogonal_cut.plane, CutPlane::kYZ);
  EXPECT_EQ(r[0].elevation_cut.plane_phi_deg, 0.0);
  EXPECT_EQ(r[0].orthogonal_cut.plane_phi_deg, 90.0);
}

TEST(PatternAnalysis, WorstXpdOnlyInTheMainBeam) {
  // Two z dipoles 16 lambda apart on the x axis, in phase: AF = cos(16 pi cos psi), psi
  // from the x axis (two-element array, Balanis 4th ed. sec. 6.2, from memory), lobes
  // where 16 cos psi is an integer, each above -3 dB within 1/4 of it. The peak is the
  // endfire lobe toward +x (PeakIndex takes the first of the equal maxima). A horizon-only
  // grid every 10 deg joins it to the next lobes (phi = 10 in the main lobe, 20 to 60 in
  // others, each above -3 dB), which the worst in-beam XPD must leave out (before: -4.77
  // dB, the XPD at phi = 60). Ludwig-3 x: co = Et cos phi,
  // cross = Et sin phi (Ep = 0), XPD = -20 log10 |tan phi| whatever theta; in the main
  // lobe |phi| is largest on the horizon at its half-power edge, 16 cos phi = 15.75.
  testing::TestArray a;
  a.frequency_hz = kTestFrequency_hz;
  a.Add(Vec3(-8 * Lambda(), 0, 0), Vec3::UnitZ(), Lambda() / 100, 1.0);
  a.Add(Vec3(8 * Lambda(), 0, 0), Vec3::UnitZ(), Lambda() / 100, 1.0);
  const AngularGrid g = AngularGrid::FromRanges({90.0, 90.0, 1.0}, {0.0, 350.0, 10.0});
  AnalysisOptions o;
  o.reference = PolarizationReference::kLinearX;
  const PatternAnalysis r = AnalyzePattern(a, a.currents, ComputePattern(a, a.currents, g), o);
  ASSERT_LT(Separation_deg(r.peak.direction.theta_deg, r.peak.direction.phi_deg, 90, 0), 1e-4);
  const double edge = std::acos(63.0 / 64.0);
  EXPECT_NEAR(r.polarization.worst_xpd_in_beam_db, -20 * std::log10(std::tan(edge)), 1e-4)
      << r.polarization.worst_xpd_direction.theta_deg << " "
      << r.polarization.worst_xpd_direction.phi_deg;
}

}  // namespace
}  // namespace lobecast
