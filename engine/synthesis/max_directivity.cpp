#include "engine/synthesis/max_directivity.h"

#include <cfloat>
#include <cmath>
#include <sstream>

#include <Eigen/Dense>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/ground.h"
#include "engine/intensity.h"
#include "engine/power/radiated_power.h"
#include "engine/synthesis/synthesis_common.h"

namespace lobecast {
namespace {

using namespace synthesis_detail;

void CheckOptions(const MaxDirectivityOptions& o) {
  std::ostringstream m;
  if (!std::isfinite(o.regularization) || o.regularization < 0)
    m << "regularization: found " << o.regularization << "; expected a finite value >= 0";
  else if (!(o.cg_tolerance > 0 && o.cg_tolerance < 1))
    m << "cg_tolerance: found " << o.cg_tolerance << "; expected a value in (0, 1)";
  else if (!(o.cg_directivity_tolerance >= 0 && o.cg_directivity_tolerance < 1))
    m << "cg_directivity_tolerance: found " << o.cg_directivity_tolerance
      << "; expected a value in [0, 1)";
  else if (o.cg_max_iterations < 1)
    m << "cg_max_iterations: found " << o.cg_max_iterations << "; expected at least 1";
  else if (o.num_threads < 0)
    m << "num_threads: found " << o.num_threads << "; expected >= 0";
  if (!m.str().empty()) throw InvalidArgument(m.str());
}

// R_mm of every dipole (ohm), images included, as ResistanceMatrix's diagonal.
Eigen::VectorXd SelfResistances(const Array& array) {
  const double k = array.wavenumber_rad_m();
  Eigen::VectorXd d(static_cast<Eigen::Index>(array.size()));
  for (std::size_t m = 0; m < array.size(); ++m) {
    const Dipole& dm = array.dipoles[m];
    double v = MutualResistance(dm, dm, k);
    if (array.ground == Ground::kPec) v += MutualResistance(dm, ImageOf(dm), k);
    d[static_cast<Eigen::Index>(m)] = v;
  }
  return d;
}

struct Solved {
  Eigen::VectorXcd x;
  double power_w = 0;  // 1/2 x^H R x (unregularized)
  double terms_w = 0;  // 1/2 sum |x_m R_mn x_n| (or its bound)
};

Solved SolveDense(const Array& array, const Eigen::VectorXcd& b, double shift, int threads) {
  Eigen::MatrixXd r = ResistanceMatrix(array, threads);
  Eigen::MatrixXd reg = r;
  reg.diagonal().array() += shift;
  const Eigen::LDLT<Eigen::MatrixXd> ldlt(reg);
  if (ldlt.info() != Eigen::Success)
    throw InvalidArgument(
        "regularization: the resistance matrix could not be factored; "
        "expected a larger regularization");
  Solved s;
  s.x.resize(b.size());
  s.x.real() = ldlt.solve(b.real());
  s.x.imag() = ldlt.solve(b.imag());
  if (!s.x.allFinite())
    throw InvalidArgument(
        "regularization: the resistance matrix is singular (found currents "
        "that are not finite); expected a regularization > 0");
  s.power_w = RadiatedPower(r, s.x);
  const Eigen::VectorXd a = s.x.cwiseAbs();
  s.terms_w = 0.5 * a.dot(r.cwiseAbs() * a);
  return s;
}

// Conjugate gradients on (R + shift Id) x = b (Hestenes and Stiefel, J. Res. NBS 49,
// 1952), R x without the matrix (PowerOf: by quadrature where cheaper, else
// streamed); R is real symmetric positive semidefinite, so with shift > 0 the system
// is Hermitian positive definite for complex x too.
Solved SolveIterative(const Array& array, const Eigen::VectorXcd& b, double shift,
                      const MaxDirectivityOptions& o, MaxDirectivityResult& out) {
  const PowerOf power(array, o.num_threads);
  const auto apply = [&](const Eigen::VectorXcd& v) -> Eigen::VectorXcd {
    return power.Product(v) + shift * v;
  };
  Eigen::VectorXcd x = Eigen::VectorXcd::Zero(b.size());
  Eigen::VectorXcd r = b, p = b;
  double rr = r.squaredNorm();
  const double stop = o.cg_tolerance * o.cg_tolerance * b.squaredNorm();
  int it = 0;
  double estimate = 0;  // b^H x, the Rayleigh quotient up to 4 pi / eta0
  while (rr > stop && it < o.cg_max_iterations) {
    const Eigen::VectorXcd ap = apply(p);
    const double pap = p.dot(ap).real();
    if (!(pap > 0)) break;  // R + shift Id semidefinite along p: no progress left
    const double alpha = rr / pap;
    x += alpha * p;
    r -= alpha * ap;
    const double rr_new = r.squaredNorm();
    p = r + (rr_new / rr) * p;
    rr = rr_new;
    ++it;
    const double next = b.dot(x).real();
    const bool settled =
        o.cg_directivity_tolerance > 0 && next - estimate <= o.cg_directivity_tolerance * next;
    estimate = next;
    if (settled) break;
  }
  out.cg_iterations = it;
  out.cg_residual_relative = std::sqrt(rr / b.squaredNorm());
  Solved s;
  s.x = x;
  s.power_w = power(x);
  // |R_mn| <= sqrt(R_mm R_nn) (R positive semidefinite): S <= 1/2 (sum |x_m| sqrt(R_mm))^2.
  const double bound = x.cwiseAbs().dot(SelfResistances(array).cwiseSqrt());
  s.terms_w = 0.5 * bound * bound;
  return s;
}

}  // namespace

std::string_view ToString(DirectivitySolver s) {
  switch (s) {
    case DirectivitySolver::kAuto:
      return "auto";
    case DirectivitySolver::kDense:
      return "dense";
    case DirectivitySolver::kConjugateGradient:
      return "conjugate-gradient";
  }
  return "?";
}

MaxDirectivityResult MaximizeDirectivity(const Array& array, const Direction& beam,
                                         const PolarizationVector& polarization,
                                         const MaxDirectivityOptions& options) {
  Validate(array);
  CheckOptions(options);
  polarization.Validate();
  const Eigen::MatrixXcd map = ExactFieldMap(array, beam);  // rows E_theta, E_phi
  const Eigen::RowVectorXcd f =
      std::conj(polarization.theta) * map.row(0) + std::conj(polarization.phi) * map.row(1);
  const Eigen::VectorXcd ones = Eigen::VectorXcd::Ones(f.size());
  if (f.cwiseAbs().maxCoeff() <= FieldFloor_v(array, ones)) {
    throw InvalidArgument("beam: no dipole radiates the requested polarization toward " +
                          DegreesText(beam.theta_rad, beam.phi_rad) +
                          "; expected a direction and polarization the elements reach");
  }
  MaxDirectivityResult out;
  out.regularization = options.regularization;
  const auto n = static_cast<double>(array.size());
  const double shift = options.regularization * SelfResistances(array).sum() / n;
  const bool dense =
      options.solver == DirectivitySolver::kDense ||
      (options.solver == DirectivitySolver::kAuto && array.size() <= options.dense_limit);
  out.solver_used = dense ? DirectivitySolver::kDense : DirectivitySolver::kConjugateGradient;
  const Eigen::VectorXcd b = f.adjoint();
  Solved s = dense ? SolveDense(array, b, shift, options.num_threads)
                   : SolveIterative(array, b, shift, options, out);
  out.digits_is_lower_bound = !dense;

  // Scale: max |I| = 1 A with p^H E real and > 0 (P and S scale with it).
  const double before = s.x.cwiseAbs().maxCoeff();
  NormalizeCurrents(s.x, (f * s.x)(0));
  const double scale2 = 1.0 / (before * before);
  s.power_w *= scale2;
  s.terms_w *= scale2;
  CheckRadiatedPower(s.power_w);
  out.currents_a = s.x;

  const double ep2 = std::norm((f * s.x)(0));
  out.partial_directivity = DirectivityPerSquaredField(s.power_w) * ep2;
  out.directivity = DirectivityPerSquaredField(s.power_w) *
                    (std::norm((map.row(0) * s.x)(0)) + std::norm((map.row(1) * s.x)(0)));
  out.sensitivity_factor = s.x.squaredNorm() * (f.cwiseAbs2().sum() / n) / ep2;
  out.sensitivity_re_uniform = n * out.sensitivity_factor;
  out.superdirective = out.sensitivity_re_uniform > kSuperdirectiveRatio;
  out.digits_in_power = -std::log10(DBL_EPSILON * s.terms_w / s.power_w);
  return out;
}

}  // namespace lobecast
