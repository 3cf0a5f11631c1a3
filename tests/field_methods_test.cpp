// The far-field methods against each other and against an independent reference:
// the direct path (vectorized, engine/field/sincos.h) against a plain long double
// std::complex loop of the formula in CONVENTIONS §1, and the fast path (type-3
// NUFFT, engine/field/nufft.h) against the direct path, which must agree to the
// requested tolerance relative to the pattern peak. Also the method choice, the
// options check, chunked execution and thread independence.
#include "engine/field/far_field.h"

#include <cmath>
#include <complex>
#include <cstdio>
#include <cstdlib>
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

double Peak(const FarField& f) {
  double p = 0;
  for (Eigen::Index i = 0; i < f.e_theta.size(); ++i) {
    p = std::max(p, std::sqrt(std::norm(f.e_theta[i]) + std::norm(f.e_phi[i])));
  }
  return p;
}

// max |rE_a - rE_b| / max |rE_b|
double RelativeDifference(const FarField& a, const FarField& b) {
  double d = 0;
  for (Eigen::Index i = 0; i < a.e_theta.size(); ++i) {
    d = std::max(
        d, std::sqrt(std::norm(a.e_theta[i] - b.e_theta[i]) + std::norm(a.e_phi[i] - b.e_phi[i])));
  }
  return d / Peak(b);
}

// rE = -j (w mu0 / 4 pi) sum_n I_n Le_n M_perp exp(+j k r_hat . r_n) (CONVENTIONS §1),
// with sources and images from ground.h, in long double with std::exp.
FarField Reference(const testing::TestArray& a, const Directions& dirs) {
  const std::vector<Dipole> src = RadiatingSources(a);
  const long double k = a.wavenumber_rad_m();
  const long double pref = a.angular_frequency_rad_s() * kMu0_H_m / (4 * kPi);
  FarField f;
  f.e_theta.resize(static_cast<Eigen::Index>(dirs.size()));
  f.e_phi.resize(static_cast<Eigen::Index>(dirs.size()));
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    LComplex m[3] = {0, 0, 0};
    const Vec3 r = dirs.r_hat(i);
    for (std::size_t s = 0; s < src.size(); ++s) {
      const Dipole& d = src[s];
      const Complex cur = a.currents[static_cast<Eigen::Index>(DipoleOfSource(s, a.size()))];
      const long double ph = k * (static_cast<long double>(r.x()) * d.position_m.x() +
                                  static_cast<long double>(r.y()) * d.position_m.y() +
                                  static_cast<long double>(r.z()) * d.position_m.z());
      const LComplex w = LComplex(cur.real(), cur.imag()) *
                         static_cast<long double>(d.effective_length_m()) *
                         std::exp(LComplex(0, ph));
      for (int c = 0; c < 3; ++c) m[c] += w * static_cast<long double>(d.orientation[c]);
    }
    const Vec3 t = dirs.theta_hat(i), p = dirs.phi_hat(i);
    const LComplex mt =
        m[0] * (long double)t.x() + m[1] * (long double)t.y() + m[2] * (long double)t.z();
    const LComplex mp =
        m[0] * (long double)p.x() + m[1] * (long double)p.y() + m[2] * (long double)p.z();
    const bool zero = BelowGround(a.ground, dirs.theta_rad(i));
    const LComplex mj(0, -pref);
    f.e_theta[static_cast<Eigen::Index>(i)] =
        zero ? Complex(0) : Complex(static_cast<std::complex<double>>(mj * mt));
    f.e_phi[static_cast<Eigen::Index>(i)] =
        zero ? Complex(0) : Complex(static_cast<std::complex<double>>(mj * mp));
  }
  return f;
}

TEST(DirectPath, MatchesLongDoubleReference) {
  TestRng rng(21);
  const Directions dirs = SphereGrid(7.5);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    for (int n : {1, 5, 37, 300}) {  // below, at and past a kernel tile and block
      const testing::TestArray a = RandomArray(rng, n, g, 6.0);
      const FarField f =
          FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect)).Execute(a.currents);
      EXPECT_LT(RelativeDifference(f, Reference(a, dirs)), 1e-13)
          << n << " dipoles, " << ToString(g);
    }
    const testing::TestArray lattice = ZLattice(rng, 9, g);
    const FarField f =
        FieldPlan(lattice, dirs, MethodOptions(FieldMethod::kDirect)).Execute(lattice.currents);
    EXPECT_LT(RelativeDifference(f, Reference(lattice, dirs)), 1e-13) << "lattice, " << ToString(g);
  }
}

TEST(DirectPath, LargePhasesStayAccurate) {
  // 300 wavelengths across: phases to ~1e3 rad.
  TestRng rng(22);
  const testing::TestArray a = RandomArray(rng, 200, Ground::kNone, 300.0);
  const Directions dirs = SphereGrid(10);
  const FarField f = FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect)).Execute(a.currents);
  EXPECT_LT(RelativeDifference(f, Reference(a, dirs)), 1e-12);
}

TEST(DirectPath, ThreadCountDoesNotChangeTheResult) {
  TestRng rng(23);
  const testing::TestArray a = RandomArray(rng, 2500, Ground::kPec, 10.0);
  const Directions dirs = SphereGrid(3);
  const FarField f1 =
      FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect, 1e-9, 1)).Execute(a.currents);
  const FarField f2 =
      FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect, 1e-9, 2)).Execute(a.currents);
  EXPECT_LE(RelativeDifference(f1, f2), 1e-13);
}

struct FastCase {
  std::string name;
  testing::TestArray array;
};

// An x-directed lattice with rows offset by half the pitch (a triangular grid),
// pitch in wavelengths, height h over the ground (images are antiparallel).
testing::TestArray OffsetRowLattice(TestRng& rng, int side, double pitch, Ground ground) {
  testing::TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  a.ground = ground;
  const double lambda = a.wavelength_m();
  for (int i = 0; i < side * side; ++i) {
    const int row = i / side;
    const Vec3 p(pitch * lambda * ((i % side) + 0.5 * (row % 2)), pitch * lambda * 0.866 * row,
                 0.3 * lambda);
    a.Add(p, Vec3::UnitX(), 0.02 * lambda, rng.Phasor(0.1, 2.0));
  }
  return a;
}

class FastPath : public ::testing::TestWithParam<double> {};

TEST_P(FastPath, AgreesWithDirectWithinTolerance) {
  const double tol = GetParam();
  TestRng rng(24);
  std::vector<FastCase> cases;
  cases.push_back({"random 3-D, free space", RandomArray(rng, 400, Ground::kNone, 8.0)});
  // Few sources: the pattern peak is close to sum |I Le|, so the bound is tightest.
  cases.push_back({"3 random dipoles", RandomArray(rng, 3, Ground::kNone, 3.0)});
  cases.push_back({"z lattice 4x4", ZLattice(rng, 4)});
  cases.push_back({"random 3-D, PEC ground", RandomArray(rng, 300, Ground::kPec, 6.0)});
  cases.push_back({"z lattice 24x24", ZLattice(rng, 24)});
  cases.push_back({"z lattice 16x16 over PEC", ZLattice(rng, 16, Ground::kPec)});
  testing::TestArray line = ZLattice(rng, 1);
  for (int i = 1; i < 200; ++i) {
    Dipole d = line.dipoles[0];
    d.position_m.x() = 0.7 * line.wavelength_m() * i;
    d.orientation = Vec3(1, 1, 0).normalized();
    line.Add(d, rng.Phasor(0.1, 2.0));
  }
  line.dipoles[0].orientation = Vec3(1, 1, 0).normalized();
  cases.push_back({"linear, tilted", line});
  cases.push_back({"offset-row x lattice, 2-wavelength pitch, over PEC",
                   OffsetRowLattice(rng, 12, 2.0, Ground::kPec)});
  testing::TestArray general = ZLattice(rng, 10);
  for (Dipole& d : general.dipoles) d.orientation = rng.UnitVector();
  cases.push_back({"lattice of random orientations", general});
  const Directions dirs = SphereGrid(2);
  for (const FastCase& c : cases) {
    const Eigen::VectorXcd cur = c.array.currents;
    const FieldPlan fast(c.array, dirs, MethodOptions(FieldMethod::kFast, tol));
    ASSERT_EQ(fast.method_used(), FieldMethod::kFast);
    const FarField ff = fast.Execute(cur);
    const FarField fd = FieldPlan(c.array, dirs, MethodOptions(FieldMethod::kDirect)).Execute(cur);
    const double err = RelativeDifference(ff, fd);
    const std::string name = c.name + " (" + std::string(ToString(fast.fast_transform())) + ")";
    EXPECT_LT(err, tol) << name;
    if (std::getenv("LOBECAST_TEST_VERBOSE")) std::printf("%s: %.2e\n", name.c_str(), err);
    // The reported bound is met and is not below what was achieved.
    EXPECT_LE(ff.error_bound_relative, tol) << name;
    EXPECT_GE(ff.error_bound_relative, err) << name;
  }
}

INSTANTIATE_TEST_SUITE_P(Tolerances, FastPath, ::testing::Values(1e-4, 1e-7, 1e-9, 1e-12));

TEST(FastPath, LatticesTakeTheLatticeTransformAndOthersTypeThree) {
  TestRng rng(27);
  const Directions dirs = SphereGrid(2);
  const auto transform = [&](const Array& a) {
    return FieldPlan(a, dirs, MethodOptions(FieldMethod::kFast)).fast_transform();
  };
  EXPECT_EQ(transform(ZLattice(rng, 24)), FastTransform::kLattice);
  EXPECT_EQ(transform(ZLattice(rng, 16, Ground::kPec)), FastTransform::kLattice);
  EXPECT_EQ(transform(OffsetRowLattice(rng, 12, 2.0, Ground::kNone)), FastTransform::kLattice);
  EXPECT_EQ(transform(RandomArray(rng, 300, Ground::kNone, 6.0)), FastTransform::kType3);
  // One dipole 1 um off its site: a phase error of 9e-6 rad at 433.92 MHz,
  // far above what the 1e-9 tolerance allows, so the points are not a lattice.
  testing::TestArray jittered = ZLattice(rng, 24);
  jittered.dipoles[100].position_m.x() += 1e-6;
  EXPECT_EQ(transform(jittered), FastTransform::kType3);
  EXPECT_EQ(FieldPlan(jittered, dirs, MethodOptions(FieldMethod::kDirect)).fast_transform(),
            FastTransform::kNone);
  EXPECT_EQ(ToString(FastTransform::kLattice), "lattice");
}

TEST(DirectPath, ExecuteAtMatchesAPlanOnThoseDirections) {
  TestRng rng(28);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = RandomArray(rng, 150, g, 3.0);
    const Eigen::VectorXcd cur = a.currents;
    std::vector<double> th, ph;
    for (int i = 0; i < 300; ++i)
      th.push_back(rng.Uniform(0, kPi)), ph.push_back(rng.Uniform(0, 2 * kPi));
    const Directions dirs = Directions::FromAngles(th, ph);
    const FarField want = FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect)).Execute(cur);
    // A plan of the sources on no directions, and one on other directions.
    for (const Directions& own : {Directions::FromAngles({}, {}), SphereGrid(30)}) {
      const FarField got =
          FieldPlan(a, own, MethodOptions(FieldMethod::kDirect)).ExecuteAt(cur, dirs);
      ASSERT_EQ(got.size(), dirs.size());
      for (Eigen::Index i = 0; i < got.e_theta.size(); ++i) {
        ASSERT_EQ(got.e_theta[i], want.e_theta[i]) << i;
        ASSERT_EQ(got.e_phi[i], want.e_phi[i]) << i;
      }
    }
    EXPECT_THROW(
        FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect)).ExecuteAt(cur.head(3), dirs),
        InvalidArgument);
  }
}

TEST(FastPath, ChunkedExecutionMatchesWhole) {
  TestRng rng(25);
  const testing::TestArray a = RandomArray(rng, 100, Ground::kNone, 4.0);
  const Directions dirs = SphereGrid(5);
  for (FieldMethod m : {FieldMethod::kDirect, FieldMethod::kFast}) {
    const FieldPlan plan(a, dirs, MethodOptions(m));
    const Eigen::VectorXcd cur = a.currents;
    const FarField whole = plan.Execute(cur);
    FarField part;
    for (std::size_t first = 0; first < plan.num_directions(); first += 77) {
      const std::size_t count = std::min<std::size_t>(77, plan.num_directions() - first);
      plan.ExecuteRange(cur, first, count, part);
      for (std::size_t j = 0; j < count; ++j) {
        const auto i = static_cast<Eigen::Index>(first + j), e = static_cast<Eigen::Index>(j);
        ASSERT_EQ(part.e_theta[e], whole.e_theta[i]) << ToString(m) << " direction " << i;
        ASSERT_EQ(part.e_phi[e], whole.e_phi[i]) << ToString(m) << " direction " << i;
      }
    }
    // A new current vector is not served from the cache.
    const FarField doubled = plan.Execute(2.0 * cur);
    EXPECT_LT(
        RelativeDifference(
            doubled, FieldPlan(a, dirs, MethodOptions(FieldMethod::kDirect)).Execute(2.0 * cur)),
        1e-9);
  }
}

TEST(FastPath, TotalCancellationFallsBackToTheExactSum) {
  // Two coincident dipoles with opposite currents radiate nothing: no tolerance
  // relative to a zero peak can be met by the NUFFT, so the plan sums directly.
  testing::TestArray a =
      testing::OneDipoleArray(MakeDipole(Vec3(0.1, 0.2, 0.3), Vec3::UnitZ(), 0.01), Complex(1, 0));
  a.Add(Vec3(0.1, 0.2, 0.3), Vec3::UnitZ(), 0.01, Complex(-1, 0));
  const FieldPlan plan(a, SphereGrid(10), MethodOptions(FieldMethod::kFast));
  const FarField f = plan.Execute(a.currents);
  EXPECT_EQ(Peak(f), 0.0);
  EXPECT_EQ(f.error_bound_relative, 0.0);
}

TEST(MethodChoice, AutoIsDirectForSmallAndFastForLargeJobs) {
  TestRng rng(26);
  const testing::TestArray small = RandomArray(rng, 16, Ground::kNone, 2.0);
  EXPECT_EQ(FieldPlan(small, SphereGrid(1), FieldOptions{}).method_used(), FieldMethod::kDirect);
  // 128 x 128 lattice on a 0.25 deg grid: 1.7e10 pairs directly.
  const testing::TestArray big = ZLattice(rng, 128);
  const Directions fine =
      Directions::FromGrid(AngularGrid::FromRanges({0, 180, 0.25}, {0, 360, 0.25}));
  EXPECT_EQ(FieldPlan(big, fine, FieldOptions{}).method_used(), FieldMethod::kFast);
  EXPECT_EQ(FieldPlan(big, SphereGrid(30), FieldOptions{}).method_used(), FieldMethod::kDirect);
}

TEST(MethodChoice, NamesRoundTripCaseInsensitively) {
  for (FieldMethod m : {FieldMethod::kDirect, FieldMethod::kFast, FieldMethod::kAuto}) {
    EXPECT_EQ(FieldMethodFromString(ToString(m)), m);
  }
  EXPECT_EQ(FieldMethodFromString("FaSt"), FieldMethod::kFast);
  EXPECT_EQ(FieldMethodFromString("nufft"), std::nullopt);
}

TEST(FieldOptionsCheck, NamesTheFieldAndValue) {
  std::string why;
  EXPECT_TRUE(FieldOptions{}.IsValid(&why));
  FieldOptions o;
  o.tolerance_relative = 0.5;
  EXPECT_FALSE(o.IsValid(&why));
  EXPECT_NE(why.find("tolerance_relative"), std::string::npos) << why;
  EXPECT_NE(why.find("0.5"), std::string::npos) << why;
  o = FieldOptions{};
  o.num_threads = -1;
  EXPECT_FALSE(o.IsValid(&why));
  EXPECT_NE(why.find("num_threads"), std::string::npos) << why;
  TestRng rng(27);
  const testing::TestArray a = RandomArray(rng, 3, Ground::kNone);
  o.num_threads = 0;
  o.tolerance_relative = 0.0;
  EXPECT_THROW(FieldPlan(a, SphereGrid(30), o), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
