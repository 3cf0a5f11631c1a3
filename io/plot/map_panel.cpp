#include "io/plot/map_panel.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>

#include "io/plot/colormap.h"
#include "io/plot/frame.h"

namespace lobecast::plot {
namespace {

constexpr double kDeg = kPi / 180.0;

bool FullCircle(const std::vector<double>& phi) {
  if (phi.size() < 2) return false;
  const double step = phi[1] - phi[0];
  return phi.back() - phi.front() + step >= 360.0 - 1e-6;
}

double WrapAzimuth(double phi_deg) {  // to (-180, 180]
  double a = std::remainder(phi_deg, 360.0);
  if (a <= -180.0) a += 360.0;
  return a;
}

}  // namespace

bool MapPanel::ToDevice(double theta_deg, double phi_deg, double* x, double* y) const {
  switch (projection) {
    case MapProjection::kUv: {
      if (theta_deg > 90.0 + 1e-9) return false;
      const double s = std::sin(theta_deg * kDeg);
      *x = disk_cx_px + disk_radius_px * s * std::cos(phi_deg * kDeg);
      *y = disk_cy_px - disk_radius_px * s * std::sin(phi_deg * kDeg);
      return true;
    }
    case MapProjection::kAzEl:
    case MapProjection::kThetaPhi: {
      double a = phi_deg;
      if (projection == MapProjection::kAzEl && phi_min_deg < 0) a = WrapAzimuth(phi_deg);
      *x = left_px + width_px * (a - phi_min_deg) / (phi_max_deg - phi_min_deg);
      *y = top_px + height_px * (theta_deg - theta_min_deg) / (theta_max_deg - theta_min_deg);
      return *x >= left_px - 1e-6 && *x <= left_px + width_px + 1e-6;
    }
  }
  return false;
}

bool MapPanel::ToAngles(double x, double y, double* theta_deg, double* phi_deg) const {
  if (projection == MapProjection::kUv) {
    const double u = (x - disk_cx_px) / disk_radius_px, v = (disk_cy_px - y) / disk_radius_px;
    const double rho = std::hypot(u, v);
    if (rho > 1.0) return false;
    *theta_deg = std::asin(rho) / kDeg;
    *phi_deg = std::atan2(v, u) / kDeg;
    if (*phi_deg < 0) *phi_deg += 360.0;
    return true;
  }
  if (x < left_px || x > left_px + width_px || y < top_px || y > top_px + height_px) return false;
  *phi_deg = phi_min_deg + (phi_max_deg - phi_min_deg) * (x - left_px) / width_px;
  *theta_deg = theta_min_deg + (theta_max_deg - theta_min_deg) * (y - top_px) / height_px;
  return true;
}

MapPanel LayoutPanel(MapProjection proj, const AngularGrid& grid, double left, double top,
                     double width, double height) {
  MapPanel p;
  p.projection = proj;
  p.left_px = std::round(left);
  p.top_px = std::round(top);
  p.width_px = std::round(width);
  p.height_px = std::round(height);
  if (!grid.theta_deg.empty()) {
    p.theta_min_deg = grid.theta_deg.front();
    p.theta_max_deg = std::max(grid.theta_deg.back(), p.theta_min_deg + 1e-3);
  }
  if (!grid.phi_deg.empty()) {
    p.phi_min_deg = grid.phi_deg.front();
    p.phi_max_deg = std::max(grid.phi_deg.back(), p.phi_min_deg + 1e-3);
  }
  if (proj == MapProjection::kAzEl && FullCircle(grid.phi_deg)) {
    p.phi_min_deg = -180.0;
    p.phi_max_deg = 180.0;
  }
  if (proj == MapProjection::kUv) {
    const double side = std::round(std::min(width, height));
    p.left_px = std::round(left + 0.5 * (width - side));
    p.top_px = std::round(top + 0.5 * (height - side));
    p.width_px = p.height_px = side;
    p.disk_cx_px = p.left_px + 0.5 * side;
    p.disk_cy_px = p.top_px + 0.5 * side;
    p.disk_radius_px = 0.5 * side;
  }
  return p;
}

GridSampler::GridSampler(const AngularGrid& grid, const std::vector<double>& values)
    : grid_(grid), values_(values), periodic_(FullCircle(grid.phi_deg)) {}

std::optional<GridSampler::Cell> GridSampler::Locate(double theta, double phi) const {
  const std::vector<double>& t = grid_.theta_deg;
  const std::vector<double>& p = grid_.phi_deg;
  if (t.empty() || p.empty()) return std::nullopt;
  Cell c{};
  if (theta < t.front() - 1e-9 || theta > t.back() + 1e-9) return std::nullopt;
  if (t.size() == 1) {
    c.i0 = c.i1 = 0;
  } else {
    const auto it = std::upper_bound(t.begin(), t.end(), theta);
    c.i1 = std::clamp<std::size_t>(static_cast<std::size_t>(it - t.begin()), 1, t.size() - 1);
    c.i0 = c.i1 - 1;
    c.ft = std::clamp((theta - t[c.i0]) / (t[c.i1] - t[c.i0]), 0.0, 1.0);
  }
  if (periodic_) phi = p.front() + std::fmod(std::fmod(phi - p.front(), 360.0) + 360.0, 360.0);
  if (periodic_ && phi > p.back()) {  // the cell closing the circle
    c.j0 = p.size() - 1;
    c.j1 = 0;
    c.fp = (phi - p.back()) / (p.front() + 360.0 - p.back());
    return c;
  }
  if (phi < p.front() - 1e-9 || phi > p.back() + 1e-9) return std::nullopt;
  if (p.size() == 1) {
    c.j0 = c.j1 = 0;
  } else {
    const auto it = std::upper_bound(p.begin(), p.end(), phi);
    c.j1 = std::clamp<std::size_t>(static_cast<std::size_t>(it - p.begin()), 1, p.size() - 1);
    c.j0 = c.j1 - 1;
    c.fp = std::clamp((phi - p[c.j0]) / (p[c.j1] - p[c.j0]), 0.0, 1.0);
  }
  return c;
}

std::optional<double> GridSampler::Linear(double theta, double phi) const {
  const auto c = Locate(theta, phi);
  if (!c) return std::nullopt;
  const std::size_t np = grid_.phi_deg.size();
  auto v = [&](std::size_t i, std::size_t j) { return values_[i * np + j]; };
  const double a = v(c->i0, c->j0) + c->fp * (v(c->i0, c->j1) - v(c->i0, c->j0));
  const double b = v(c->i1, c->j0) + c->fp * (v(c->i1, c->j1) - v(c->i1, c->j0));
  return a + c->ft * (b - a);
}

std::optional<double> GridSampler::Nearest(double theta, double phi) const {
  const auto c = Locate(theta, phi);
  if (!c) return std::nullopt;
  const std::size_t i = c->ft < 0.5 ? c->i0 : c->i1;
  const std::size_t j = c->fp < 0.5 ? c->j0 : c->j1;
  return values_[i * grid_.phi_deg.size() + j];
}

void PaintPanel(const Canvas& c, const MapPanel& p,
                const std::function<std::optional<std::uint32_t>(double, double)>& colour) {
  const int w = static_cast<int>(p.width_px), h = static_cast<int>(p.height_px);
  if (w <= 0 || h <= 0) return;
  cairo_surface_t* img = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, w, h);
  cairo_surface_flush(img);
  unsigned char* data = cairo_image_surface_get_data(img);
  const int stride = cairo_image_surface_get_stride(img);
  const std::uint32_t none = ToArgb32(NoDataColour());
  for (int y = 0; y < h; ++y) {
    auto* row = reinterpret_cast<std::uint32_t*>(data + static_cast<std::size_t>(y) * stride);
    for (int x = 0; x < w; ++x) {
      double theta, phi;
      row[x] = 0;  // transparent outside the panel (the u-v disk's corners)
      if (!p.ToAngles(p.left_px + x + 0.5, p.top_px + y + 0.5, &theta, &phi)) continue;
      row[x] = colour(theta, phi).value_or(none);
    }
  }
  cairo_surface_mark_dirty(img);
  cairo_t* cr = c.cr();
  cairo_save(cr);
  cairo_set_source_surface(cr, img, p.left_px, p.top_px);
  cairo_pattern_set_filter(cairo_get_source(cr), CAIRO_FILTER_NEAREST);
  cairo_paint(cr);
  cairo_restore(cr);
  cairo_surface_destroy(img);
}

void DrawPanelAxes(const Canvas& c, const MapPanel& p) {
  cairo_t* cr = c.cr();
  const double f = 0.9 * c.font_px();
  c.SetColour(TextColour());
  SetSolid(c, 1.0);
  if (p.projection == MapProjection::kUv) {
    const double cx = p.disk_cx_px, cy = p.disk_cy_px, r = p.disk_radius_px;
    cairo_new_sub_path(cr);
    cairo_arc(cr, cx, cy, r, 0, 2 * kPi);
    cairo_stroke(cr);
    c.SetColour({0.3, 0.3, 0.3, 0.6});
    SetDashed(c, 0.8, 3);
    for (double th : {30.0, 60.0}) {
      cairo_new_sub_path(cr);
      cairo_arc(cr, cx, cy, r * std::sin(th * kDeg), 0, 2 * kPi);
    }
    cairo_move_to(cr, cx - r, cy);
    cairo_line_to(cr, cx + r, cy);
    cairo_move_to(cr, cx, cy - r);
    cairo_line_to(cr, cx, cy + r);
    cairo_stroke(cr);
    SetSolid(c, 1.0);
    c.SetColour(TextColour());
    for (double u : {-1.0, -0.5, 0.0, 0.5, 1.0}) {
      c.Text(cx + u * r, cy + r + 0.4 * f, Tick(u), f, HAlign::kCentre, VAlign::kTop);
      c.Text(cx - r - 0.4 * f, cy - u * r, Tick(u), f, HAlign::kRight, VAlign::kMiddle);
    }
    c.Text(cx + r + 0.4 * f, cy - 0.2 * f, "u", f, HAlign::kLeft, VAlign::kBottom, true);
    c.Text(cx + 0.4 * f, cy - r - 0.2 * f, "v", f, HAlign::kLeft, VAlign::kBottom, true);
    c.Text(cx + r * std::sin(30 * kDeg) * 0.71, cy - r * std::sin(30 * kDeg) * 0.71, "θ 30°",
           0.85 * f, HAlign::kLeft, VAlign::kBottom);
    c.Text(cx + r * std::sin(60 * kDeg) * 0.71, cy - r * std::sin(60 * kDeg) * 0.71, "θ 60°",
           0.85 * f, HAlign::kLeft, VAlign::kBottom);
    return;
  }
  cairo_rectangle(cr, p.left_px, p.top_px, p.width_px, p.height_px);
  cairo_stroke(cr);
  const bool az_el = p.projection == MapProjection::kAzEl;
  // Horizontal axis: phi or azimuth.
  const double span_x = p.phi_max_deg - p.phi_min_deg;
  const double step_x = span_x > 200 && p.width_px < 500 ? 60.0 : 30.0;
  for (double a = step_x * std::ceil(p.phi_min_deg / step_x - 1e-9); a <= p.phi_max_deg + 1e-9;
       a += step_x) {
    const double x = p.left_px + p.width_px * (a - p.phi_min_deg) / span_x;
    cairo_move_to(cr, x, p.top_px + p.height_px);
    cairo_line_to(cr, x, p.top_px + p.height_px + 0.3 * f);
    cairo_stroke(cr);
    c.Text(x, p.top_px + p.height_px + 0.5 * f, Tick(a), f, HAlign::kCentre, VAlign::kTop);
  }
  c.Text(p.left_px + 0.5 * p.width_px, p.top_px + p.height_px + 1.9 * f,
         az_el ? "azimuth (deg, from +x toward +y)" : "phi (deg, from +x toward +y)", f,
         HAlign::kCentre, VAlign::kTop);
  // Vertical axis: theta down, or elevation up.
  const double span_y = p.theta_max_deg - p.theta_min_deg;
  for (double t = 30.0 * std::ceil(p.theta_min_deg / 30.0 - 1e-9); t <= p.theta_max_deg + 1e-9;
       t += 30.0) {
    const double y = p.top_px + p.height_px * (t - p.theta_min_deg) / span_y;
    cairo_move_to(cr, p.left_px - 0.3 * f, y);
    cairo_line_to(cr, p.left_px, y);
    cairo_stroke(cr);
    c.Text(p.left_px - 0.5 * f, y, Tick(az_el ? 90.0 - t : t), f, HAlign::kRight, VAlign::kMiddle);
  }
  cairo_save(cr);
  cairo_translate(cr, p.left_px - 3.2 * f, p.top_px + 0.5 * p.height_px);
  cairo_rotate(cr, -0.5 * kPi);
  c.Text(0, 0, az_el ? "elevation (deg, above xy)" : "theta (deg, from +z)", f, HAlign::kCentre,
         VAlign::kMiddle);
  cairo_restore(cr);
}

std::vector<ContourSegment> Contours(const AngularGrid& grid, const std::vector<double>& v,
                                     double level) {
  std::vector<ContourSegment> out;
  const std::vector<double>& t = grid.theta_deg;
  const std::vector<double>& p = grid.phi_deg;
  const std::size_t nt = t.size(), np = p.size();
  if (nt < 2 || np < 2) return out;
  for (std::size_t i = 0; i + 1 < nt; ++i) {
    for (std::size_t j = 0; j + 1 < np; ++j) {
      // Corners counter-clockwise in (phi, theta): a (i,j), b (i,j+1), c (i+1,j+1), d (i+1,j).
      const double va = v[i * np + j], vb = v[i * np + j + 1];
      const double vc = v[(i + 1) * np + j + 1], vd = v[(i + 1) * np + j];
      struct P {
        double th, ph;
      };
      const P pa{t[i], p[j]}, pb{t[i], p[j + 1]}, pc{t[i + 1], p[j + 1]}, pd{t[i + 1], p[j]};
      const int code =
          (va > level ? 1 : 0) | (vb > level ? 2 : 0) | (vc > level ? 4 : 0) | (vd > level ? 8 : 0);
      if (code == 0 || code == 15) continue;
      auto lerp = [&](const P& p0, double v0, const P& p1, double v1) {
        const double f = (level - v0) / (v1 - v0);
        return P{p0.th + f * (p1.th - p0.th), p0.ph + f * (p1.ph - p0.ph)};
      };
      const P ab = lerp(pa, va, pb, vb), bc = lerp(pb, vb, pc, vc);
      const P cd = lerp(pc, vc, pd, vd), da = lerp(pd, vd, pa, va);
      auto seg = [&](const P& x, const P& y) { out.push_back({x.th, x.ph, y.th, y.ph}); };
      const bool centre_high = 0.25 * (va + vb + vc + vd) > level;
      switch (code) {
        case 1:
        case 14:
          seg(da, ab);
          break;
        case 2:
        case 13:
          seg(ab, bc);
          break;
        case 3:
        case 12:
          seg(da, bc);
          break;
        case 4:
        case 11:
          seg(bc, cd);
          break;
        case 6:
        case 9:
          seg(ab, cd);
          break;
        case 7:
        case 8:
          seg(cd, da);
          break;
        case 5:  // a and c high
          if (centre_high) {
            seg(ab, bc);
            seg(cd, da);
          } else {
            seg(da, ab);
            seg(bc, cd);
          }
          break;
        case 10:  // b and d high
          if (centre_high) {
            seg(da, ab);
            seg(bc, cd);
          } else {
            seg(ab, bc);
            seg(cd, da);
          }
          break;
        default:
          break;
      }
    }
  }
  return out;
}

void DrawContourSegments(const Canvas& c, const MapPanel& p,
                         const std::vector<ContourSegment>& segments) {
  cairo_t* cr = c.cr();
  cairo_save(cr);
  if (p.projection == MapProjection::kUv) {
    cairo_new_sub_path(cr);
    cairo_arc(cr, p.disk_cx_px, p.disk_cy_px, p.disk_radius_px, 0, 2 * kPi);
  } else {
    cairo_rectangle(cr, p.left_px, p.top_px, p.width_px, p.height_px);
  }
  cairo_clip(cr);
  for (const ContourSegment& s : segments) {
    double x0, y0, x1, y1;
    if (!p.ToDevice(s.theta0_deg, s.phi0_deg, &x0, &y0) ||
        !p.ToDevice(s.theta1_deg, s.phi1_deg, &x1, &y1))
      continue;
    // A segment across the azimuth seam would span the map: drop it.
    if (std::fabs(x1 - x0) > 0.5 * p.width_px) continue;
    cairo_move_to(cr, x0, y0);
    cairo_line_to(cr, x1, y1);
  }
  cairo_stroke(cr);
  cairo_restore(cr);
}

std::string ProjectionDescription(MapProjection p) {
  switch (p) {
    case MapProjection::kThetaPhi:
      return "theta-phi map (theta from +z, phi from +x toward +y)";
    case MapProjection::kAzEl:
      return "azimuth-elevation map (azimuth = phi from +x toward +y, elevation = 90° - theta)";
    case MapProjection::kUv:
      return "u-v map, upper hemisphere seen from +z (u = sin θ cos φ, v = sin θ sin φ)";
  }
  return "?";
}

}  // namespace lobecast::plot
