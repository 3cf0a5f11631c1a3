#include "io/plot/colormap.h"

#include <algorithm>
#include <cmath>

namespace lobecast::plot {
namespace {

constexpr double kPi = 3.14159265358979323846;

double Encode(double linear, bool* ok) {
  if (linear < -1e-9 || linear > 1 + 1e-9) *ok = false;
  const double c = std::clamp(linear, 0.0, 1.0);
  return c <= 0.0031308 ? 12.92 * c : 1.055 * std::pow(c, 1.0 / 2.4) - 0.055;
}

double Decode(double c) { return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4); }

Oklab FromLch(double l, double c, double h_deg) {
  const double h = h_deg * kPi / 180.0;
  return {l, c * std::cos(h), c * std::sin(h)};
}

}  // namespace

// Matrices from Ottosson (2020), cited in the header.
Rgb OklabToSrgb(const Oklab& c, bool* in_gamut) {
  const double l_ = c.l + 0.3963377774 * c.a + 0.2158037573 * c.b;
  const double m_ = c.l - 0.1055613458 * c.a - 0.0638541728 * c.b;
  const double s_ = c.l - 0.0894841775 * c.a - 1.2914855480 * c.b;
  const double l = l_ * l_ * l_, m = m_ * m_ * m_, s = s_ * s_ * s_;
  bool ok = true;
  Rgb out{Encode(+4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s, &ok),
          Encode(-1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s, &ok),
          Encode(-0.0041960863 * l - 0.7034186147 * m + 1.7076147010 * s, &ok)};
  if (in_gamut) *in_gamut = ok;
  return out;
}

Oklab SrgbToOklab(const Rgb& c) {
  const double r = Decode(c.r), g = Decode(c.g), b = Decode(c.b);
  const double l = std::cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const double m = std::cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const double s = std::cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return {0.2104542553 * l + 0.7936177850 * m - 0.0040720468 * s,
          1.9779984951 * l - 2.4285922050 * m + 0.4505937099 * s,
          0.0259040371 * l + 0.7827717662 * m - 0.8086757660 * s};
}

Oklab RampOklab(double t) {
  t = std::clamp(t, 0.0, 1.0);
  return FromLch(0.28 + 0.65 * t, 0.09, 290.0 - 185.0 * t);
}

Rgb Ramp(double t) { return OklabToSrgb(RampOklab(t)); }

Rgb SenseColour(int sense) {
  if (sense > 0) return OklabToSrgb(FromLch(0.62, 0.15, 40.0));   // right: warm red-orange
  if (sense < 0) return OklabToSrgb(FromLch(0.58, 0.15, 255.0));  // left: blue
  return OklabToSrgb(FromLch(0.88, 0.0, 0.0));                    // linear: light grey
}

Rgb NoDataColour() { return {1.0, 1.0, 1.0}; }

std::uint32_t ToArgb32(const Rgb& c) {
  auto q = [](double v) {
    return static_cast<std::uint32_t>(std::lround(std::clamp(v, 0.0, 1.0) * 255.0));
  };
  return 0xff000000u | (q(c.r) << 16) | (q(c.g) << 8) | q(c.b);
}

}  // namespace lobecast::plot
