// Sizing (issue 16): from requirements (sizing/requirements.h) to a short ranked
// list of candidate panels, each predicted by array theory and then checked by
// computing its pattern with the engine.
//
// For each lattice (rectangular, triangular) and taper (Taylor n-bar,
// Dolph-Chebyshev):
//  1. spacing: the largest cell dx dy whose nearest grating lobe stays outside
//     visible space over the whole scan region by at least the half-width of a lobe
//     to its first null (grating_free.h; the guard: a lobe exactly on the horizon
//     shows its near half as a side lobe, common practice to keep it out);
//  2. taper: at the side-lobe requirement less a 0.3 dB guard, lowered until the
//     predicted principal-plane cuts (plane_cut.h) at broadside and at the scan edges
//     meet it (a short dipole's element factor raises the side lobes on the broadside
//     side of a scanned beam);
//  3. counts: the aperture for the directivity, D = K A eta / lambda^2 with A = N dx dy,
//     eta the taper efficiency, K = 4 pi over a PEC ground (one half-space) and 2 pi in
//     free space (the mirror beam takes half the power) (the standard large-array
//     estimate, e.g. R. C. Hansen, Phased Array Antennas, 2nd ed., 2009, ch. 1, from
//     memory; common practice), square unless max_aperture bounds a side; and the
//     counts whose predicted half-power beamwidths meet the beamwidth requirements;
//  4. check: the pattern computed by the engine (ComputePattern, AnalyzePattern) at
//     broadside and steered to the scan edge in each principal plane (for circular
//     polarization also the axial ratio and sense at each beam peak); where the
//     computed directivity, beamwidth or side lobes miss, the counts or the taper are
//     raised by the shortfall and the candidate is sized again (at most
//     SizingOptions::max_rounds times).
// Circular polarization (requirements polarization "rhcp"/"lhcp") puts a crossed pair at
// every site (engine/synthesis/crossed_pair.h): the cuts take the pair's power pattern
// 1 + cos^2 t instead of one dipole's; the directivity estimate (3.) is that of the
// aperture and does not change; the axial ratio is predicted as the pair's own toward
// the predicted peak of each scan edge's beam, 1 / cos(theta_peak), which no lattice or
// taper can improve (kElement).
// Counts (max_elements, the ranking) are of sites, two dipoles each.
// Candidates that meet everything computed rank first, by fewest elements, then by
// the larger grating-lobe margin. Constraints (max_elements, max_aperture) cap the
// counts; what they cost is a Shortfall naming the requirement and the constraint.
#pragma once

#include <cstddef>
#include <optional>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/sizing/plane_cut.h"
#include "engine/sizing/requirements.h"
#include "engine/synthesis/taper.h"

namespace lobecast {

// kAxialRatio: circular polarization only (the axial ratio at the beam peak).
enum class Requirement {
  kDirectivity,
  kBeamwidthXZ,
  kBeamwidthYZ,
  kSidelobes,
  kGratingLobes,
  kAxialRatio
};
std::string_view ToString(Requirement r);  // "directivity", "beamwidth_xz", ...

// kTaper: the taper's design level reached its floor (-80 dB) and the predicted side
// lobes still miss (the outline, not the taper, sets them). kElement: the element sets
// it (a crossed pair's axial ratio off its normal, crossed_pair.h), not the lattice.
enum class Constraint { kNone, kMaxElements, kMaxApertureX, kMaxApertureY, kTaper, kElement };
std::string_view ToString(Constraint c);  // "none", "max_elements", "max_aperture_x", ...

// A requirement missed: what was asked and what was reached (dBi, deg or dB; grating
// lobes: 0 asked, the count reached), the beam state it was missed at, and the
// constraint that held the design back (kNone: the prediction or the check missed it).
struct Shortfall {
  Requirement what = Requirement::kDirectivity;
  double asked = 0;
  double reached = 0;
  double scan_theta_deg = 0;  // the beam: 0 broadside, else steered in scan_plane
  ScanPlane scan_plane = ScanPlane::kXZ;
  Constraint bound_by = Constraint::kNone;
};

// One beam state the check computed.
struct ComputedBeam {
  double steer_theta_deg = 0;  // 0: broadside
  ScanPlane plane = ScanPlane::kXZ;
  double steer_phi_deg = 0;
  double peak_dbi = 0;
  double peak_theta_deg = 0, peak_phi_deg = 0;        // refined; phi NaN on the axis
  double beamwidth_xz_deg = 0, beamwidth_yz_deg = 0;  // broadside only (E/H planes)
  double sidelobe_db = 0;                             // highest side lobe re the peak (-inf: none)
  int grating_lobes = 0;  // other major lobes (not the free-space mirror beam)
  double grid_step_deg = 0;
  // At the refined peak (IEEE Std 145-2013): dB (0 circular, +inf linear) and sense
  // (+1 right, -1 left, 0 linear). Reported for circular requirements.
  double axial_ratio_db = 0;
  int sense = 0;
};

struct SizingCandidate {
  LatticeKind lattice = LatticeKind::kRectangular;
  int count_x = 0, count_y = 0;  // elements per row, rows
  double spacing_x_m = 0, spacing_y_m = 0;
  double largest_spacing_x_m = 0, largest_spacing_y_m = 0;  // the lattice condition, no guard
  TaperSpec taper;                                          // separable: the same on x and y
  double taper_efficiency = 1;
  int dipoles_per_site = 1;  // 2: crossed pairs (circular polarization)
  // Lattice sites; each holds dipoles_per_site dipoles.
  std::size_t elements() const {
    return static_cast<std::size_t>(count_x) * static_cast<std::size_t>(count_y);
  }
  std::size_t dipoles() const { return elements() * static_cast<std::size_t>(dipoles_per_site); }
  double aperture_x_m() const { return (count_x - 1) * spacing_x_m; }
  double aperture_y_m() const { return (count_y - 1) * spacing_y_m; }

  // Predicted (array theory).
  double directivity_dbi = 0;                                       // broadside
  double scan_directivity_xz_dbi = 0, scan_directivity_yz_dbi = 0;  // at the scan edges
  double beamwidth_xz_deg = 0, beamwidth_yz_deg = 0;                // broadside
  double sidelobe_db = 0;  // worst principal-plane cut, broadside and scan edges
  // The worst of the two principal-plane cuts at broadside, and the cut of each
  // plane steered to its scan edge (-inf where that plane is not scanned).
  double sidelobe_broadside_db = 0, sidelobe_scan_xz_db = 0, sidelobe_scan_yz_db = 0;
  double grating_margin = 0;  // sine space (GratingLobeMargin)
  // Crossed pairs: the pair's axial ratio (CrossedPairAxialRatioDb) toward the
  // predicted peak of the beam steered to each scan edge; 0 where a plane is not
  // scanned or for linear elements.
  double axial_ratio_scan_xz_db = 0, axial_ratio_scan_yz_db = 0;
  std::vector<Shortfall> predicted_shortfalls;

  // Computed by the engine (empty when the check was not run).
  std::vector<ComputedBeam> computed;
  std::vector<Shortfall> shortfalls;  // of the computed figures
  bool checked = false;
  bool meets = false;  // checked and no shortfall
  int rounds = 0;      // sizings (1 + re-sizings after the check)
};

struct SizingOptions {
  bool check = true;   // compute every candidate with the engine
  int max_rounds = 4;  // sizings per candidate, the first included
  int threads = 0;     // as ResolveThreads
};

struct SizingResult {
  std::vector<SizingCandidate> candidates;  // ranked, best first
  // When no candidate meets everything: the shortfalls of the best one, with the
  // constraints that bind.
  std::vector<Shortfall> binding;
  double seconds = 0;
};

// Candidates SizeArray returns at most: rectangular with three tapers, triangular with one.
inline constexpr std::size_t kMaxSizingCandidates = 4;

// Throws InvalidArgument for invalid requirements (Validate).
SizingResult SizeArray(const SizingRequirements& req, const SizingOptions& options = {});

// The geometry and broadside currents (the taper, 1 A peak) of a candidate: what its
// design file generates (lattice centred on the z axis, at the ground height over PEC;
// crossed pairs site by site, the second dipole's current turned by the pair's 90 deg).
struct CandidateArray {
  Array array;
  Eigen::VectorXcd currents;
};
CandidateArray BuildCandidateArray(const SizingRequirements& req, const SizingCandidate& c);

// The grid step the check uses (and the written design file names): a fifth of the
// narrowest predicted beamwidth, as 1, 0.5, 0.25, 0.2 or 0.1 deg.
double CheckGridStepDeg(const SizingCandidate& c);
// The grid: theta 0..90 over PEC (0..180 in free space), phi 0..360, that step.
AngularGrid CheckGrid(const SizingRequirements& req, const SizingCandidate& c);

// The check alone: fills computed, shortfalls, checked and meets.
void CheckCandidate(const SizingRequirements& req, SizingCandidate& c, int threads = 0);

}  // namespace lobecast
