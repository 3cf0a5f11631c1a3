// A drawing surface for lobecast plots: PNG, SVG or PDF chosen from the output
// file's extension, with the same coordinates (1 unit = 1 px in PNG, 1 pt in SVG
// and PDF), so one piece of drawing code serves all three. Text uses the
// "DejaVu Sans" face through cairo's font selection (any sans face if missing).
//
// The file is drawn under a temporary name beside the target and renamed into
// place by Finish(), so a failed plot never leaves a half-written image.
//
// cairo stays out of this header (it is a private dependency of lobecast::io);
// the plot files include <cairo.h> themselves and use cr().
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

typedef struct _cairo cairo_t;  // NOLINT: the same typedef as <cairo.h>

namespace lobecast::plot {

enum class ImageFormat { kPng, kSvg, kPdf };
std::string_view ToString(ImageFormat f);  // "png", "svg", "pdf"
// From the extension, case-insensitive: .png, .svg, .pdf; std::nullopt otherwise.
std::optional<ImageFormat> ImageFormatFromPath(std::string_view path);

// Image size in px (points for SVG/PDF). 320x240 .. 8000x8000 keeps the text
// legible and the files sane.
struct ImageSize {
  int width_px = 800;
  int height_px = 600;
  bool IsValid(std::string* why) const;
};
// "800x600" (also "800X600"); std::nullopt when malformed.
std::optional<ImageSize> ImageSizeFromString(std::string_view s);

enum class HAlign { kLeft, kCentre, kRight };
enum class VAlign { kTop, kMiddle, kBaseline, kBottom };

struct Colour {
  double r = 0, g = 0, b = 0, a = 1;
};

class Canvas {
 public:
  // Throws InputError for an extension other than .png/.svg/.pdf or an invalid
  // size, IoError when the surface cannot be created.
  Canvas(const std::string& path, const ImageSize& size);
  ~Canvas();
  Canvas(const Canvas&) = delete;
  Canvas& operator=(const Canvas&) = delete;

  cairo_t* cr() const;
  double width() const;
  double height() const;
  ImageFormat format() const;
  // Base text size (px) for the image size: 13 px at 800x600, growing with the
  // smaller side, never below 11 px.
  double font_px() const;

  void SetColour(const Colour& c) const;
  // Draws `text` anchored at (x, y); returns its advance width.
  double Text(double x, double y, std::string_view text, double size_px, HAlign h = HAlign::kLeft,
              VAlign v = VAlign::kBaseline, bool bold = false) const;
  double TextWidth(std::string_view text, double size_px, bool bold = false) const;
  // Text on a white box (slightly transparent by default), for labels drawn over data.
  void BoxedText(double x, double y, std::string_view text, double size_px, HAlign h, VAlign v,
                 double box_alpha = 0.85) const;

  // Writes the file (PNG) or finishes it (SVG, PDF) and renames it into place.
  // Throws IoError naming the path. The destructor of an unfinished canvas
  // removes the temporary file.
  void Finish();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

// A decoded PNG (for tests and tools): pixels as 0xAARRGGBB, row-major.
struct RasterImage {
  int width = 0;
  int height = 0;
  std::vector<std::uint32_t> argb;
  std::uint32_t At(int x, int y) const { return argb[static_cast<std::size_t>(y) * width + x]; }
};
// Reads a PNG with cairo. Throws IoError when it cannot be read.
RasterImage ReadPng(const std::string& path);

}  // namespace lobecast::plot
