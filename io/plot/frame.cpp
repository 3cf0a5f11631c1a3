#include "io/plot/frame.h"

#include <cairo.h>

#include <cmath>
#include <cstdarg>
#include <cstdio>
#include <filesystem>
#include <utility>

#include "io/plot/colormap.h"

namespace lobecast::plot {
namespace {

Colour FromOklab(double l, double c, double h_deg) {
  const double h = h_deg * kPi / 180.0;
  const Rgb rgb = OklabToSrgb({l, c * std::cos(h), c * std::sin(h)});
  return {rgb.r, rgb.g, rgb.b, 1.0};
}

}  // namespace

std::string Tick(double v) {
  if (std::fabs(v) < 1e-9) v = 0.0;  // no "-0"
  return Format("%g", v);
}

std::string Format(const char* fmt, ...) {
  char buf[512];
  va_list args;
  va_start(args, fmt);
  std::vsnprintf(buf, sizeof buf, fmt, args);
  va_end(args);
  return buf;
}

std::string FormatFrequency(double hz) {
  const char* units[] = {"Hz", "kHz", "MHz", "GHz", "THz"};
  int u = 0;
  double v = hz;
  while (std::fabs(v) >= 1000.0 && u < 4) {
    v /= 1000.0;
    ++u;
  }
  return Format("%.6g %s", v, units[u]);
}

std::string ArrayLine(const StoredResult& r) {
  std::string name = r.metadata.name;
  if (name.empty() && !r.metadata.input_path.empty())
    name = std::filesystem::path(r.metadata.input_path).stem().string();
  if (name.empty()) name = "unnamed array";
  const std::size_t n = r.array.dipoles.size();
  return name + " - " + FormatFrequency(r.array.frequency_hz) + ", " + std::to_string(n) +
         (n == 1 ? " dipole, " : " dipoles, ") +
         (r.array.ground == Ground::kPec ? "PEC ground z = 0" : "free space");
}

std::vector<std::string> WrapText(const Canvas& c, const std::string& text, double size_px,
                                  double width_px, bool bold) {
  std::vector<std::string> lines;
  std::string line, word;
  auto flush_word = [&] {
    if (word.empty()) return;
    const std::string candidate = line.empty() ? word : line + " " + word;
    if (!line.empty() && c.TextWidth(candidate, size_px, bold) > width_px) {
      lines.push_back(line);
      line = word;
    } else {
      line = candidate;
    }
    word.clear();
  };
  for (char ch : text) {
    if (ch == ' ')
      flush_word();
    else
      word += ch;
  }
  flush_word();
  if (!line.empty()) lines.push_back(line);
  return lines;
}

double DrawTitleBlock(const Canvas& c, const std::vector<std::string>& lines) {
  const double f = c.font_px();
  const double x = 0.8 * f;
  double y = 0.8 * f;
  c.SetColour(TextColour());
  for (std::size_t i = 0; i < lines.size(); ++i) {
    const double size = i == 0 ? 1.15 * f : f;
    for (const std::string& part : WrapText(c, lines[i], size, c.width() - 2 * x, i == 0)) {
      c.Text(x, y, part, size, HAlign::kLeft, VAlign::kTop, i == 0);
      y += 1.35 * size;
    }
  }
  return y + 0.3 * f;
}

// Dark blue and orange differ in lightness and hue, so the pair stays apart in
// grey scale and for the common colour-vision deficiencies.
Colour MainTraceColour() { return FromOklab(0.42, 0.15, 262.0); }
Colour CompanionTraceColour() { return FromOklab(0.70, 0.15, 55.0); }
Colour GridColour() { return {0.78, 0.78, 0.78, 1.0}; }
Colour TextColour() { return {0.12, 0.12, 0.12, 1.0}; }
Colour HalfPowerColour() { return FromOklab(0.55, 0.17, 20.0); }
Colour MarkerColour() { return {0.0, 0.0, 0.0, 1.0}; }

void SetSolid(const Canvas& c, double width_px) {
  cairo_set_line_width(c.cr(), width_px);
  cairo_set_dash(c.cr(), nullptr, 0, 0);
}

void SetDashed(const Canvas& c, double width_px, double dash_px) {
  const double dashes[] = {dash_px, 0.6 * dash_px};
  cairo_set_line_width(c.cr(), width_px);
  cairo_set_dash(c.cr(), dashes, 2, 0);
}

void DrawTrace(const Canvas& c, const Colour& colour, double width_px, std::size_t n,
               const std::function<std::pair<double, double>(std::size_t)>& point_px) {
  cairo_t* cr = c.cr();
  c.SetColour(colour);
  SetSolid(c, width_px);
  cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
  for (std::size_t k = 0; k < n; ++k) {
    const auto [x, y] = point_px(k);
    if (k == 0)
      cairo_move_to(cr, x, y);
    else
      cairo_line_to(cr, x, y);
  }
  cairo_stroke(cr);
}

void DrawGridRow(const Canvas& c, const FrameBox& b, double y, const std::string& label) {
  cairo_t* cr = c.cr();
  const double f = c.font_px();
  c.SetColour(GridColour());
  cairo_move_to(cr, b.left_px, y);
  cairo_line_to(cr, b.left_px + b.width_px, y);
  cairo_stroke(cr);
  c.SetColour(TextColour());
  c.Text(b.left_px - 0.4 * f, y, label, 0.9 * f, HAlign::kRight, VAlign::kMiddle);
}

void DrawGridColumn(const Canvas& c, const FrameBox& b, double x, const std::string& label) {
  cairo_t* cr = c.cr();
  const double f = c.font_px();
  c.SetColour(GridColour());
  cairo_move_to(cr, x, b.top_px);
  cairo_line_to(cr, x, b.top_px + b.height_px);
  cairo_stroke(cr);
  c.SetColour(TextColour());
  c.Text(x, b.top_px + b.height_px + 0.5 * f, label, 0.9 * f, HAlign::kCentre, VAlign::kTop);
}

void DrawAxisTitlesAndOutline(const Canvas& c, const FrameBox& b, const std::string& x_title,
                              const std::string& y_title) {
  cairo_t* cr = c.cr();
  const double f = c.font_px();
  c.SetColour(TextColour());
  c.Text(b.left_px + 0.5 * b.width_px, b.top_px + b.height_px + 2.0 * f, x_title, 0.9 * f,
         HAlign::kCentre, VAlign::kTop);
  cairo_save(cr);
  cairo_translate(cr, 0.9 * f, b.top_px + 0.5 * b.height_px);
  cairo_rotate(cr, -0.5 * kPi);
  c.Text(0, 0, y_title, 0.9 * f, HAlign::kCentre, VAlign::kMiddle);
  cairo_restore(cr);
  c.SetColour(TextColour());
  SetSolid(c, 1.0);
  cairo_rectangle(cr, b.left_px, b.top_px, b.width_px, b.height_px);
  cairo_stroke(cr);
}

double DbLabelStep(double range_db) {
  if (range_db > 25) return 10;
  if (range_db > 10) return 5;
  return 2;
}

void DrawNullMark(const Canvas& c, double x, double y, double s) {
  cairo_t* cr = c.cr();
  for (const auto& [w, col] :
       {std::pair{3.2, Colour{1, 1, 1, 1}}, std::pair{1.4, Colour{0, 0, 0, 1}}}) {
    c.SetColour(col);
    SetSolid(c, w);
    cairo_move_to(cr, x - s, y - s);
    cairo_line_to(cr, x + s, y + s);
    cairo_move_to(cr, x - s, y + s);
    cairo_line_to(cr, x + s, y - s);
    cairo_stroke(cr);
  }
  SetSolid(c, 1.0);
}

}  // namespace lobecast::plot
