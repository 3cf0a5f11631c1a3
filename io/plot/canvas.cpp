#include "io/plot/canvas.h"

#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <cairo.h>

#include <algorithm>
#include <charconv>
#include <cstdio>
#include <filesystem>
#include <string>
#include <system_error>

#include "engine/text_case.h"
#include "io/input_error.h"
#include "io/io_error.h"
#include "io/output_file.h"

namespace lobecast::plot {
namespace {

constexpr const char* kFontFace = "DejaVu Sans";

// cairo's write callback: the bytes go to the output's temporary; a failure is
// remembered there (its reason) and reported by Finish.
cairo_status_t WriteToOutput(void* closure, const unsigned char* data, unsigned int length) {
  try {
    static_cast<OutputFile*>(closure)->Write(data, length);
    return CAIRO_STATUS_SUCCESS;
  } catch (...) {
    return CAIRO_STATUS_WRITE_ERROR;
  }
}

void SelectFont(cairo_t* cr, double size_px, bool bold) {
  cairo_select_font_face(cr, kFontFace, CAIRO_FONT_SLANT_NORMAL,
                         bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
  cairo_set_font_size(cr, size_px);
}

}  // namespace

std::string_view ToString(ImageFormat f) {
  switch (f) {
    case ImageFormat::kPng:
      return "png";
    case ImageFormat::kSvg:
      return "svg";
    case ImageFormat::kPdf:
      return "pdf";
  }
  return "?";
}

std::optional<ImageFormat> ImageFormatFromPath(std::string_view path) {
  const std::string ext = Lower(std::filesystem::path(std::string(path)).extension().string());
  if (ext == ".png") return ImageFormat::kPng;
  if (ext == ".svg") return ImageFormat::kSvg;
  if (ext == ".pdf") return ImageFormat::kPdf;
  return std::nullopt;
}

bool ImageSize::IsValid(std::string* why) const {
  auto bad = [&](const char* field, int v) {
    if (why) *why = std::string(field) + " = " + std::to_string(v) + ": expected 320 .. 8000 px";
    return false;
  };
  if (width_px < 320 || width_px > 8000) return bad("width_px", width_px);
  if (height_px < 240 || height_px > 8000) {
    if (why) *why = "height_px = " + std::to_string(height_px) + ": expected 240 .. 8000 px";
    return false;
  }
  return true;
}

std::optional<ImageSize> ImageSizeFromString(std::string_view s) {
  const std::size_t x = s.find_first_of("xX");
  if (x == std::string_view::npos) return std::nullopt;
  ImageSize size;
  auto parse = [](std::string_view t, int& v) {
    const auto [p, ec] = std::from_chars(t.data(), t.data() + t.size(), v);
    return ec == std::errc() && p == t.data() + t.size() && !t.empty();
  };
  if (!parse(s.substr(0, x), size.width_px) || !parse(s.substr(x + 1), size.height_px))
    return std::nullopt;
  return size;
}

struct Canvas::Impl {
  std::string path;
  std::unique_ptr<OutputFile> out;
  ImageFormat format = ImageFormat::kPng;
  double width = 0, height = 0;
  cairo_surface_t* surface = nullptr;
  cairo_t* cr = nullptr;
  bool finished = false;

  void Release() {
    if (cr) cairo_destroy(cr);
    if (surface) cairo_surface_destroy(surface);
    cr = nullptr;
    surface = nullptr;
  }
};

Canvas::Canvas(const std::string& path, const ImageSize& size) : impl_(std::make_unique<Impl>()) {
  const auto format = ImageFormatFromPath(path);
  if (!format)
    throw InputError(SourceLocation{path},
                     "unknown image type: expected a file name ending in .png, .svg or .pdf");
  std::string why;
  if (!size.IsValid(&why)) throw InputError(SourceLocation{"--size"}, why);
  impl_->out = std::make_unique<OutputFile>(path, "the image");  // refuses a device
  impl_->path = path;
  impl_->format = *format;
  impl_->width = size.width_px;
  impl_->height = size.height_px;
  switch (*format) {
    case ImageFormat::kPng:
      impl_->surface =
          cairo_image_surface_create(CAIRO_FORMAT_ARGB32, size.width_px, size.height_px);
      break;
    case ImageFormat::kSvg:
      impl_->surface = cairo_svg_surface_create_for_stream(WriteToOutput, impl_->out.get(),
                                                           size.width_px, size.height_px);
      break;
    case ImageFormat::kPdf:
      impl_->surface = cairo_pdf_surface_create_for_stream(WriteToOutput, impl_->out.get(),
                                                           size.width_px, size.height_px);
      break;
  }
  if (cairo_surface_status(impl_->surface) != CAIRO_STATUS_SUCCESS) {
    const std::string msg = cairo_status_to_string(cairo_surface_status(impl_->surface));
    impl_->Release();
    impl_->out->Fail("cannot create the image: " + msg);
  }
  impl_->cr = cairo_create(impl_->surface);
  cairo_set_source_rgb(impl_->cr, 1, 1, 1);
  cairo_paint(impl_->cr);
  cairo_select_font_face(impl_->cr, kFontFace, CAIRO_FONT_SLANT_NORMAL, CAIRO_FONT_WEIGHT_NORMAL);
}

Canvas::~Canvas() {
  if (!impl_) return;
  impl_->Release();  // the OutputFile then removes an unfinished temporary
}

cairo_t* Canvas::cr() const { return impl_->cr; }
double Canvas::width() const { return impl_->width; }
double Canvas::height() const { return impl_->height; }
ImageFormat Canvas::format() const { return impl_->format; }

double Canvas::font_px() const {
  return std::max(11.0, 13.0 * std::min(impl_->width / 800.0, impl_->height / 600.0));
}

void Canvas::SetColour(const Colour& c) const {
  cairo_set_source_rgba(impl_->cr, c.r, c.g, c.b, c.a);
}

double Canvas::TextWidth(std::string_view text, double size_px, bool bold) const {
  cairo_t* cr = impl_->cr;
  cairo_save(cr);
  SelectFont(cr, size_px, bold);
  const std::string s(text);
  cairo_text_extents_t e;
  cairo_text_extents(cr, s.c_str(), &e);
  cairo_restore(cr);
  return e.x_advance;
}

double Canvas::Text(double x, double y, std::string_view text, double size_px, HAlign h, VAlign v,
                    bool bold) const {
  cairo_t* cr = impl_->cr;
  cairo_save(cr);
  SelectFont(cr, size_px, bold);
  const std::string s(text);
  cairo_text_extents_t e;
  cairo_text_extents(cr, s.c_str(), &e);
  cairo_font_extents_t fe;
  cairo_font_extents(cr, &fe);
  double dx = 0, dy = 0;
  if (h == HAlign::kCentre) dx = -0.5 * e.x_advance;
  if (h == HAlign::kRight) dx = -e.x_advance;
  // Vertical anchors from the font's ascent, so a row of labels lines up
  // whatever letters it holds.
  const double ascent = 0.72 * size_px;
  if (v == VAlign::kTop) dy = ascent;
  if (v == VAlign::kMiddle) dy = 0.5 * ascent;
  if (v == VAlign::kBottom) dy = -fe.descent;
  cairo_move_to(cr, x + dx, y + dy);
  cairo_show_text(cr, s.c_str());
  cairo_restore(cr);
  return e.x_advance;
}

void Canvas::BoxedText(double x, double y, std::string_view text, double size_px, HAlign h,
                       VAlign v, double box_alpha) const {
  const double w = TextWidth(text, size_px);
  const double ascent = 0.72 * size_px;
  double left = x, top = y - ascent;
  if (h == HAlign::kCentre) left -= 0.5 * w;
  if (h == HAlign::kRight) left -= w;
  if (v == VAlign::kTop) top = y;
  if (v == VAlign::kMiddle) top = y - 0.5 * ascent;
  if (v == VAlign::kBottom) top = y - ascent - 0.25 * size_px;
  cairo_t* cr = impl_->cr;
  cairo_save(cr);
  cairo_set_source_rgba(cr, 1, 1, 1, box_alpha);
  const double pad = 0.2 * size_px;
  cairo_rectangle(cr, left - pad, top - pad, w + 2 * pad, ascent + 2 * pad);
  cairo_fill(cr);
  cairo_restore(cr);
  Text(x, y, text, size_px, h, v);
}

void Canvas::Finish() {
  Impl& m = *impl_;
  cairo_surface_flush(m.surface);
  cairo_status_t status = cairo_status(m.cr);
  if (status == CAIRO_STATUS_SUCCESS && m.format == ImageFormat::kPng)
    status = cairo_surface_write_to_png_stream(m.surface, WriteToOutput, m.out.get());
  cairo_surface_finish(m.surface);
  if (status == CAIRO_STATUS_SUCCESS) status = cairo_surface_status(m.surface);
  m.Release();
  m.finished = true;
  // A failed write says why (the system's reason); another cairo failure says cairo's.
  if (status != CAIRO_STATUS_SUCCESS && !m.out->failed()) {
    m.out->Fail(std::string("cannot draw the image: ") + cairo_status_to_string(status));
  }
  m.out->Commit();
}

RasterImage ReadPng(const std::string& path) {
  cairo_surface_t* s = cairo_image_surface_create_from_png(path.c_str());
  if (cairo_surface_status(s) != CAIRO_STATUS_SUCCESS) {
    const std::string msg = cairo_status_to_string(cairo_surface_status(s));
    cairo_surface_destroy(s);
    throw IoError(path, "cannot read the PNG: " + msg);
  }
  cairo_surface_flush(s);
  RasterImage img;
  img.width = cairo_image_surface_get_width(s);
  img.height = cairo_image_surface_get_height(s);
  const int stride = cairo_image_surface_get_stride(s);
  const unsigned char* data = cairo_image_surface_get_data(s);
  img.argb.resize(static_cast<std::size_t>(img.width) * img.height);
  for (int y = 0; y < img.height; ++y) {
    const auto* row =
        reinterpret_cast<const std::uint32_t*>(data + static_cast<std::size_t>(y) * stride);
    std::copy(row, row + img.width, img.argb.begin() + static_cast<std::ptrdiff_t>(y) * img.width);
  }
  cairo_surface_destroy(s);
  return img;
}

}  // namespace lobecast::plot
