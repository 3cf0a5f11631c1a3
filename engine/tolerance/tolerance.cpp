// Monte Carlo tolerance studies (tolerance.h).
#include "engine/tolerance/tolerance.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <limits>
#include <optional>

#include "engine/analysis/beam.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/check.h"
#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/intensity.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"
#include "engine/rounding_floor.h"
#include "engine/threads.h"
#include "engine/tolerance/trial_random.h"

namespace lobecast {
namespace {

using Clock = std::chrono::steady_clock;
double SecondsSince(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Power as ComputePattern takes it (the matrix route up to the limit, else streamed),
// so an error-free trial's P is the baseline's to the bit.
double PowerOf(const Array& array, const Eigen::VectorXcd& currents,
               const std::optional<Eigen::MatrixXd>& shared_r, const PatternOptions& options) {
  if (shared_r) return RadiatedPower(*shared_r, currents);
  if (array.size() <= options.resistance_matrix_max_dipoles || options.store_resistance_matrix)
    return RadiatedPower(ResistanceMatrix(array, options.field.num_threads), currents);
  return RadiatedPowerStreamed(array, currents, options.field.num_threads).radiated_power_w;
}

Vec3 GridDirection(const AngularGrid& grid, std::size_t index) {
  const std::size_t np = grid.phi_deg.size();
  return UnitVectorAt(grid.theta_deg[index / np] * kDegree, grid.phi_deg[index % np] * kDegree);
}

double GridSpacingRad(const AngularGrid& grid) {
  if (grid.theta_deg.size() > 1) return std::abs(grid.theta_deg[1] - grid.theta_deg[0]) * kDegree;
  if (grid.phi_deg.size() > 1) return std::abs(grid.phi_deg[1] - grid.phi_deg[0]) * kDegree;
  return kDegree;
}

// The figures that need off-grid evaluations (beam, protected directions, the
// refined peak) and the grid trackers' ratios.
void FinishFigures(const TrialArray& t, double power_w, const TrialGridMaxima& g,
                   const AngularGrid& grid, const Vec3& beam, const std::vector<Vec3>& protect,
                   const Vec3* reference_peak, TrialFigures& f) {
  const PatternProbe probe(t.array, t.currents_a, power_w);
  f.radiated_w = power_w;
  f.failed_elements = t.failed;
  const ProbeSample b = probe.At(beam);
  f.beam_directivity = b.directivity;
  const double u_beam = RadiationIntensity(b.e_theta, b.e_phi);
  f.protected_intensity_w_sr.clear();
  f.null_depth_db.clear();
  for (const Vec3& p : protect) {
    const ProbeSample s = probe.At(p);
    const double u = RadiationIntensity(s.e_theta, s.e_phi);
    f.protected_intensity_w_sr.push_back(u);
    f.null_depth_db.push_back(PowerRatioDb(u, u_beam));
  }
  f.peak_sidelobe_db = g.max_outside < 0.0 ? kNaN : PowerRatioDb(g.max_outside, g.max_all);
  if (g.max_inside < 0.0) {  // no main beam on the grid (cannot happen: the peak is in it)
    f.peak_r_hat = beam;
    f.peak_directivity = kNaN;
    f.pointing_error_deg = kNaN;
    return;
  }
  // The analysis' settings for a refined peak (AnalysisOptions defaults).
  const AnalysisOptions a;
  const RefinedMaximum m =
      RefineMaximum(probe, GridDirection(grid, g.argmax_inside), 0.5 * GridSpacingRad(grid),
                    a.refine_tolerance_deg * kDegree, a.max_evaluations_per_search);
  f.peak_r_hat = m.r_hat;
  f.peak_directivity = m.directivity;
  f.pointing_error_deg = reference_peak ? AngleBetween(m.r_hat, *reference_peak) / kDegree : 0.0;
}

std::string Number(double v) {
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "%.6g", v);
  return buffer;
}

}  // namespace

void TrialGridMaxima::Add(std::size_t index, double d, bool in_main_beam) {
  max_all = std::max(max_all, d);
  if (in_main_beam) {
    if (d > max_inside) max_inside = d, argmax_inside = index;
  } else {
    max_outside = std::max(max_outside, d);
  }
}

bool ErrorModel::AnyError() const {
  return amplitude_sigma_db > 0 || phase_sigma_deg > 0 || position_sigma_m > 0 ||
         failure_probability > 0 || (failure_count && *failure_count > 0);
}

std::string ErrorModel::Describe(double wavelength_m) const {
  std::string s = "amplitude: ";
  s += amplitude_sigma_db > 0
           ? "|I| x 10^(x/20), x Gaussian in dB with mean 0 and standard deviation " +
                 Number(amplitude_sigma_db) + " dB"
           : std::string("none");
  s += "; phase: ";
  s += phase_sigma_deg > 0 ? "arg I + p, p Gaussian with mean 0 and standard deviation " +
                                 Number(phase_sigma_deg) + " deg"
                           : std::string("none");
  s += "; position: ";
  s += position_sigma_m > 0
           ? "r + (dx, dy, dz), each Gaussian with mean 0 and standard deviation " +
                 Number(position_sigma_m) + " m (" + Number(position_sigma_m / wavelength_m) +
                 " wavelength)"
           : std::string("none");
  s += "; failures: ";
  if (failure_count && *failure_count > 0) {
    s += "exactly " + std::to_string(*failure_count) +
         " elements open (current 0), every set of that size equally likely";
  } else if (failure_probability > 0) {
    s += "each element open (current 0) with probability " + Number(failure_probability) +
         ", independently (Bernoulli)";
  } else {
    s += "none";
  }
  return s + "; independent between elements, kinds and trials";
}

bool ErrorModel::IsValid(std::string* why) const {
  auto fail = [&](const std::string& m) {
    if (why) *why = m;
    return false;
  };
  auto sigma = [&](const char* name, double v) {
    return std::isfinite(v) && v >= 0.0 ? true
                                        : fail(std::string(name) + ": found " + std::to_string(v) +
                                               ", expected a finite standard deviation >= 0");
  };
  if (!sigma("amplitude_sigma_db", amplitude_sigma_db) ||
      !sigma("phase_sigma_deg", phase_sigma_deg) || !sigma("position_sigma_m", position_sigma_m))
    return false;
  if (!(failure_probability >= 0.0 && failure_probability < 1.0))
    return fail("failure_probability: found " + std::to_string(failure_probability) +
                ", expected a probability in [0, 1)");
  if (failure_count && failure_probability > 0.0)
    return fail("failure_count and failure_probability: found both, expected one");
  return true;
}

bool ToleranceOptions::IsValid(std::string* why) const {
  auto fail = [&](const std::string& m) {
    if (why) *why = m;
    return false;
  };
  if (trials < 1) return fail("trials: found 0, expected at least 1");
  if (!errors.IsValid(why)) return false;
  for (std::size_t i = 0; i < percentiles.size(); ++i) {
    const double p = percentiles[i];
    if (!(p > 0.0 && p < 100.0))
      return fail("percentiles: found " + std::to_string(p) + ", expected values in (0, 100)");
    if (i > 0 && !(p > percentiles[i - 1]))
      return fail("percentiles: found " + std::to_string(p) + " after " +
                  std::to_string(percentiles[i - 1]) + ", expected ascending values");
  }
  if (max_block_bytes == 0) return fail("max_block_bytes: found 0, expected > 0");
  return pattern.field.IsValid(why);
}

double PercentileOfSorted(const double* x, std::size_t n, double p) {
  LOBECAST_CHECK_GE(n, std::size_t{1});
  const double h = static_cast<double>(n - 1) * p / 100.0;
  const auto lo = static_cast<std::size_t>(std::floor(h));
  if (lo + 1 >= n) return x[n - 1];
  const double frac = h - static_cast<double>(lo);
  // Equal neighbours give their value exactly (no rounding from the interpolation).
  return x[lo] == x[lo + 1] ? x[lo] : x[lo] + frac * (x[lo + 1] - x[lo]);
}

ScalarStatistics StatisticsOf(const std::vector<double>& values,
                              const std::vector<double>& percentiles) {
  std::vector<double> v;
  for (double x : values)
    if (!std::isnan(x)) v.push_back(x);
  ScalarStatistics s;
  if (v.empty()) {
    s.mean = s.std_dev = s.min = s.max = kNaN;
    s.percentiles.assign(percentiles.size(), kNaN);
    return s;
  }
  std::sort(v.begin(), v.end());
  s.min = v.front();
  s.max = v.back();
  double sum = 0.0;
  for (double x : v) sum += x;
  s.mean = sum / static_cast<double>(v.size());
  double ss = 0.0;
  if (std::isfinite(s.mean))
    for (double x : v) ss += (x - s.mean) * (x - s.mean);
  s.std_dev = v.size() > 1 ? std::sqrt(ss / static_cast<double>(v.size() - 1)) : 0.0;
  if (!std::isfinite(s.mean)) s.std_dev = kNaN;
  for (double p : percentiles) s.percentiles.push_back(PercentileOfSorted(v.data(), v.size(), p));
  return s;
}

TrialArray ApplyTrialErrors(const Array& array, const Eigen::VectorXcd& currents,
                            const ErrorModel& e, std::uint64_t seed, std::uint64_t trial) {
  TrialArray t{array, currents, 0};
  const std::size_t n = array.size();
  if (e.amplitude_sigma_db > 0) {
    TrialRandom r(seed, trial, ErrorStream::kAmplitude);
    for (std::size_t i = 0; i < n; ++i)
      t.currents_a[static_cast<Eigen::Index>(i)] *=
          std::pow(10.0, e.amplitude_sigma_db * r.Normal() / 20.0);
  }
  if (e.phase_sigma_deg > 0) {
    TrialRandom r(seed, trial, ErrorStream::kPhase);
    for (std::size_t i = 0; i < n; ++i)
      t.currents_a[static_cast<Eigen::Index>(i)] *=
          std::polar(1.0, e.phase_sigma_deg * kDegree * r.Normal());
  }
  if (e.position_sigma_m > 0) {
    TrialRandom r(seed, trial, ErrorStream::kPosition);
    for (std::size_t i = 0; i < n; ++i) {
      Vec3& p = t.array.dipoles[i].position_m;
      for (int axis = 0; axis < 3; ++axis) p[axis] += e.position_sigma_m * r.Normal();
      if (array.ground == Ground::kPec && !(p.z() > 0.0)) {
        throw InvalidArgument(
            "trial " + std::to_string(trial) + ": the position error moves dipole " +
            std::to_string(i) + " to z = " + std::to_string(p.z()) +
            " m, at or below the PEC ground plane: expected a position error well below the "
            "elements' height over ground");
      }
    }
  }
  if (e.failure_count && *e.failure_count > 0) {
    TrialRandom r(seed, trial, ErrorStream::kFailure);
    for (std::size_t i : ChooseDistinct(r, n, std::min(*e.failure_count, n)))
      t.currents_a[static_cast<Eigen::Index>(i)] = 0.0;
    t.failed = std::min(*e.failure_count, n);
  } else if (e.failure_probability > 0) {
    TrialRandom r(seed, trial, ErrorStream::kFailure);
    for (std::size_t i = 0; i < n; ++i) {
      if (r.Uniform() < e.failure_probability) {
        t.currents_a[static_cast<Eigen::Index>(i)] = 0.0;
        ++t.failed;
      }
    }
  }
  return t;
}

std::vector<bool> MainBeamMask(const AngularGrid& grid, const Eigen::VectorXd& d) {
  const std::size_t nt = grid.theta_deg.size(), np = grid.phi_deg.size();
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(d.size()), nt * np);
  std::vector<bool> in(nt * np, false);
  if (d.size() == 0) return in;
  const double span = np > 1 ? grid.phi_deg.back() - grid.phi_deg.front() : 0.0;
  const double step = np > 1 ? grid.phi_deg[1] - grid.phi_deg[0] : 0.0;
  const bool wrap = np > 2 && span + step >= 360.0 - 1e-9;
  const double max = d.maxCoeff();
  std::vector<std::size_t> stack;
  for (std::size_t i = 0; i < nt * np; ++i) {
    if (d[static_cast<Eigen::Index>(i)] >= max * (1.0 - 1e-9)) {
      in[i] = true;
      stack.push_back(i);
    }
  }
  while (!stack.empty()) {
    const std::size_t i = stack.back();
    stack.pop_back();
    const double di = d[static_cast<Eigen::Index>(i)];
    const long row = static_cast<long>(i / np), col = static_cast<long>(i % np);
    for (long dr = -1; dr <= 1; ++dr) {
      for (long dc = -1; dc <= 1; ++dc) {
        const long r = row + dr;
        long c = col + dc;
        if ((dr == 0 && dc == 0) || r < 0 || r >= static_cast<long>(nt)) continue;
        if (c < 0 || c >= static_cast<long>(np)) {
          if (!wrap) continue;
          c = (c + static_cast<long>(np)) % static_cast<long>(np);
        }
        const std::size_t j = static_cast<std::size_t>(r) * np + static_cast<std::size_t>(c);
        if (!in[j] && d[static_cast<Eigen::Index>(j)] <= di) {
          in[j] = true;
          stack.push_back(j);
        }
      }
    }
  }
  return in;
}

ToleranceStudy::ToleranceStudy(const Array& array, const Eigen::VectorXcd& currents,
                               const AngularGrid& grid, const ToleranceTargets& targets,
                               const ToleranceOptions& options)
    : array_(array), currents_(currents), grid_(grid), options_(options) {
  std::string why;
  if (!options.IsValid(&why)) throw InvalidArgument(why);
  Validate(array);
  ValidateCurrents(array, currents);
  if (grid.size() == 0) throw InvalidArgument("grid: found no directions, expected at least one");
  const ErrorModel& e = options.errors;
  if (e.failure_count && *e.failure_count >= array.size()) {
    throw InvalidArgument("failure_count: found " + std::to_string(*e.failure_count) +
                          ", expected fewer than the array's " + std::to_string(array.size()) +
                          " elements");
  }
  const std::size_t k_trials = options.trials;
  const std::size_t nt = grid.theta_deg.size(), np = grid.phi_deg.size();
  const std::size_t rows_by_memory =
      std::max<std::size_t>(1, options.max_block_bytes / (sizeof(double) * k_trials * np));
  rows_per_block_ =
      std::max<std::size_t>(1, std::min(options.pattern.block_directions / np, rows_by_memory));

  ToleranceResult& r = result_;
  r.percentiles = options.percentiles;
  const auto t0 = Clock::now();
  PatternOptions po = options.pattern;
  po.block_directions = rows_per_block_ * np;
  po.progress = {};
  r.baseline = ComputePattern(array, currents, grid, po);
  r.main_beam = MainBeamMask(grid, r.baseline.directivity);

  // The error-free figures, through the same functions as every trial's.
  moves_ = e.position_sigma_m > 0;
  if (!moves_ && r.baseline.resistance_ohm.size() != 0) shared_r_ = r.baseline.resistance_ohm;
  TrialGridMaxima base_grid;
  for (std::size_t i = 0; i < grid.size(); ++i)
    base_grid.Add(i, r.baseline.directivity[static_cast<Eigen::Index>(i)], r.main_beam[i]);
  const TrialArray base{array, currents, 0};
  // The beam: the design's, or the error-free refined peak (found first).
  FinishFigures(base, r.baseline.radiated_power_w, base_grid, grid, Vec3::UnitZ(), {}, nullptr,
                r.baseline_figures);
  peak0_ = r.baseline_figures.peak_r_hat;
  r.beam_from_design = targets.beam.has_value();
  r.beam_r_hat = targets.beam ? targets.beam->normalized() : peak0_;
  for (const Vec3& p : targets.protected_directions)
    r.protected_directions.push_back(p.normalized());
  FinishFigures(base, r.baseline.radiated_power_w, base_grid, grid, r.beam_r_hat,
                r.protected_directions, &peak0_, r.baseline_figures);
  r.baseline_figures.directivity_loss_db = 0.0;
  r.seconds_baseline = SecondsSince(t0);

  const Eigen::Index ng = static_cast<Eigen::Index>(grid.size());
  r.directivity_mean.resize(ng);
  r.intensity_mean_w_sr.resize(ng);
  r.directivity_percentiles.resize(static_cast<Eigen::Index>(options.percentiles.size()), ng);
  r.blocks = (nt + rows_per_block_ - 1) / rows_per_block_;
  r.trials.resize(k_trials);
  power_.assign(k_trials, 0.0);
  trackers_.assign(k_trials, TrialGridMaxima{});
}

std::size_t ToleranceStudy::FirstRow(std::size_t block) const { return block * rows_per_block_; }

std::size_t ToleranceStudy::BlockDirections(std::size_t block) const {
  LOBECAST_CHECK_LT(block, result_.blocks);
  const std::size_t nt = grid_.theta_deg.size();
  return std::min(rows_per_block_, nt - FirstRow(block)) * grid_.phi_deg.size();
}

void ToleranceStudy::ComputePowers(std::size_t k0, std::size_t k1) {
  LOBECAST_CHECK_LE(k1, options_.trials);
  for (std::size_t k = k0; k < k1; ++k) {
    const TrialArray t = ApplyTrialErrors(array_, currents_, options_.errors, options_.seed, k);
    power_[k] = PowerOf(t.array, t.currents_a, shared_r_, options_.pattern);
    if (!(power_[k] > 0.0)) {
      throw InvalidArgument("trial " + std::to_string(k) + ": " + std::to_string(t.failed) +
                            " of " + std::to_string(array_.size()) +
                            " elements failed and the rest radiate no power: expected a "
                            "failure rate that leaves elements radiating");
    }
  }
}

void ToleranceStudy::TrialsOnBlock(std::size_t b, std::size_t k0, std::size_t k1, double* d,
                                   double* u, bool u_summed) {
  LOBECAST_CHECK_LE(k1, options_.trials);
  const std::size_t np = grid_.phi_deg.size();
  const std::size_t row = FirstRow(b);
  const std::size_t nb = BlockDirections(b), rows = nb / np, offset = row * np;
  const std::size_t stride = k1 - k0;
  AngularGrid block;
  block.theta_deg.assign(grid_.theta_deg.begin() + static_cast<std::ptrdiff_t>(row),
                         grid_.theta_deg.begin() + static_cast<std::ptrdiff_t>(row + rows));
  block.phi_deg = grid_.phi_deg;
  const Directions dirs = Directions::FromGrid(block);
  std::optional<FieldPlan> plan;
  if (!moves_) plan.emplace(array_, dirs, options_.pattern.field);
  for (std::size_t k = k0; k < k1; ++k) {
    const TrialArray t = ApplyTrialErrors(array_, currents_, options_.errors, options_.seed, k);
    const FarField f = moves_
                           ? FieldPlan(t.array, dirs, options_.pattern.field).Execute(t.currents_a)
                           : plan->Execute(t.currents_a);
    const double floor_v = FieldFloor_v(t.array, t.currents_a);
    const double to_d = DirectivityPerIntensity(power_[k]);
    TrialGridMaxima& g = trackers_[k];
    for (std::size_t i = 0; i < nb; ++i) {
      const auto ii = static_cast<Eigen::Index>(i);
      // As DeriveFromField (engine/pattern.h): floored field, U, D = 4 pi U / P.
      const double ui =
          RadiationIntensity(Floored(f.e_theta[ii], floor_v), Floored(f.e_phi[ii], floor_v));
      const double di = to_d * ui;
      d[i * stride + (k - k0)] = di;
      if (u_summed) {
        u[i] += ui;
      } else {
        u[i * stride + (k - k0)] = ui;
      }
      g.Add(offset + i, di, result_.main_beam[offset + i]);
    }
    if (options_.progress) {
      options_.progress(0.95 * static_cast<double>(b * stride + (k - k0) + 1) /
                        static_cast<double>(result_.blocks * stride));
    }
  }
}

void ToleranceStudy::BlockStatistics(std::size_t b, const double* values, const double* u,
                                     bool u_summed) {
  const std::size_t k_trials = options_.trials;
  const std::size_t nb = BlockDirections(b), offset = FirstRow(b) * grid_.phi_deg.size();
  const std::size_t np_pct = options_.percentiles.size();
  ToleranceResult& r = result_;
  // Each direction's statistics over the trials, in trial order (thread-independent).
#pragma omp parallel num_threads(ResolveThreads(options_.pattern.field.num_threads))
  {
    std::vector<double> sorted(k_trials);
#pragma omp for schedule(static)
    for (std::size_t i = 0; i < nb; ++i) {
      const double* column = values + i * k_trials;
      double sum = 0.0;
      for (std::size_t k = 0; k < k_trials; ++k) sum += column[k];
      const auto gi = static_cast<Eigen::Index>(offset + i);
      r.directivity_mean[gi] = sum / static_cast<double>(k_trials);
      double u_sum = 0.0;
      if (u_summed) {
        u_sum = u[i];
      } else {  // the same additions, in the same order, as the running sum
        for (std::size_t k = 0; k < k_trials; ++k) u_sum += u[i * k_trials + k];
      }
      r.intensity_mean_w_sr[gi] = u_sum / static_cast<double>(k_trials);
      std::copy(column, column + k_trials, sorted.begin());
      std::sort(sorted.begin(), sorted.end());
      for (std::size_t p = 0; p < np_pct; ++p) {
        r.directivity_percentiles(static_cast<Eigen::Index>(p), gi) =
            PercentileOfSorted(sorted.data(), k_trials, options_.percentiles[p]);
      }
    }
  }
}

void ToleranceStudy::FinishTrials(std::size_t k0, std::size_t k1) {
  LOBECAST_CHECK_LE(k1, options_.trials);
  ToleranceResult& r = result_;
  for (std::size_t k = k0; k < k1; ++k) {
    const TrialArray t = ApplyTrialErrors(array_, currents_, options_.errors, options_.seed, k);
    FinishFigures(t, power_[k], trackers_[k], grid_, r.beam_r_hat, r.protected_directions, &peak0_,
                  r.trials[k]);
    r.trials[k].directivity_loss_db =
        PowerRatioDb(r.baseline_figures.beam_directivity, r.trials[k].beam_directivity);
    if (options_.progress) {
      options_.progress(0.95 +
                        0.05 * static_cast<double>(k - k0 + 1) / static_cast<double>(k1 - k0));
    }
  }
}

ToleranceResult RunTolerance(const Array& array, const Eigen::VectorXcd& currents,
                             const AngularGrid& grid, const ToleranceTargets& targets,
                             const ToleranceOptions& options) {
  ToleranceStudy study(array, currents, grid, targets, options);
  const auto t0 = Clock::now();
  const std::size_t k_trials = options.trials;
  // Stage 1: every trial's radiated power (needed for its directivity on the grid).
  study.ComputePowers(0, k_trials);
  // Stage 2: the grid, block by block, every trial per block.
  std::vector<double> values;
  for (std::size_t b = 0; b < study.result().blocks; ++b) {
    const std::size_t nb = study.BlockDirections(b);
    values.assign(nb * k_trials, 0.0);
    std::vector<double> u_sum(nb, 0.0);
    study.TrialsOnBlock(b, 0, k_trials, values.data(), u_sum.data(), true);
    study.BlockStatistics(b, values.data(), u_sum.data(), true);
  }
  values.clear();
  values.shrink_to_fit();
  // Stage 3: the off-grid figures of every trial.
  study.FinishTrials(0, k_trials);
  study.result().seconds_trials = SecondsSince(t0);
  return std::move(study.result());
}

}  // namespace lobecast
