#include "engine/synthesis/envelope.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <sstream>

#include <Clp_C_Interface.h>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/synthesis/synthesis_common.h"

namespace lobecast {
namespace {

using namespace synthesis_detail;

// Clp takes bounds at or beyond 1e30 as infinite.
constexpr double kInfinity = std::numeric_limits<double>::max();
constexpr int kMaxRounds = 500;

// One Clp model, rows added in batches and re-solved warm (dual simplex from the
// last basis).
class CuttingLp {
 public:
  CuttingLp() : model_(Clp_newModel(), &Clp_deleteModel) { Clp_setLogLevel(model_.get(), 0); }

  int AddColumn(double lower, double upper, double cost) {
    col_lower_.push_back(lower);
    col_upper_.push_back(upper);
    cost_.push_back(cost);
    return static_cast<int>(cost_.size()) - 1;
  }
  void Add(int column, double value) {
    if (value == 0.0) return;
    columns_.push_back(column);
    values_.push_back(value);
  }
  void EndRow(double lower, double upper) {
    row_lower_.push_back(lower);
    row_upper_.push_back(upper);
    starts_.push_back(static_cast<CoinBigIndex>(columns_.size()));
  }
  int rows() const { return rows_ + static_cast<int>(row_lower_.size()); }
  int columns() const { return static_cast<int>(cost_.size()); }

  // Loads the columns on the first call, adds the pending rows, minimizes.
  std::vector<double> Solve() {
    if (!loaded_) {
      const std::vector<CoinBigIndex> empty(cost_.size() + 1, 0);
      Clp_loadProblem(model_.get(), columns(), 0, empty.data(), nullptr, nullptr, col_lower_.data(),
                      col_upper_.data(), cost_.data(), nullptr, nullptr);
      // The rows come normalized (O(1) coefficients); Clp's own scaling, with the
      // infinite row bounds, gave non-optimal answers on the two-component tests.
      Clp_scaling(model_.get(), 0);
      loaded_ = true;
    }
    Clp_addRows(model_.get(), static_cast<int>(row_lower_.size()), row_lower_.data(),
                row_upper_.data(), starts_.data(), columns_.data(), values_.data());
    rows_ += static_cast<int>(row_lower_.size());
    row_lower_.clear(), row_upper_.clear(), columns_.clear(), values_.clear();
    starts_.assign(1, 0);
    // Dual simplex, warm from the last basis after the first call (new rows slack);
    // without presolve, which took a quarter of the time on tall problems.
    Clp_dual(model_.get(), 0);
    const int status = Clp_status(model_.get());
    if (status == 1)
      throw InvalidArgument(
          "envelope: no currents meet the constraints (the nulls and the fixed beam field "
          "contradict each other, e.g. a null on the beam direction); expected a feasible design");
    if (status != 0) {
      std::ostringstream m;
      m << "envelope: the linear program solver (Clp) stopped with status " << status
        << "; expected an optimal solution";
      throw InvalidArgument(m.str());
    }
    const double* x = Clp_primalColumnSolution(model_.get());
    return std::vector<double>(x, x + columns());
  }

 private:
  std::unique_ptr<Clp_Simplex, decltype(&Clp_deleteModel)> model_;
  bool loaded_ = false;
  int rows_ = 0;
  std::vector<double> col_lower_, col_upper_, cost_;
  std::vector<double> row_lower_, row_upper_;
  std::vector<CoinBigIndex> starts_{0};
  std::vector<int> columns_;
  std::vector<double> values_;
};

// Adds Re(c a I) as terms over x = [u, v] (I = u + j v): Re(c a) u - Im(c a) v.
void AddReal(CuttingLp& lp, const Eigen::RowVectorXcd& a, Complex c) {
  const auto n = static_cast<int>(a.size());
  for (int q = 0; q < n; ++q) {
    const Complex ca = c * a[q];
    lp.Add(q, ca.real());
    lp.Add(n + q, -ca.imag());
  }
}

// One side-lobe sample: its component rows (theta, phi) and its mask level.
struct Sample {
  Eigen::RowVectorXcd row[2];
  bool present[2] = {false, false};
  double level = 1;  // 10^(m / 20)
};

// The tangent plane of |e| <= level t at the unit complex 2-vector u:
// Re(conj(u_theta) e_theta + conj(u_phi) e_phi) <= level t. Every such plane holds
// for all currents within the envelope (Cauchy-Schwarz), and at e = |e| u it is
// the constraint itself.
void AddTangentCut(CuttingLp& lp, const Sample& s, const Complex (&u)[2], int t) {
  Eigen::RowVectorXcd a = Eigen::RowVectorXcd::Zero(s.row[0].size());
  for (int c = 0; c < 2; ++c)
    if (s.present[c]) a += std::conj(u[c]) * s.row[c];
  AddReal(lp, a, 1.0);
  lp.Add(t, -s.level);
  lp.EndRow(-kInfinity, 0.0);
}

}  // namespace

Directions DirectionsOutside(const Directions& candidates, const Direction& beam,
                             double half_angle_rad) {
  const Vec3 b = UnitVectorAt(beam.theta_rad, beam.phi_rad);
  std::vector<double> th, ph;
  for (std::size_t i = 0; i < candidates.size(); ++i) {
    const double angle = std::acos(std::clamp(candidates.r_hat(i).dot(b), -1.0, 1.0));
    if (angle > half_angle_rad) {
      th.push_back(candidates.theta_rad(i));
      ph.push_back(candidates.phi_rad(i));
    }
  }
  return Directions::FromAngles(th, ph);
}

EnvelopeResult SynthesizeEnvelope(const Array& array, const EnvelopeProblem& problem) {
  Validate(array);
  problem.polarization.Validate();
  const std::size_t ns = problem.samples.size();
  if (ns == 0) throw InvalidArgument("envelope: found no side-lobe samples; expected at least one");
  if (!problem.mask_db.empty() && problem.mask_db.size() != ns) {
    std::ostringstream m;
    m << "envelope: found " << problem.mask_db.size() << " mask levels for " << ns
      << " samples; expected one per sample (or none)";
    throw InvalidArgument(m.str());
  }
  for (double m : problem.mask_db)
    if (!std::isfinite(m)) throw InvalidArgument("envelope: found a mask level that is not finite");
  if (!(problem.max_approximation_db > 0 && problem.max_approximation_db < 1)) {
    std::ostringstream m;
    m << "envelope: max_approximation_db: found " << problem.max_approximation_db
      << "; expected a value in (0, 1) dB";
    throw InvalidArgument(m.str());
  }

  const Eigen::MatrixXcd beam_map = ExactFieldMap(array, problem.beam);
  const Eigen::RowVectorXcd f_raw = std::conj(problem.polarization.theta) * beam_map.row(0) +
                                    std::conj(problem.polarization.phi) * beam_map.row(1);
  const double scale = f_raw.cwiseAbs().maxCoeff();
  if (scale <= FieldFloor_v(array, Eigen::VectorXcd::Ones(f_raw.size())))
    throw InvalidArgument(
        "envelope: no dipole radiates the requested polarization toward the beam " +
        DegreesText(problem.beam.theta_rad, problem.beam.phi_rad));
  // Coefficients O(1): every field row over the beam row's largest entry.
  const Eigen::MatrixXcd sample_map = FieldMap(array, problem.samples) / scale;
  const Eigen::MatrixXcd null_map = problem.nulls.size() > 0
                                        ? Eigen::MatrixXcd(FieldMap(array, problem.nulls) / scale)
                                        : Eigen::MatrixXcd(0, f_raw.size());
  const Eigen::RowVectorXcd f = f_raw / scale;
  const double absent = 1e-14;  // a component row this small (re the beam's) is rounding

  const int n = static_cast<int>(array.size());
  CuttingLp lp;
  for (int j = 0; j < 2 * n; ++j) lp.AddColumn(-kInfinity, kInfinity, 0.0);  // Re I, Im I
  const int t = lp.AddColumn(0.0, kInfinity, 1.0);
  // The beam: f I = 1 (Im(f I) = Re(-j f I)).
  AddReal(lp, f, 1.0);
  lp.EndRow(1.0, 1.0);
  AddReal(lp, f, Complex(0.0, -1.0));
  lp.EndRow(0.0, 0.0);
  const auto k_nulls = static_cast<Eigen::Index>(problem.nulls.size());
  for (Eigen::Index i = 0; i < 2 * k_nulls; ++i) {
    if (null_map.row(i).cwiseAbs().maxCoeff() <= absent) continue;
    AddReal(lp, null_map.row(i), 1.0);
    lp.EndRow(0.0, 0.0);
    AddReal(lp, null_map.row(i), Complex(0.0, -1.0));
    lp.EndRow(0.0, 0.0);
  }
  // The samples, each with a square per component to start: |e_c| <= |e| gives the
  // valid planes +-Re(e_c), +-Im(e_c) <= level t for each present component. An
  // octagon needed fewer rounds but twice the rows, and Clp's time goes with the
  // rows (a 50-dipole line: 4.3 s with squares, 7.6 s with octagons; measured
  // 2026-12-03).
  const auto ks = static_cast<Eigen::Index>(ns);
  std::vector<Sample> samples;
  for (Eigen::Index i = 0; i < ks; ++i) {
    Sample s;
    s.level = problem.mask_db.empty()
                  ? 1.0
                  : std::pow(10.0, problem.mask_db[static_cast<std::size_t>(i)] / 20.0);
    s.row[0] = sample_map.row(i);
    s.row[1] = sample_map.row(ks + i);
    for (int c = 0; c < 2; ++c) s.present[c] = s.row[c].cwiseAbs().maxCoeff() > absent;
    if (!s.present[0] && !s.present[1]) continue;
    for (int c = 0; c < 2; ++c) {
      if (!s.present[c]) continue;
      for (int j = 0; j < 4; ++j) {
        Complex u[2] = {0.0, 0.0};
        u[c] = std::polar(1.0, kPi * j / 2);
        AddTangentCut(lp, s, u, t);
      }
    }
    samples.push_back(s);
  }

  // Cutting-plane rounds: a tangent plane at each sample whose |e| leaves the
  // envelope by more than a thousandth of the budget, until every sample is within
  // the budget.
  const double budget = std::pow(10.0, problem.max_approximation_db / 20.0);
  const double cut_above = std::pow(10.0, problem.max_approximation_db / 20000.0);
  EnvelopeResult out;
  Eigen::VectorXcd currents(n);
  double bound = 0, worst_ratio = 0;
  for (;;) {
    const std::vector<double> x = lp.Solve();
    ++out.rounds;
    for (int j = 0; j < n; ++j)
      currents[j] = Complex(x[static_cast<std::size_t>(j)], x[static_cast<std::size_t>(n + j)]);
    bound = x[static_cast<std::size_t>(t)];
    worst_ratio = 0;
    for (const Sample& s : samples) {
      Complex e[2] = {0.0, 0.0};
      for (int c = 0; c < 2; ++c)
        if (s.present[c]) e[c] = (s.row[c] * currents)(0);
      const double limit = s.level * bound;
      const double total = std::hypot(std::abs(e[0]), std::abs(e[1]));
      worst_ratio = std::max(worst_ratio, total / limit);
      if (total <= limit * cut_above) continue;
      const Complex u[2] = {e[0] / total, e[1] / total};
      AddTangentCut(lp, s, u, t);
    }
    if (worst_ratio <= budget) break;
    if (out.rounds >= kMaxRounds) {
      std::ostringstream m;
      m << "envelope: the cutting planes did not reach " << problem.max_approximation_db
        << " dB in " << kMaxRounds << " rounds (left: " << AmplitudeToDb(worst_ratio)
        << " dB); expected a better conditioned problem";
      throw InvalidArgument(m.str());
    }
  }
  out.lp_rows = lp.rows();
  out.lp_columns = lp.columns();
  out.lp_bound_db = AmplitudeToDb(bound);
  out.approximation_db = std::max(0.0, AmplitudeToDb(worst_ratio));

  NormalizeCurrents(currents, (f * currents)(0));
  out.currents_a = currents;
  const double e_beam = std::abs((f * currents)(0));
  double worst = 0;
  for (const Sample& s : samples) {
    double e2 = 0;
    for (int c = 0; c < 2; ++c)
      if (s.present[c]) e2 += std::norm((s.row[c] * currents)(0));
    worst = std::max(worst, std::sqrt(e2) / s.level);
  }
  out.margin_db = AmplitudeToDb(worst / e_beam);
  const double floor = FieldFloor_v(array, currents) / scale;
  for (Eigen::Index i = 0; i < k_nulls; ++i)
    out.null_depth_db.push_back(
        DepthDb(std::sqrt(FieldSquared(null_map, i, currents)), e_beam, floor));
  return out;
}

}  // namespace lobecast
