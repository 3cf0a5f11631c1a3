// Lattice detection and the lattice's type-2 sum (engine/field/lattice.h). The sum is
// checked against the exponential sum it replaces, sum_j c_j exp(+i s . x_j),
// evaluated in long double over the points themselves (not their sites), to the
// accuracy Barnett, Magland and af Klinteberg report for their kernel (SIAM J.
// Sci. Comput. 41, 2019, sec. 4: near the tolerance relative to sum |c|; we
// require below 3x).
#include "engine/field/lattice.h"

#include <cmath>
#include <complex>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine/error.h"
#include "tests/exponential_sum.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::TestRng;
using LComplex = std::complex<long double>;

// Points o + (a0 i, a1 j, a2 l) for the given site counts, optionally keeping
// each with probability keep (thinned lattices) and offsetting odd rows (along y)
// by half the x pitch (triangular lattices).
Eigen::Matrix3Xd LatticePoints(TestRng& rng, const std::array<int, 3>& m, const Eigen::Vector3d& a,
                               const Eigen::Vector3d& o, double keep = 1.0,
                               bool offset_rows = false) {
  std::vector<Eigen::Vector3d> pts;
  for (int i = 0; i < m[0]; ++i) {
    for (int j = 0; j < m[1]; ++j) {
      for (int l = 0; l < m[2]; ++l) {
        if (keep < 1.0 && rng.Uniform(0, 1) > keep) continue;
        const double shift = offset_rows && (j % 2) ? 0.5 * a[0] : 0.0;
        pts.push_back(o + Eigen::Vector3d(a[0] * i + shift, a[1] * j, a[2] * l));
      }
    }
  }
  Eigen::Matrix3Xd x(3, static_cast<Eigen::Index>(pts.size()));
  for (std::size_t j = 0; j < pts.size(); ++j) x.col(static_cast<Eigen::Index>(j)) = pts[j];
  return x;
}

// Directions of a wave number k over the sphere: the far field's targets.
Eigen::Matrix3Xd Wavevectors(TestRng& rng, int n, double k) {
  Eigen::Matrix3Xd s(3, n);
  for (int i = 0; i < n; ++i) {
    const double z = rng.Uniform(-1, 1), p = rng.Uniform(0, 2 * kPi);
    const double r = std::sqrt(1 - z * z);
    s.col(i) = k * Eigen::Vector3d(r * std::cos(p), r * std::sin(p), z);
  }
  return s;
}

TEST(FindAxisLattice, FindsPitchSitesAndIndices) {
  TestRng rng(31);
  const Eigen::Vector3d o(-1.25, 0.5, 0.3);
  const Eigen::Matrix3Xd x = LatticePoints(rng, {8, 6, 1}, {0.17, 0.23, 0.0}, o);
  const auto lat = FindAxisLattice(x, 1e-12, 1e6);
  ASSERT_TRUE(lat.has_value());
  EXPECT_EQ(lat->sites, (std::array<int, 3>{8, 6, 1}));
  EXPECT_NEAR(lat->pitch[0], 0.17, 1e-15);
  EXPECT_NEAR(lat->pitch[1], 0.23, 1e-15);
  EXPECT_EQ(lat->pitch[2], 0.0);
  EXPECT_LT(lat->max_offset, 1e-14);
  for (Eigen::Index j = 0; j < x.cols(); ++j) {
    const auto& n = lat->index[static_cast<std::size_t>(j)];
    const Eigen::Vector3d site =
        lat->origin + Eigen::Vector3d(n[0] * lat->pitch[0], n[1] * lat->pitch[1], 0.0);
    EXPECT_LT((site - x.col(j)).norm(), 1e-14) << j;
  }
}

TEST(FindAxisLattice, FindsThinnedOffsetRowAndImageLattices) {
  TestRng rng(32);
  // Triangular: rows offset by half a pitch are a rectangular lattice of half the pitch.
  const auto tri = FindAxisLattice(
      LatticePoints(rng, {10, 9, 1}, {0.5, 0.43, 0}, Eigen::Vector3d::Zero(), 1.0, true), 1e-12,
      1e6);
  ASSERT_TRUE(tri.has_value());
  EXPECT_EQ(tri->sites[0], 20);
  EXPECT_NEAR(tri->pitch[0], 0.25, 1e-15);
  // Thinned to 40 %: the pitch is still the smallest gap's.
  const auto thin = FindAxisLattice(
      LatticePoints(rng, {30, 30, 1}, {0.1, 0.1, 0}, Eigen::Vector3d::Zero(), 0.4), 1e-12, 1e6);
  ASSERT_TRUE(thin.has_value());
  EXPECT_NEAR(thin->pitch[0], 0.1, 1e-15);
  // A plane and its image below a ground plane: two sites along z.
  const auto img = FindAxisLattice(
      LatticePoints(rng, {4, 4, 2}, {0.5, 0.5, 0.5}, Eigen::Vector3d(0, 0, -0.25)), 1e-12, 1e6);
  ASSERT_TRUE(img.has_value());
  EXPECT_EQ(img->sites[2], 2);
  // Coincident points (crossed dipoles at one feed) are one site.
  const auto one = FindAxisLattice(Eigen::Matrix3Xd::Constant(3, 2, 0.7), 1e-12, 1e6);
  ASSERT_TRUE(one.has_value());
  EXPECT_EQ(one->num_sites(), 1.0);
}

TEST(FindAxisLattice, RejectsJitterIrregularPointsAndTooManySites) {
  TestRng rng(33);
  Eigen::Matrix3Xd x = LatticePoints(rng, {6, 6, 1}, {0.5, 0.5, 0}, Eigen::Vector3d::Zero());
  EXPECT_TRUE(FindAxisLattice(x, 1e-12, 1e6).has_value());
  x(0, 7) += 1e-9;  // one point off its site by more than allowed
  EXPECT_FALSE(FindAxisLattice(x, 1e-12, 1e6).has_value());
  EXPECT_TRUE(FindAxisLattice(x, 1e-8, 1e6).has_value());  // within a looser allowance
  // Random positions: no lattice with a bounded number of sites.
  Eigen::Matrix3Xd r(3, 50);
  for (Eigen::Index j = 0; j < r.cols(); ++j) r.col(j) << rng.Uniform(0, 3), rng.Uniform(0, 3), 0;
  EXPECT_FALSE(FindAxisLattice(r, 1e-12, 1e6).has_value());
  // A lattice with more sites than allowed.
  EXPECT_FALSE(
      FindAxisLattice(LatticePoints(rng, {20, 20, 1}, {0.5, 0.5, 0}, Eigen::Vector3d::Zero()),
                      1e-12, 399)
          .has_value());
}

struct SumCase {
  const char* name;
  std::array<int, 3> sites;
  Eigen::Vector3d pitch;
  double keep;
};

class LatticeSumAccuracy : public ::testing::TestWithParam<double> {};

TEST_P(LatticeSumAccuracy, MatchesTheExponentialSum) {
  const double tol = GetParam();
  const double k = 2 * kPi;  // unit wavelength
  const SumCase cases[] = {
      {"planar, half-wave pitch", {16, 12, 1}, {0.5, 0.5, 0}, 1.0},
      {"planar over ground (2 layers)", {10, 10, 2}, {0.5, 0.5, 0.5}, 1.0},
      {"sparse 3-wavelength pitch, thinned", {12, 12, 1}, {3.0, 3.0, 0}, 0.6},
      {"volume", {12, 11, 13}, {0.4, 0.6, 0.5}, 0.5},
      {"line", {64, 1, 1}, {0.7, 0, 0}, 1.0},
  };
  TestRng rng(34);
  for (const SumCase& c : cases) {
    const Eigen::Matrix3Xd x =
        LatticePoints(rng, c.sites, c.pitch, Eigen::Vector3d(1.5, -2.0, 0.75), c.keep);
    const auto lat = FindAxisLattice(x, 1e-12, 1e6);
    ASSERT_TRUE(lat.has_value()) << c.name;
    const Eigen::Matrix3Xd s = Wavevectors(rng, 300, k);
    Eigen::MatrixXcd str(x.cols(), 3);
    for (Eigen::Index j = 0; j < x.cols(); ++j) {
      for (int a = 0; a < 3; ++a) str(j, a) = Complex(rng.Uniform(-1, 1), rng.Uniform(-1, 1));
    }
    const LatticeSum sum(*lat, s, NufftOptions{tol, 0});
    const Eigen::MatrixXcd f = sum.Execute(str);
    const double err = testing::SumRelativeError(x, s, str, f);
    EXPECT_LT(err, 3.0 * tol + sum.representation_error()) << c.name << ", tolerance " << tol;
    EXPECT_GT(err, 1e-4 * tol) << c.name << ", tolerance " << tol;
    // The adjoint, sum_k v_k exp(-i s_k . x_j): the transpose of Execute to
    // rounding, and the exact sum (roles swapped, conjugated) to the same bound.
    const Eigen::MatrixXcd v = Eigen::MatrixXcd::Random(s.cols(), 3);
    const Eigen::MatrixXcd g = sum.Adjoint(v);
    EXPECT_LT(testing::AdjointMismatch(str, f, v, g), 1e-14) << c.name << ", tolerance " << tol;
    const double adjoint_err = testing::SumRelativeError(s, x, v.conjugate(), g.conjugate());
    EXPECT_LT(adjoint_err, 3.0 * tol + sum.representation_error())
        << c.name << ", tolerance " << tol;
    EXPECT_GT(adjoint_err, 1e-4 * tol) << c.name << ", tolerance " << tol;
  }
}

INSTANTIATE_TEST_SUITE_P(Tolerances, LatticeSumAccuracy, ::testing::Values(1e-4, 1e-9, 1e-12));

TEST(LatticeSum, PreparedGridGivesExecutesValuesAtAnyTargets) {
  // Prepare then ExecuteAt (a sum of no targets, read at targets given later) against
  // Execute of a sum built on those targets: the same transform, to rounding; a
  // target's value the same bits alone as in a batch; layered and planar lattices.
  const double k = 2 * kPi;
  TestRng rng(38);
  for (const std::array<int, 3>& m : {std::array<int, 3>{20, 14, 1}, {10, 10, 2}}) {
    const Eigen::Matrix3Xd x =
        LatticePoints(rng, m, {0.5, 0.5, 0.5}, Eigen::Vector3d(1.5, -2.0, 0.75));
    const auto lat = FindAxisLattice(x, 1e-12, 1e6);
    ASSERT_TRUE(lat.has_value());
    const Eigen::Matrix3Xd s = Wavevectors(rng, 200, k);
    Eigen::MatrixXcd str(x.cols(), 2);
    for (Eigen::Index j = 0; j < x.cols(); ++j) {
      for (int a = 0; a < 2; ++a) str(j, a) = Complex(rng.Uniform(-1, 1), rng.Uniform(-1, 1));
    }
    const NufftOptions o{1e-12, 0};
    const Eigen::MatrixXcd f = LatticeSum(*lat, s, o).Execute(str);
    const LatticeSum probe(*lat, Eigen::Matrix3Xd(3, 0), o);
    const auto grid = probe.Prepare(str);
    const Eigen::MatrixXcd g = probe.ExecuteAt(*grid, s);
    const double l1 = str.cwiseAbs().colwise().sum().maxCoeff();
    EXPECT_LT((g - f).cwiseAbs().maxCoeff(), 1e-14 * l1) << m[2];
    EXPECT_LT(testing::SumRelativeError(x, s, str, g), 3e-12) << m[2];
    for (const Eigen::Index i : {Eigen::Index{0}, Eigen::Index{77}, Eigen::Index{199}}) {
      const Eigen::MatrixXcd one = probe.ExecuteAt(*grid, s.col(i));
      for (int a = 0; a < 2; ++a) EXPECT_EQ(one(0, a), g(i, a)) << m[2] << " " << i;
    }
  }
}

TEST(LatticeSum, FewSitesAlongADimensionAreSummedLayerByLayer) {
  TestRng rng(35);
  const auto lat = FindAxisLattice(
      LatticePoints(rng, {32, 32, 2}, {0.5, 0.5, 0.5}, Eigen::Vector3d::Zero()), 1e-12, 1e6);
  ASSERT_TRUE(lat.has_value());
  const LatticeShape shape = LatticeSum::ShapeFor(*lat, 1e-9);
  EXPECT_EQ(shape.layers, 2);
  EXPECT_EQ(shape.per_layer.active_dims, 2);
  EXPECT_EQ(shape.per_layer.fft_size[1], 64);
  EXPECT_EQ(shape.per_layer.fft_size[2], 64);
}

TEST(LatticeSum, SmallCubesAreNotSplitIntoHundredsOfLayers) {
  // 12 sites a side is below the 1e-12 kernel width (13): layering every
  // dimension would make 1728 passes over the targets (measured 35 s against
  // 0.9 s for type 3 on a 1 deg grid). At most 16 layers, the rest transformed.
  TestRng rng(37);
  const auto lat = FindAxisLattice(
      LatticePoints(rng, {12, 12, 12}, {0.5, 0.5, 0.5}, Eigen::Vector3d::Zero()), 1e-12, 1e6);
  ASSERT_TRUE(lat.has_value());
  for (double tol : {1e-4, 1e-9, 1e-12, 1e-14}) {
    const LatticeShape shape = LatticeSum::ShapeFor(*lat, tol);
    EXPECT_LE(shape.layers, 16) << tol;
    EXPECT_GE(shape.per_layer.active_dims, 2) << tol;
  }
}

TEST(FindAxisLattice, RejectsNonFiniteCoordinates) {
  Eigen::Matrix3Xd x = Eigen::Matrix3Xd::Zero(3, 4);
  x(0, 1) = 0.5, x(0, 2) = 1.0, x(0, 3) = std::numeric_limits<double>::quiet_NaN();
  EXPECT_FALSE(FindAxisLattice(x, 1e-12, 1e6).has_value());
  x(0, 3) = std::numeric_limits<double>::infinity();
  EXPECT_FALSE(FindAxisLattice(x, 1e-12, 1e6).has_value());
}

TEST(LatticeSum, ResultAndAdjointDoNotDependOnThreadsAndRejectBadSizes) {
  TestRng rng(36);
  const Eigen::Matrix3Xd x =
      LatticePoints(rng, {20, 20, 2}, {0.5, 0.5, 0.5}, Eigen::Vector3d::Zero());
  const auto lat = FindAxisLattice(x, 1e-12, 1e6);
  ASSERT_TRUE(lat.has_value());
  const Eigen::Matrix3Xd s = Wavevectors(rng, 2000, 2 * kPi);
  const Eigen::MatrixXcd c = Eigen::MatrixXcd::Random(x.cols(), 2);
  const Eigen::MatrixXcd f1 = LatticeSum(*lat, s, NufftOptions{1e-9, 1}).Execute(c);
  const LatticeSum two(*lat, s, NufftOptions{1e-9, 2});
  EXPECT_EQ((f1 - two.Execute(c)).cwiseAbs().maxCoeff(), 0.0);
  EXPECT_THROW(two.Execute(Eigen::MatrixXcd::Ones(3, 1)), InvalidArgument);
  EXPECT_THROW(two.Execute(Eigen::MatrixXcd::Ones(x.cols(), 4)), InvalidArgument);
  const Eigen::MatrixXcd v = Eigen::MatrixXcd::Random(s.cols(), 2);
  const Eigen::MatrixXcd g1 = LatticeSum(*lat, s, NufftOptions{1e-9, 1}).Adjoint(v);
  EXPECT_EQ((g1 - two.Adjoint(v)).cwiseAbs().maxCoeff(), 0.0);
  EXPECT_THROW(two.Adjoint(Eigen::MatrixXcd::Ones(3, 1)), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
