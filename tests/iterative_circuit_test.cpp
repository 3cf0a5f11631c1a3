// The port circuit without the impedance matrix (engine/coupling/iterative_circuit.h):
// the streamed product Z x against the dense Z, the GMRES currents against the
// direct LU solve of the same circuit (the dense route of coupling.h, bounded by
// the residual and the smallest singular value from Eigen's JacobiSVD), the power
// balance above the matrix limit, and the refusal when it does not converge.
#include "engine/coupling/iterative_circuit.h"

#include <cmath>
#include <string>

#include <gtest/gtest.h>
#include <Eigen/SVD>

#include "engine/coupling/coupling.h"
#include "engine/coupling/self_impedance.h"
#include "engine/error.h"
#include "engine/power/impedance.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::RandomArray;
using testing::TestRng;

// A panel of driven rows with a parasitic reflector row under each (0.12 lambda
// below): horizontal triangular dipoles of lambda/20 on wires of lambda/300, copper.
// Each source is 1 V behind 50 ohm plus a coil that cancels the self reactance; each
// reflector is loaded by a coil within 2 % of resonance (a strong, inductively
// loaded reflector) and a 1 ohm resistance. every_current > 0 turns every such
// element into a current-forced one (b - Z_UF I_F).
struct Panel {
  Array array;
  std::vector<Port> ports;
  std::vector<Wire> wires;
};
Panel ParasiticPanel(int cols, int rows, Ground ground, int every_current = 0) {
  Panel p;
  p.array.frequency_hz = 3e8;  // lambda = 1 m
  p.array.ground = ground;
  const double lambda = p.array.wavelength_m(), k = p.array.wavenumber_rad_m();
  const double length = lambda / 20, radius = lambda / 300;
  const double xs = SelfReactance(
      MakeDipole(Vec3::Zero(), Vec3::UnitX(), length, Distribution::kTriangular), radius, k);
  int count = 0;
  for (int r = 0; r < rows; ++r) {
    for (int c = 0; c < cols; ++c) {
      for (int level = 0; level < 2; ++level) {
        const Vec3 at(0.5 * lambda * c, 0.5 * lambda * r, (0.3 - 0.12 * level) * lambda);
        p.array.dipoles.push_back(MakeDipole(at, Vec3::UnitX(), length, Distribution::kTriangular));
        p.wires.push_back({radius, std::numeric_limits<double>::quiet_NaN(), 5.8e7});
        ++count;
        if (every_current > 0 && count % every_current == 0) {
          p.ports.push_back({PortKind::kCurrent, std::polar(0.01, 0.3 * c), 0.0, 0.0});
        } else if (level == 0) {  // steered a little along x
          p.ports.push_back({PortKind::kDrive, 0.0, std::polar(1.0, -0.4 * c), {50.0, -xs}});
        } else {
          p.ports.push_back({PortKind::kLoad, 0.0, 0.0, {1.0, -0.98 * xs}});
        }
      }
    }
  }
  return p;
}

TEST(IterativeCircuit, StreamedProductEqualsTheDenseMatrix) {
  // One Z x row by row against ImpedanceMatrix(...) x: the same closed forms
  // (impedance.h) summed in another order, so they agree to rounding of the row's
  // terms, sum_n |Z_mn| |x_n|. A missing image, self reactance or loss term, or a
  // transposed kernel, is off by far more.
  TestRng rng(2024);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = RandomArray(rng, 150, g, 3.0);
    Eigen::VectorXd xs(a.size()), loss(a.size());
    for (Eigen::Index e = 0; e < xs.size(); ++e) {
      xs[e] = rng.Uniform(-2000.0, 500.0);
      loss[e] = rng.Uniform(0.0, 3.0);
    }
    Eigen::MatrixXcd z = ImpedanceMatrix(a, xs);
    z.diagonal().real() += loss;
    const Eigen::VectorXcd dense = z * a.currents;
    const Eigen::VectorXcd streamed = ImpedanceProductStreamed(a, xs, loss, a.currents);
    const Eigen::VectorXd scale = z.cwiseAbs() * a.currents.cwiseAbs();
    for (Eigen::Index e = 0; e < dense.size(); ++e)
      EXPECT_LE(std::abs(streamed[e] - dense[e]), 1e-13 * scale[e]) << e;
  }
}

// The currents of the iterative route against the LU solve of the whole matrix:
// with A = Z_UU + diag Z_p and r the final residual, |I_it - I_lu| <= |r| / s_min(A)
// (s_min from Eigen's JacobiSVD), plus the LU's own rounding, eps cond(A) |I|.
void ExpectIterativeEqualsDirect(const Panel& p, std::size_t block_size, int restart) {
  CouplingOptions iterative, direct;
  iterative.max_dipoles = 10;  // below N: the iterative route
  iterative.iterative.block_size = block_size;
  iterative.iterative.restart = restart;
  direct.max_dipoles = 10;
  direct.force_matrix = true;
  const CouplingResult it = SolveCoupling(p.array, p.ports, p.wires, iterative);
  const CouplingResult lu = SolveCoupling(p.array, p.ports, p.wires, direct);
  ASSERT_TRUE(it.route.iterative);
  ASSERT_FALSE(lu.route.iterative);
  EXPECT_EQ(it.impedance_ohm.size(), 0);
  EXPECT_GT(it.route.iterations, 0);
  EXPECT_EQ(it.route.blocks, (it.route.unknowns + block_size - 1) / block_size);
  // More iterations than a restart cycle: the restarts are exercised too.
  EXPECT_GT(it.route.iterations, restart) << it.route.iterations;
  EXPECT_GT(it.route.restarts, 1) << it.route.restarts;
  EXPECT_LE(it.route.relative_residual, it.route.target_residual);

  // The reported residual, recomputed with the dense Z (loss on the diagonal).
  std::vector<Eigen::Index> u;
  for (std::size_t m = 0; m < p.ports.size(); ++m)
    if (p.ports[m].kind != PortKind::kCurrent) u.push_back(static_cast<Eigen::Index>(m));
  const auto nu = static_cast<Eigen::Index>(u.size());
  Eigen::MatrixXcd z = lu.impedance_ohm;
  z.diagonal().real() += lu.loss_resistance_ohm;
  Eigen::MatrixXcd a(nu, nu);
  Eigen::VectorXcd b(nu), b_eff(nu), iu(nu), lu_u(nu);
  for (Eigen::Index i = 0; i < nu; ++i) {
    const Port& port = p.ports[static_cast<std::size_t>(u[i])];
    for (Eigen::Index j = 0; j < nu; ++j) a(i, j) = z(u[i], u[j]);
    a(i, i) += port.impedance_ohm;
    b[i] = port.kind == PortKind::kDrive ? port.voltage_v : Complex(0.0);
    iu[i] = it.circuit.current_a[u[i]];
    lu_u[i] = lu.circuit.current_a[u[i]];
  }
  Eigen::VectorXcd forced = lu.circuit.current_a;
  for (Eigen::Index i : u) forced[i] = 0;
  const Eigen::VectorXcd zf = z * forced;
  for (Eigen::Index i = 0; i < nu; ++i) b_eff[i] = b[i] - zf[u[i]];
  const double residual = (b_eff - a * iu).norm() / b_eff.norm();
  EXPECT_NEAR(residual, it.route.relative_residual, 1e-13);

  const Eigen::JacobiSVD<Eigen::MatrixXcd> svd(a);
  const double s_min = svd.singularValues().tail(1)[0];
  const double cond = svd.singularValues()[0] / s_min;
  const double bound =
      2 * it.route.relative_residual * b_eff.norm() / s_min + 1e-15 * cond * lu_u.norm();
  EXPECT_LE((iu - lu_u).norm(), bound) << "cond " << cond;
  EXPECT_GT((iu - lu_u).norm(), 0);  // two routes, not one: they differ in rounding
  // Figures from the currents follow them.
  const double i_rel = bound / lu_u.norm();
  EXPECT_NEAR(it.radiated_w, lu.radiated_w, 4 * i_rel * lu.radiated_w + 1e-13 * lu.radiated_w);
  EXPECT_NEAR(it.supplied_w, lu.supplied_w, 4 * i_rel * lu.supplied_w + 1e-13 * lu.supplied_w);
  EXPECT_NEAR(it.load_loss_w, lu.load_loss_w, 4 * i_rel * lu.load_loss_w);
  for (Eigen::Index i = 0; i < nu; ++i) {
    if (p.ports[static_cast<std::size_t>(u[i])].kind != PortKind::kDrive) continue;
    const Complex zi = it.circuit.input_impedance_ohm[u[i]];
    const Complex zl = lu.circuit.input_impedance_ohm[u[i]];
    EXPECT_LE(std::abs(zi - zl), 1e-6 * std::abs(zl)) << u[i];  // six printed digits
  }
}

TEST(IterativeCircuit, CurrentsEqualTheDirectSolveInFreeSpace) {
  ExpectIterativeEqualsDirect(ParasiticPanel(9, 8, Ground::kNone), 64, 2);  // 3 blocks
  ExpectIterativeEqualsDirect(ParasiticPanel(9, 8, Ground::kNone), 1, 3);   // diagonal
}

TEST(IterativeCircuit, CurrentsEqualTheDirectSolveOverGroundWithCurrentPorts) {
  // Ground images in every product and in the preconditioner's blocks; every 7th
  // element forced by a current source (the right-hand side b - Z_UF I_F).
  ExpectIterativeEqualsDirect(ParasiticPanel(9, 8, Ground::kPec, 7), 16, 3);
  ExpectIterativeEqualsDirect(ParasiticPanel(9, 8, Ground::kPec, 7), 2, 4);
}

TEST(IterativeCircuit, PowerBalanceAboveTheMatrixLimit) {
  // 4224 dipoles, above CouplingOptions::max_dipoles (4096): the default route is
  // the iterative one. Supplied = radiated + ohmic + in the loads + in the sources
  // (energy conservation). The radiated power sums the R rows only (power_large.h),
  // the supplied one is 1/2 Re(V_s I*) at the sources, so they agree only when
  // the currents solve the circuit: the balance errs by 1/2 Re(r^H I).
  const Panel p = ParasiticPanel(48, 44, Ground::kPec);
  ASSERT_GT(p.array.size(), CouplingOptions{}.max_dipoles);
  int last_iteration = -1;
  double last_residual = 1;
  CouplingOptions options;
  options.iterative.progress = [&](int iteration, double residual) {
    EXPECT_GE(iteration, last_iteration);
    last_iteration = iteration;
    last_residual = residual;
  };
  const CouplingResult r = SolveCoupling(p.array, p.ports, p.wires, options);
  ASSERT_TRUE(r.route.iterative);
  EXPECT_EQ(r.impedance_ohm.size(), 0);
  EXPECT_LE(r.route.relative_residual, 1e-12);
  EXPECT_EQ(last_iteration, r.route.iterations);
  EXPECT_EQ(last_residual, r.route.relative_residual);
  const double losses = r.ohmic_w + r.load_loss_w + r.source_loss_w;
  EXPECT_NEAR(r.supplied_w, r.radiated_w + losses, 1e-10 * r.supplied_w);
  EXPECT_GT(r.load_loss_w, 0);
  EXPECT_GT(r.radiated_w, 0);
}

TEST(IterativeCircuit, RefusesWhenItDoesNotConverge) {
  const Panel p = ParasiticPanel(6, 5, Ground::kNone);
  CouplingOptions options;
  options.max_dipoles = 10;
  options.iterative.max_iterations = 2;
  options.iterative.block_size = 1;  // a block of all 60 would solve it in one step
  try {
    SolveCoupling(p.array, p.ports, p.wires, options);
    ADD_FAILURE() << "two iterations reached 1e-12";
  } catch (const InvalidArgument& e) {
    const std::string what = e.what();
    EXPECT_NE(what.find("did not converge after 2 iterations at a relative residual of"),
              std::string::npos)
        << what;
    EXPECT_NE(what.find("--resistance-matrix"), std::string::npos) << what;
  }
}

}  // namespace
}  // namespace lobecast
