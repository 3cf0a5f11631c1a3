// Shared helpers for the engine tests: a seeded random generator whose output does
// not depend on the standard library's distributions, random dipole arrays, and an
// independent quadrature of the radiation intensity over the sphere (the cross-check
// of the closed-form power, CONVENTIONS §1).
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <random>
#include <vector>

#include <Eigen/Core>
#include <Eigen/Geometry>

#include "engine/constants.h"
#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/ground.h"
#include "engine/types.h"

namespace lobecast::testing {

// The frequency the tests use unless they say otherwise (the example in CONVENTIONS §3).
inline constexpr double kTestFrequency_hz = 433.92e6;
inline double TestWavelength_m() { return kSpeedOfLight_m_s / kTestFrequency_hz; }

// Angle between two directions given in degrees, deg.
inline double Separation_deg(double t1, double p1, double t2, double p2) {
  const Vec3 a(std::sin(t1 * kDegree) * std::cos(p1 * kDegree),
               std::sin(t1 * kDegree) * std::sin(p1 * kDegree), std::cos(t1 * kDegree));
  const Vec3 b(std::sin(t2 * kDegree) * std::cos(p2 * kDegree),
               std::sin(t2 * kDegree) * std::sin(p2 * kDegree), std::cos(t2 * kDegree));
  return std::atan2(a.cross(b).norm(), a.dot(b)) / kDegree;
}

// |AF|^2 / N^2 of a uniform line, u = k d cos(angle from the line axis) + phase step
// (the closed form, Balanis 4th ed. ch. 6, from memory).
inline double UniformFactor(int n, double u) {
  const double s = std::sin(0.5 * u);
  if (std::abs(s) < 1e-300) return 1.0;
  const double r = std::sin(0.5 * n * u) / (n * s);
  return r * r;
}

// The exact direct sum (far_field.h), for checks tighter than the fast path's tolerance.
inline FieldOptions DirectMethod(int num_threads = 0) {
  FieldOptions o;
  o.method = FieldMethod::kDirect;
  o.num_threads = num_threads;
  return o;
}

// Full-sphere grid of the given step (theta 0 to 180, phi 0 to 360 deg).
inline Directions SphereGrid(double step_deg) {
  return Directions::FromGrid(AngularGrid::FromRanges({0, 180, step_deg}, {0, 360, step_deg}));
}

// Field options with the given method, tolerance and threads.
inline FieldOptions MethodOptions(FieldMethod m, double tol = 1e-9, int threads = 0) {
  FieldOptions o;
  o.method = m;
  o.tolerance_relative = tol;
  o.num_threads = threads;
  return o;
}

// mt19937_64's output sequence is fixed by the C++ standard; the mapping to [0, 1)
// below is ours, so the same seed gives the same arrays on every platform.
class TestRng {
 public:
  explicit TestRng(std::uint64_t seed) : engine_(seed) {}

  double Uniform() { return static_cast<double>(engine_() >> 11) * 0x1.0p-53; }
  double Uniform(double lo, double hi) { return lo + (hi - lo) * Uniform(); }
  int Index(int n) { return static_cast<int>(Uniform() * n) % n; }

  // Uniform on the unit sphere (rejection from the cube).
  Vec3 UnitVector() {
    for (;;) {
      Vec3 v(Uniform(-1, 1), Uniform(-1, 1), Uniform(-1, 1));
      const double n = v.norm();
      if (n > 0.1 && n <= 1.0) return v / n;
    }
  }

  Complex Phasor(double min_magnitude, double max_magnitude) {
    return std::polar(Uniform(min_magnitude, max_magnitude), Uniform(-kPi, kPi));
  }

  // A uniformly random rotation (normalized random quaternion from the 4-ball).
  Eigen::Matrix3d Rotation() {
    for (;;) {
      Eigen::Quaterniond q(Uniform(-1, 1), Uniform(-1, 1), Uniform(-1, 1), Uniform(-1, 1));
      const double n = q.norm();
      if (n > 0.1 && n <= 1.0) return q.normalized().toRotationMatrix();
    }
  }

 private:
  std::mt19937_64 engine_;
};

inline Dipole MakeDipole(const Vec3& position_m, const Vec3& orientation, double length_m,
                         Distribution distribution = Distribution::kUniform) {
  Dipole d;
  d.position_m = position_m;
  d.orientation = orientation.normalized();
  d.length_m = length_m;
  d.distribution = distribution;
  return d;
}

// A test array with its excitation beside it: the geometry is the Array itself
// (so a TestArray goes wherever an Array does), the terminal currents (A peak,
// one per dipole) are `currents`.
struct TestArray : Array {
  Eigen::VectorXcd currents;

  void Add(const Dipole& d, Complex current_a) {
    dipoles.push_back(d);
    currents.conservativeResize(currents.size() + 1);
    currents[currents.size() - 1] = current_a;
  }
  void Add(const Vec3& position_m, const Vec3& orientation, double length_m, Complex current_a,
           Distribution distribution = Distribution::kUniform) {
    Add(MakeDipole(position_m, orientation, length_m, distribution), current_a);
  }
};

inline TestArray OneDipoleArray(const Dipole& d, Complex current_a, Ground ground = Ground::kNone,
                                double frequency_hz = kTestFrequency_hz) {
  TestArray a;
  a.frequency_hz = frequency_hz;
  a.ground = ground;
  a.Add(d, current_a);
  return a;
}

// n dipoles with random positions in a box of side extent_wavelengths (centred on the
// origin in free space; with a PEC ground x, y centred and 0.02 lambda <= z <=
// extent), random orientations, lengths lambda/1000 .. lambda/20, mixed distributions
// and random complex currents of 0.1 .. 2 A.
inline TestArray RandomArray(TestRng& rng, int n, Ground ground, double extent_wavelengths = 2.0,
                             double frequency_hz = kTestFrequency_hz) {
  TestArray a;
  a.frequency_hz = frequency_hz;
  a.ground = ground;
  const double lambda = a.wavelength_m();
  const double half = 0.5 * extent_wavelengths * lambda;
  for (int i = 0; i < n; ++i) {
    Vec3 p(rng.Uniform(-half, half), rng.Uniform(-half, half), rng.Uniform(-half, half));
    if (ground == Ground::kPec) p.z() = rng.Uniform(0.02 * lambda, extent_wavelengths * lambda);
    const Distribution dist =
        rng.Uniform() < 0.5 ? Distribution::kUniform : Distribution::kTriangular;
    a.Add(p, rng.UnitVector(), rng.Uniform(1e-3, 0.05) * lambda, rng.Phasor(0.1, 2.0), dist);
  }
  return a;
}

// side x side z-directed dipoles on a planar half-wavelength lattice (a quarter
// wavelength up over PEC), random currents: one moment axis (the collinear
// kernels) and, on the fast path, the lattice transform.
inline TestArray ZLattice(TestRng& rng, int side, Ground ground = Ground::kNone) {
  TestArray a;
  a.frequency_hz = kTestFrequency_hz;
  a.ground = ground;
  const double lambda = a.wavelength_m();
  for (int i = 0; i < side * side; ++i) {
    const Vec3 p(0.5 * lambda * (i % side), 0.5 * lambda * (i / side),
                 ground == Ground::kPec ? 0.25 * lambda : 0.0);
    a.Add(p, Vec3::UnitZ(), 0.02 * lambda, rng.Phasor(0.1, 2.0));
  }
  return a;
}

// n random complex currents of 0.1 .. 2 A (as RandomArray's).
inline Eigen::VectorXcd RandomCurrents(TestRng& rng, int n) {
  Eigen::VectorXcd c(n);
  for (int i = 0; i < n; ++i) c[i] = rng.Phasor(0.1, 2.0);
  return c;
}

// Largest distance between two radiating sources, images included (m).
inline double MaxSourceSeparation_m(const Array& a) {
  std::vector<Vec3> p;
  for (const Dipole& d : a.dipoles) {
    p.push_back(d.position_m);
    if (a.ground == Ground::kPec)
      p.emplace_back(d.position_m.x(), d.position_m.y(), -d.position_m.z());
  }
  double m = 0.0;
  for (std::size_t i = 0; i < p.size(); ++i)
    for (std::size_t j = i + 1; j < p.size(); ++j) m = std::max(m, (p[i] - p[j]).norm());
  return m;
}

// Gauss-Legendre rule on [-1, 1]: Newton on P_n in long double from the usual
// cos(pi (i - 1/4) / (n + 1/2)) starting guesses (Abramowitz & Stegun, Handbook of
// Mathematical Functions, 1964, 25.4.29 for the rule; the starting guess is common
// practice). Exact for polynomials of degree <= 2n - 1, which GaussRuleIsExact checks.
struct QuadratureRule {
  std::vector<double> nodes;
  std::vector<double> weights;
};

inline QuadratureRule GaussLegendreRule(int n) {
  QuadratureRule r;
  r.nodes.resize(n);
  r.weights.resize(n);
  const long double pi = 3.141592653589793238462643383279502884L;
  for (int i = 0; i < n; ++i) {
    long double x = std::cos(pi * (i + 0.75L) / (n + 0.5L));
    long double dp = 0;
    for (int iter = 0; iter < 100; ++iter) {
      long double p0 = 1, p1 = x;
      for (int k = 2; k <= n; ++k) {
        const long double p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = n * (x * p1 - p0) / (x * x - 1);
      const long double dx = p1 / dp;
      x -= dx;
      if (std::fabs(dx) < 1e-19L) break;
    }
    // Recompute P_n' at the converged node for the weight.
    long double p0 = 1, p1 = x;
    for (int k = 2; k <= n; ++k) {
      const long double p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
      p0 = p1;
      p1 = p2;
    }
    dp = n * (x * p1 - p0) / (x * x - 1);
    r.nodes[i] = static_cast<double>(x);
    r.weights[i] = static_cast<double>(2 / ((1 - x * x) * dp * dp));
  }
  return r;
}

// P = int U dOmega with U = |rE|^2 / (2 eta0) from a FieldPlan: Gauss-Legendre in
// mu = cos(theta) times the trapezoid rule in phi (spectrally accurate for the periodic
// phi integrand). Free space: mu in [-1, 1]. PEC ground: only the upper hemisphere,
// mu in [0, 1], where the field is smooth (it is zero below).
inline double QuadraturePower(const Array& a, const Eigen::VectorXcd& currents, int n_mu,
                              int n_phi) {
  const QuadratureRule g = GaussLegendreRule(n_mu);
  const bool half = a.ground == Ground::kPec;
  std::vector<double> theta, phi, w;
  for (int i = 0; i < n_mu; ++i) {
    const double mu = half ? 0.5 * (g.nodes[i] + 1.0) : g.nodes[i];
    const double wmu = half ? 0.5 * g.weights[i] : g.weights[i];
    for (int j = 0; j < n_phi; ++j) {
      theta.push_back(std::acos(mu));
      phi.push_back(2.0 * kPi * j / n_phi);
      w.push_back(wmu * 2.0 * kPi / n_phi);
    }
  }
  const FieldPlan plan(a, Directions::FromAngles(theta, phi), DirectMethod());
  const FarField f = plan.Execute(currents);
  long double sum = 0;
  for (std::size_t i = 0; i < f.size(); ++i)
    sum += w[i] * (std::norm(f.e_theta[i]) + std::norm(f.e_phi[i])) / (2.0 * kEta0_ohm);
  return static_cast<double>(sum);
}

// Orders chosen from the electrical size: |rE|^2 holds exp(j k r_hat.(r_n - r_m)), whose
// bandwidth in mu and in phi is at most k * max separation; 40 extra points take the
// Gauss and trapezoid errors below 1e-14 (checked by the convergence test).
inline double QuadraturePower(const Array& a, const Eigen::VectorXcd& currents) {
  const double c = a.wavenumber_rad_m() * MaxSourceSeparation_m(a);
  const int n = static_cast<int>(std::ceil(c)) + 40;
  return QuadraturePower(a, currents, n, n);
}

// |rE| per direction, V.
inline Eigen::VectorXd Magnitude(const FarField& f) {
  Eigen::VectorXd m(f.size());
  for (std::size_t i = 0; i < f.size(); ++i)
    m[i] = std::sqrt(std::norm(f.e_theta[i]) + std::norm(f.e_phi[i]));
  return m;
}

// Largest |difference| of two fields over all directions and both components, V.
inline double MaxFieldDifference(const FarField& a, const FarField& b) {
  return std::max((a.e_theta - b.e_theta).cwiseAbs().maxCoeff(),
                  (a.e_phi - b.e_phi).cwiseAbs().maxCoeff());
}

// Spherical angles (rad) of a unit vector, accurate near the poles.
inline void AnglesOf(const Vec3& r, double& theta_rad, double& phi_rad) {
  theta_rad = std::atan2(std::hypot(r.x(), r.y()), r.z());
  phi_rad = std::atan2(r.y(), r.x());
}

}  // namespace lobecast::testing
