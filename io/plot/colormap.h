// Colours for lobecast plots, defined in Oklab (B. Ottosson, "A perceptual color
// space for image processing", 2020, bottosson.github.io/posts/oklab; public
// domain matrices). Oklab is close to perceptually uniform, so a straight path in
// it gives equal visible steps for equal value steps.
//
// The value ramp ("lobecast ramp") is our own definition:
//   L(t) = 0.28 + 0.65 t,  C = 0.09,  h(t) = 290 deg - 185 deg * t,   t in [0, 1]
//   a = C cos h, b = C sin h
// dark blue-violet (t = 0, low) through teal and green to pale yellow (t = 1,
// high). L rises monotonically (readable in grey scale), and the whole path lies
// inside the sRGB gamut (no clipping; plot_test checks it), so the Oklab distance
// between t and t + dt is the same everywhere on the ramp.
#pragma once

#include <cstdint>

namespace lobecast::plot {

struct Rgb {
  double r = 0, g = 0, b = 0;  // gamma-encoded sRGB, 0..1
};

struct Oklab {
  double l = 0, a = 0, b = 0;
};

// Oklab -> linear sRGB -> gamma-encoded sRGB (IEC 61966-2-1 transfer). `in_gamut`
// (optional) is set false when a channel had to be clipped to [0, 1].
Rgb OklabToSrgb(const Oklab& c, bool* in_gamut = nullptr);
Oklab SrgbToOklab(const Rgb& c);

// The value ramp above at t (clamped to [0, 1]); `RampOklab` gives it before
// conversion, for tests.
Oklab RampOklab(double t);
Rgb Ramp(double t);

// Categorical colours for the polarization sense (right, left, linear), and for
// "no data" (outside the grid or the field is zero). Same Oklab lightness for
// right and left so neither dominates.
Rgb SenseColour(int sense);
Rgb NoDataColour();

// Packs into cairo's native ARGB32 (premultiplied; alpha 255).
std::uint32_t ToArgb32(const Rgb& c);

}  // namespace lobecast::plot
