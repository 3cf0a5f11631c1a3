#include "engine/synthesis/null_placement.h"

#include <cmath>
#include <sstream>

#include <Eigen/Dense>
#include <Eigen/SVD>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/intensity.h"
#include "engine/synthesis/synthesis_common.h"

namespace lobecast {
namespace {

using namespace synthesis_detail;

// The field map of the nulls followed by the beam direction: rows 0..K (theta),
// K+1..2K+1 (phi); the null rows and the beam's are taken apart below.
struct NullMaps {
  Eigen::MatrixXcd nulls;  // 2K x N: theta rows, then phi rows
  Eigen::MatrixXcd beam;   // 2 x N
};

NullMaps MapsOf(const Array& array, const Directions& nulls, const Direction& beam) {
  std::vector<double> th, ph;
  for (std::size_t i = 0; i < nulls.size(); ++i) {
    th.push_back(nulls.theta_rad(i));
    ph.push_back(nulls.phi_rad(i));
  }
  th.push_back(beam.theta_rad);
  ph.push_back(beam.phi_rad);
  const Eigen::MatrixXcd all = FieldMap(array, Directions::FromAngles(th, ph));
  const auto k = static_cast<Eigen::Index>(nulls.size());
  NullMaps m;
  m.nulls.resize(2 * k, all.cols());
  m.nulls.topRows(k) = all.topRows(k);
  m.nulls.bottomRows(k) = all.middleRows(k + 1, k);
  m.beam.resize(2, all.cols());
  m.beam.row(0) = all.row(k);
  m.beam.row(1) = all.row(2 * k + 1);
  return m;
}

// Checks shared by both methods: valid input, at least one null, none in the main
// beam of the original currents.
NullMaps Prepare(const Array& array, const Eigen::VectorXcd& currents_a, const Directions& nulls,
                 const Direction& beam, const NullOptions& options) {
  Validate(array);
  ValidateCurrents(array, currents_a);
  if (nulls.size() == 0) throw InvalidArgument("nulls: found none; expected at least one");
  NullMaps m = MapsOf(array, nulls, beam);
  const double e_beam = std::sqrt(FieldSquared(m.beam, 0, currents_a));
  if (e_beam <= FieldFloor_v(array, currents_a)) {
    throw InvalidArgument("nulls: the currents give no field toward the beam direction " +
                          DegreesText(beam.theta_rad, beam.phi_rad) +
                          "; expected a beam there to keep");
  }
  for (std::size_t i = 0; i < nulls.size(); ++i) {
    const double level = AmplitudeToDb(
        std::sqrt(FieldSquared(m.nulls, static_cast<Eigen::Index>(i), currents_a)) / e_beam);
    if (level >= options.main_beam_level_db) {
      std::ostringstream s;
      s << "null " << i + 1 << " at " << DegreesText(nulls.theta_rad(i), nulls.phi_rad(i))
        << " lies in the main beam: the pattern there is " << level << " dB re the beam direction "
        << DegreesText(beam.theta_rad, beam.phi_rad) << "; expected a direction below "
        << options.main_beam_level_db << " dB (outside the main beam)";
      throw InvalidArgument(s.str());
    }
  }
  return m;
}

// Depths, directivities and the change, for the new currents.
void Report(const Array& array, const Eigen::VectorXcd& before, const NullMaps& m,
            const NullOptions& options, NullResult& r) {
  const double e_beam = std::sqrt(FieldSquared(m.beam, 0, r.currents_a));
  const double floor = FieldFloor_v(array, r.currents_a);
  if (e_beam <= floor) {
    throw InvalidArgument(
        "nulls: placing them cancels the field toward the beam direction; expected nulls that "
        "leave the main beam");
  }
  r.depth_db.clear();
  for (Eigen::Index i = 0; i < m.nulls.rows() / 2; ++i)
    r.depth_db.push_back(DepthDb(std::sqrt(FieldSquared(m.nulls, i, r.currents_a)), e_beam, floor));
  const PowerOf power(array, options.num_threads);
  const auto directivity = [&](const Eigen::VectorXcd& i) {
    return DirectivityPerSquaredField(power(i)) * FieldSquared(m.beam, 0, i);
  };
  r.directivity_before = directivity(before);
  r.directivity_after = directivity(r.currents_a);
  r.directivity_lost_db = ToDb(r.directivity_before / r.directivity_after);
  r.change_relative = (r.currents_a - before).norm() / before.norm();
}

}  // namespace

NullResult PlaceNulls(const Array& array, const Eigen::VectorXcd& currents_a,
                      const Directions& nulls, const Direction& beam, const NullOptions& options) {
  const NullMaps m = Prepare(array, currents_a, nulls, beam, options);
  NullResult r;
  r.constraints = static_cast<int>(m.nulls.rows());
  // Thin SVD of A^H = U S V^H: range(A^H) is spanned by U's columns of significant
  // singular values, and the projection onto A's null space is Id - U_r U_r^H.
  const Eigen::MatrixXcd ah = m.nulls.adjoint();
  const Eigen::JacobiSVD<Eigen::MatrixXcd, Eigen::ColPivHouseholderQRPreconditioner> svd(
      ah, Eigen::ComputeThinU);
  const Eigen::VectorXd s = svd.singularValues();
  int rank = 0;
  for (Eigen::Index i = 0; i < s.size(); ++i)
    if (s[i] > options.rank_tolerance * s[0]) ++rank;
  r.rank = rank;
  if (rank >= static_cast<int>(array.size())) {
    std::ostringstream msg;
    msg << "nulls: " << nulls.size() << " nulls set " << rank
        << " independent constraints (two field components each) on " << array.size()
        << " dipole currents, which leaves only zero currents; expected fewer than " << array.size()
        << " independent constraints";
    throw InvalidArgument(msg.str());
  }
  const Eigen::MatrixXcd u = svd.matrixU().leftCols(rank);
  r.currents_a = currents_a - u * (u.adjoint() * currents_a);
  Report(array, currents_a, m, options, r);
  return r;
}

NullResult PlaceNullsPhaseOnly(const Array& array, const Eigen::VectorXcd& currents_a,
                               const Directions& nulls, const Direction& beam,
                               const NullOptions& options) {
  const NullMaps m = Prepare(array, currents_a, nulls, beam, options);
  const Eigen::Index n = currents_a.size(), rows = m.nulls.rows();
  const Eigen::VectorXd mag = currents_a.cwiseAbs();
  Eigen::VectorXd phase(n);
  for (Eigen::Index i = 0; i < n; ++i) phase[i] = std::arg(currents_a[i]);
  const auto currents = [&](const Eigen::VectorXd& ph) {
    Eigen::VectorXcd c(n);
    for (Eigen::Index i = 0; i < n; ++i) c[i] = std::polar(mag[i], ph[i]);
    return c;
  };
  NullResult r;
  r.constraints = static_cast<int>(rows);
  const double target = std::pow(10.0, options.phase_only_target_db / 20.0);
  const auto deep_enough = [&](const Eigen::VectorXcd& c) {
    const double e_beam = std::sqrt(FieldSquared(m.beam, 0, c));
    const double floor = FieldFloor_v(array, c);
    for (Eigen::Index i = 0; i < rows / 2; ++i) {
      const double e = std::sqrt(FieldSquared(m.nulls, i, c));
      if (e >= floor && e > target * e_beam) return false;
    }
    return true;
  };
  Eigen::VectorXcd c = currents_a;
  Eigen::VectorXcd res = m.nulls * c;
  r.converged = deep_enough(c);
  while (!r.converged && r.iterations < options.phase_only_max_iterations) {
    // Linearized: d(A I)/d phase_n = A_n j I_n; real rows (Re, Im) over real phases.
    Eigen::MatrixXd j(2 * rows, n);
    for (Eigen::Index q = 0; q < n; ++q) {
      const Eigen::VectorXcd col = m.nulls.col(q) * (Complex(0.0, 1.0) * c[q]);
      j.col(q) << col.real(), col.imag();
    }
    Eigen::VectorXd rhs(2 * rows);
    rhs << -res.real(), -res.imag();
    // The minimum-norm step: the least change of the phases (pseudo-inverse).
    const Eigen::VectorXd step = j.completeOrthogonalDecomposition().solve(rhs);
    double t = 1.0;
    bool improved = false;
    for (int halving = 0; halving < 40; ++halving, t *= 0.5) {
      const Eigen::VectorXd trial = phase + t * step;
      const Eigen::VectorXcd tc = currents(trial);
      const Eigen::VectorXcd tres = m.nulls * tc;
      if (tres.norm() < res.norm()) {
        phase = trial;
        c = tc;
        res = tres;
        improved = true;
        break;
      }
    }
    ++r.iterations;
    r.converged = deep_enough(c);
    if (!improved) break;
  }
  r.currents_a = c;
  Report(array, currents_a, m, options, r);
  return r;
}

}  // namespace lobecast
