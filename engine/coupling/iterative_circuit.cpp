// The port circuit solved by GMRES on streamed products (iterative_circuit.h).
#include "engine/coupling/iterative_circuit.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <sstream>
#include <utility>

#include <Eigen/LU>

#include "engine/check.h"
#include "engine/error.h"
#include "engine/power/impedance.h"
#include "engine/power/power_large.h"

namespace lobecast {
namespace {

using Vec = Eigen::VectorXcd;

// Z x with the diagonal's self reactance and loss, and the radiated power of x as
// currents (from the R rows alone, power_large.h).
Vec FullProduct(const Array& array, const Eigen::VectorXd& xs, const Eigen::VectorXd& loss,
                const Vec& x, int num_threads, double* radiated_w = nullptr) {
  const StreamedPower sp = RadiatedPowerStreamed(array, x, num_threads);
  Vec zx = sp.impedance_product_v;
  for (Eigen::Index e = 0; e < zx.size(); ++e) zx[e] += Complex(loss[e], xs[e]) * x[e];
  if (radiated_w != nullptr) *radiated_w = sp.radiated_power_w;
  return zx;
}

// Bits 0..20 of v moved to every third bit (a Morton key's one axis).
std::uint64_t SpreadBits(std::uint64_t v) {
  v &= 0x1fffffULL;
  v = (v | v << 32) & 0x1f00000000ffffULL;
  v = (v | v << 16) & 0x1f0000ff0000ffULL;
  v = (v | v << 8) & 0x100f00f00f00f00fULL;
  v = (v | v << 4) & 0x10c30c30c30c30c3ULL;
  v = (v | v << 2) & 0x1249249249249249ULL;
  return v;
}

// Block-diagonal preconditioner over the unknowns (positions in the U vector).
class BlockPreconditioner {
 public:
  BlockPreconditioner(const Array& array, const std::vector<Eigen::Index>& unknown,
                      const Eigen::VectorXd& xs, const Eigen::VectorXd& loss, const Vec& port_z,
                      std::size_t block_size) {
    const auto nu = unknown.size();
    // Morton order of the unknowns on a lambda/4 grid: near neighbours end up close.
    const double cell = array.wavelength_m() / 4;
    Vec3 low = array.dipoles[static_cast<std::size_t>(unknown[0])].position_m;
    for (Eigen::Index m : unknown)
      low = low.cwiseMin(array.dipoles[static_cast<std::size_t>(m)].position_m);
    std::vector<std::pair<std::uint64_t, std::size_t>> keys(nu);
    for (std::size_t i = 0; i < nu; ++i) {
      const Vec3 p = (array.dipoles[static_cast<std::size_t>(unknown[i])].position_m - low) / cell;
      std::uint64_t key = 0;
      for (int a = 0; a < 3; ++a) {
        const double q = std::min(std::floor(p[a]), static_cast<double>(0x1fffff));
        key |= SpreadBits(static_cast<std::uint64_t>(q)) << a;
      }
      keys[i] = {key, i};
    }
    std::sort(keys.begin(), keys.end());
    const std::size_t size = std::max<std::size_t>(1, block_size);
    for (std::size_t first = 0; first < nu; first += size) {
      std::vector<Eigen::Index> members;
      for (std::size_t i = first; i < std::min(nu, first + size); ++i)
        members.push_back(static_cast<Eigen::Index>(keys[i].second));
      members_.push_back(std::move(members));
    }
    lu_.resize(members_.size());
    usable_.assign(members_.size(), 1);
    // N_U x block_size kernels and the blocks' LU: cheap beside one product.
    const auto blocks = static_cast<std::ptrdiff_t>(members_.size());
    for (std::ptrdiff_t b = 0; b < blocks; ++b) {
      const std::vector<Eigen::Index>& mem = members_[static_cast<std::size_t>(b)];
      const auto nb = static_cast<Eigen::Index>(mem.size());
      Array sub;
      sub.frequency_hz = array.frequency_hz;
      sub.ground = array.ground;
      Eigen::VectorXd sub_xs(nb);
      for (Eigen::Index i = 0; i < nb; ++i) {
        const Eigen::Index m = unknown[static_cast<std::size_t>(mem[static_cast<std::size_t>(i)])];
        sub.dipoles.push_back(array.dipoles[static_cast<std::size_t>(m)]);
        sub_xs[i] = xs[m];
      }
      Eigen::MatrixXcd a = ImpedanceMatrix(sub, sub_xs, 1);  // the block of Z, exactly
      for (Eigen::Index i = 0; i < nb; ++i) {
        const Eigen::Index u = mem[static_cast<std::size_t>(i)];
        a(i, i) += loss[unknown[static_cast<std::size_t>(u)]] + port_z[u];
      }
      auto& lu = lu_[static_cast<std::size_t>(b)];
      lu.compute(a);
      // A singular block (lossless loads at resonance) is left unpreconditioned.
      if (!(lu.rcond() > 1e-14)) usable_[static_cast<std::size_t>(b)] = 0;
    }
  }

  std::size_t blocks() const { return members_.size(); }

  Vec Apply(const Vec& v) const {
    Vec out = v;
    for (std::size_t b = 0; b < members_.size(); ++b) {
      if (!usable_[b]) continue;
      const std::vector<Eigen::Index>& mem = members_[b];
      Vec vb(static_cast<Eigen::Index>(mem.size()));
      for (std::size_t i = 0; i < mem.size(); ++i) vb[static_cast<Eigen::Index>(i)] = v[mem[i]];
      const Vec xb = lu_[b].solve(vb);
      for (std::size_t i = 0; i < mem.size(); ++i) out[mem[i]] = xb[static_cast<Eigen::Index>(i)];
    }
    return out;
  }

 private:
  std::vector<std::vector<Eigen::Index>> members_;
  std::vector<Eigen::PartialPivLU<Eigen::MatrixXcd>> lu_;
  std::vector<char> usable_;
};

// The plane rotation that zeroes b against a: [c s; -conj(s) c] [a; b] = [r; 0].
void Rotation(Complex a, Complex b, double& c, Complex& s) {
  const double aa = std::abs(a), r = std::hypot(aa, std::abs(b));
  if (r == 0) {
    c = 1, s = 0;
  } else if (aa == 0) {
    c = 0, s = std::conj(b) / std::abs(b);
  } else {
    c = aa / r, s = (a / aa) * std::conj(b) / r;
  }
}

}  // namespace

Eigen::VectorXcd ImpedanceProductStreamed(const Array& array,
                                          const Eigen::VectorXd& self_reactance_ohm,
                                          const Eigen::VectorXd& loss_resistance_ohm,
                                          const Eigen::VectorXcd& x, int num_threads) {
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(self_reactance_ohm.size()), array.size());
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(loss_resistance_ohm.size()), array.size());
  return FullProduct(array, self_reactance_ohm, loss_resistance_ohm, x, num_threads);
}

IterativeCircuit SolveCircuitIterative(const Array& array,
                                       const Eigen::VectorXd& self_reactance_ohm,
                                       const Eigen::VectorXd& loss_resistance_ohm,
                                       const std::vector<Port>& ports,
                                       const IterativeCircuitOptions& options) {
  const auto t0 = std::chrono::steady_clock::now();
  const auto n = static_cast<Eigen::Index>(array.size());
  LOBECAST_CHECK_EQ(static_cast<Eigen::Index>(ports.size()), n);
  LOBECAST_CHECK_EQ(self_reactance_ohm.size(), n);
  LOBECAST_CHECK_EQ(loss_resistance_ohm.size(), n);
  CheckPortValues(ports);
  const Eigen::VectorXd& xs = self_reactance_ohm;
  const Eigen::VectorXd& loss = loss_resistance_ohm;
  const int threads = options.num_threads;
  std::vector<Eigen::Index> unknown;
  Vec forced = Vec::Zero(n);
  for (Eigen::Index m = 0; m < n; ++m) {
    const Port& p = ports[static_cast<std::size_t>(m)];
    if (p.kind == PortKind::kCurrent)
      forced[m] = p.current_a;
    else
      unknown.push_back(m);
  }
  const auto nu = static_cast<Eigen::Index>(unknown.size());
  Vec port_z(nu), b(nu);
  for (Eigen::Index i = 0; i < nu; ++i) {
    const Port& p = ports[static_cast<std::size_t>(unknown[static_cast<std::size_t>(i)])];
    port_z[i] = p.impedance_ohm;
    b[i] = p.kind == PortKind::kDrive ? p.voltage_v : Complex(0.0);
  }
  IterativeCircuit out;
  CircuitRoute& route = out.route;
  route.iterative = true;
  route.target_residual = options.target_relative_residual;
  route.unknowns = unknown.size();

  // The whole current vector from the unknowns, and A y = (Z_UU + diag Z_p) y.
  const auto currents = [&](const Vec& y, const Vec& base) {
    Vec full = base;
    for (Eigen::Index i = 0; i < nu; ++i) full[unknown[static_cast<std::size_t>(i)]] = y[i];
    return full;
  };
  const auto apply = [&](const Vec& y) {
    const Vec zx = FullProduct(array, xs, loss, currents(y, Vec::Zero(n)), threads);
    Vec ay(nu);
    for (Eigen::Index i = 0; i < nu; ++i)
      ay[i] = zx[unknown[static_cast<std::size_t>(i)]] + port_z[i] * y[i];
    return ay;
  };
  // The true residual of the port equations for I_U = y with the forced currents;
  // the product's V = Z I and radiated power are kept (the last ones are the answer).
  Vec full_i, zi;
  const auto residual = [&](const Vec& y) {
    full_i = currents(y, forced);
    zi = FullProduct(array, xs, loss, full_i, threads, &out.radiated_w);
    Vec r(nu);
    for (Eigen::Index i = 0; i < nu; ++i)
      r[i] = b[i] - zi[unknown[static_cast<std::size_t>(i)]] - port_z[i] * y[i];
    return r;
  };

  Vec y = Vec::Zero(nu);
  Vec r = residual(y);  // b - Z_UF I_F
  const double b_norm = r.norm();
  const auto report = [&](int iteration, double rel) {
    if (options.progress) options.progress(iteration, rel);
  };
  if (nu > 0 && b_norm > 0) {
    const BlockPreconditioner precondition(array, unknown, xs, loss, port_z, options.block_size);
    route.blocks = precondition.blocks();
    const Eigen::Index m = std::max<Eigen::Index>(1, std::min<Eigen::Index>(options.restart, nu));
    Eigen::MatrixXcd v(nu, m + 1), h(m + 1, m);
    std::vector<double> c(static_cast<std::size_t>(m));
    std::vector<Complex> s(static_cast<std::size_t>(m));
    Vec g(m + 1);
    double rel = 1;
    for (;;) {
      const double previous = rel;
      rel = r.norm() / b_norm;
      report(route.iterations, rel);
      if (rel <= options.target_relative_residual) break;
      // Out of iterations, or a whole cycle without progress (restarted GMRES then
      // repeats the same Krylov space): refuse with the residual reached.
      const bool stalled = route.restarts > 0 && rel > 0.99 * previous;
      if (route.iterations >= options.max_iterations || stalled) {
        std::ostringstream msg;
        msg << "circuit: the iterative solve of the " << nu
            << " driven and loaded dipoles (restarted GMRES on streamed products) "
            << (stalled ? "stopped making progress" : "did not converge") << " after "
            << route.iterations << " iterations at a relative residual of " << rel << " (wanted "
            << options.target_relative_residual
            << "): the circuit is too ill-conditioned for it; expected loads or sources with "
               "some resistance off resonance (or the direct solve with the whole impedance "
               "matrix, "
            << 16.0 * static_cast<double>(n) * static_cast<double>(n) / 1e9
            << " GB: compute --resistance-matrix)";
        throw InvalidArgument(msg.str());
      }
      const double beta = r.norm();
      v.col(0) = r / beta;
      h.setZero();
      g.setZero();
      g[0] = beta;
      Eigen::Index j = 0;
      while (j < m && route.iterations < options.max_iterations) {
        Vec w = apply(precondition.Apply(v.col(j)));
        ++route.iterations;
        // Modified Gram-Schmidt, twice (orthogonality to rounding at a 1e-12 target).
        for (int pass = 0; pass < 2; ++pass) {
          for (Eigen::Index i = 0; i <= j; ++i) {
            const Complex hij = v.col(i).dot(w);  // v_i^H w
            h(i, j) += hij;
            w -= hij * v.col(i);
          }
        }
        const double hn = w.norm();
        h(j + 1, j) = hn;
        for (Eigen::Index i = 0; i < j; ++i) {
          const auto iu = static_cast<std::size_t>(i);
          const Complex t = c[iu] * h(i, j) + s[iu] * h(i + 1, j);
          h(i + 1, j) = -std::conj(s[iu]) * h(i, j) + c[iu] * h(i + 1, j);
          h(i, j) = t;
        }
        const auto ju = static_cast<std::size_t>(j);
        Rotation(h(j, j), h(j + 1, j), c[ju], s[ju]);
        h(j, j) = c[ju] * h(j, j) + s[ju] * h(j + 1, j);
        h(j + 1, j) = 0;
        g[j + 1] = -std::conj(s[ju]) * g[j];
        g[j] = c[ju] * g[j];
        ++j;
        const double estimate = std::abs(g[j]) / b_norm;
        report(route.iterations, estimate);
        if (hn == 0 || estimate <= options.target_relative_residual) break;
        v.col(j) = w / hn;
      }
      const Vec coef = h.topLeftCorner(j, j).triangularView<Eigen::Upper>().solve(g.head(j));
      y += precondition.Apply(v.leftCols(j) * coef);
      ++route.restarts;
      r = residual(y);
    }
    route.relative_residual = rel;
  }
  out.circuit = CircuitFromVoltages(ports, std::move(full_i), std::move(zi));
  route.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return out;
}

}  // namespace lobecast
