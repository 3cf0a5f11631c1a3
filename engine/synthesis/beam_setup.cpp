#include "engine/synthesis/beam_setup.h"

#include <algorithm>
#include <cmath>

#include <Eigen/Eigenvalues>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/synthesis/grating_lobes.h"

namespace lobecast {

Direction ToDirection(const Vec3& r) {
  return {std::acos(std::clamp(r.z(), -1.0, 1.0)), std::atan2(r.y(), r.x())};
}

Vec3 UnsteeredBeam(const LatticeSpec& lattice, const Vec3& element) {
  if (lattice.kind != LatticeKind::kLine) return BroadsideOf(lattice);
  Vec3 b = (lattice.rotation * lattice.axis).normalized().cross(element);
  if (!(b.norm() > 1e-9)) return BroadsideOf(lattice);
  b.normalize();
  Eigen::Index i = 0;
  b.cwiseAbs().maxCoeff(&i);
  return b[i] < 0 ? Vec3(-b) : b;
}

PolarizationVector ElementPolarization(const Vec3& u, const Direction& beam) {
  const double a = u.dot(ThetaHatAt(beam.theta_rad, beam.phi_rad));
  const double b = u.dot(PhiHatAt(beam.phi_rad));
  const double n = std::hypot(a, b);
  if (!(n > 1e-12)) {
    throw InvalidArgument(
        "the beam direction lies along the elements' axis, where they radiate nothing");
  }
  return {a / n, b / n};
}

Eigen::Matrix3d PositionCovariance(const std::vector<Vec3>& positions) {
  Vec3 mean = Vec3::Zero();
  for (const Vec3& p : positions) mean += p;
  mean /= static_cast<double>(positions.size());
  Eigen::Matrix3d c = Eigen::Matrix3d::Zero();
  for (const Vec3& p : positions) c += (p - mean) * (p - mean).transpose();
  return c / static_cast<double>(positions.size());
}

SideLobeSamples SampleSideLobes(const Array& array, const Direction& beam,
                                double main_beam_factor) {
  std::vector<Vec3> positions;
  for (const Dipole& d : array.dipoles) positions.push_back(d.position_m);
  const Eigen::Matrix3d c = PositionCovariance(positions);
  const double k = array.wavenumber_rad_m();
  const double spread_max =
      k * std::sqrt(std::max(
              Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d>(c).eigenvalues().maxCoeff(), 0.0));
  const double theta_max = array.ground == Ground::kPec ? kPi / 2 : kPi;
  // A quarter of the first-null radius of the widest aperture, then as coarse as the
  // sample budget needs (about 2 pi / step^2 directions on the sphere).
  double step = std::min(2.0 * kDegree, 0.25 * kFirstNullSpread / std::max(spread_max, 1e-9));
  step = std::max(step, std::sqrt(4.0 * theta_max / kMaxEnvelopeSamples));
  const Vec3 s0 = UnitVectorAt(beam.theta_rad, beam.phi_rad);
  const double free_spread = main_beam_factor * kFirstNullSpread / k;
  SideLobeSamples out;
  std::vector<double> th, ph;
  const int rings = static_cast<int>(std::ceil(theta_max / step));
  for (int i = 0; i <= rings; ++i) {
    const double t = theta_max * i / rings;
    const int n_phi = std::max(1, static_cast<int>(std::ceil(2 * kPi * std::sin(t) / step)));
    for (int j = 0; j < n_phi; ++j) {
      const double p = 2 * kPi * j / n_phi;
      const Vec3 d = UnitVectorAt(t, p) - s0;
      if (std::sqrt(std::max(d.dot(c * d), 0.0)) < free_spread) continue;
      th.push_back(t);
      ph.push_back(p);
      out.theta_deg.push_back(t / kDegree);
      out.phi_deg.push_back(p / kDegree);
    }
  }
  out.directions = Directions::FromAngles(th, ph);
  return out;
}

}  // namespace lobecast
