// Polarization of a far-field phasor (engine/polarization.h): definitions against an
// independent description of the traced ellipse, the turnstile's circular sense, and
// Ludwig-3 cross-polarization of a short dipole.
#include "engine/polarization.h"

#include <cmath>
#include <complex>
#include <limits>
#include <vector>

#include <gtest/gtest.h>

#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/types.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::TestRng;

constexpr Complex kJ(0.0, 1.0);

// The ellipse traced by v(t) = Re[(Et theta_hat + Ep phi_hat) exp(j w t)], described
// without E_R / E_L or Stokes parameters: |v|^2 = (|E|^2 + Re(E.E exp(2 j w t)))/2
// with the unconjugated E.E = Et^2 + Ep^2, so the squared semi-axes are
// (|E|^2 +- |E.E|)/2; the major axis is v at 2 w t = -arg(E.E); and v x dv/dt along
// r_hat is -w Im(conj(Et) Ep), positive (counter-clockwise about r_hat) for right-hand
// in IEEE Std 145-2013. Elementary algebra, derived here.
struct Ellipse {
  double axial_ratio;  // major / minor, >= 1
  double tilt_deg;     // major axis from theta_hat toward phi_hat, (-90, 90]
  int sense;
};

Ellipse EllipseOf(Complex et, Complex ep) {
  const double e2 = std::norm(et) + std::norm(ep);
  const Complex ee = et * et + ep * ep;
  const double major2 = 0.5 * (e2 + std::abs(ee)), minor2 = 0.5 * (e2 - std::abs(ee));
  const double wt = -0.5 * std::arg(ee);
  const Complex rot = std::exp(kJ * wt);
  double tilt = std::atan2((ep * rot).real(), (et * rot).real()) / kDegree;
  if (tilt <= -90) tilt += 180;
  if (tilt > 90) tilt -= 180;
  const double turn = -(std::conj(et) * ep).imag();
  return {std::sqrt(major2 / minor2), tilt, turn > 0 ? 1 : (turn < 0 ? -1 : 0)};
}

TEST(Polarization, CircularComponentsFollowTheConvention) {
  // E_R = (Et + j Ep)/sqrt2, E_L = (Et - j Ep)/sqrt2 (IEEE Std 145-2013 with exp(+jwt);
  // RHCP unit vector (theta_hat - j phi_hat)/sqrt2, CONVENTIONS §2).
  TestRng rng(3);
  for (int i = 0; i < 200; ++i) {
    const Complex et = rng.Phasor(0, 3), ep = rng.Phasor(0, 3);
    const Polarization p = PolarizationOf(et, ep);
    const double s = std::abs(et) + std::abs(ep);
    EXPECT_LE(std::abs(p.e_right - (et + kJ * ep) / std::sqrt(2.0)), 1e-15 * s);
    EXPECT_LE(std::abs(p.e_left - (et - kJ * ep) / std::sqrt(2.0)), 1e-15 * s);
  }
  // The RHCP unit vector itself is pure right-hand.
  const Polarization r = PolarizationOf(1.0 / std::sqrt(2.0), -kJ / std::sqrt(2.0));
  EXPECT_NEAR(std::abs(r.e_right), 1.0, 1e-15);
  EXPECT_LE(std::abs(r.e_left), 1e-15);
  EXPECT_EQ(r.sense, 1);
}

TEST(Polarization, StokesParameters) {
  TestRng rng(4);
  for (int i = 0; i < 200; ++i) {
    const Complex et = rng.Phasor(0, 3), ep = rng.Phasor(0, 3);
    const Polarization p = PolarizationOf(et, ep);
    const double s0 = std::norm(et) + std::norm(ep);
    EXPECT_NEAR(p.s0, s0, 1e-15 * s0);
    EXPECT_NEAR(p.s1, std::norm(et) - std::norm(ep), 1e-14 * s0);
    EXPECT_NEAR(p.s2, 2 * (et * std::conj(ep)).real(), 1e-14 * s0);
    // A fully polarized wave: s0^2 = s1^2 + s2^2 + s3^2 (Stokes; e.g. Born & Wolf,
    // Principles of Optics, 7th ed., 1999, sec. 1.4.2, section from memory).
    EXPECT_NEAR(p.s0 * p.s0, p.s1 * p.s1 + p.s2 * p.s2 + p.s3 * p.s3, 1e-13 * s0 * s0);
  }
}

TEST(Polarization, S3IsPositiveForRightHand) {
  // polarization.h: s3 = |E_R|^2 - |E_L|^2, positive for right-hand (the IEEE Std
  // 145-2013 sense of CONVENTIONS §2). The RHCP unit vector (theta_hat - j phi_hat)/sqrt2
  // has E_R = 1, E_L = 0, so s3 = +1. Note |E_R|^2 - |E_L|^2 = +2 Im(Et Ep*).
  const Polarization r = PolarizationOf(1.0 / std::sqrt(2.0), -kJ / std::sqrt(2.0));
  EXPECT_NEAR(r.s3, 1.0, 1e-15);
  const Polarization l = PolarizationOf(1.0 / std::sqrt(2.0), kJ / std::sqrt(2.0));
  EXPECT_NEAR(l.s3, -1.0, 1e-15);
  TestRng rng(41);
  for (int i = 0; i < 200 && !HasFailure(); ++i) {
    const Complex et = rng.Phasor(0, 3), ep = rng.Phasor(0, 3);
    const Polarization p = PolarizationOf(et, ep);
    const double s0 = std::norm(et) + std::norm(ep);
    EXPECT_NEAR(p.s3, std::norm(p.e_right) - std::norm(p.e_left), 1e-14 * s0) << et << " " << ep;
    EXPECT_EQ(p.s3 > 0, p.sense == 1) << et << " " << ep;
  }
}

TEST(Polarization, AxialRatioTiltAndSenseMatchTheTracedEllipse) {
  TestRng rng(5);
  for (int i = 0; i < 500; ++i) {
    const Complex et = rng.Phasor(0.01, 3), ep = rng.Phasor(0.01, 3);
    const Polarization p = PolarizationOf(et, ep);
    const Ellipse e = EllipseOf(et, ep);
    // AR from its definition (|E_R| + |E_L|)/||E_R| - |E_L|| (IEEE Std 145-2013, CONVENTIONS §2).
    const double ar_def = (std::abs(p.e_right) + std::abs(p.e_left)) /
                          std::abs(std::abs(p.e_right) - std::abs(p.e_left));
    if (e.axial_ratio > 100) continue;  // near linear the ellipse route loses digits (~eps AR^2)
    EXPECT_NEAR(p.axial_ratio_db, 20 * std::log10(e.axial_ratio), 1e-9) << et << " " << ep;
    EXPECT_NEAR(p.axial_ratio_db, 20 * std::log10(ar_def), 1e-9) << et << " " << ep;
    EXPECT_EQ(p.sense, e.sense) << et << " " << ep;
    if (e.axial_ratio < 1.001) continue;  // tilt is ill-conditioned near circular
    double dt = p.tilt_deg - e.tilt_deg;
    if (dt > 90) dt -= 180;
    if (dt < -90) dt += 180;
    EXPECT_NEAR(dt, 0.0, 1e-6) << et << " " << ep;
    EXPECT_GT(p.tilt_deg, -90.0);
    EXPECT_LE(p.tilt_deg, 90.0);
  }
  // An ellipse with axes 2 (along theta_hat) and 1: AR = 2 (6.0206 dB), tilt 0, and
  // Ep = +j turns theta_hat toward -phi_hat, clockwise about r_hat: left-hand.
  const Polarization p = PolarizationOf(2.0, kJ);
  EXPECT_NEAR(p.axial_ratio_db, 20 * std::log10(2.0), 1e-12);
  EXPECT_NEAR(p.tilt_deg, 0.0, 1e-12);
  EXPECT_EQ(p.sense, -1);
}

TEST(Polarization, TiltOfLinearFields) {
  // tau = 1/2 atan2(S2, S1) in (-90, 90] (CONVENTIONS §2). Pure E_phi must be +90 for any
  // phase (a signed zero in S2 must not turn it into -90).
  for (Complex c : {Complex(1, 0), Complex(-1, 0), Complex(0, 1), Complex(0, -1),
                    Complex(-0.3, -0.4), Complex(2, -5)}) {
    const Polarization phi_only = PolarizationOf(Complex(0, 0), c);
    EXPECT_DOUBLE_EQ(phi_only.tilt_deg, 90.0) << c;
    const Polarization phi_neg_zero = PolarizationOf(Complex(-0.0, -0.0), c);
    EXPECT_DOUBLE_EQ(phi_neg_zero.tilt_deg, 90.0) << c;
    const Polarization theta_only = PolarizationOf(c, Complex(0, 0));
    EXPECT_NEAR(theta_only.tilt_deg, 0.0, 1e-12) << c;
    EXPECT_NEAR(PolarizationOf(c, c).tilt_deg, 45.0, 1e-12) << c;
    EXPECT_NEAR(PolarizationOf(c, -c).tilt_deg, -45.0, 1e-12) << c;
    for (const Polarization& p : {phi_only, theta_only}) {
      EXPECT_TRUE(std::isinf(p.axial_ratio_db) && p.axial_ratio_db > 0) << p.axial_ratio_db;
      EXPECT_EQ(p.sense, 0);
    }
  }
}

TEST(Polarization, ZeroField) {
  const Polarization p = PolarizationOf(0.0, 0.0);
  EXPECT_TRUE(std::isnan(p.axial_ratio_db));
  EXPECT_TRUE(std::isnan(p.tilt_deg));
  EXPECT_EQ(p.sense, 0);
  EXPECT_EQ(p.s0, 0.0);
}

// Two crossed x and y dipoles at one point, y current = y_current.
FarField TurnstileField(Complex y_current, const Directions& dirs) {
  testing::TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  a.Add(Vec3::Zero(), Vec3::UnitX(), 0.005, 1.0);
  a.Add(Vec3::Zero(), Vec3::UnitY(), 0.005, y_current);
  return FieldPlan(a, dirs).Execute(a.currents);
}

TEST(Polarization, TurnstileIsCircularOnAxisAndLinearInThePlane) {
  // Currents x: 1, y: -j, i.e. x cos(wt) + y sin(wt), turning from x to y:
  // counter-clockwise about +z, so right-hand toward +z and left-hand toward -z
  // (IEEE Std 145-2013 with exp(+jwt)). With +j the senses swap.
  std::vector<double> theta = {0.0, kPi}, phi = {0.0, 0.0};
  for (double p = 0; p < 360; p += 22.5) {
    theta.push_back(0.5 * kPi);
    phi.push_back(p * kDegree);
  }
  const Directions dirs = Directions::FromAngles(theta, phi);
  for (int s : {+1, -1}) {
    const FarField f = TurnstileField(Complex(0, -s), dirs);
    const Polarization up = PolarizationOf(f.e_theta[0], f.e_phi[0]);
    EXPECT_NEAR(up.axial_ratio_db, 0.0, 1e-9);
    EXPECT_EQ(up.sense, s);
    const Polarization down = PolarizationOf(f.e_theta[1], f.e_phi[1]);
    EXPECT_NEAR(down.axial_ratio_db, 0.0, 1e-9);
    EXPECT_EQ(down.sense, -s);
    for (std::size_t i = 2; i < dirs.size(); ++i) {
      // In the xy plane only E_phi survives: linear.
      const Polarization p = PolarizationOf(f.e_theta[i], f.e_phi[i]);
      EXPECT_GT(p.axial_ratio_db, 200.0) << "phi = " << dirs.phi_rad(i) / kDegree;
      EXPECT_EQ(p.sense, 0) << "phi = " << dirs.phi_rad(i) / kDegree;
    }
  }
}

TEST(Polarization, LudwigThirdCrossPolarOfAnXDipole) {
  // Ludwig's third definition (A. C. Ludwig, IEEE Trans. AP-21, 1973) with an x
  // reference: an x-directed short dipole has no cross-polarization in the phi = 0 and
  // phi = 90 deg planes. Its field rE = -C(cos(th)cos(ph) theta_hat - sin(ph) phi_hat)
  // (Balanis 4th ed. sec. 4.2, rotated) gives cross = C sin(ph)cos(ph)(1 - cos(th))
  // elsewhere and co = -C(cos(th)cos^2(ph) + sin^2(ph)) (derived here from the definition).
  testing::TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  a.Add(Vec3::Zero(), Vec3::UnitX(), 0.005, 1.0);
  std::vector<double> theta, phi;
  for (double ph : {0.0, 90.0, 180.0, 270.0})
    for (double th = 0; th <= 180; th += 5) {
      theta.push_back(th * kDegree);
      phi.push_back(ph * kDegree);
    }
  const Directions dirs = Directions::FromAngles(theta, phi);
  const FarField f = FieldPlan(a, dirs).Execute(a.currents);
  double co_max = 0;
  for (std::size_t i = 0; i < dirs.size(); ++i)
    co_max = std::max(co_max, std::abs(CoCrossOf(f.e_theta[i], f.e_phi[i], dirs.phi_rad(i),
                                                 PolarizationReference::kLinearX)
                                           .co));
  ASSERT_GT(co_max, 0);
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    const CoCross cc =
        CoCrossOf(f.e_theta[i], f.e_phi[i], dirs.phi_rad(i), PolarizationReference::kLinearX);
    EXPECT_LE(std::abs(cc.cross), 1e-12 * co_max)
        << "theta " << dirs.theta_rad(i) / kDegree << " phi " << dirs.phi_rad(i) / kDegree;
  }
  // Off the principal planes the cross-polarization is there: phi = 45, theta = 60.
  const double th = 60 * kDegree, ph = 45 * kDegree;
  const FarField g = FieldPlan(a, Directions::FromAngles({th}, {ph})).Execute(a.currents);
  const CoCross cc = CoCrossOf(g.e_theta[0], g.e_phi[0], ph, PolarizationReference::kLinearX);
  const Complex c = kJ * kEta0_ohm * a.wavenumber_rad_m() * 0.005 / (4 * kPi);
  EXPECT_GT(std::abs(cc.cross), 0.1 * co_max);
  EXPECT_LE(std::abs(cc.cross - c * std::sin(ph) * std::cos(ph) * (1 - std::cos(th))),
            1e-13 * std::abs(c));
  EXPECT_LE(std::abs(cc.co + c * (std::cos(th) * std::cos(ph) * std::cos(ph) +
                                  std::sin(ph) * std::sin(ph))),
            1e-13 * std::abs(c));
  // The y reference swaps the two (polarization.h).
  const CoCross yy = CoCrossOf(g.e_theta[0], g.e_phi[0], ph, PolarizationReference::kLinearY);
  EXPECT_LE(std::abs(yy.co - cc.cross), 1e-15 * std::abs(c));
  EXPECT_LE(std::abs(yy.cross - cc.co), 1e-15 * std::abs(c));
}

TEST(Polarization, CircularReferences) {
  TestRng rng(6);
  for (int i = 0; i < 50; ++i) {
    const Complex et = rng.Phasor(0, 2), ep = rng.Phasor(0, 2);
    const double phi = rng.Uniform(-kPi, kPi);
    const Polarization p = PolarizationOf(et, ep);
    const CoCross r = CoCrossOf(et, ep, phi, PolarizationReference::kRightCircular);
    const CoCross l = CoCrossOf(et, ep, phi, PolarizationReference::kLeftCircular);
    EXPECT_LE(std::abs(r.co - p.e_right), 1e-15 * 4);
    EXPECT_LE(std::abs(r.cross - p.e_left), 1e-15 * 4);
    EXPECT_LE(std::abs(l.co - p.e_left), 1e-15 * 4);
    EXPECT_LE(std::abs(l.cross - p.e_right), 1e-15 * 4);
  }
}

TEST(Polarization, ReferenceNames) {
  EXPECT_EQ(PolarizationReferenceFromString("x"), PolarizationReference::kLinearX);
  EXPECT_EQ(PolarizationReferenceFromString("Y"), PolarizationReference::kLinearY);
  EXPECT_EQ(PolarizationReferenceFromString("RHCP"), PolarizationReference::kRightCircular);
  EXPECT_EQ(PolarizationReferenceFromString("lhcp"), PolarizationReference::kLeftCircular);
  EXPECT_EQ(PolarizationReferenceFromString("Theta"), PolarizationReference::kTheta);
  EXPECT_EQ(PolarizationReferenceFromString("phi"), PolarizationReference::kPhi);
  EXPECT_FALSE(PolarizationReferenceFromString("z").has_value());
  for (auto r : kAllPolarizationReferences)
    EXPECT_EQ(PolarizationReferenceFromString(ToString(r)), r);
}

TEST(Polarization, ThetaAndPhiReferences) {
  // CONVENTIONS §2: "theta": co = E_theta, cross = E_phi; "phi": the reverse, whatever phi.
  const Complex et(0.3, -1.2), ep(-0.7, 0.4);
  for (const double phi : {0.0, 0.7, 2.5}) {
    const CoCross t = CoCrossOf(et, ep, phi, PolarizationReference::kTheta);
    const CoCross p = CoCrossOf(et, ep, phi, PolarizationReference::kPhi);
    EXPECT_EQ(t.co, et);
    EXPECT_EQ(t.cross, ep);
    EXPECT_EQ(p.co, ep);
    EXPECT_EQ(p.cross, et);
  }
}

}  // namespace
}  // namespace lobecast
