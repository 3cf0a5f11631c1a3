// Power routes and their cost model (power_cost.h).
#include "engine/power/power_cost.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/quadrature.h"
#include "engine/text_case.h"
#include "engine/threads.h"

namespace lobecast {
namespace {

// Seconds per pair evaluation on one core, from tests/bench/power_bench.cpp
// (process CPU time; tests/bench/RESULTS.md): the streamed rows (R and X' kernels,
// vectorized, with the near-pair check) and the matrix's entries (scalar).
constexpr double kSecondsPerStreamedPair = 1.0 / 4.5e7;
constexpr double kSecondsPerMatrixPair = 1.0 / 1.7e7;
// Building a field plan, per source (positions, moments, lattice search).
constexpr double kSecondsPerPlanSource = 1.5e-7;
// Per node, besides the plan: weights, sums, the direction lists.
constexpr double kSecondsPerNode = 2.0e-8;

std::string Seconds(double s) {
  char b[32];
  std::snprintf(b, sizeof b, "%.2g s", s);
  return b;
}

}  // namespace

std::string_view ToString(PowerMethod m) {
  switch (m) {
    case PowerMethod::kClosed:
      return "closed";
    case PowerMethod::kQuadrature:
      return "quadrature";
    case PowerMethod::kAuto:
      return "auto";
  }
  return "unknown";
}

std::optional<PowerMethod> PowerMethodFromString(std::string_view s) {
  for (PowerMethod m : {PowerMethod::kClosed, PowerMethod::kQuadrature, PowerMethod::kAuto}) {
    if (EqualsIgnoreCase(s, ToString(m))) return m;
  }
  return std::nullopt;
}

std::string_view ToString(PowerRoute r) {
  switch (r) {
    case PowerRoute::kMatrix:
      return "matrix";
    case PowerRoute::kStreamed:
      return "streamed";
    case PowerRoute::kQuadrature:
      return "quadrature";
  }
  return "unknown";
}

std::optional<PowerRoute> PowerRouteFromString(std::string_view s) {
  for (PowerRoute r : {PowerRoute::kMatrix, PowerRoute::kStreamed, PowerRoute::kQuadrature}) {
    if (EqualsIgnoreCase(s, ToString(r))) return r;
  }
  return std::nullopt;
}

PowerCost ClosedPowerCost(PowerRoute route, std::size_t num_dipoles, Ground ground, int threads) {
  if (route == PowerRoute::kQuadrature) {
    throw InvalidArgument("ClosedPowerCost: expected the matrix or the streamed route");
  }
  const auto n = static_cast<double>(num_dipoles);
  const double ns = ground == Ground::kPec ? 2.0 * n : n;
  const double t = ResolveThreads(threads);
  PowerCost c;
  c.seconds = n * ns * kSecondsPerStreamedPair / t;
  c.bytes = 96.0 * ns + 64.0 * n;  // the sources' arrays, the rows' sums
  if (route == PowerRoute::kMatrix) {
    c.seconds += 0.5 * n * ns * kSecondsPerMatrixPair / t;
    c.bytes += 8.0 * n * n;
  }
  return c;
}

PowerCost QuadraturePowerCost(const Array& array, const PowerQuadratureOptions& options) {
  const SphereRule rule = PowerQuadratureRule(array, options);
  // A sample of the nodes with the rule's extent: every evaluated theta row at up
  // to 16 phi values spread over the circle.
  const QuadratureRule gl = GaussLegendre(rule.num_theta);
  std::vector<double> theta, phi;
  const int phis = std::min(rule.num_phi, 16);
  for (int i = 0; i < rule.num_theta; ++i) {
    const double c = gl.nodes[static_cast<std::size_t>(i)];
    if (rule.upper_half && !(c > 0.0)) continue;
    for (int j = 0; j < phis; ++j) {
      theta.push_back(std::acos(c));
      phi.push_back(2.0 * kPi * (j + 0.5) / phis);
    }
  }
  FieldOptions f;
  f.num_threads = options.num_threads;
  f.method = FieldMethod::kFast;  // keeps the lattice, to cost both
  f.fixed_pass_tolerance = rule.transform_tolerance;
  const FieldPlan sample(array, Directions::FromAngles(theta, phi), f);
  const double nodes = static_cast<double>(rule.num_nodes());
  const double rows = rule.evaluated_theta();
  const double rows_per_block =
      std::max(1.0, std::floor(static_cast<double>(options.block_directions) / rule.num_phi));
  const double blocks = std::ceil(rows / rows_per_block);
  const double per_block = nodes / blocks;
  const double t = ResolveThreads(options.num_threads);
  PowerCost c;
  c.seconds = blocks * (sample.EstimatedSeconds(per_block) +
                        static_cast<double>(sample.num_sources()) * kSecondsPerPlanSource) +
              nodes * kSecondsPerNode / t;
  c.bytes = sample.EstimatedBytes(per_block) + 200.0 * static_cast<double>(sample.num_sources());
  return c;
}

PowerChoice ChoosePowerRoute(const Array& array, PowerMethod method, bool with_matrix,
                             bool with_matrix_required, const PowerQuadratureOptions& options) {
  PowerChoice c;
  const PowerRoute closed = with_matrix ? PowerRoute::kMatrix : PowerRoute::kStreamed;
  c.closed = ClosedPowerCost(closed, array.size(), array.ground, options.num_threads);
  c.route = closed;
  c.cost = c.closed;
  if (method == PowerMethod::kClosed) return c;
  if (method == PowerMethod::kQuadrature) {
    if (with_matrix_required) {
      throw InvalidArgument(
          "power method: found quadrature with the resistance matrix asked for, expected one "
          "of them (the quadrature builds no matrix)");
    }
    c.quadrature = QuadraturePowerCost(array, options);
    c.quadrature_costed = true;
    c.route = PowerRoute::kQuadrature;
    c.cost = c.quadrature;
    return c;
  }
  if (with_matrix_required || c.closed.seconds <= kAutoClosedUpToSeconds) return c;
  c.quadrature = QuadraturePowerCost(array, options);
  c.quadrature_costed = true;
  if (c.quadrature.seconds < 0.5 * c.closed.seconds) {
    c.route = PowerRoute::kQuadrature;
    c.cost = c.quadrature;
    c.why = "auto chose the band-limited quadrature for the power (estimated " +
            Seconds(c.quadrature.seconds) + " against " + Seconds(c.closed.seconds) +
            " for the closed form)";
  } else {
    c.why = "auto kept the closed-form power (estimated " + Seconds(c.closed.seconds) +
            ", the quadrature " + Seconds(c.quadrature.seconds) + ")";
  }
  return c;
}

}  // namespace lobecast
