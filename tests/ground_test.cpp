// PEC ground plane by image theory (engine/ground.h): images, the h -> 0 limit of a
// vertical dipole, handbook resistances at finite height, fields below the plane, and
// rejection of dipoles on or under the plane.
#include "engine/ground.h"

#include <cmath>
#include <vector>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/power/radiated_power.h"
#include "engine/types.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::OneDipoleArray;
using testing::TestRng;

TEST(Ground, ImageReversesHorizontalCurrentAndKeepsVertical) {
  // Image theory over a perfect electric conductor (Balanis 4th ed. sec. 4.7.1, from memory).
  const Dipole d = MakeDipole(Vec3(0.1, -0.2, 0.3), Vec3(1, 2, 3), 0.01, Distribution::kTriangular);
  const Dipole im = ImageOf(d);
  EXPECT_EQ(im.position_m, Vec3(0.1, -0.2, -0.3));
  EXPECT_EQ(im.orientation, Vec3(-d.orientation.x(), -d.orientation.y(), d.orientation.z()));
  // The image carries its dipole's current (the currents are kept apart from the
  // geometry: the source's dipole index says whose).
  EXPECT_EQ(DipoleOfSource(ImageIndexOf(3, 5), 5), 3u);
  EXPECT_EQ(im.length_m, d.length_m);
  EXPECT_EQ(im.distribution, d.distribution);
}

TEST(Ground, RadiatingSourcesListsImagesAfterDipoles) {
  TestRng rng(70);
  const testing::TestArray free = testing::RandomArray(rng, 4, Ground::kNone);
  EXPECT_EQ(RadiatingSources(free).size(), 4u);
  const testing::TestArray pec = testing::RandomArray(rng, 4, Ground::kPec);
  const std::vector<Dipole> s = RadiatingSources(pec);
  ASSERT_EQ(s.size(), 8u);
  for (int i = 0; i < 4; ++i) {
    EXPECT_EQ(s[i].position_m, pec.dipoles[i].position_m);
    EXPECT_EQ(s[i + 4].position_m, ImageOf(pec.dipoles[i]).position_m);
    EXPECT_EQ(s[i + 4].orientation, ImageOf(pec.dipoles[i]).orientation);
  }
  for (std::size_t i = 0; i < 4; ++i) {
    EXPECT_EQ(s[ImageIndexOf(i, 4)].position_m, ImageOf(pec.dipoles[i]).position_m) << i;
    EXPECT_EQ(DipoleOfSource(i, 4), i);
    EXPECT_EQ(DipoleOfSource(ImageIndexOf(i, 4), 4), i);
  }
  EXPECT_FALSE(BelowGround(Ground::kPec, 0.5 * kPi));
  EXPECT_TRUE(BelowGround(Ground::kPec, 0.5 * kPi + 1e-12));
  EXPECT_FALSE(BelowGround(Ground::kNone, kPi));
}

testing::TestArray VerticalOverGround(double height_wavelengths, double length_wavelengths) {
  testing::TestArray a =
      OneDipoleArray(MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 1.0), 1.0, Ground::kPec);
  a.dipoles[0].position_m.z() = height_wavelengths * a.wavelength_m();
  a.dipoles[0].length_m = length_wavelengths * a.wavelength_m();
  return a;
}

TEST(Ground, VerticalDipoleAtZeroHeight) {
  // A vertical Hertzian dipole at h -> 0 over PEC: D = 3 (4.77 dBi) at the horizon and
  // twice the free-space radiation resistance (Balanis 4th ed. sec. 4.7.2, from memory).
  // At h = 1e-6 lambda the corrections are O((2kh)^2) ~ 1e-10.
  const testing::TestArray a = VerticalOverGround(1e-6, 0.01);
  testing::TestArray free = a;
  free.ground = Ground::kNone;
  const double r = ResistanceMatrix(a)(0, 0);
  const double r_free = ResistanceMatrix(free)(0, 0);
  EXPECT_NEAR(r, 2 * r_free, 1e-9 * r);

  const PatternResult p =
      ComputePattern(a, a.currents, AngularGrid::FromRanges({0, 180, 1}, {0, 355, 5}));
  EXPECT_NEAR(p.summary.peak_directivity, 3.0, 3e-9);
  EXPECT_NEAR(p.summary.peak_theta_deg, 90.0, 1e-12);
  EXPECT_NEAR(10 * std::log10(p.summary.peak_directivity), 4.77, 5e-3);
  const std::size_t np = p.grid.phi_deg.size();
  for (std::size_t i = 0; i < p.grid.theta_deg.size(); ++i) {
    const double th = p.grid.theta_deg[i] * kDegree;
    for (std::size_t j = 0; j < np; ++j) {
      // D(theta) = 3 sin^2(theta) above the plane (same limit).
      const double expected = th <= 0.5 * kPi ? 3 * std::sin(th) * std::sin(th) : 0.0;
      EXPECT_NEAR(p.directivity[i * np + j], expected, 3e-9) << "theta " << p.grid.theta_deg[i];
    }
  }
}

TEST(Ground, FieldsBelowThePlaneAreExactlyZero) {
  TestRng rng(71);
  const testing::TestArray a = testing::RandomArray(rng, 10, Ground::kPec);
  const AngularGrid grid = AngularGrid::FromRanges({0, 180, 3}, {0, 357, 3});
  const Directions dirs = Directions::FromGrid(grid);
  const FarField f = FieldPlan(a, dirs).Execute(a.currents);
  int above_nonzero = 0;
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    if (dirs.theta_rad(i) > 0.5 * kPi) {
      EXPECT_EQ(f.e_theta[i], Complex(0.0, 0.0)) << "theta " << dirs.theta_rad(i) / kDegree;
      EXPECT_EQ(f.e_phi[i], Complex(0.0, 0.0)) << "theta " << dirs.theta_rad(i) / kDegree;
    } else if (std::abs(f.e_theta[i]) + std::abs(f.e_phi[i]) > 0) {
      ++above_nonzero;
    }
  }
  EXPECT_GT(above_nonzero, 0);
  const PatternResult p = ComputePattern(a, a.currents, grid);
  for (std::size_t i = 0; i < dirs.size(); ++i)
    if (dirs.theta_rad(i) > 0.5 * kPi) {
      EXPECT_EQ(p.intensity_w_sr[i], 0.0);
      EXPECT_EQ(p.directivity[i], 0.0);
    }
}

TEST(Ground, UpperHalfSpaceIsDipolesPlusImagesInFreeSpace) {
  // Image theory (Balanis 4th ed. sec. 4.7.1, from memory): above the plane the field is
  // that of the dipoles and their images in free space, and the power is half theirs.
  TestRng rng(72);
  const testing::TestArray a = testing::RandomArray(rng, 12, Ground::kPec);
  Array both;
  both.frequency_hz = a.frequency_hz;
  both.dipoles = RadiatingSources(a);
  Eigen::VectorXcd i2(24);
  i2 << a.currents, a.currents;
  const Directions dirs = Directions::FromGrid(AngularGrid::FromRanges({0, 90, 3}, {0, 357, 3}));
  const FarField fg = FieldPlan(a, dirs).Execute(a.currents);
  const FarField ff = FieldPlan(both, dirs).Execute(i2);
  EXPECT_LE(testing::MaxFieldDifference(fg, ff), 1e-13 * testing::Magnitude(ff).maxCoeff());
  const double pg = RadiatedPower(ResistanceMatrix(a), a.currents);
  const double pf = RadiatedPower(ResistanceMatrix(both), i2);
  EXPECT_NEAR(pg, 0.5 * pf, 1e-12 * pg);
}

TEST(Ground, VerticalDipoleResistanceVersusHeight) {
  // Vertical infinitesimal dipole at height h over PEC (Balanis 4th ed. sec. 4.7.2,
  // equation from memory), x = 2kh:
  //   R = 2 pi eta (l/lambda)^2 [1/3 - cos(x)/x^2 + sin(x)/x^3]
  for (double h : {0.05, 0.1, 0.25, 0.5, 1.0, 3.7}) {
    const testing::TestArray a = VerticalOverGround(h, 0.01);
    const double x = 2 * 2 * kPi * h;
    const double expected =
        2 * kPi * kEta0_ohm * 1e-4 * (1.0 / 3 - std::cos(x) / (x * x) + std::sin(x) / (x * x * x));
    EXPECT_NEAR(ResistanceMatrix(a)(0, 0), expected, 1e-12 * expected) << "h = " << h;
  }
}

TEST(Ground, HorizontalDipoleResistanceVersusHeight) {
  // Horizontal infinitesimal dipole at height h over PEC (Balanis 4th ed. sec. 4.7.5,
  // equation from memory), x = 2kh:
  //   R = pi eta (l/lambda)^2 [2/3 - sin(x)/x - cos(x)/x^2 + sin(x)/x^3]
  for (double h : {0.05, 0.1, 0.25, 0.5, 1.0, 3.7}) {
    testing::TestArray a = VerticalOverGround(h, 0.01);
    a.dipoles[0].orientation = Vec3(std::cos(0.4), std::sin(0.4), 0.0);
    const double x = 2 * 2 * kPi * h;
    const double expected =
        kPi * kEta0_ohm * 1e-4 *
        (2.0 / 3 - std::sin(x) / x - std::cos(x) / (x * x) + std::sin(x) / (x * x * x));
    EXPECT_NEAR(ResistanceMatrix(a)(0, 0), expected, 1e-12 * expected) << "h = " << h;
  }
}

TEST(Ground, RejectsDipolesOnOrBelowThePlane) {
  const Directions dirs = Directions::FromGrid(AngularGrid::FromRanges({0, 180, 10}, {0, 350, 10}));
  const AngularGrid grid = AngularGrid::FromRanges({0, 180, 10}, {0, 350, 10});
  for (double z : {0.0, -0.0, -1e-9, -0.2}) {
    testing::TestArray a = VerticalOverGround(0.1, 0.01);
    a.Add(Vec3(0.3, 0.0, z), Vec3::UnitX(), 0.01, 1.0);
    EXPECT_THROW(Validate(a), InvalidArgument) << "z = " << z;
    EXPECT_THROW(FieldPlan(a, dirs), InvalidArgument) << "z = " << z;
    EXPECT_THROW(ComputePattern(a, a.currents, grid), InvalidArgument) << "z = " << z;
    a.ground = Ground::kNone;  // the same array is fine in free space
    EXPECT_NO_THROW(Validate(a)) << "z = " << z;
  }
}

TEST(Ground, Names) {
  EXPECT_EQ(GroundFromString("PEC"), Ground::kPec);
  EXPECT_EQ(GroundFromString("none"), Ground::kNone);
  EXPECT_FALSE(GroundFromString("soil").has_value());
  for (Ground g : {Ground::kNone, Ground::kPec}) EXPECT_EQ(GroundFromString(ToString(g)), g);
  EXPECT_EQ(DistributionFromString("Triangular"), Distribution::kTriangular);
  EXPECT_EQ(DistributionFromString("uniform"), Distribution::kUniform);
  EXPECT_FALSE(DistributionFromString("cosine").has_value());
}

}  // namespace
}  // namespace lobecast
