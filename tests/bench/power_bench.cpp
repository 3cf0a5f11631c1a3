// Radiated power by the closed form (streamed, power_large.h) and by the
// band-limited quadrature (power_quadrature.h): times, errors and bounds. Figures,
// not tests; one case per process so that the peak resident memory
// (getrusage ru_maxrss) is that case's. Prints one markdown table row.
//
//   power_bench LAYOUT N ROUTE [GROUND]
//
// LAYOUT: "box" (N z-directed dipoles at uniformly random positions in a cube of
// 20 wavelengths, random complex currents), "box-general" (the same with random
// orientations: three moment components), "lattice" (a square lattice of side
// sqrt(N) at half a wavelength, z-directed, random currents; exactly on the
// lattice: the lattice transform). ROUTE: "closed" (RadiatedPowerStreamed, which
// also sums the active resistances), "closed-p" (ResistanceProductStreamed: R I
// alone, the power's share of the closed form's work), "quadrature",
// "both" (closed and quadrature, with the quadrature's error against the closed
// form), "cost" (the cost model's estimates only), "rx" (R I by quadrature),
// "matrix" (ResistanceMatrix and P from it; its pairs/CPU-s counts N N_s / 2).
// GROUND: "none" (default) or "pec" (the box then spans z 0.05 .. 20 wavelengths).
#include <sys/resource.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <random>
#include <string>

#include "engine/power/power_cost.h"
#include "engine/power/power_large.h"
#include "engine/power/power_quadrature.h"
#include "engine/power/radiated_power.h"
#include "engine/threads.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

constexpr double kFrequency_hz = 1.0e9;
constexpr double kBoxWavelengths = 20.0;

testing::TestArray MakeArray(const std::string& layout, int n, Ground ground) {
  testing::TestArray a;
  a.frequency_hz = kFrequency_hz;
  a.ground = ground;
  const double lambda = a.wavelength_m();
  std::mt19937_64 rng(2026);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  const int side = static_cast<int>(std::lround(std::sqrt(static_cast<double>(n))));
  for (int i = 0; i < n; ++i) {
    Dipole d;
    if (layout == "lattice") {
      d.position_m =
          Vec3(0.5 * (i % side), 0.5 * (i / side), ground == Ground::kPec ? 0.25 : 0.0) * lambda;
    } else {
      const double h = 0.5 * kBoxWavelengths;
      const double z = ground == Ground::kPec ? 0.05 + h * (1.0 + u(rng)) : h * u(rng);
      d.position_m = Vec3(h * u(rng), h * u(rng), z) * lambda;
    }
    d.orientation =
        layout == "box-general" ? Vec3(u(rng), u(rng), u(rng)).normalized() : Vec3::UnitZ();
    d.length_m = 0.01 * lambda;
    a.Add(d, Complex(u(rng), u(rng)));
  }
  return a;
}

double CpuSeconds() { return static_cast<double>(std::clock()) / CLOCKS_PER_SEC; }
double PeakMiB() {
  rusage r{};
  getrusage(RUSAGE_SELF, &r);
  return static_cast<double>(r.ru_maxrss) / 1024.0;
}

struct Timed {
  double wall = 0, cpu = 0;
};
template <class F>
Timed Time(F&& f) {
  const auto t0 = std::chrono::steady_clock::now();
  const double c0 = CpuSeconds();
  f();
  return {std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count(),
          CpuSeconds() - c0};
}

int Run(int argc, char** argv) {
  if (argc < 4) {
    std::fprintf(stderr, "usage: power_bench LAYOUT N ROUTE [GROUND]\n");
    return 2;
  }
  const std::string layout = argv[1], route = argv[3];
  const int n = std::stoi(argv[2]);
  const Ground ground = argc > 4 && std::string(argv[4]) == "pec" ? Ground::kPec : Ground::kNone;
  const testing::TestArray a = MakeArray(layout, n, ground);
  const int threads = ResolveThreads(0);
  std::string cells = "| " + layout + " | " + std::to_string(n) + " | " +
                      std::string(ToString(ground)) + " | " + route + " |";
  char b[512];
  if (route == "cost") {
    const PowerCost closed = ClosedPowerCost(PowerRoute::kStreamed, a.size(), ground, threads);
    PowerCost quad;
    const Timed t = Time([&] { quad = QuadraturePowerCost(a); });
    const SphereRule rule = PowerQuadratureRule(a);
    std::snprintf(b, sizeof b,
                  " closed %.3g s | quadrature %.3g s, %.0f MiB (degree %d, %zu nodes) | "
                  "costing took %.2f s |",
                  closed.seconds, quad.seconds, quad.bytes / 1048576.0, rule.exact_degree(),
                  rule.num_nodes(), t.wall);
    std::printf("%s%s\n", cells.c_str(), b);
    return 0;
  }
  double p_closed = 0, s_closed = 0;
  Timed tc, tq;
  if (route == "closed" || route == "both") {
    tc = Time([&] {
      const StreamedPower s = RadiatedPowerStreamed(a, a.currents);
      p_closed = s.radiated_power_w;
      s_closed = s.term_magnitudes_w;
    });
  }
  if (route == "matrix") {  // the N x N matrix alone (pairs: N N_s / 2)
    tc = Time([&] { p_closed = RadiatedPower(ResistanceMatrix(a), a.currents); });
  }
  if (route == "closed-p") {
    tc = Time(
        [&] { p_closed = 0.5 * a.currents.dot(ResistanceProductStreamed(a, a.currents)).real(); });
  }
  QuadraturePower q;
  if (route == "quadrature" || route == "both") {
    tq = Time([&] { q = RadiatedPowerByQuadrature(a, a.currents); });
  }
  if (route == "rx") {
    QuadratureResistanceProduct rx;
    tq = Time([&] { rx = ResistanceProductByQuadrature(a, a.currents); });
    std::snprintf(b, sizeof b,
                  " R I by quadrature: %.3f s wall, %.3f s CPU; bound %.2g of max |R I| "
                  "(degree %d, %zu nodes) | peak %.0f MiB |",
                  tq.wall, tq.cpu, rx.error_bound_relative, rx.rule.exact_degree(),
                  rx.rule.num_nodes(), PeakMiB());
    std::printf("%s%s\n", cells.c_str(), b);
    return 0;
  }
  std::string closed_cell = " |", quad_cell = " |", error_cell = " |";
  if (tc.wall > 0) {
    const double pairs = static_cast<double>(a.size()) *
                         static_cast<double>(ground == Ground::kPec ? 2 * a.size() : a.size()) *
                         (route == "matrix" ? 0.5 : 1.0);
    std::snprintf(b, sizeof b, " %.3f s wall, %.3f s CPU (%.3g pairs/CPU-s) |", tc.wall, tc.cpu,
                  pairs / tc.cpu);
    closed_cell = b;
  }
  if (tq.wall > 0) {
    std::snprintf(b, sizeof b,
                  " %.3f s wall, %.3f s CPU (degree %d, %zu nodes, %zu/%zu blocks fast) |", tq.wall,
                  tq.cpu, q.rule.exact_degree(), q.rule.num_nodes(), q.fast_blocks, q.blocks);
    quad_cell = b;
  }
  if (route == "both") {
    std::snprintf(
        b, sizeof b, " %.2g / %.2g (truncation %.1g, field %.1g; closed-form rounding %.1g) |",
        std::abs(q.radiated_power_w - p_closed) / p_closed, q.error_bound_relative,
        q.truncation_bound_relative, q.field_bound_relative, 2.2e-16 * s_closed / p_closed);
    error_cell = b;
  } else if (tq.wall > 0) {
    std::snprintf(b, sizeof b, " - / %.2g |", q.error_bound_relative);
    error_cell = b;
  }
  std::snprintf(b, sizeof b, " %.0f |", PeakMiB());
  std::printf("%s%s%s%s%s\n", cells.c_str(), closed_cell.c_str(), quad_cell.c_str(),
              error_cell.c_str(), b);
  return 0;
}

}  // namespace
}  // namespace lobecast

int main(int argc, char** argv) { return lobecast::Run(argc, argv); }
