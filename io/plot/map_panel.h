// One map panel: where directions land on the page in a projection
// (plot_options.h, MapProjection), a sampler that reads grid values at any
// direction, the raster fill, the axes, and contour lines by marching squares.
#pragma once

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "engine/grid.h"
#include "io/plot/canvas.h"
#include "io/plot/options.h"

namespace lobecast::plot {

struct MapPanel {
  MapProjection projection = MapProjection::kThetaPhi;
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;  // the frame
  // Angles shown (theta-phi, az-el): theta rows top to bottom, phi (azimuth)
  // columns left to right. On az-el with a full phi circle, azimuth runs
  // -180..180 (phi wrapped), so +x is in the middle.
  double theta_min_deg = 0, theta_max_deg = 180;
  double phi_min_deg = 0, phi_max_deg = 360;
  // u-v: the unit circle's centre and radius.
  double disk_cx_px = 0, disk_cy_px = 0, disk_radius_px = 0;

  // False when the direction is outside the panel (e.g. theta > 90 on u-v).
  bool ToDevice(double theta_deg, double phi_deg, double* x_px, double* y_px) const;
  // False outside the panel (the frame, or the unit disk on u-v).
  bool ToAngles(double x_px, double y_px, double* theta_deg, double* phi_deg) const;
};

// Lays out a panel for `grid` inside the box; u-v keeps a square centred in it.
MapPanel LayoutPanel(MapProjection p, const AngularGrid& grid, double left_px, double top_px,
                     double width_px, double height_px);

// Reads theta-major grid values at any direction: bilinear (Linear) or the
// nearest sample (Nearest). Phi wraps when the grid covers the full circle.
// std::nullopt outside the grid.
class GridSampler {
 public:
  GridSampler(const AngularGrid& grid, const std::vector<double>& values);
  std::optional<double> Linear(double theta_deg, double phi_deg) const;
  std::optional<double> Nearest(double theta_deg, double phi_deg) const;

 private:
  struct Cell {
    std::size_t i0, i1, j0, j1;
    double ft, fp;  // fractions toward i1, j1
  };
  std::optional<Cell> Locate(double theta_deg, double phi_deg) const;
  const AngularGrid& grid_;
  const std::vector<double>& values_;
  bool periodic_ = false;
};

// Fills the panel pixel by pixel: colour(theta, phi) as ARGB32, or nullopt
// for "no data" (drawn as the no-data colour inside the panel).
void PaintPanel(const Canvas& c, const MapPanel& p,
                const std::function<std::optional<std::uint32_t>(double, double)>& colour);

// Frame, tick labels every 30 deg (u-v: every 0.5, and theta rings 30 and 60 deg)
// and axis titles.
void DrawPanelAxes(const Canvas& c, const MapPanel& p);

// Contour segments of theta-major `values` at `level` by marching squares on the
// grid cells, in (theta, phi) degrees; saddles are split by the cell mean.
struct ContourSegment {
  double theta0_deg, phi0_deg, theta1_deg, phi1_deg;
};
std::vector<ContourSegment> Contours(const AngularGrid& grid, const std::vector<double>& values,
                                     double level);
// Draws segments projected into the panel (clipped to it).
void DrawContourSegments(const Canvas& c, const MapPanel& p,
                         const std::vector<ContourSegment>& segments);

// A short name and the definition of a projection, for titles.
std::string ProjectionDescription(MapProjection p);

}  // namespace lobecast::plot
