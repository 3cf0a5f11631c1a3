// The type-3 NUFFT (engine/field/nufft.h) against the direct sum it approximates,
// f_k = sum_j c_j exp(+i s_k . x_j), evaluated here in long double. Barnett,
// Magland and af Klinteberg (SIAM J. Sci. Comput. 41, 2019, sec. 4) report errors
// near the requested tolerance relative to sum_j |c_j|; we require below 3x that.
#include "engine/field/nufft.h"

#include <array>
#include <cmath>
#include <complex>
#include <string>
#include <thread>
#include <vector>

#include <gtest/gtest.h>

#include "engine/check.h"

#include "engine/error.h"
#include "tests/exponential_sum.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::TestRng;
using LComplex = std::complex<long double>;

Eigen::Matrix3Xd RandomCloud(TestRng& rng, int n, const Eigen::Vector3d& half,
                             const Eigen::Vector3d& centre) {
  Eigen::Matrix3Xd m(3, n);
  for (int j = 0; j < n; ++j) {
    for (int d = 0; d < 3; ++d) m(d, j) = centre[d] + rng.Uniform(-half[d], half[d]);
  }
  return m;
}

Eigen::MatrixXcd RandomStrengths(TestRng& rng, int n, int cols) {
  Eigen::MatrixXcd c(n, cols);
  for (int j = 0; j < n; ++j) {
    for (int a = 0; a < cols; ++a) c(j, a) = Complex(rng.Uniform(-1, 1), rng.Uniform(-1, 1));
  }
  return c;
}

struct Case {
  const char* name;
  Eigen::Vector3d x_half, s_half;
};

class NufftAccuracy : public ::testing::TestWithParam<double> {};

TEST_P(NufftAccuracy, MatchesDirectSumIn1D2D3D) {
  const double tol = GetParam();
  const Case cases[] = {
      {"3-D cloud", {3.0, 2.0, 1.5}, {8.0, 6.0, 7.0}},
      {"planar (z exact)", {4.0, 5.0, 0.0}, {6.0, 6.0, 6.0}},
      {"linear (y, z exact)", {20.0, 0.0, 0.0}, {3.0, 3.0, 3.0}},
      {"targets on a line", {2.0, 2.0, 2.0}, {0.0, 0.0, 30.0}},
  };
  TestRng rng(11);
  for (const Case& c : cases) {
    const Eigen::Matrix3Xd x = RandomCloud(rng, 300, c.x_half, Eigen::Vector3d(0.7, -1.2, 2.0));
    const Eigen::Matrix3Xd s = RandomCloud(rng, 400, c.s_half, Eigen::Vector3d(-0.3, 0.5, 1.1));
    const Eigen::MatrixXcd str = RandomStrengths(rng, 300, 3);
    const Nufft3 nufft(x, s, NufftOptions{tol, 0});
    const double err = testing::SumRelativeError(x, s, str, nufft.Execute(str));
    EXPECT_LT(err, 3.0 * tol) << c.name << ", tolerance " << tol;
    // Not absurdly pessimistic either: the width tracks the tolerance (floor 1e-14).
    EXPECT_GT(err, 1e-4 * tol) << c.name << ", tolerance " << tol;
  }
}

INSTANTIATE_TEST_SUITE_P(Tolerances, NufftAccuracy, ::testing::Values(1e-3, 1e-6, 1e-9, 1e-12));

TEST(Nufft3, PreparedGridGivesExecutesValuesAtTargetsInTheBox) {
  // Prepare then ExecuteAt: a transform built on the corners of a box of targets, read
  // later at other targets inside it, against Execute of a transform built on those
  // targets with the same box (to rounding) and against the exact sum; a target's
  // value the same bits alone as in a batch; 3-D, planar and linear sources.
  const Case cases[] = {
      {"3-D cloud", {3.0, 2.0, 1.5}, {8.0, 6.0, 7.0}},
      {"planar (z exact)", {4.0, 5.0, 0.0}, {6.0, 6.0, 6.0}},
      {"linear (y, z exact)", {20.0, 0.0, 0.0}, {3.0, 3.0, 3.0}},
  };
  TestRng rng(12);
  const Eigen::Vector3d centre(-0.3, 0.5, 1.1);
  for (const Case& c : cases) {
    const Eigen::Matrix3Xd x = RandomCloud(rng, 300, c.x_half, Eigen::Vector3d(0.7, -1.2, 2.0));
    const Eigen::MatrixXcd str = RandomStrengths(rng, 300, 2);
    Eigen::Matrix3Xd corners(3, 2);
    corners.col(0) = centre - c.s_half;
    corners.col(1) = centre + c.s_half;
    Eigen::Matrix3Xd s = RandomCloud(rng, 200, c.s_half, centre);
    s.col(0) = corners.col(0);  // the box's own corners are inside it
    s.col(1) = corners.col(1);
    Eigen::Matrix3Xd with_box(3, s.cols() + 2);
    with_box << s, corners;
    const NufftOptions o{1e-12, 0};
    const Eigen::MatrixXcd f = Nufft3(x, with_box, o).Execute(str).topRows(s.cols());
    const Nufft3 probe(x, corners, o);
    const auto grid = probe.Prepare(str);
    const Eigen::MatrixXcd g = probe.ExecuteAt(*grid, s);
    const double l1 = str.cwiseAbs().colwise().sum().maxCoeff();
    EXPECT_LT((g - f).cwiseAbs().maxCoeff(), 1e-14 * l1) << c.name;
    EXPECT_LT(testing::SumRelativeError(x, s, str, g), 3e-12) << c.name;
    for (const Eigen::Index i : {Eigen::Index{0}, Eigen::Index{77}, Eigen::Index{199}}) {
      const Eigen::MatrixXcd one = probe.ExecuteAt(*grid, s.col(i));
      for (int a = 0; a < 2; ++a) EXPECT_EQ(one(0, a), g(i, a)) << c.name << " " << i;
    }
  }
}

TEST(Nufft3, ExecuteAtRefusesTargetsOutsideItsBoxAndOthersGrids) {
  // Outside the box the deconvolution grows and the grid aliases: a programming error,
  // never a silent loss of accuracy; a grid another transform prepared likewise.
  TestRng rng(13);
  const Eigen::Matrix3Xd x = RandomCloud(rng, 50, {3.0, 2.0, 1.5}, Eigen::Vector3d::Zero());
  Eigen::Matrix3Xd box(3, 2);
  box.col(0) = Eigen::Vector3d(-5, -5, -5);
  box.col(1) = Eigen::Vector3d(5, 5, 5);
  const Nufft3 a(x, box, NufftOptions{1e-9, 0}), b(x, box, NufftOptions{1e-9, 0});
  const auto grid = a.Prepare(RandomStrengths(rng, 50, 1));
  EXPECT_NO_THROW(a.ExecuteAt(*grid, box));
  EXPECT_THROW(a.ExecuteAt(*grid, Eigen::Vector3d(0, 5.001, 0)), InternalError);
  EXPECT_THROW(b.ExecuteAt(*grid, box), InternalError);
}

TEST(Nufft, DegenerateDimensionsCostNothing) {
  TestRng rng(12);
  const Eigen::Matrix3Xd planar = RandomCloud(rng, 50, {5, 5, 0}, Eigen::Vector3d::Zero());
  const Eigen::Matrix3Xd s = RandomCloud(rng, 50, {3, 3, 3}, Eigen::Vector3d::Zero());
  const NufftGeometry g = Nufft3::GeometryFor(planar, s, 1e-9);
  EXPECT_EQ(g.active_dims, 2);
  EXPECT_EQ(g.fft_size[2], 1);
  EXPECT_EQ(g.kernel_width, 10);  // ceil(log10(1e9)) + 1, Barnett et al. sec. 4.1
}

TEST(Nufft, SinglePointIsAPlaneWave) {
  Eigen::Matrix3Xd x(3, 1);
  x << 0.3, -0.2, 0.9;
  TestRng rng(13);
  const Eigen::Matrix3Xd s = RandomCloud(rng, 100, {10, 10, 10}, Eigen::Vector3d::Zero());
  Eigen::MatrixXcd c(1, 1);
  c(0, 0) = Complex(0.6, -0.8);
  const Eigen::MatrixXcd f = Nufft3(x, s, NufftOptions{1e-12, 0}).Execute(c);
  for (Eigen::Index k = 0; k < s.cols(); ++k) {
    const double p = s.col(k).dot(x.col(0));
    EXPECT_LT(std::abs(f(k, 0) - c(0, 0) * Complex(std::cos(p), std::sin(p))), 3e-12) << k;
  }
}

TEST(Nufft, ResultDoesNotDependOnThreads) {
  TestRng rng(14);
  const Eigen::Matrix3Xd x = RandomCloud(rng, 500, {3, 3, 3}, Eigen::Vector3d::Zero());
  const Eigen::Matrix3Xd s = RandomCloud(rng, 2000, {5, 5, 5}, Eigen::Vector3d::Zero());
  const Eigen::MatrixXcd c = RandomStrengths(rng, 500, 2);
  const Eigen::MatrixXcd f1 = Nufft3(x, s, NufftOptions{1e-9, 1}).Execute(c);
  const Eigen::MatrixXcd f2 = Nufft3(x, s, NufftOptions{1e-9, 2}).Execute(c);
  EXPECT_EQ((f1 - f2).cwiseAbs().maxCoeff(), 0.0);
}

// The adjoint, g_j = sum_k v_k exp(-i s_k . x_j): the exact transpose of the
// forward transform as computed (dot-product test to rounding), and within the
// forward bound of the exact sum with the roles of points and targets swapped:
// g = conj(sum_k conj(v_k) exp(+i x_j . s_k)).
class NufftAdjoint : public ::testing::TestWithParam<double> {};

TEST_P(NufftAdjoint, IsTheTransposeAndMatchesDirectSum) {
  const double tol = GetParam();
  const Case cases[] = {
      {"3-D cloud", {3.0, 2.0, 1.5}, {8.0, 6.0, 7.0}},
      {"planar (z exact)", {4.0, 5.0, 0.0}, {6.0, 6.0, 6.0}},
      {"linear (y, z exact)", {20.0, 0.0, 0.0}, {3.0, 3.0, 3.0}},
  };
  TestRng rng(18);
  for (const Case& c : cases) {
    for (int cols = 1; cols <= 3; ++cols) {
      const Eigen::Matrix3Xd x = RandomCloud(rng, 200, c.x_half, Eigen::Vector3d(0.7, -1.2, 2.0));
      const Eigen::Matrix3Xd s = RandomCloud(rng, 300, c.s_half, Eigen::Vector3d(-0.3, 0.5, 1.1));
      const Eigen::MatrixXcd str = RandomStrengths(rng, 200, cols);
      const Eigen::MatrixXcd v = RandomStrengths(rng, 300, cols);
      const Nufft3 nufft(x, s, NufftOptions{tol, 0});
      const Eigen::MatrixXcd g = nufft.Adjoint(v);
      const double mismatch = testing::AdjointMismatch(str, nufft.Execute(str), v, g);
      EXPECT_LT(mismatch, 1e-14) << c.name << ", " << cols << " columns, tolerance " << tol;
      const double err = testing::SumRelativeError(s, x, v.conjugate(), g.conjugate());
      EXPECT_LT(err, 3.0 * tol) << c.name << ", tolerance " << tol;
      EXPECT_GT(err, 1e-4 * tol) << c.name << ", tolerance " << tol;
    }
  }
}

INSTANTIATE_TEST_SUITE_P(Tolerances, NufftAdjoint, ::testing::Values(1e-3, 1e-9, 1e-12));

TEST(Nufft2, AdjointIsTheTranspose) {
  const std::array<int, 3> shapes[] = {{7, 12, 5}, {1, 40, 1}, {1, 16, 17}, {3, 1, 2}};
  TestRng rng(19);
  for (const auto& modes : shapes) {
    const int nm = modes[0] * modes[1] * modes[2];
    const Eigen::Matrix3Xd t = RandomCloud(rng, 300, {40.0, 40.0, 40.0}, Eigen::Vector3d::Zero());
    const Eigen::MatrixXcd c = RandomStrengths(rng, nm, 2);
    const Eigen::MatrixXcd v = RandomStrengths(rng, 300, 2);
    const Nufft2 nufft(modes, t, NufftOptions{1e-9, 0});
    EXPECT_LT(testing::AdjointMismatch(c, nufft.Execute(c), v, nufft.Adjoint(v)), 1e-14)
        << modes[0] << "x" << modes[1] << "x" << modes[2];
  }
}

TEST(Nufft, AdjointDoesNotDependOnThreads) {
  TestRng rng(20);
  const Eigen::Matrix3Xd x = RandomCloud(rng, 500, {3, 3, 3}, Eigen::Vector3d::Zero());
  const Eigen::Matrix3Xd s = RandomCloud(rng, 2000, {5, 5, 5}, Eigen::Vector3d::Zero());
  const Eigen::MatrixXcd v = RandomStrengths(rng, 2000, 2);
  const Eigen::MatrixXcd g1 = Nufft3(x, s, NufftOptions{1e-9, 1}).Adjoint(v);
  const Eigen::MatrixXcd g2 = Nufft3(x, s, NufftOptions{1e-9, 2}).Adjoint(v);
  const Eigen::MatrixXcd g3 = Nufft3(x, s, NufftOptions{1e-9, 3}).Adjoint(v);
  EXPECT_EQ((g1 - g2).cwiseAbs().maxCoeff(), 0.0);
  EXPECT_EQ((g1 - g3).cwiseAbs().maxCoeff(), 0.0);
}

// One const transform executed from several threads at once (the FFTW plans are
// made once and shared; each execution has its own grid): every result equals
// the serial one bit for bit, for each component count (one plan each).
TEST(Nufft, ConcurrentExecutesOfOneTransformAgree) {
  TestRng rng(17);
  const Eigen::Matrix3Xd x = RandomCloud(rng, 200, {3, 2, 1}, Eigen::Vector3d::Zero());
  const Eigen::Matrix3Xd s = RandomCloud(rng, 300, {5, 5, 5}, Eigen::Vector3d::Zero());
  const Nufft3 nufft(x, s, NufftOptions{1e-9, 1});
  std::vector<Eigen::MatrixXcd> in, serial;
  for (int cols = 1; cols <= 3; ++cols) {
    in.push_back(RandomStrengths(rng, 200, cols));
    serial.push_back(Nufft3(x, s, NufftOptions{1e-9, 1}).Execute(in.back()));
  }
  constexpr int kThreads = 4, kRepeats = 5;
  std::vector<std::vector<Eigen::MatrixXcd>> got(kThreads);
  std::vector<std::thread> threads;
  for (int t = 0; t < kThreads; ++t) {
    threads.emplace_back([&, t] {
      for (int r = 0; r < kRepeats; ++r) {
        for (std::size_t i = 0; i < in.size(); ++i) {
          got[static_cast<std::size_t>(t)].push_back(nufft.Execute(in[(i + t) % in.size()]));
        }
      }
    });
  }
  for (std::thread& t : threads) t.join();
  for (int t = 0; t < kThreads; ++t) {
    const auto& g = got[static_cast<std::size_t>(t)];
    ASSERT_EQ(g.size(), in.size() * kRepeats);
    for (std::size_t k = 0; k < g.size(); ++k) {
      const Eigen::MatrixXcd& want = serial[(k + static_cast<std::size_t>(t)) % in.size()];
      ASSERT_EQ(g[k].cols(), want.cols());
      EXPECT_EQ((g[k] - want).cwiseAbs().maxCoeff(), 0.0) << "thread " << t << ", call " << k;
    }
  }
}

// The type-2 stage on its own: modes l_d = i_d - floor(M_d / 2) against the
// direct sum sum_l c_l exp(+i l . t_k), in long double. Odd and even mode counts,
// one to three active dimensions, and targets far outside one period (the sum
// is 2 pi periodic in each t_d; the transform reduces them itself).
class Nufft2Accuracy : public ::testing::TestWithParam<double> {};

TEST_P(Nufft2Accuracy, MatchesDirectSum) {
  const double tol = GetParam();
  const std::array<int, 3> shapes[] = {{7, 12, 5}, {1, 40, 1}, {1, 16, 17}, {3, 1, 2}};
  TestRng rng(16);
  for (const auto& modes : shapes) {
    const int nm = modes[0] * modes[1] * modes[2];
    const Eigen::Matrix3Xd t = RandomCloud(rng, 300, {40.0, 40.0, 40.0}, Eigen::Vector3d::Zero());
    const Eigen::MatrixXcd c = RandomStrengths(rng, nm, 2);
    const Eigen::MatrixXcd f = Nufft2(modes, t, NufftOptions{tol, 0}).Execute(c);
    double worst = 0;
    for (Eigen::Index a = 0; a < c.cols(); ++a) {
      const double l1 = c.col(a).cwiseAbs().sum();
      for (Eigen::Index k = 0; k < t.cols(); ++k) {
        LComplex sum = 0;
        for (int i0 = 0; i0 < modes[0]; ++i0) {
          for (int i1 = 0; i1 < modes[1]; ++i1) {
            for (int i2 = 0; i2 < modes[2]; ++i2) {
              const long double p = static_cast<long double>(i0 - modes[0] / 2) * t(0, k) +
                                    static_cast<long double>(i1 - modes[1] / 2) * t(1, k) +
                                    static_cast<long double>(i2 - modes[2] / 2) * t(2, k);
              const Complex cl = c((i0 * modes[1] + i1) * modes[2] + i2, a);
              sum += LComplex(cl.real(), cl.imag()) * LComplex(cosl(p), sinl(p));
            }
          }
        }
        const LComplex d = LComplex(f(k, a).real(), f(k, a).imag()) - sum;
        worst = std::max(worst, static_cast<double>(std::abs(d)) / l1);
      }
    }
    const std::string shape =
        std::to_string(modes[0]) + "x" + std::to_string(modes[1]) + "x" + std::to_string(modes[2]);
    EXPECT_LT(worst, 3.0 * tol) << shape << ", tolerance " << tol;
    EXPECT_GT(worst, 1e-4 * tol) << shape << ", tolerance " << tol;
  }
}

INSTANTIATE_TEST_SUITE_P(Tolerances, Nufft2Accuracy, ::testing::Values(1e-3, 1e-6, 1e-9, 1e-12));

TEST(Nufft2, GeometryPadsActiveDimensionsOnly) {
  const NufftGeometry g = Nufft2::GeometryFor({1, 64, 9}, 1e-6);
  EXPECT_EQ(g.active_dims, 2);
  EXPECT_EQ(g.fft_size[0], 1);
  EXPECT_EQ(g.fft_size[1], 128);  // sigma = 2, already 2-3-5 smooth
  EXPECT_EQ(g.fft_size[2], 18);
  EXPECT_THROW(Nufft2::GeometryFor({0, 4, 4}, 1e-6), InvalidArgument);
  const Nufft2 n({2, 2, 1}, Eigen::Matrix3Xd::Zero(3, 3), NufftOptions{1e-6, 0});
  EXPECT_THROW(n.Execute(Eigen::MatrixXcd::Ones(5, 1)), InvalidArgument);
}

TEST(Nufft, RejectsBadArguments) {
  TestRng rng(15);
  const Eigen::Matrix3Xd x = RandomCloud(rng, 5, {1, 1, 1}, Eigen::Vector3d::Zero());
  EXPECT_THROW(Nufft3(x, x, NufftOptions{0.0, 0}), InvalidArgument);
  EXPECT_THROW(Nufft3(x, x, NufftOptions{0.5, 0}), InvalidArgument);
  const Nufft3 nufft(x, x, NufftOptions{1e-6, 0});
  EXPECT_THROW(nufft.Execute(Eigen::MatrixXcd::Ones(4, 1)), InvalidArgument);
  EXPECT_THROW(nufft.Execute(Eigen::MatrixXcd::Ones(5, 4)), InvalidArgument);
  EXPECT_THROW(nufft.Adjoint(Eigen::MatrixXcd::Ones(4, 1)), InvalidArgument);
  EXPECT_THROW(nufft.Adjoint(Eigen::MatrixXcd::Ones(5, 0)), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
