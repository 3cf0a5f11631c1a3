// The routes to the radiated power and their cost model: the closed form (the
// N x N matrix, or streamed row by row; radiated_power.h, power_large.h), or the
// band-limited quadrature (power_quadrature.h). One place for the choice the
// pattern job makes under `auto` and for the estimates a caller may show before a
// large job (seconds with the threads counted, peak bytes).
//
// The closed form costs O(N N_s) pair evaluations (N_s = N, or 2N with images):
// the matrix route half the pairs for R plus the streamed rows for the active
// resistances, the streamed route the rows alone. The quadrature costs its field
// plan on about (k a + 1)(2 k a + 3) nodes (half of them when the pattern is
// mirror symmetric), costed by the field plan's own model on a sample of the
// nodes. The closed form also gives the active resistances, which the
// quadrature cannot (power_quadrature.h), so auto keeps the closed form unless it
// is estimated above kAutoClosedUpToSeconds and the quadrature below half of it.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "engine/power/power_quadrature.h"
#include "engine/types.h"

namespace lobecast {

// What the user asks for.
enum class PowerMethod { kClosed, kQuadrature, kAuto };
std::string_view ToString(PowerMethod m);  // "closed", "quadrature", "auto"
// Case-insensitive; std::nullopt for an unknown name.
std::optional<PowerMethod> PowerMethodFromString(std::string_view s);

// How the radiated power and the active resistances were obtained.
enum class PowerRoute {
  kMatrix,      // the closed-form N x N resistance matrix, built (and stored)
  kStreamed,    // closed form row by row in O(N) memory; no matrix stored
  kQuadrature,  // band-limited quadrature; no matrix, no active resistances
};
std::string_view ToString(PowerRoute r);  // "matrix", "streamed", "quadrature"
// Case-insensitive; std::nullopt for an unknown name.
std::optional<PowerRoute> PowerRouteFromString(std::string_view s);

// Auto takes the quadrature only when the closed form is estimated above this.
inline constexpr double kAutoClosedUpToSeconds = 2.0;

struct PowerCost {
  double seconds = 0;  // estimated wall seconds with the threads given
  double bytes = 0;    // estimated peak memory of the power stage
};

// The closed form for num_dipoles dipoles (images doubling the sources over PEC):
// with the matrix (kMatrix) or streamed (kStreamed), active resistances included.
// threads as ResolveThreads.
PowerCost ClosedPowerCost(PowerRoute route, std::size_t num_dipoles, Ground ground, int threads);

// The quadrature for this array's geometry: plans a sample of the rule's nodes and
// asks the field plan's model (O(N) to build; no transform runs).
PowerCost QuadraturePowerCost(const Array& array, const PowerQuadratureOptions& options = {});

struct PowerChoice {
  PowerRoute route = PowerRoute::kMatrix;
  PowerCost cost;        // of the route taken
  PowerCost closed;      // the closed form's estimate
  PowerCost quadrature;  // the quadrature's; seconds 0 when not estimated
  bool quadrature_costed = false;
  std::string why;  // for people: why auto chose as it did; empty otherwise
};

// The route of `method` for the array: kClosed is kMatrix when with_matrix (the
// job builds or stores R) else kStreamed; kQuadrature as asked (InvalidArgument
// with with_matrix_required, which asks for R); kAuto the closed form unless it is
// estimated above kAutoClosedUpToSeconds and the quadrature below half its cost.
PowerChoice ChoosePowerRoute(const Array& array, PowerMethod method, bool with_matrix,
                             bool with_matrix_required, const PowerQuadratureOptions& options = {});

}  // namespace lobecast
