// Radiation intensity and directivity of a far field (engine/intensity.h).
#include "engine/intensity.h"

#include <cmath>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/power/radiated_power.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

TEST(Intensity, PlaneWaveIntensityIsPowerDensityTimesRSquared) {
  // A field of peak amplitude E carries |E|^2 / (2 eta0) W/m^2 (time average of a
  // plane wave, Balanis, Antenna Theory, 4th ed., sec. 2.3, from memory); with rE in
  // V the same expression is W/sr.
  EXPECT_DOUBLE_EQ(RadiationIntensity(Complex(3.0, 4.0), 0.0), 25.0 / (2.0 * kEta0_ohm));
  EXPECT_DOUBLE_EQ(RadiationIntensity(0.0, Complex(0.0, -5.0)), 25.0 / (2.0 * kEta0_ohm));
  EXPECT_DOUBLE_EQ(RadiationIntensity(Complex(1.0, 1.0), Complex(2.0, 0.0)),
                   6.0 / (2.0 * kEta0_ohm));
}

TEST(Intensity, ShortDipoleBroadsideDirectivityIsOneAndAHalf) {
  // Hertzian dipole: D = 1.5 sin^2(theta) (Balanis, 4th ed., sec. 4.2, from memory).
  const testing::TestArray a = testing::OneDipoleArray(
      testing::MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.001), Complex(1.0, 0.0));
  const double p = RadiatedPower(ResistanceMatrix(a), a.currents);
  const FarField f = FieldPlan(a, Directions::FromAngles({0.5 * kPi, kPi / 6.0}, {0.3, 1.0}),
                               testing::DirectMethod())
                         .Execute(a.currents);
  const double d90 = DirectivityPerIntensity(p) * RadiationIntensity(f.e_theta[0], f.e_phi[0]);
  const double d30 = DirectivityPerIntensity(p) * RadiationIntensity(f.e_theta[1], f.e_phi[1]);
  EXPECT_NEAR(d90, 1.5, 1e-12);
  EXPECT_NEAR(d30, 1.5 * 0.25, 1e-12);
}

TEST(Intensity, ComponentDirectivitiesAddUpToTheTotal) {
  const double p = 0.37;
  const Complex et(0.2, -1.1), ep(-0.4, 0.05);
  const double total = DirectivityPerIntensity(p) * RadiationIntensity(et, ep);
  const double parts =
      DirectivityPerSquaredField(p) * std::norm(et) + DirectivityPerSquaredField(p) * std::norm(ep);
  EXPECT_NEAR(parts, total, 1e-15 * total);
}

}  // namespace
}  // namespace lobecast
