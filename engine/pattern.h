// The whole pattern job on a theta-phi grid: field, intensity, directivity,
// polarization, power and resistances. This is what `lobecast compute` runs.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/power/power_cost.h"
#include "engine/types.h"

namespace lobecast {

struct PatternOptions {
  // The field plan's options, passed to every block's FieldPlan as they are:
  // threads (also used for the power and polarization stages), the method (direct,
  // fast to tolerance_relative of the pattern peak, or auto: fast only when its
  // estimated cost is well below direct) and the fast path's tolerance.
  FieldOptions field;
  // The N x N resistance matrix costs 8 N^2 bytes. Up to this many dipoles it is
  // built (and stored in results); beyond, power and active resistances are
  // streamed row by row in O(N) memory and PatternResult::resistance_ohm is
  // empty, unless store_resistance_matrix asks for it anyway.
  std::size_t resistance_matrix_max_dipoles = 4096;
  bool store_resistance_matrix = false;
  // The power's route: the closed form (matrix or streamed, as above), the
  // band-limited quadrature (engine/power/power_quadrature.h: no matrix and no
  // active resistances, which are then NaN), or auto (power_cost.h: the closed
  // form unless it is estimated slow and the quadrature well below it). The
  // quadrature's threads are field.num_threads.
  PowerMethod power_method = PowerMethod::kAuto;
  PowerQuadratureOptions power_quadrature;
  // The grid is planned and computed in blocks of whole theta rows of about this
  // many directions, bounding the plan's memory (~100 bytes per direction) on
  // large grids. The result does not depend on it beyond the fast path's tolerance
  // (each block's fast transform meets it relative to that block's peak).
  std::size_t block_directions = std::size_t{1} << 20;
  // Called with the fraction done (0..1) between chunks of directions; may be empty.
  // The engine never prints; the CLI draws its progress bar from this.
  std::function<void(double)> progress;
};

// PowerRoute (how the radiated power and the active resistances were obtained),
// PowerMethod (what was asked) and their cost model: engine/power/power_cost.h.

// ComputeSummary::fast_transforms_used as one name: "none" when empty, else the
// transforms' names joined with "+" ("lattice", "lattice+type-3"). The result
// file stores this form (attribute /summary/fast_transform).
std::string FastTransformsToString(const std::vector<FastTransform>& transforms);
// The inverse, case-insensitive; std::nullopt for an unknown name in the list.
std::optional<std::vector<FastTransform>> FastTransformsFromString(std::string_view s);

// What was asked, what was used, and how long each stage took.
struct ComputeSummary {
  FieldMethod field_method_given = FieldMethod::kAuto;  // PatternOptions::field.method
  // kFast when any block took the fast path, else kDirect.
  FieldMethod field_method_used = FieldMethod::kDirect;
  // The fast transforms the blocks ran, each once, in the order first used; empty
  // when every block summed directly. Blocks may differ (auto decides per block).
  std::vector<FastTransform> fast_transforms_used;
  double field_error_bound_relative = 0;  // fast path: bound met, relative to the peak
  PowerRoute power_route = PowerRoute::kMatrix;
  // The quadrature route only (0 otherwise; stored only then): the bound of
  // |P - P_exact| relative to P, the rule's exact degree and its nodes evaluated.
  double power_error_bound_relative = 0;
  int power_quadrature_degree = 0;
  std::size_t power_quadrature_nodes = 0;
  int threads_used = 0;
  std::size_t num_dipoles = 0;
  std::size_t num_sources = 0;  // dipoles plus images
  std::size_t num_directions = 0;
  double pairs = 0;  // source-direction pairs evaluated
  double seconds_plan = 0;
  double seconds_field = 0;
  double seconds_power = 0;
  double seconds_polarization = 0;
  double radiated_power_w = 0;
  // Decimal digits of radiated_power_w that survive cancellation in its sum
  // (PowerSignificantDigits, engine/power/radiated_power.h): ~15.7 normally; fewer
  // than kPowerDigitsWanted (9) are said in every output (PowerDigitsNote).
  double power_significant_digits = 0;
  double peak_directivity = 0;  // linear, grid maximum
  double peak_theta_deg = 0;
  // NaN (undefined) when the grid maximum is on the z axis (theta 0 or 180 deg), where
  // every phi names the same direction.
  double peak_phi_deg = 0;
  // Why the routes are what they are (auto's choice, blocks that differ, a matrix
  // left out); may be empty. For people: the result file does not store it.
  std::string message;

  // One line: the field method used and asked, the fast transforms and their error
  // bound, and the power route, e.g. "field fast (asked auto), lattice transform,
  // error bound 1e-10 of the peak |rE|; power matrix (closed form)".
  std::string BriefReport() const;
  // Several lines: the brief report, then sizes, threads, time per stage, power,
  // the peak and the message.
  std::string FullReport() const;
};

struct PatternResult {
  AngularGrid grid;
  FarField field;                  // (Nt*Np), theta-major
  Eigen::VectorXd intensity_w_sr;  // U = |rE|^2 / (2 eta0)
  Eigen::VectorXd directivity;     // linear, 4 pi U / P
  Eigen::VectorXd axial_ratio_db;
  Eigen::VectorXd tilt_deg;
  std::vector<std::int8_t> sense;
  Eigen::MatrixXd resistance_ohm;         // (N, N); 0 x 0 when streamed
  Eigen::VectorXd active_resistance_ohm;  // (N) Re Z_act (engine/power/impedance.h)
  double radiated_power_w = 0;
  // The numerical floor of the field, V (FieldFloor_v, engine/rounding_floor.h): the
  // field components below it are stored as exact zeros, and everything derived from
  // the field (intensity, directivity, polarization, co/cross parts, the analysis)
  // applies it. Not stored: ReadResult computes it again from the array and currents.
  double field_floor_v = 0;
  ComputeSummary summary;
};

// "" when P keeps at least kPowerDigitsWanted digits, else one sentence saying how
// many it keeps and why (for the compute and check text, the report and its JSON).
std::string PowerDigitsNote(double power_significant_digits);

// Applies the floor to a result whose grid, field, radiated power and field_floor_v
// are set, and derives the rest per direction: the field components below the floor
// become exact zeros (the stored /field holds them so: every reader of the file sees
// the same zeros the report and plots treat as zero, and a floored value is rounding
// anyway, with no digit worth keeping), then U, D and the polarization from them.
// ComputePattern and ReadResult both call it, so a result read back equals the one
// computed, bit for bit. num_threads as ResolveThreads.
void DeriveFromField(PatternResult& result, int num_threads = 0);

// The grid index of the directivity peak. Ties (within 1e-9 relative, i.e.
// rounding) go to the first index, the smallest theta: a planar array's twin
// beams at theta and 180 - theta are equal, and the upper one is where Ludwig-3
// references (defined about +z) mean what users expect. Used by ComputePattern's
// summary and by the pattern analysis, so both name the same beam.
Eigen::Index PeakIndex(const Eigen::VectorXd& directivity);

// currents_a: the terminal currents (A peak), one per dipole (ValidateCurrents).
// Throws InvalidArgument for an invalid array, currents or grid, or when the
// currents radiate no power (directivity undefined).
// The blocks of ComputePatternBlocks gathered into one result and finished once
// the plans are gone (so the grid's derived quantities never sit beside a plan):
// the same blocks and the same per-direction DeriveFromField as the streamed job,
// so their values agree bit for bit (tests/pattern_stream_test.cpp).
PatternResult ComputePattern(const Array& array, const Eigen::VectorXcd& currents_a,
                             const AngularGrid& grid, const PatternOptions& options = {});

// --- Streaming (grids whose result does not fit in memory) ---
// PeakIndex fed in order, block by block, holding O(1): the same index as PeakIndex
// on the whole vector. The first index within 1e-9 of the final maximum is always a
// prefix maximum (every value before it is below the threshold, so below it), so
// only the prefix maxima within 1e-9 of the running maximum are kept (a few).
class PeakTracker {
 public:
  void Add(std::size_t first_index, const Eigen::VectorXd& values);
  // PeakIndex of everything added; 0 before anything was added.
  std::size_t index() const;
  double value() const;  // the value at index()
  // Every index that may still become the peak (for keeping their rows).
  std::vector<std::size_t> candidate_indices() const;

 private:
  struct Candidate {
    std::size_t index;
    double value;
  };
  const Candidate* Peak() const;
  std::vector<Candidate> candidates_;  // prefix maxima, ascending in index and value
  double max_ = -std::numeric_limits<double>::infinity();
};

// Called once per finished block, in theta order: `rows` holds the block's theta
// rows (rows.grid: those rows, every phi), with the field floored and intensity,
// directivity and polarization derived exactly as ComputePattern stores them;
// radiated_power_w and field_floor_v are set, the resistances and summary are not.
// `rows` is only valid during the call.
using PatternBlockSink = std::function<void(std::size_t first_row, const PatternResult& rows)>;

// The job in blocks of whole theta rows (PatternOptions::block_directions): the
// power first (it does not need the grid: closed form or quadrature), then each
// block's field, finished per direction (DeriveFromField) and handed to `sink`, then
// dropped. Memory O(block + N) besides what the sink keeps. Returns the result
// without per-direction quantities (empty field and vectors): grid, power,
// resistances, floor and the whole summary (peak by PeakTracker). Throws as
// ComputePattern, and whatever the sink throws.
PatternResult ComputePatternBlocks(const Array& array, const Eigen::VectorXcd& currents_a,
                                   const AngularGrid& grid, const PatternOptions& options,
                                   const PatternBlockSink& sink);
// ComputePattern in two steps, for a driver that splits the grid among processes
// (cli/mpi; the engine stays MPI-free). ComputePatternRows validates, computes the
// power and the field of theta rows [first_row, last_row) only, in blocks of
// options.block_directions from first_row (the other rows' field is zero; the
// blocks of ComputePatternBlocks, gathered); the driver then fills in every row's
// field and merges the summary's per-block entries (fast_transforms_used,
// field_error_bound_relative, blocks, fast_blocks), and FinishPattern applies the
// floor, derives U, D and the polarization and finds the peak. ComputePattern is the two over every
// row. Rows split at block boundaries run the very plans of the whole grid (the same bits whatever
// the method); other splits give the direct sums' bits and the fast path's tolerance.
struct PatternInProgress {
  PatternResult result;  // grid, power, field of the rows, summary so far
  std::size_t blocks = 0;
  std::size_t fast_blocks = 0;
  std::string power_why;  // PowerChoice::why, for the summary's message
};
PatternInProgress ComputePatternRows(const Array& array, const Eigen::VectorXcd& currents_a,
                                     const AngularGrid& grid, const PatternOptions& options,
                                     std::size_t first_row, std::size_t last_row);
PatternResult FinishPattern(PatternInProgress&& in_progress, const PatternOptions& options);

}  // namespace lobecast
