// Pixel helpers for the plot tests: how far a decoded PNG pixel is from a colour.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdlib>

#include "io/plot/canvas.h"

namespace lobecast::plot {

struct Rgb8 {
  int r, g, b;
};
inline Rgb8 Unpack(std::uint32_t argb) {
  return {static_cast<int>((argb >> 16) & 255), static_cast<int>((argb >> 8) & 255),
          static_cast<int>(argb & 255)};
}
// The largest difference over the three 8-bit channels.
inline int ChannelDistance(std::uint32_t argb, const Colour& c) {
  const Rgb8 p = Unpack(argb);
  return std::max({std::abs(p.r - static_cast<int>(std::lround(c.r * 255))),
                   std::abs(p.g - static_cast<int>(std::lround(c.g * 255))),
                   std::abs(p.b - static_cast<int>(std::lround(c.b * 255)))});
}

}  // namespace lobecast::plot
