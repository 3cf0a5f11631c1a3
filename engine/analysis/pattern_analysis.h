// Pattern analysis (issue 4): the numbers an engineer sizes an array by, computed
// from a grid job and refined off the grid through the engine itself: the main
// beam (peak, principal-plane half-power and first-null beamwidths, front-to-back),
// side lobes, nulls, the field toward protected directions, and polarization purity.
// Pure computation: reports, exports and the HDF5 /summary are built on this by io/
// and cli/. Definitions (principal planes, F/B, side lobes, the -3 dB beam) are
// documented beside the result fields in analysis_types.h.
//
// The grid only seeds the searches: every reported angle and level comes from exact
// field evaluations (direct sum) near the grid feature, so results do not depend on
// the grid spacing as long as the grid resolves the feature at all (a lobe narrower
// than the spacing may go unseen).
#pragma once

#include "engine/analysis/analysis_types.h"
#include "engine/pattern.h"
#include "engine/types.h"

namespace lobecast {

// The polarization reference "auto" means (compute, report, export, plot): of the six
// references, the one with the largest co-polar part |co|^2 at the grid peak
// (PeakIndex, so the beam the summary and the analysis name). The peak's distance
// from the z axis sets the order in which ties (within 1e-9 relative) are broken:
//  - peak within 45 deg of the horizon (45 <= theta <= 135 deg): theta, phi, x, y,
//    RHCP, LHCP. theta_hat / phi_hat follow the field of vertical and horizontal
//    elements over the whole beam (CONVENTIONS §2): a vertical element's field is
//    E_theta everywhere, where Ludwig-3 x and y mix it into both components as phi
//    moves off 0 or 90 deg.
//  - peak within 45 deg of the z axis: x, y, RHCP, LHCP, theta, phi. theta_hat and
//    phi_hat turn by the full phi range around the pole (and are undefined on it),
//    so the Ludwig-3 frame, smooth there, is the natural one. theta or phi is still
//    chosen where it captures strictly more (a vertical element's beam tilted 30 deg
//    from the axis at phi = 45 deg).
// A 45 deg linear field on the horizon thus gets theta (co and cross equal in all
// linear references); a circular one RHCP or LHCP.
PolarizationReference AutoReference(const PatternResult& result);

// grid_result must be ComputePattern(array, currents_a, ...) for this array and
// these currents (checked at the grid maximum). Throws InvalidArgument for invalid
// options (see IsValid), an invalid array or currents, an empty grid, a radiated power that is not
// > 0, or a grid result that does not fit the array; InternalError when the result's values do not
// match its own grid (ComputePattern and ReadResult never make one).
PatternAnalysis AnalyzePattern(const Array& array, const Eigen::VectorXcd& currents_a,
                               const PatternResult& grid_result,
                               const AnalysisOptions& options = {});

}  // namespace lobecast
