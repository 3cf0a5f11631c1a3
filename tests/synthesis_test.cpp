// Lattice generators, tapers, steering and grating lobes (engine/synthesis), each
// checked against an independent source named beside it. The amplitudes themselves
// are compared with scipy.signal.windows in tests/design_check.py.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <vector>

#include "engine/analysis/local_search.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/synthesis/grating_lobes.h"
#include "engine/synthesis/lattice_generator.h"
#include "engine/synthesis/steering.h"
#include "engine/synthesis/taper.h"
#include "test_util.h"

namespace lobecast {
namespace {

constexpr double kF = 1e9;
const double kLambda = kSpeedOfLight_m_s / kF;

// Dipoles of one orientation at the sites, with the given currents.
Array ArrayAt(const std::vector<LatticeSite>& sites, const Vec3& orientation, double f = kF) {
  Array a;
  a.frequency_hz = f;
  for (const LatticeSite& s : sites) {
    Dipole d;
    d.position_m = s.position_m;
    d.orientation = orientation;
    d.length_m = 0.01 * kLambda;
    a.dipoles.push_back(d);
  }
  return a;
}

LatticeSpec Line(int n, double spacing_m) {
  LatticeSpec s;
  s.kind = LatticeKind::kLine;
  s.count_x = n;
  s.spacing_x_m = spacing_m;
  return s;
}

Eigen::VectorXcd Real(const std::vector<double>& a) {
  Eigen::VectorXcd v(static_cast<Eigen::Index>(a.size()));
  for (std::size_t i = 0; i < a.size(); ++i) v[static_cast<Eigen::Index>(i)] = a[i];
  return v;
}

// The highest side lobe (dB re the peak) of a line of z dipoles along x in the
// theta = 90 deg plane, where the pattern is the array factor (the element pattern
// sin(theta) is 1 there): grid maxima outside the main lobe, each refined by a
// golden-section search on the exact direct sum.
double HighestSideLobeDb(const std::vector<double>& taper, double spacing_m) {
  const std::vector<LatticeSite> sites =
      GenerateLattice(Line(static_cast<int>(taper.size()), spacing_m));
  const Array array = ArrayAt(sites, Vec3::UnitZ());
  const Eigen::VectorXcd currents = Real(taper);
  const AngularGrid grid = AngularGrid::FromRanges({90, 90, 1}, {0, 180, 0.01});
  PatternOptions options;
  options.field = testing::DirectMethod();
  const PatternResult r = ComputePattern(array, currents, grid, options);
  const PatternProbe probe(array, currents, r.radiated_power_w);
  const Eigen::VectorXd& d = r.directivity;
  const Eigen::Index n = d.size();
  const Eigen::Index peak = (n - 1) / 2;  // phi = 90 deg: broadside
  Eigen::Index lo = peak, hi = peak;
  while (lo > 0 && d[lo - 1] < d[lo]) --lo;
  while (hi + 1 < n && d[hi + 1] < d[hi]) ++hi;
  double best = 0;
  for (Eigen::Index i = 0; i < n; ++i) {
    if (i >= lo && i <= hi) continue;
    const bool local = (i == 0 || d[i] >= d[i - 1]) && (i + 1 == n || d[i] >= d[i + 1]);
    if (!local) continue;
    const double phi = grid.phi_deg[static_cast<std::size_t>(i)] * kDegree;
    const double step = 0.01 * kDegree;
    const auto m = MinimizeOnInterval(
        [&](double p) { return -probe.DirectivityAt(UnitVectorAt(0.5 * kPi, p)); },
        std::max(0.0, phi - step), std::min(kPi, phi + step), 1e-12);
    best = std::max(best, -m.value);
  }
  return ToDb(best / d[peak]);
}

TEST(Lattice, LineIsCentredAndOrdered) {
  LatticeSpec s = Line(4, 0.2);
  s.center_m = Vec3(1, 2, 3);
  const auto sites = GenerateLattice(s);
  ASSERT_EQ(sites.size(), 4u);
  EXPECT_NEAR(sites[0].position_m.x(), 1 - 0.3, 1e-15);
  EXPECT_NEAR(sites[3].position_m.x(), 1 + 0.3, 1e-15);
  EXPECT_EQ(sites[2].position_m.y(), 2);
}

TEST(Lattice, TriangularRowsAreShiftedByHalfAPitch) {
  LatticeSpec s;
  s.kind = LatticeKind::kTriangular;
  s.count_x = 3;
  s.count_y = 4;
  s.spacing_x_m = 1.0;
  s.spacing_y_m = 0.8;
  const auto sites = GenerateLattice(s);
  ASSERT_EQ(sites.size(), 12u);
  // Row 1 element 0 sits half a pitch to the right of row 0 element 0.
  EXPECT_NEAR(sites[3].position_m.x() - sites[0].position_m.x(), 0.5, 1e-15);
  EXPECT_NEAR(sites[3].position_m.y() - sites[0].position_m.y(), 0.8, 1e-15);
  Vec3 mean = Vec3::Zero();
  for (const auto& p : sites) mean += p.position_m;
  EXPECT_LT((mean / 12).norm(), 1e-15);  // centred (even number of rows)
}

TEST(Lattice, RotationTurnsTheWholeLatticeAndRemovalKeepsOrder) {
  LatticeSpec s;
  s.kind = LatticeKind::kRectangular;
  s.count_x = 2;
  s.count_y = 2;
  s.spacing_x_m = s.spacing_y_m = 1.0;
  s.rotation = AxisAngleRotation(Vec3::UnitX(), 0.5 * kPi);  // the panel into the x-z plane
  s.removed = {1};
  const auto sites = GenerateLattice(s);
  ASSERT_EQ(sites.size(), 3u);
  EXPECT_EQ(sites[1].index, 2u);
  for (const auto& p : sites) EXPECT_NEAR(p.position_m.y(), 0.0, 1e-15);
  EXPECT_NEAR(sites[1].position_m.z(), 0.5, 1e-15);  // row 1 (y = +0.5) -> z = +0.5
  s.removed = {4};
  EXPECT_THROW(GenerateLattice(s), InvalidArgument);
  s.removed = {0, 0};
  EXPECT_THROW(GenerateLattice(s), InvalidArgument);
  s.removed = {0, 1, 2, 3};
  EXPECT_THROW(GenerateLattice(s), InvalidArgument);
}

TEST(Lattice, ConcentricRings) {
  LatticeSpec s;
  s.kind = LatticeKind::kRing;
  s.ring_counts = {4, 8};
  s.ring_radii_m = {0.5, 1.0};
  const auto sites = GenerateLattice(s);
  ASSERT_EQ(sites.size(), 12u);
  EXPECT_NEAR(sites[5].position_m.norm(), 1.0, 1e-15);
  EXPECT_NEAR(sites[1].position_m.y(), 0.5, 1e-15);
  s.ring_radii_m = {1.0, 0.5};
  EXPECT_THROW(GenerateLattice(s), InvalidArgument);
}

// Dolph, Proc. IRE 34 (1946): every side lobe of the Dolph-Chebyshev array is at
// the design level; the achieved level of the line within 0.01 dB.
TEST(Taper, ChebyshevMeetsItsSideLobeLevel) {
  for (int n : {8, 13, 24}) {
    for (double sll : {-20.0, -30.0, -45.0}) {
      TaperSpec t;
      t.kind = TaperKind::kChebyshev;
      t.sidelobe_db = sll;
      const double got = HighestSideLobeDb(LineTaper(t, n), 0.5 * kLambda);
      EXPECT_NEAR(got, sll, 0.01) << "N = " << n;
    }
  }
}

// Taylor, IRE Trans. AP-3 (1955): the n-bar line source's highest side lobe, from
// its closed-form pattern sin(pi u)/(pi u) prod_{n<nbar} (1 - u^2/z_n^2)/(1 - u^2/n^2),
// z_n^2 = s2 (A^2 + (n - 1/2)^2). The sampled taper of a long line approaches it
// (within 0.02 dB at N = 128); a short line misses it by up to about 1.7 dB (N = 8),
// which is why the design text prints the achieved level.
TEST(Taper, TaylorLineApproachesTheContinuousPattern) {
  const double sll = -30;
  const int nbar = 4;
  const double a = std::acosh(std::pow(10.0, -sll / 20)) / kPi;
  const double s2 = nbar * nbar / (a * a + (nbar - 0.5) * (nbar - 0.5));
  auto pattern = [&](double u) {
    double f = std::abs(u) < 1e-12 ? 1.0 : std::sin(kPi * u) / (kPi * u);
    for (int n = 1; n < nbar; ++n)
      f *= (1 - u * u / (s2 * (a * a + (n - 0.5) * (n - 0.5)))) / (1 - u * u / (n * n));
    return f;
  };
  double continuous = 0;
  // Side lobes start at the first null, z_1.
  const double z1 = std::sqrt(s2 * (a * a + 0.25));
  for (double u = z1; u < 40; u += 1e-5) continuous = std::max(continuous, std::abs(pattern(u)));
  const double continuous_db = AmplitudeToDb(continuous);
  EXPECT_LT(continuous_db, sll);  // finite n-bar: the near lobes sit a little below
  EXPECT_GT(continuous_db, sll - 0.5);
  TaperSpec t;
  t.kind = TaperKind::kTaylor;
  t.sidelobe_db = sll;
  t.nbar = nbar;
  EXPECT_NEAR(HighestSideLobeDb(LineTaper(t, 128), 0.5 * kLambda), continuous_db, 0.02);
}

// Balanis, Antenna Theory, 4th ed., sec. 6.8.2 (from memory): the binomial array at
// half-wave spacing has no side lobes; its pattern falls monotonically from
// broadside to endfire. Here: no maximum outside the main beam above rounding (near
// endfire, where the pattern is an exact zero, the sums' rounding leaves ripples
// around -280 dB; CONVENTIONS §1 puts the floor at 1e-13 of the field scale, -260 dB).
TEST(Taper, BinomialHasNoSideLobesAtHalfWaveSpacing) {
  TaperSpec t;
  t.kind = TaperKind::kBinomial;
  for (int n : {5, 10}) EXPECT_LT(HighestSideLobeDb(LineTaper(t, n), 0.5 * kLambda), -250) << n;
  // ...and it has them at 0.7 wavelength (the check can fail).
  EXPECT_GT(HighestSideLobeDb(LineTaper(t, 6), 0.7 * kLambda), -30);
}

// Binomial efficiency in closed form (Vandermonde: sum C(m,i)^2 = C(2m, m)):
// (2^m)^2 / (N C(2m, m)), m = N - 1.
TEST(Taper, EfficiencyOfUniformAndBinomial) {
  TaperSpec t;
  EXPECT_DOUBLE_EQ(TaperEfficiency(LineTaper(t, 7)), 1.0);
  t.kind = TaperKind::kBinomial;
  const int n = 9;
  const double c2m = 12870;  // C(16, 8)
  EXPECT_NEAR(TaperEfficiency(LineTaper(t, n)), 65536.0 / (n * c2m), 1e-14);
}

TEST(Taper, CosineSitsOnItsPedestal) {
  TaperSpec t;
  t.kind = TaperKind::kCosine;
  t.pedestal_db = -12;
  const auto w = LineTaper(t, 9);
  EXPECT_NEAR(w.front(), std::pow(10.0, -12.0 / 20), 1e-15);
  EXPECT_NEAR(w.back(), w.front(), 1e-15);
  EXPECT_DOUBLE_EQ(w[4], 1.0);
}

// Zeros of J1 (Abramowitz and Stegun, Handbook of Mathematical Functions, 1964,
// table 9.5, from memory).
TEST(Taper, BesselJ1Zeros) {
  const auto z = BesselJ1Zeros(3);
  EXPECT_NEAR(z[0], 3.8317059702, 1e-9);
  EXPECT_NEAR(z[1], 7.0155866698, 1e-9);
  EXPECT_NEAR(z[2], 10.1734681351, 1e-9);
}

// Taylor (1960): the circular distribution's far field, the Hankel transform
// F(u) = int_0^pi g(p) J0(u p) p dp, vanishes at u = z_n for n < nbar, where the
// design moved the uniform aperture's zeros. Quadrature: 4000-point Gauss-free
// midpoint rule on a smooth integrand (error far below the 1e-6 tolerance).
TEST(Taper, CircularTaylorPatternHasItsZerosWhereDesigned) {
  const double sll = -35;
  const int nbar = 5;
  const double a = std::acosh(std::pow(10.0, -sll / 20)) / kPi;
  const double mu_nbar = BesselJ1Zeros(nbar)[nbar - 1] / kPi;
  const double sigma = mu_nbar / std::sqrt(a * a + (nbar - 0.5) * (nbar - 0.5));
  auto transform = [&](double u) {
    const int k = 4000;
    double s = 0;
    for (int i = 0; i < k; ++i) {
      const double p = (i + 0.5) * kPi / k;
      s += CircularTaylorAt(p / kPi, sll, nbar) * std::cyl_bessel_j(0.0, u * p) * p;
    }
    return s * kPi / k;
  };
  const double peak = transform(0);
  for (int n = 1; n < nbar; ++n) {
    const double zn = sigma * std::sqrt(a * a + (n - 0.5) * (n - 0.5));
    EXPECT_LT(std::abs(transform(zn)) / peak, 1e-6) << "n = " << n;
    // ...and not at the uniform aperture's zero mu_n (the check can fail).
    EXPECT_GT(std::abs(transform(BesselJ1Zeros(n)[n - 1] / kPi)) / peak, 1e-4) << "n = " << n;
  }
  EXPECT_DOUBLE_EQ(CircularTaylorAt(0, sll, nbar), 1.0);
}

// The refined peak of |rE|^2 near r0, by Nelder-Mead in a local chart (exact sums).
Vec3 RefinedPeak(const Array& array, const Eigen::VectorXcd& currents, const Vec3& r0) {
  const PatternProbe probe(array, currents, 1.0);
  const LocalChart chart(r0);
  PlaneSearchOptions o;
  o.initial_step = 0.3 * kDegree;
  o.tolerance = 1e-10;
  o.max_evaluations = 4000;
  const PlaneMinimum m = MinimizeOnPlane(
      [&](double a, double b) { return -probe.DirectivityAt(chart.At(a, b)); }, 0, 0, o);
  return chart.At(m.a, m.b);
}

std::vector<Vec3> Positions(const std::vector<LatticeSite>& sites) {
  std::vector<Vec3> p;
  for (const auto& s : sites) p.push_back(s.position_m);
  return p;
}

// The steered beam peaks at (theta0, phi0) within 0.01 deg where the element pattern
// is stationary there, so only the array factor decides: z dipoles in the
// theta = 90 deg plane (sin(theta) has zero slope), x dipoles on a panel steered in
// the phi = 90 deg plane (1 - sin^2 theta cos^2 phi has zero slope).
TEST(Steering, PeakLandsOnTheSteeringDirection) {
  {
    const auto sites = GenerateLattice(Line(16, 0.5 * kLambda));
    const Array array = ArrayAt(sites, Vec3::UnitZ());
    const Steering st{UnitVectorAt(0.5 * kPi, 50 * kDegree), SteeringMode::kPhase, kF};
    const Vec3 peak = RefinedPeak(array, SteeringPhasorsAt(Positions(sites), st, kF), st.direction);
    EXPECT_LT(AngleBetween(peak, st.direction) / kDegree, 0.01);
  }
  {
    LatticeSpec s;
    s.kind = LatticeKind::kRectangular;
    s.count_x = s.count_y = 12;
    s.spacing_x_m = s.spacing_y_m = 0.5 * kLambda;
    const auto sites = GenerateLattice(s);
    const Array array = ArrayAt(sites, Vec3::UnitX());
    TaperSpec t;
    t.kind = TaperKind::kTaylor;
    const std::vector<double> a = LatticeTaper(t, s, sites);
    const Steering st{UnitVectorAt(25 * kDegree, 90 * kDegree), SteeringMode::kPhase, kF};
    Eigen::VectorXcd c = SteeringPhasorsAt(Positions(sites), st, kF);
    for (Eigen::Index i = 0; i < c.size(); ++i) c[i] *= a[static_cast<std::size_t>(i)];
    const Vec3 peak = RefinedPeak(array, c, st.direction);
    EXPECT_LT(AngleBetween(peak, st.direction) / kDegree, 0.01);
  }
}

// Phase steering squints: at f1 the array factor of a line along x peaks where
// k1 cos(phi1) = k0 cos(phi0). Delay steering does not move. Both through the engine.
TEST(Steering, PhaseSquintsWithFrequencyDelayDoesNot) {
  const auto sites = GenerateLattice(Line(24, 0.5 * kLambda));
  const double phi0 = 60 * kDegree;
  const double f1 = 1.1 * kF;
  const Array array1 = ArrayAt(sites, Vec3::UnitZ(), f1);
  Steering st{UnitVectorAt(0.5 * kPi, phi0), SteeringMode::kPhase, kF};
  const Vec3 squinted =
      RefinedPeak(array1, SteeringPhasorsAt(Positions(sites), st, f1), st.direction);
  const double phi1 = std::acos(std::cos(phi0) * kF / f1);
  EXPECT_NEAR(AnglesOf(squinted).phi_rad / kDegree, phi1 / kDegree, 0.01);
  EXPECT_GT(std::abs(phi1 - phi0) / kDegree, 1.0);  // the squint is real
  st.mode = SteeringMode::kDelay;
  const Vec3 held = RefinedPeak(array1, SteeringPhasorsAt(Positions(sites), st, f1), st.direction);
  EXPECT_LT(AngleBetween(held, st.direction) / kDegree, 0.01);
  // At the design frequency the two modes agree.
  const auto p = SteeringPhasorsAt(Positions(sites), st, kF);
  st.mode = SteeringMode::kPhase;
  EXPECT_LT((p - SteeringPhasorsAt(Positions(sites), st, kF)).cwiseAbs().maxCoeff(), 1e-12);
}

// The array factor |sum I_n exp(j k r . r_n)| at r.
double ArrayFactor(const std::vector<Vec3>& pos, const Eigen::VectorXcd& c, const Vec3& r) {
  const double k = 2 * kPi / kLambda;
  Complex s = 0;
  for (std::size_t n = 0; n < pos.size(); ++n)
    s += c[static_cast<Eigen::Index>(n)] * std::polar(1.0, k * r.dot(pos[n]));
  return std::abs(s);
}

// A line steered to theta0 off broadside has no grating lobe exactly while
// d / lambda < 1 / (1 + |sin theta0|) (the condition for lines; Balanis 4th ed.
// sec. 6.3, from memory). Each reported lobe has the main beam's array factor.
TEST(GratingLobes, LineWarnsExactlyWhenTheConditionSays) {
  for (double scan_deg : {0.0, 20.0, 45.0}) {
    const Vec3 r0 = UnitVectorAt(0.5 * kPi, (90 - scan_deg) * kDegree);  // scan off broadside
    const double limit = 1.0 / (1.0 + std::sin(scan_deg * kDegree));
    for (double ratio : {0.98, 0.999, 1.001, 1.05, 1.6}) {
      const double d = ratio * limit * kLambda;
      const LatticeSpec s = Line(10, d);
      const auto lobes = VisibleGratingLobes(s, r0, kLambda);
      EXPECT_EQ(!lobes.empty(), ratio > 1) << scan_deg << " " << ratio;
      const auto sites = GenerateLattice(s);
      const Steering st{r0, SteeringMode::kPhase, kF};
      const Eigen::VectorXcd c = SteeringPhasorsAt(Positions(sites), st, kF);
      for (const GratingLobe& g : lobes)
        EXPECT_NEAR(ArrayFactor(Positions(sites), c, g.direction), 10.0, 1e-9);
    }
  }
}

TEST(GratingLobes, PanelsAndTheirDirections) {
  LatticeSpec s;
  s.kind = LatticeKind::kRectangular;
  s.count_x = 6;
  s.count_y = 5;
  s.spacing_x_m = 0.6 * kLambda;
  s.spacing_y_m = 0.5 * kLambda;
  // Broadside: none; steered 45 deg in the x-z plane: the x period shows one.
  EXPECT_TRUE(VisibleGratingLobes(s, Vec3::UnitZ(), kLambda).empty());
  const Vec3 r0 = UnitVectorAt(45 * kDegree, 0);
  const auto lobes = VisibleGratingLobes(s, r0, kLambda);
  ASSERT_EQ(lobes.size(), 1u);
  EXPECT_EQ(lobes[0].order_1, -1);
  // A triangular panel of the same pitch: its reciprocal lattice differs, and each
  // lobe it reports has the main beam's array factor (rotated lattice too).
  s.kind = LatticeKind::kTriangular;
  s.spacing_x_m = 1.1 * kLambda;
  s.spacing_y_m = 0.9 * kLambda;
  s.rotation = AxisAngleRotation(Vec3(1, 1, 0), 0.3);
  const auto sites = GenerateLattice(s);
  const Steering st{UnitVectorAt(20 * kDegree, 30 * kDegree), SteeringMode::kPhase, kF};
  const Eigen::VectorXcd c = SteeringPhasorsAt(Positions(sites), st, kF);
  const auto tri = VisibleGratingLobes(s, st.direction, kLambda);
  ASSERT_FALSE(tri.empty());
  for (const GratingLobe& g : tri)
    EXPECT_NEAR(ArrayFactor(Positions(sites), c, g.direction), 30.0, 1e-9);
  // Rings are not periodic.
  s.kind = LatticeKind::kRing;
  s.ring_counts = {8};
  s.ring_radii_m = {3 * kLambda};
  EXPECT_TRUE(VisibleGratingLobes(s, r0, kLambda).empty());
}

}  // namespace
}  // namespace lobecast
