// Tolerance studies: what manufacturing errors and failed elements do to an array,
// by Monte Carlo (CONVENTIONS §3, "Tolerance studies"). K trials each draw one error
// set, compute the pattern of the array with those errors on the grid, and the study
// reports per-direction statistics over the trials and per-trial figures.
//
// Errors of trial k (independent between elements, between kinds and between trials;
// random numbers from (seed, k) alone, engine/tolerance/trial_random.h):
//  - amplitude: |I_n| times 10^(x_n / 20), x_n ~ N(0, amplitude_sigma_db^2) (dB);
//  - phase: arg I_n plus p_n, p_n ~ N(0, phase_sigma_deg^2) (deg);
//  - position: r_n plus (dx, dy, dz), each ~ N(0, position_sigma_m^2) (m);
//  - failures: element n fails open (current 0) with probability failure_probability,
//    independently; or exactly failure_count elements fail, every set of that size
//    equally likely.
//
// Plan once, execute many. The field is linear in the currents, so amplitude, phase
// and failure errors reuse one FieldPlan per block of grid directions for every
// trial (FieldPlan::Execute per trial, nothing re-planned) and one resistance matrix
// for every trial's power P = 1/2 I^H R I. Position errors change the geometry and
// so the plan and R. A first-order expansion in the displacements (the field's
// derivative per element, dE/dr_n = j k r_hat E_n) would reuse the plan but is not
// exact (its error grows as (k sigma)^2 and with the grid's far side lobes, where a
// small error matters most), so each trial builds its own plan over the block's
// directions and its own R instead. The cost: a plan's set-up is O(N + M) (source
// moments, direction vectors: a sincos pair per direction) against the O(N M) of its
// execution (M directions of the block), and R_k is O(N^2) (streamed above
// PatternOptions' resistance_matrix_max_dipoles, as compute does), so the extra
// shrinks as N and M grow. Measured on design-tolerance-panel-12x8.toml (96 dipoles
// over ground, 16 471 directions, direct sums, 1 thread): 4.9 ms of CPU per trial
// reusing the plan, 8.0 ms with position errors (a plan and R per trial). Directions
// alone (the beam, protected directions, the refined peak) need no grid plan at all:
// they are exact direct sums of each trial's sources (PatternProbe).
//
// Blocks and memory. The grid is processed in blocks of whole theta rows; for each
// block every trial's pattern is computed and the K values of each direction kept
// (8 K bytes per direction), then each direction's statistics are taken exactly
// (sorted, no streaming estimate) and the block dropped. Blocks are sized so that
// K x (block directions) x 8 bytes stays within max_block_bytes; the error-free
// pattern (ComputePattern) is computed with the same blocks, so a trial without
// errors runs exactly the baseline's plans.
//
// Reproducibility. Trials run in order k = 0..K-1, each on a plan threaded over
// directions, whose result does not depend on the thread count (FieldOptions);
// per-direction statistics are taken per direction over trials in index order. So
// the same seed gives the same bits with any thread count.
//
// Scale-out (cli/mpi: the MPI driver; the engine stays MPI-free). Trial k depends only
// on (seed, k), so a driver splits the trials into contiguous ranges [k0, k1) and runs
// the stages of ToleranceStudy (below) for its range: the powers, each block's values,
// the per-trial figures. Per block the driver gathers every range's (k1 - k0) x (block
// directions) values of D and U to one process, which takes the statistics over trials
// in index order from the full columns (BlockStatistics): the single-process bits. The
// blocks are the single process's (they depend on K and the grid only), so each trial's
// plan, and so its field, is the same whatever the method. RunTolerance is the stages
// over [0, K) in one process.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/types.h"

namespace lobecast {

struct ErrorModel {
  double amplitude_sigma_db = 0.0;   // >= 0, standard deviation of the amplitude in dB
  double phase_sigma_deg = 0.0;      // >= 0, standard deviation of the phase, deg
  double position_sigma_m = 0.0;     // >= 0, per axis, m
  double failure_probability = 0.0;  // in [0, 1): each element fails open independently
  // Exactly this many elements fail, uniformly chosen (instead of the probability;
  // at most N - 1 so that something radiates).
  std::optional<std::size_t> failure_count;

  bool AnyError() const;
  // Each distribution in words, one clause per kind, for files and terminals:
  // "amplitude: none; phase: Gaussian, standard deviation 5 deg, ...". wavelength_m
  // adds the position's size in wavelengths.
  std::string Describe(double wavelength_m) const;
  // False (with a message naming the field, the value and the rule) for an invalid value.
  bool IsValid(std::string* why) const;
};

struct ToleranceOptions {
  std::size_t trials = 100;  // K >= 1
  std::uint64_t seed = 1;
  ErrorModel errors;
  // Percentiles of the per-direction directivity, in (0, 100), ascending. Each is the
  // linear interpolation between order statistics (Hyndman and Fan's type 7, numpy's
  // default "linear": h = (K - 1) p / 100, x[floor h] + (h - floor h)(x[floor h + 1] -
  // x[floor h]) of the sorted values).
  std::vector<double> percentiles = {5.0, 50.0, 95.0};
  // The pattern's options (field method, threads, power route) for the baseline and
  // for every trial.
  PatternOptions pattern;
  // The K values per direction held for one block of directions, bytes.
  std::size_t max_block_bytes = std::size_t{256} << 20;
  // Called with the fraction done (0..1) between trials; may be empty.
  std::function<void(double)> progress;

  bool IsValid(std::string* why) const;
};

// Where the study looks besides the grid.
struct ToleranceTargets {
  // The design's beam direction (unit vector); std::nullopt: the refined peak of
  // the error-free pattern.
  std::optional<Vec3> beam;
  // Protected directions (a design's [[null]]s), unit vectors.
  std::vector<Vec3> protected_directions;
};

// The figures of one trial (and of the error-free array, ToleranceResult::baseline_figures).
struct TrialFigures {
  double radiated_w = 0.0;
  double beam_directivity = 0.0;  // linear, toward the beam direction (exact)
  // Highest grid directivity outside the main-beam region (MainBeamMask, from the
  // error-free pattern) over the trial's highest grid directivity, dB; -inf when
  // nothing radiates outside, NaN when the region covers the whole grid.
  double peak_sidelobe_db = 0.0;
  // The trial's peak refined off the grid (RefineMaximum from its grid maximum inside
  // the main-beam region) and its angle from the error-free refined peak, deg.
  Vec3 peak_r_hat = Vec3::UnitZ();
  double peak_directivity = 0.0;  // linear, at peak_r_hat
  double pointing_error_deg = 0.0;
  // The error-free beam directivity over this trial's, dB (> 0: directivity lost).
  double directivity_loss_db = 0.0;
  // U at each protected direction, W/sr (exact), and its ratio to U toward the beam, dB.
  std::vector<double> protected_intensity_w_sr;
  std::vector<double> null_depth_db;
  std::size_t failed_elements = 0;
};

// Statistics over the trials of one scalar figure.
struct ScalarStatistics {
  double mean = 0.0;
  double std_dev = 0.0;  // sample standard deviation (K - 1 in the denominator); 0 for K = 1
  double min = 0.0, max = 0.0;
  std::vector<double> percentiles;  // at ToleranceOptions::percentiles
};
// NaN values are left out (a figure undefined in some trials); all NaN gives NaN.
ScalarStatistics StatisticsOf(const std::vector<double>& values,
                              const std::vector<double>& percentiles);

// The type-7 percentile p (0..100) of sorted values (ToleranceOptions::percentiles).
double PercentileOfSorted(const double* sorted, std::size_t n, double p);

struct ToleranceResult {
  PatternResult baseline;  // the error-free pattern (ComputePattern, the study's blocks)
  TrialFigures baseline_figures;
  Vec3 beam_r_hat = Vec3::UnitZ();  // the beam direction used
  bool beam_from_design = false;    // ToleranceTargets::beam was given
  std::vector<Vec3> protected_directions;
  // Per direction (grid, theta-major): the mean over trials of D (linear) and of U
  // (W/sr), and D's percentiles (percentiles.size() x grid, percentile-major).
  Eigen::VectorXd directivity_mean;
  Eigen::VectorXd intensity_mean_w_sr;
  Eigen::MatrixXd directivity_percentiles;  // rows: percentiles, columns: directions
  std::vector<double> percentiles;
  // Grid directions of the error-free main beam (excluded from the side lobes).
  std::vector<bool> main_beam;
  std::vector<TrialFigures> trials;  // K
  std::size_t blocks = 0;
  double seconds_baseline = 0.0;
  double seconds_trials = 0.0;
};

// The study. currents_a: the error-free terminal currents (ValidateCurrents).
// Throws InvalidArgument for invalid options, array, currents or grid, when the
// error-free currents radiate nothing, and when a trial cannot be computed (every
// element failed; a position error that puts a dipole at or below a PEC ground),
// naming the trial.
ToleranceResult RunTolerance(const Array& array, const Eigen::VectorXcd& currents_a,
                             const AngularGrid& grid, const ToleranceTargets& targets,
                             const ToleranceOptions& options);

// The grid quantities one trial's figures need, gathered over the blocks: the
// largest directivity, the largest outside the main beam, and where inside the main
// beam the largest one is (the first such index).
struct TrialGridMaxima {
  double max_all = 0.0;
  double max_outside = -1.0;  // stays < 0 when every direction is in the main beam
  double max_inside = -1.0;
  std::size_t argmax_inside = 0;
  void Add(std::size_t index, double d, bool in_main_beam);
};

// The stages of RunTolerance, for a driver that splits the trials among processes
// (cli/mpi). Run over every trial in this order (powers, then per block the trials and
// the statistics, then the figures), they are RunTolerance, bit for bit; a process may
// run any range of trials of each stage, provided it runs the same range in all three
// (a trial's grid maxima and power stay where they were computed).
class ToleranceStudy {
 public:
  // Validates (the exceptions of RunTolerance), computes the error-free pattern, main
  // beam and figures: result() holds them, sized for every trial and direction.
  ToleranceStudy(const Array& array, const Eigen::VectorXcd& currents_a, const AngularGrid& grid,
                 const ToleranceTargets& targets, const ToleranceOptions& options);

  std::size_t blocks() const { return result_.blocks; }
  // Directions of block b (whole theta rows, theta-major), and its first grid index.
  std::size_t BlockDirections(std::size_t block) const;
  std::size_t BlockOffset(std::size_t block) const {
    return FirstRow(block) * grid_.phi_deg.size();
  }
  // Stage 1: the radiated power of trials [k0, k1); throws naming a trial that
  // radiates nothing.
  void ComputePowers(std::size_t k0, std::size_t k1);
  // Stage 2: trials [k0, k1) on block b (their powers computed). D of direction i and
  // trial k goes to d[i * (k1 - k0) + k - k0]; U likewise to u, or, when u_summed,
  // is added to u[i] in trial order. Reports progress as a fraction of the range.
  void TrialsOnBlock(std::size_t block, std::size_t k0, std::size_t k1, double* d, double* u,
                     bool u_summed);
  // The statistics of block b from every trial's D (d as TrialsOnBlock over [0, K))
  // and U (the same layout, or its running sums when u_summed).
  void BlockStatistics(std::size_t block, const double* d, const double* u, bool u_summed);
  // Stage 3: the figures of trials [k0, k1) (their blocks all done) into result().trials.
  void FinishTrials(std::size_t k0, std::size_t k1);

  ToleranceResult& result() { return result_; }

 private:
  std::size_t FirstRow(std::size_t block) const;

  const Array& array_;
  const Eigen::VectorXcd& currents_;
  const AngularGrid& grid_;
  ToleranceOptions options_;
  std::size_t rows_per_block_ = 1;
  bool moves_ = false;
  std::optional<Eigen::MatrixXd> shared_r_;
  Vec3 peak0_ = Vec3::UnitZ();
  std::vector<double> power_;
  std::vector<TrialGridMaxima> trackers_;
  ToleranceResult result_;
};

// The error set of trial k applied to an array and its currents (exposed for tests
// and for a driver that splits trials).
struct TrialArray {
  Array array;
  Eigen::VectorXcd currents_a;
  std::size_t failed = 0;
};
TrialArray ApplyTrialErrors(const Array& array, const Eigen::VectorXcd& currents_a,
                            const ErrorModel& errors, std::uint64_t seed, std::uint64_t trial);

// The error-free main beam on the grid: every direction reached from a grid maximum
// (each direction within 1e-9 relative of the largest directivity, so a broadside
// panel's twin beams both count) by steps to one of its eight grid neighbours
// (phi wrapping round when the grid spans the full circle) that never increase the
// directivity: the lobe down to its first minima all round. One flag per direction.
std::vector<bool> MainBeamMask(const AngularGrid& grid, const Eigen::VectorXd& directivity);

}  // namespace lobecast
