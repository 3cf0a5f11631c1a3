#include "engine/sweep/scan_sweep.h"

#include <algorithm>
#include <cmath>

#include <Eigen/Geometry>

#include "engine/analysis/pattern_analysis.h"
#include "engine/constants.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/synthesis/grating_lobes.h"
#include "engine/synthesis/steering.h"

namespace lobecast {
namespace {

// The refined figures of the beam steered to (theta, phi), or NaN ones when the
// analysis fails (a pattern the analysis cannot take, e.g. no main beam).
ScanPoint Steer(const Array& array, const Eigen::VectorXcd& amplitudes, double theta_rad,
                double phi_rad, const AngularGrid& grid, const ScanSweepOptions& options,
                const std::function<void(double)>& progress) {
  ScanPoint p;
  p.steer_theta_deg = theta_rad / kDegree;
  p.steer_phi_deg = phi_rad / kDegree;
  const Eigen::VectorXcd currents =
      amplitudes.cwiseProduct(SteeringPhasors(array, theta_rad, phi_rad));
  PatternOptions po = options.pattern;
  po.progress = progress;
  const PatternResult r = ComputePattern(array, currents, grid, po);
  try {
    const PatternAnalysis a = AnalyzePattern(array, currents, r, options.analysis);
    p.analysed = true;
    p.peak_directivity_dbi = a.peak.directivity_dbi;
    p.peak_theta_deg = a.peak.direction.theta_deg;
    p.peak_phi_deg = a.peak.direction.phi_deg;
    const Vec3 peak = UnitVectorAt(p.peak_theta_deg * kDegree,
                                   std::isnan(p.peak_phi_deg) ? 0.0 : p.peak_phi_deg * kDegree);
    const Vec3 steer = UnitVectorAt(theta_rad, phi_rad);
    p.pointing_error_deg = std::atan2(peak.cross(steer).norm(), peak.dot(steer)) / kDegree;
    p.half_power_first_deg = a.elevation_cut.half_power_width_deg;
    p.half_power_second_deg = a.orthogonal_cut.half_power_width_deg;
    p.other_major_lobes = static_cast<int>(a.major_lobes.size());
    p.sidelobe_db = a.highest_side_lobe ? a.highest_side_lobe->level_db
                                        : -std::numeric_limits<double>::infinity();
  } catch (const InvalidArgument&) {
    // Left NaN (analysed false).
  }
  if (options.lattice) {
    p.grating_lobes =
        static_cast<int>(VisibleGratingLobes(*options.lattice, UnitVectorAt(theta_rad, phi_rad),
                                             array.wavelength_m())
                             .size());
  }
  return p;
}

}  // namespace

ScanSweep RunScanSweep(const Array& array, const Eigen::VectorXcd& amplitudes,
                       const std::vector<double>& theta_rad, const std::vector<double>& phi_rad,
                       const AngularGrid& grid, const ScanSweepOptions& options) {
  if (theta_rad.size() != phi_rad.size() || theta_rad.empty())
    throw InvalidArgument("a scan needs as many phi as theta angles, at least one");
  if (amplitudes.size() != static_cast<Eigen::Index>(array.size()))
    throw InvalidArgument("a scan needs one amplitude per dipole");
  ScanSweep out;
  const double total = static_cast<double>(theta_rad.size() + 1);
  auto part = [&](std::size_t i) {
    return [&options, i, total](double f) {
      if (options.progress) options.progress((static_cast<double>(i) + f) / total);
    };
  };
  // The broadside beam first: the reference of the scan loss.
  const Vec3 b = options.broadside.normalized();
  const double b_theta = std::acos(std::clamp(b.z(), -1.0, 1.0));
  const double b_phi = std::atan2(b.y(), b.x());
  out.broadside_directivity_dbi =
      Steer(array, amplitudes, b_theta, b_phi, grid, options, part(0)).peak_directivity_dbi;
  for (std::size_t i = 0; i < theta_rad.size(); ++i) {
    ScanPoint p = Steer(array, amplitudes, theta_rad[i], phi_rad[i], grid, options, part(i + 1));
    p.scan_loss_db = p.peak_directivity_dbi - out.broadside_directivity_dbi;
    if (p.grating_lobes > 0 && !out.grating_onset) out.grating_onset = i;
    out.points.push_back(p);
  }
  if (options.progress) options.progress(1.0);
  return out;
}

}  // namespace lobecast
