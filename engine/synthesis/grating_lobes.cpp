#include "engine/synthesis/grating_lobes.h"

#include <algorithm>
#include <cmath>

#include <Eigen/Dense>

#include "engine/constants.h"
#include "engine/error.h"

namespace lobecast {
namespace {

// A unit vector perpendicular to a (unit).
Vec3 AnyPerpendicular(const Vec3& a) {
  const Vec3 t = std::abs(a.z()) < 0.9 ? Vec3::UnitZ() : Vec3::UnitX();
  return (t - t.dot(a) * a).normalized();
}

std::vector<GratingLobe> LineLobes(const Vec3& axis, double pitch, const Vec3& r0, double lambda,
                                   double tol) {
  std::vector<GratingLobe> out;
  const double c0 = r0.dot(axis);
  Vec3 perp = r0 - c0 * axis;
  perp = perp.norm() > 1e-12 ? Vec3(perp.normalized()) : AnyPerpendicular(axis);
  const int mmax = static_cast<int>(std::ceil(2.0 * pitch / lambda)) + 1;
  for (int m = -mmax; m <= mmax; ++m) {
    if (m == 0) continue;
    const double c = c0 + m * lambda / pitch;
    if (std::abs(c) > 1.0 + tol) continue;
    const double cc = std::clamp(c, -1.0, 1.0);
    GratingLobe g;
    g.direction = (cc * axis + std::sqrt(1.0 - cc * cc) * perp).normalized();
    g.order_1 = m;
    out.push_back(g);
  }
  return out;
}

}  // namespace

Vec3 BroadsideOf(const LatticeSpec& lattice) {
  if (lattice.kind == LatticeKind::kLine)
    return lattice.rotation * AnyPerpendicular(lattice.axis.normalized());
  return lattice.rotation * Vec3::UnitZ();
}

std::vector<GratingLobe> VisibleGratingLobes(const LatticeSpec& lattice,
                                             const Vec3& steer_direction, double wavelength_m,
                                             double tolerance) {
  if (!(wavelength_m > 0)) throw InvalidArgument("grating lobes need a wavelength > 0");
  // Work in the lattice frame, report in the global one.
  const Vec3 r0 = lattice.rotation.transpose() * steer_direction.normalized();
  std::vector<GratingLobe> out;
  auto to_global = [&](std::vector<GratingLobe> v) {
    for (GratingLobe& g : v) {
      g.direction = lattice.rotation * g.direction;
      const Vec3& d = g.direction;
      g.theta_rad = std::atan2(std::hypot(d.x(), d.y()), d.z());
      g.phi_rad = std::hypot(d.x(), d.y()) > 0 ? std::atan2(d.y(), d.x()) : 0.0;
      if (g.phi_rad < 0) g.phi_rad += 2 * kPi;
    }
    return v;
  };
  switch (lattice.kind) {
    case LatticeKind::kRing:
      return out;
    case LatticeKind::kLine:
      if (lattice.count_x < 2) return out;
      return to_global(
          LineLobes(lattice.axis.normalized(), lattice.spacing_x_m, r0, wavelength_m, tolerance));
    case LatticeKind::kRectangular:
    case LatticeKind::kTriangular:
      break;
  }
  const bool tri = lattice.kind == LatticeKind::kTriangular && lattice.count_y > 1;
  if (!tri) {
    // A single row or column is a line.
    if (lattice.count_y < 2 && lattice.count_x < 2) return out;
    if (lattice.count_y < 2)
      return to_global(LineLobes(Vec3::UnitX(), lattice.spacing_x_m, r0, wavelength_m, tolerance));
    if (lattice.count_x < 2)
      return to_global(LineLobes(Vec3::UnitY(), lattice.spacing_y_m, r0, wavelength_m, tolerance));
  }
  // Basis a1 = (dx, 0), a2 = (tri ? dx/2 : 0, dy); reciprocal b_j with a_i . b_j = delta_ij.
  Eigen::Matrix2d a;
  a << lattice.spacing_x_m, tri ? 0.5 * lattice.spacing_x_m : 0.0, 0.0, lattice.spacing_y_m;
  const Eigen::Matrix2d b = a.inverse().transpose();  // columns b1, b2
  const double longest = std::max(a.col(0).norm(), a.col(1).norm());
  const int nmax = static_cast<int>(std::ceil(2.0 * longest / wavelength_m)) + 1;
  const double side = r0.z() < 0 ? -1.0 : 1.0;
  for (int p = -nmax; p <= nmax; ++p) {
    for (int q = -nmax; q <= nmax; ++q) {
      if (p == 0 && q == 0) continue;
      const Eigen::Vector2d uv = r0.head<2>() + wavelength_m * (p * b.col(0) + q * b.col(1));
      const double s2 = uv.squaredNorm();
      if (s2 > 1.0 + tolerance) continue;
      const double w = side * std::sqrt(std::max(0.0, 1.0 - s2));
      GratingLobe g;
      g.direction = Vec3(uv.x(), uv.y(), w).normalized();
      g.order_1 = p;
      g.order_2 = q;
      out.push_back(g);
    }
  }
  return to_global(out);
}

}  // namespace lobecast
