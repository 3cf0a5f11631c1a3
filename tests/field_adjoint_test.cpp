// The adjoint of the far-field map (FieldPlan::ExecuteAdjoint, engine/field/far_field.h):
// A maps currents to (rE_theta, rE_phi) at the plan's directions; ExecuteAdjoint
// returns A^H W x. Checked by the dot-product test <A I, x> = <I, A^H x> (Claerbout,
// "Earth Soundings Analysis: Processing versus Inversion", 1992, sec. 5.1: the
// standard test of an adjoint), by a plain long double loop of the conjugated
// formula (CONVENTIONS §1, images by Balanis 4th ed. sec. 4.7), and the fast path
// against the direct one within its reported bound.
#include "engine/field/far_field.h"

#include <cmath>
#include <complex>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine/error.h"
#include "engine/grid.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::MethodOptions;
using testing::RandomArray;
using testing::SphereGrid;
using testing::TestRng;
using testing::ZLattice;
using LComplex = std::complex<long double>;

Eigen::VectorXcd RandomVector(TestRng& rng, std::size_t n) {
  Eigen::VectorXcd v(static_cast<Eigen::Index>(n));
  for (Eigen::Index i = 0; i < v.size(); ++i) v[i] = rng.Phasor(0.1, 2.0);
  return v;
}

FarField RandomField(TestRng& rng, std::size_t n) {
  return FarField{RandomVector(rng, n), RandomVector(rng, n)};
}

// <f, x> = sum_i conj(f_theta_i) x_theta_i + conj(f_phi_i) x_phi_i.
Complex Dot(const FarField& f, const FarField& x) {
  return f.e_theta.dot(x.e_theta) + f.e_phi.dot(x.e_phi);  // Eigen's dot conjugates the first
}

double Norm(const FarField& f) { return std::hypot(f.e_theta.norm(), f.e_phi.norm()); }

// y_n = sum_i w_i [conj(A_theta(i, n)) x_theta_i + conj(A_phi(i, n)) x_phi_i] with
// A(i, n) = -j (w mu0 / 4 pi) sum over the dipole and (PEC) its image of
// Le (theta_hat_i or phi_hat_i) . u exp(+j k r_hat_i . r), zero below a PEC
// ground. The image sits at (x, y, -z) with the horizontal components of u
// reversed (Balanis 4th ed. sec. 4.7). Long double, std::exp.
Eigen::VectorXcd ReferenceAdjoint(const Array& a, const Directions& dirs, const FarField& x,
                                  const Eigen::VectorXd& weights) {
  const long double k = a.wavenumber_rad_m();
  const long double pref = a.angular_frequency_rad_s() * kMu0_H_m / (4 * kPi);
  Eigen::VectorXcd y(static_cast<Eigen::Index>(a.size()));
  for (std::size_t n = 0; n < a.size(); ++n) {
    const Dipole& d = a.dipoles[n];
    std::vector<std::pair<Vec3, Vec3>> sources{{d.position_m, d.orientation}};
    if (a.ground == Ground::kPec) {
      sources.emplace_back(Vec3(d.position_m.x(), d.position_m.y(), -d.position_m.z()),
                           Vec3(-d.orientation.x(), -d.orientation.y(), d.orientation.z()));
    }
    LComplex sum = 0;
    for (std::size_t i = 0; i < dirs.size(); ++i) {
      if (a.ground == Ground::kPec && dirs.theta_rad(i) > 0.5 * kPi) continue;
      const Vec3 r = dirs.r_hat(i), t = dirs.theta_hat(i), p = dirs.phi_hat(i);
      LComplex at = 0, ap = 0;
      for (const auto& [pos, u] : sources) {
        const long double ph = k * (static_cast<long double>(r.x()) * pos.x() +
                                    static_cast<long double>(r.y()) * pos.y() +
                                    static_cast<long double>(r.z()) * pos.z());
        const LComplex e =
            std::exp(LComplex(0, ph)) * static_cast<long double>(d.effective_length_m());
        at += e * static_cast<long double>(t.dot(u));
        ap += e * static_cast<long double>(p.dot(u));
      }
      at *= LComplex(0, -pref), ap *= LComplex(0, -pref);
      const auto e = static_cast<Eigen::Index>(i);
      const long double w = weights.size() ? weights[e] : 1.0L;
      sum += w * (std::conj(at) * LComplex(x.e_theta[e].real(), x.e_theta[e].imag()) +
                  std::conj(ap) * LComplex(x.e_phi[e].real(), x.e_phi[e].imag()));
    }
    y[static_cast<Eigen::Index>(n)] =
        Complex(static_cast<double>(sum.real()), static_cast<double>(sum.imag()));
  }
  return y;
}

double MaxRelative(const Eigen::VectorXcd& a, const Eigen::VectorXcd& b) {
  return (a - b).cwiseAbs().maxCoeff() / b.cwiseAbs().maxCoeff();
}

TEST(FieldAdjoint, DirectPassesTheDotProductTest) {
  TestRng rng(51);
  const Directions dirs = SphereGrid(5.0);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const Array arrays[] = {RandomArray(rng, 37, g, 4.0), ZLattice(rng, 6, g)};
    for (const Array& a : arrays) {
      const FieldPlan plan(a, dirs, MethodOptions(FieldMethod::kDirect));
      const Eigen::VectorXcd current = RandomVector(rng, a.size());
      const FarField x = RandomField(rng, dirs.size());
      Eigen::VectorXd w(static_cast<Eigen::Index>(dirs.size()));
      for (Eigen::Index i = 0; i < w.size(); ++i) w[i] = rng.Uniform(0.0, 3.0);
      const FarField f = plan.Execute(current);
      const DipoleSums y = plan.ExecuteAdjoint(x);
      EXPECT_EQ(y.error_bound_relative, 0.0);
      // <A I, x> = <I, A^H x> to rounding (relative to |A I| |x|).
      const Complex lhs = Dot(f, x), rhs = current.dot(y.values);
      EXPECT_LT(std::abs(lhs - rhs) / (Norm(f) * Norm(x)), 1e-14) << ToString(g);
      // With weights: <A I, W x> = <I, A^H W x>.
      FarField wx = x;
      wx.e_theta = wx.e_theta.cwiseProduct(w.cast<Complex>());
      wx.e_phi = wx.e_phi.cwiseProduct(w.cast<Complex>());
      const Complex lw = Dot(f, wx), rw = current.dot(plan.ExecuteAdjoint(x, w).values);
      EXPECT_LT(std::abs(lw - rw) / (Norm(f) * Norm(wx)), 1e-14) << ToString(g);
    }
  }
}

TEST(FieldAdjoint, MatchesLongDoubleLoop) {
  TestRng rng(52);
  const Directions dirs = SphereGrid(10.0);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    for (int n : {1, 7, 30}) {  // below and past a kernel tile
      const Array a = RandomArray(rng, n, g, 3.0);
      const FarField x = RandomField(rng, dirs.size());
      Eigen::VectorXd w(static_cast<Eigen::Index>(dirs.size()));
      for (Eigen::Index i = 0; i < w.size(); ++i) w[i] = rng.Uniform(0.0, 3.0);
      const Eigen::VectorXcd ref = ReferenceAdjoint(a, dirs, x, w);
      const Eigen::VectorXcd y =
          FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect)).ExecuteAdjoint(x, w).values;
      EXPECT_LT(MaxRelative(y, ref), 1e-13) << n << " dipoles, " << ToString(g);
    }
    const Array lattice = ZLattice(rng, 5, g);
    const FarField x = RandomField(rng, dirs.size());
    const Eigen::VectorXcd ref = ReferenceAdjoint(lattice, dirs, x, {});
    const Eigen::VectorXcd y =
        FieldPlan(lattice, dirs, MethodOptions(FieldMethod::kDirect)).ExecuteAdjoint(x).values;
    EXPECT_LT(MaxRelative(y, ref), 1e-13) << "lattice, " << ToString(g);
  }
}

// The fast path's forward and adjoint each pick their own NUFFT tolerance from
// their data, so the dot-product identity holds to their bounds (each transform
// pair alone is exact to rounding: tests/nufft_test.cpp, lattice_test.cpp), and
// the fast adjoint meets its bound against the direct one.
TEST(FieldAdjoint, FastMeetsItsBoundAndTheDotProductTest) {
  TestRng rng(53);
  const Directions dirs = SphereGrid(2.0);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const Array arrays[] = {RandomArray(rng, 200, g, 6.0), ZLattice(rng, 12, g)};
    for (const Array& a : arrays) {
      for (double tol : {1e-6, 1e-10}) {
        const FieldPlan fast(a, dirs, MethodOptions(FieldMethod::kFast, tol));
        const FieldPlan direct(a, dirs, MethodOptions(FieldMethod::kDirect));
        const std::string name = std::string(ToString(fast.fast_transform())) + ", " +
                                 std::string(ToString(g)) + ", tolerance " + std::to_string(tol);
        const FarField x = RandomField(rng, dirs.size());
        const DipoleSums y = fast.ExecuteAdjoint(x);
        const Eigen::VectorXcd exact = direct.ExecuteAdjoint(x).values;
        const double err = MaxRelative(y.values, exact);
        EXPECT_GT(y.error_bound_relative, 0.0) << name;
        EXPECT_LE(y.error_bound_relative, tol) << name;
        EXPECT_LE(err, y.error_bound_relative * (1 + 1e-6)) << name;

        const Eigen::VectorXcd current = RandomVector(rng, a.size());
        const FarField f = fast.Execute(current);
        const double fwd_bound = f.error_bound_relative;
        double f_peak = 0, x_l1 = 0;
        for (Eigen::Index i = 0; i < f.e_theta.size(); ++i) {
          f_peak = std::max(f_peak, std::hypot(std::abs(f.e_theta[i]), std::abs(f.e_phi[i])));
          x_l1 += std::hypot(std::abs(x.e_theta[i]), std::abs(x.e_phi[i]));
        }
        const double slack = fwd_bound * f_peak * x_l1 + y.error_bound_relative *
                                                             y.values.cwiseAbs().maxCoeff() *
                                                             current.cwiseAbs().sum();
        EXPECT_LE(std::abs(Dot(f, x) - current.dot(y.values)), slack * (1 + 1e-6)) << name;
      }
    }
  }
}

// With one fixed transform tolerance (FieldOptions::fixed_pass_tolerance, the
// quadrature of engine/power/power_quadrature.h) the forward and adjoint fast
// passes use the same transform, whose adjoint is exact as computed
// (PointSum::Adjoint), so the dot-product test holds to rounding: 1e-12 of
// |A I| |x|, as for the direct sums; and each meets its reported bound.
TEST(FieldAdjoint, FixedPassFastPassesTheDotProductTest) {
  TestRng rng(57);
  const Directions dirs = SphereGrid(2.0);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const Array arrays[] = {RandomArray(rng, 200, g, 6.0), ZLattice(rng, 12, g)};
    for (const Array& a : arrays) {
      for (double eps : {1e-6, 1e-12}) {
        FieldOptions o = MethodOptions(FieldMethod::kFast);
        o.fixed_pass_tolerance = eps;
        const FieldPlan fast(a, dirs, o);
        const FieldPlan direct(a, dirs, MethodOptions(FieldMethod::kDirect));
        const std::string name = std::string(ToString(fast.fast_transform())) + ", " +
                                 std::string(ToString(g)) + ", eps " + std::to_string(eps);
        const Eigen::VectorXcd current = RandomVector(rng, a.size());
        const FarField x = RandomField(rng, dirs.size());
        const FarField f = fast.Execute(current);
        const DipoleSums y = fast.ExecuteAdjoint(x);
        EXPECT_LT(std::abs(Dot(f, x) - current.dot(y.values)) / (Norm(f) * Norm(x)), 1e-12) << name;
        // Against the exact sums, within the bounds reported (relative to the peaks).
        const FarField fd = direct.Execute(current);
        double peak = 0, err = 0;
        for (Eigen::Index i = 0; i < f.e_theta.size(); ++i) {
          peak = std::max(peak, std::hypot(std::abs(f.e_theta[i]), std::abs(f.e_phi[i])));
          err = std::max(err, std::hypot(std::abs(f.e_theta[i] - fd.e_theta[i]),
                                         std::abs(f.e_phi[i] - fd.e_phi[i])));
        }
        EXPECT_GT(f.error_bound_relative, 0.0) << name;
        EXPECT_LE(err, f.error_bound_relative * peak) << name;
        EXPECT_LE(MaxRelative(y.values, direct.ExecuteAdjoint(x).values),
                  y.error_bound_relative * (1 + 1e-6))
            << name;
      }
    }
  }
}

TEST(FieldAdjoint, DoesNotDependOnThreads) {
  TestRng rng(54);
  const Directions dirs = SphereGrid(3.0);
  for (const Array& a :
       {RandomArray(rng, 300, Ground::kPec, 5.0), ZLattice(rng, 15, Ground::kNone)}) {
    const FarField x = RandomField(rng, dirs.size());
    const Eigen::VectorXcd y1 =
        FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect, 1e-9, 1)).ExecuteAdjoint(x).values;
    for (int t : {2, 3}) {
      const Eigen::VectorXcd yt =
          FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect, 1e-9, t)).ExecuteAdjoint(x).values;
      EXPECT_EQ((yt - y1).cwiseAbs().maxCoeff(), 0.0) << t << " threads";
    }
  }
}

TEST(FieldAdjoint, CartesianVectorsEqualTheirThetaPhiParts) {
  TestRng rng(55);
  const Directions dirs = SphereGrid(6.0);
  const Array a = RandomArray(rng, 20, Ground::kPec, 3.0);
  const FieldPlan plan(a, dirs, MethodOptions(FieldMethod::kDirect));
  const FarField x = RandomField(rng, dirs.size());
  const Eigen::VectorXcd radial = RandomVector(rng, dirs.size());
  Eigen::Matrix3Xcd v(3, static_cast<Eigen::Index>(dirs.size()));
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    const auto e = static_cast<Eigen::Index>(i);
    v.col(e) = dirs.theta_hat(i).cast<Complex>() * x.e_theta[e] +
               dirs.phi_hat(i).cast<Complex>() * x.e_phi[e] +
               dirs.r_hat(i).cast<Complex>() * radial[e];
  }
  EXPECT_LT(MaxRelative(plan.ExecuteAdjoint(v).values, plan.ExecuteAdjoint(x).values), 1e-13);
}

TEST(FieldAdjoint, RejectsWrongSizes) {
  TestRng rng(56);
  const Directions dirs = SphereGrid(30.0);
  const FieldPlan plan(RandomArray(rng, 3, Ground::kNone), dirs);
  const FarField x = RandomField(rng, dirs.size());
  EXPECT_THROW(plan.ExecuteAdjoint(RandomField(rng, dirs.size() - 1)), InvalidArgument);
  EXPECT_THROW(plan.ExecuteAdjoint(x, Eigen::VectorXd::Ones(2)), InvalidArgument);
  EXPECT_THROW(plan.ExecuteAdjoint(Eigen::Matrix3Xcd::Zero(3, 4)), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
