#include "engine/synthesis/lattice_generator.h"

#include <algorithm>
#include <cmath>
#include <string>

#include <Eigen/Geometry>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/text_case.h"

namespace lobecast {

std::string_view ToString(LatticeKind k) {
  switch (k) {
    case LatticeKind::kLine:
      return "line";
    case LatticeKind::kRectangular:
      return "rectangular";
    case LatticeKind::kTriangular:
      return "triangular";
    case LatticeKind::kRing:
      return "ring";
  }
  return "?";
}

std::optional<LatticeKind> LatticeKindFromString(std::string_view s) {
  for (LatticeKind k : {LatticeKind::kLine, LatticeKind::kRectangular, LatticeKind::kTriangular,
                        LatticeKind::kRing}) {
    if (EqualsIgnoreCase(s, ToString(k))) return k;
  }
  return std::nullopt;
}

std::size_t LatticeSpec::GeneratedCount() const {
  switch (kind) {
    case LatticeKind::kLine:
      return static_cast<std::size_t>(std::max(count_x, 0));
    case LatticeKind::kRectangular:
    case LatticeKind::kTriangular:
      return static_cast<std::size_t>(std::max(count_x, 0)) *
             static_cast<std::size_t>(std::max(count_y, 0));
    case LatticeKind::kRing: {
      std::size_t n = 0;
      for (int c : ring_counts) n += static_cast<std::size_t>(std::max(c, 0));
      return n;
    }
  }
  return 0;
}

Eigen::Matrix3d AxisAngleRotation(const Vec3& axis, double angle_rad) {
  if (!(axis.stableNorm() > 0.0)) throw InvalidArgument("rotation axis is the zero vector");
  return Eigen::AngleAxisd(angle_rad, axis / axis.stableNorm()).toRotationMatrix();
}

namespace {

void RequireSpacing(double d, const char* what) {
  if (!(d > 0.0) || !std::isfinite(d))
    throw InvalidArgument(std::string(what) + " must be finite and > 0");
}

// Positions -(n-1)/2 .. (n-1)/2 times the pitch.
double Centred(int i, int n, double pitch) { return (i - 0.5 * (n - 1)) * pitch; }

}  // namespace

std::vector<LatticeSite> GenerateLattice(const LatticeSpec& spec) {
  const Eigen::Matrix3d should_be_identity = spec.rotation.transpose() * spec.rotation;
  if (!((should_be_identity - Eigen::Matrix3d::Identity()).cwiseAbs().maxCoeff() < 1e-9) ||
      !(spec.rotation.determinant() > 0))
    throw InvalidArgument("lattice rotation is not a proper rotation");

  std::vector<LatticeSite> all;
  auto add = [&](int ix, int iy, const Vec3& local) {
    LatticeSite s;
    s.index = all.size();
    s.ix = ix;
    s.iy = iy;
    s.local_m = local;
    s.position_m = spec.center_m + spec.rotation * local;
    all.push_back(s);
  };
  switch (spec.kind) {
    case LatticeKind::kLine: {
      if (spec.count_x < 1) throw InvalidArgument("line count must be >= 1");
      if (spec.count_x > 1) RequireSpacing(spec.spacing_x_m, "line spacing");
      const Vec3 a = spec.axis.normalized();
      for (int i = 0; i < spec.count_x; ++i)
        add(i, 0, a * Centred(i, spec.count_x, spec.spacing_x_m));
      break;
    }
    case LatticeKind::kRectangular:
    case LatticeKind::kTriangular: {
      if (spec.count_x < 1 || spec.count_y < 1) throw InvalidArgument("panel counts must be >= 1");
      if (spec.count_x > 1 || spec.kind == LatticeKind::kTriangular)
        RequireSpacing(spec.spacing_x_m, "panel spacing in x");
      if (spec.count_y > 1) RequireSpacing(spec.spacing_y_m, "panel spacing in y");
      const bool tri = spec.kind == LatticeKind::kTriangular && spec.count_y > 1;
      for (int j = 0; j < spec.count_y; ++j) {
        const double shift = tri ? (j % 2 == 0 ? -0.25 : 0.25) * spec.spacing_x_m : 0.0;
        for (int i = 0; i < spec.count_x; ++i) {
          add(i, j,
              Vec3(Centred(i, spec.count_x, spec.spacing_x_m) + shift,
                   Centred(j, spec.count_y, spec.spacing_y_m), 0.0));
        }
      }
      break;
    }
    case LatticeKind::kRing: {
      if (spec.ring_counts.empty() || spec.ring_counts.size() != spec.ring_radii_m.size())
        throw InvalidArgument("a ring lattice needs one count per radius");
      for (std::size_t r = 0; r < spec.ring_counts.size(); ++r) {
        const int n = spec.ring_counts[r];
        const double radius = spec.ring_radii_m[r];
        if (n < 1) throw InvalidArgument("ring counts must be >= 1");
        RequireSpacing(radius, "ring radius");
        if (r > 0 && !(radius > spec.ring_radii_m[r - 1]))
          throw InvalidArgument("ring radii must increase");
        for (int i = 0; i < n; ++i) {
          const double a = 2.0 * kPi * i / n;
          add(i, static_cast<int>(r), Vec3(radius * std::cos(a), radius * std::sin(a), 0.0));
        }
      }
      break;
    }
  }

  std::vector<bool> drop(all.size(), false);
  for (std::size_t i : spec.removed) {
    if (i >= all.size())
      throw InvalidArgument("removed element " + std::to_string(i) + " is beyond the lattice's " +
                            std::to_string(all.size()) + " elements");
    if (drop[i]) throw InvalidArgument("element " + std::to_string(i) + " is removed twice");
    drop[i] = true;
  }
  std::vector<LatticeSite> out;
  out.reserve(all.size());
  for (const LatticeSite& s : all)
    if (!drop[s.index]) out.push_back(s);
  if (out.empty()) throw InvalidArgument("every element of the lattice is removed");
  return out;
}

}  // namespace lobecast
