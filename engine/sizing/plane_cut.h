// Predicted principal-plane cuts of a planar panel (array-factor theory): the array
// factor times the element factor of a short dipole (|u_perp| = sqrt(1 - (r . o)^2)),
// or of a crossed pair (power 1 + (r . z)^2, engine/synthesis/crossed_pair.h), and, over a PEC
// ground, the image factor 2 |sin(k h cos theta)| of a horizontal dipole at height h. Mutual
// coupling is not modelled (the engine's currents are forced too); the planes off the principal
// ones are left to the engine's check (sizing.h).
//
// The xz-plane cut runs over r = (sin t, 0, cos t), the yz-plane cut over
// r = (0, sin t, cos t), t in [-90, 90] deg, with the beam steered to t0 in that plane
// (phase steering, exp(-j k r0 . r_n)). In the xz plane (r - r0) . r_n = (u - u0) x_n
// for a panel in a plane z = const, so the array factor is exactly the line factor of
// the amplitudes summed over equal x (PanelModel::x); likewise y in the yz plane. This
// holds for any lattice and any taper, separable or not.
#pragma once

#include <vector>

#include "engine/synthesis/lattice_generator.h"
#include "engine/types.h"

namespace lobecast {

// Positions (wavelengths) and the amplitudes summed at each.
struct LineProjection {
  std::vector<double> position;
  std::vector<double> weight;
};

struct PanelModel {
  LineProjection x, y;
  Vec3 orientation = Vec3::UnitX();
  bool crossed = false;  // a crossed pair per site (orientation and z x it)
  bool pec = false;
  double height = 0.25;  // wavelengths, over PEC
};

// The projections of a panel's sites (lattice frame, local_m) with their amplitudes.
PanelModel ProjectPanel(const std::vector<LatticeSite>& sites,
                        const std::vector<double>& amplitudes, double wavelength_m);

enum class ScanPlane { kXZ, kYZ };  // the cut (and the scan) in the xz or the yz plane

struct CutFigures {
  double peak_deg = 0;              // t of the main beam (the element factor pulls it)
  double half_power_width_deg = 0;  // +inf if it does not fall to half on both sides
  double sidelobe_db = 0;           // highest outside the first nulls, re the peak; -inf: none
  double first_null_lower_deg = 0;  // t of the first nulls around the peak
  double first_null_upper_deg = 0;
};

// The cut in `plane` with the beam steered to t0_deg in it. step_deg: the sampling
// (the figures are refined between samples by bisection and golden sections).
CutFigures PredictCut(const PanelModel& panel, ScanPlane plane, double t0_deg, double step_deg);

// The first null of the line factor sum w_n exp(j 2 pi s x_n) in sine space: the
// smallest s > 0 where it has its first minimum. A grating lobe's half-width to its
// first null (the guard of sizing.h).
double FirstNullSine(const LineProjection& line);

}  // namespace lobecast
