// Side lobes and other major lobes (side_lobes.h).
#include "engine/analysis/side_lobes.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <functional>
#include <limits>
#include <queue>

#include "engine/analysis/beam.h"
#include "engine/decibels.h"

namespace lobecast {
namespace {

// Two refined lobes closer than this are the same lobe, rad (the searches converge to
// ~1e-8 rad; distinct lobes of any realistic array are far wider apart).
constexpr double kSameLobe_rad = 1e-4;

// Grid candidates this far below the listing threshold are refined only while looking
// for the highest side lobe: a coarse grid can undersample a lobe by several dB.
constexpr double kCandidateMargin_db = 10.0;

// The least rise (dB) from a grid value to the refined lobe that the early stop of a
// full side-lobe list allows for (FindLobes).
constexpr double kRiseFloor_db = 3.0;

// Arrays of at least this many sources (images counted) refine their side-lobe
// candidates kLockstepLobes at a time: an exact evaluation costs O(sources), so one
// batch of many directions beats as many calls of one (threads, no per-call setup).
constexpr std::size_t kLockstepSources = 8192;
constexpr std::size_t kLockstepLobes = 32;

// Lobes in order of level, highest first; levels that round to the same multiple of
// kTieLevel_db (the mirror images of a symmetric array, equal but for rounding) in
// order of theta, then phi (undefined on the z axis: first), each to kTieAngle_deg, so
// that rounding does not pick which is first (but for twins astride a multiple's edge).
constexpr double kTieLevel_db = 1e-6;
constexpr double kTieAngle_deg = 1e-6;
bool HigherLobe(const Lobe& a, const Lobe& b) {
  const auto key = [](const Lobe& l) {
    const auto q = [](double v, double step) { return std::llround(v / step); };
    // Higher levels first (smaller keys); no field at all last.
    return std::array<long long, 3>{
        l.directivity > 0 && std::isfinite(l.directivity) ? -q(ToDb(l.directivity), kTieLevel_db)
                                                          : std::numeric_limits<long long>::max(),
        q(l.direction.theta_deg, kTieAngle_deg),
        std::isnan(l.direction.phi_deg) ? -1 : q(l.direction.phi_deg, kTieAngle_deg)};
  };
  return key(a) < key(b);
}

}  // namespace

LobeSearch FindLobes(const PatternProbe& probe, const GridNeighbours& neighbours,
                     const Eigen::VectorXd& grid_directivity, const Vec3& peak,
                     double peak_directivity, const AnalysisOptions& options) {
  LobeSearch out;
  if (neighbours.num_nodes() == 0) return out;
  const GridNeighbours::GridValue at = [&](std::size_t g) {
    return grid_directivity[static_cast<Eigen::Index>(g)];
  };
  auto d = [&](std::size_t node) { return at(neighbours.representative(node)); };
  const std::size_t top = neighbours.MaxNode(at);
  const auto components = neighbours.Components(neighbours.LocalMaxima(at, 1e-12 * d(top)));

  struct Candidate {
    std::size_t node;
    double value;
  };
  std::vector<Candidate> cands;
  for (const auto& comp : components) {
    if (std::find(comp.begin(), comp.end(), top) != comp.end()) continue;  // the main lobe
    std::size_t best = comp[0];
    double best_d = d(best);
    for (std::size_t n : comp) {
      const double dn = d(n);
      if (dn > best_d) {
        best = n;
        best_d = dn;
      }
    }
    cands.push_back({best, best_d});
  }
  std::sort(cands.begin(), cands.end(),
            [](const Candidate& a, const Candidate& b) { return a.value > b.value; });

  const double listing = FromDb(options.side_lobe_threshold_db) * peak_directivity;
  const double worth =
      FromDb(options.side_lobe_threshold_db - kCandidateMargin_db) * peak_directivity;
  const double major = FromDb(-options.major_lobe_tolerance_db) * peak_directivity;
  const std::size_t max_refined = 4 * options.max_side_lobes + 8;
  std::vector<Vec3> accepted;
  std::vector<Lobe> sides;
  std::size_t refined = 0;
  // The largest rise from a candidate's grid value to its refined maximum so far.
  double rise = 1.0;
  // The max_side_lobes + 1 highest side-lobe levels found, lowest on top.
  std::priority_queue<double, std::vector<double>, std::greater<>> listed;
  // Refinements of cands[0 .. refinements.size()), made ahead in groups of `lockstep`
  // (one for arrays small enough that a direction's exact sum costs little: the
  // candidates one by one, as many evaluations as needed and no more).
  std::vector<RefinedMaximum> refinements;
  const std::size_t lockstep =
      probe.array().size() * (probe.array().ground == Ground::kNone ? 1 : 2) >= kLockstepSources
          ? kLockstepLobes
          : 1;
  for (const Candidate& c : cands) {
    if (c.value < worth && out.highest_side_lobe) break;
    // Once the list is full (and so truncated), a candidate whose grid value, raised by
    // the square of the largest rise met (in dB twice it; at least kRiseFloor_db, at
    // most kCandidateMargin_db), stays below the lowest listed lobe can neither enter
    // the list nor be the highest: the candidates come highest first, so the rest are
    // not refined.
    if (listed.size() > options.max_side_lobes) {
      const double reach =
          std::clamp(rise * rise, FromDb(kRiseFloor_db), FromDb(kCandidateMargin_db));
      if (c.value * reach < listed.top()) {
        out.truncated = true;
        break;
      }
    }
    if (refined == max_refined) {
      out.truncated = true;
      break;
    }
    // The candidates are refined in groups, their simplex searches in lockstep; a group
    // may refine a few candidates the early stops above then leave unused.
    if (refined == refinements.size()) {
      std::vector<Vec3> starts;
      const std::size_t group = std::min(lockstep, max_refined - refined);
      for (std::size_t k = refined; k < std::min(cands.size(), refined + group); ++k)
        starts.push_back(neighbours.direction(cands[k].node));
      const std::vector<RefinedMaximum> more =
          RefineMaxima(probe, starts, 0.5 * neighbours.spacing_rad(),
                       options.refine_tolerance_deg * kDegree, options.max_evaluations_per_search);
      refinements.insert(refinements.end(), more.begin(), more.end());
    }
    const RefinedMaximum m = refinements[refined];
    ++refined;
    if (c.value > 0.0) rise = std::max(rise, m.directivity / c.value);
    if (AngleBetween(m.r_hat, peak) < kSameLobe_rad) continue;
    if (std::any_of(accepted.begin(), accepted.end(),
                    [&](const Vec3& r) { return AngleBetween(r, m.r_hat) < kSameLobe_rad; }))
      continue;
    accepted.push_back(m.r_hat);
    Lobe lobe;
    lobe.direction = ReportedDirection(m.r_hat, neighbours.direction_deg(c.node),
                                       options.refine_tolerance_deg * kDegree);
    lobe.directivity = m.directivity;
    lobe.directivity_dbi = ToDb(m.directivity);
    lobe.level_db = ToDb(m.directivity / peak_directivity);
    if (m.directivity >= major) {
      out.major_lobes.push_back(lobe);
      continue;
    }
    if (!out.highest_side_lobe || HigherLobe(lobe, *out.highest_side_lobe))
      out.highest_side_lobe = lobe;
    if (m.directivity >= listing) {
      sides.push_back(lobe);
      listed.push(m.directivity);
      if (listed.size() > options.max_side_lobes + 1) listed.pop();
    }
  }
  std::sort(sides.begin(), sides.end(), HigherLobe);
  std::sort(out.major_lobes.begin(), out.major_lobes.end(), HigherLobe);
  if (sides.size() > options.max_side_lobes) {
    sides.resize(options.max_side_lobes);
    out.truncated = true;
  }
  out.side_lobes = std::move(sides);
  return out;
}

}  // namespace lobecast
