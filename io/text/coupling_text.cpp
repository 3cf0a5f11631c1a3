#include "io/text/coupling_text.h"

#include <cmath>
#include <sstream>

#include "io/hdf5/coupling_writer.h"
#include "io/text/summary_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

constexpr std::size_t kFullTableUpTo = 16;

std::string Impedance(Complex z) {
  if (std::isnan(z.real()) || std::isnan(z.imag())) return "unknown";
  // A part below 1e-12 of |Z| is rounding (a lossless load's resistance): print 0.
  const double floor = 1e-12 * std::abs(z);
  // + 0.0 turns a signed zero (a short circuit's -0) into 0.
  const double re = std::abs(z.real()) < floor ? 0.0 : z.real() + 0.0;
  const double im = std::abs(z.imag()) < floor ? 0.0 : z.imag() + 0.0;
  return Printf("%.6g %c j%.6g", re, im < 0 ? '-' : '+', std::abs(im));
}

std::string PortText(const Port& p) {
  switch (p.kind) {
    case PortKind::kCurrent:
      return "current";
    case PortKind::kDrive:
      return Printf("drive %.3g V %.0f deg", std::abs(p.voltage_v),
                    std::arg(p.voltage_v) / kDegree + 0.0);
    case PortKind::kLoad:
      return "load " + Impedance(p.impedance_ohm);
  }
  return "";
}

}  // namespace

std::string DescribeCoupling(const CouplingResult& c, const std::vector<Port>& ports,
                             double peak_directivity) {
  std::ostringstream s;
  const Eigen::VectorXcd& i = c.circuit.current_a;
  std::size_t count[3] = {0, 0, 0};  // current, drive, load
  for (const Port& p : ports) ++count[static_cast<int>(p.kind)];
  s << Printf(
      "circuit      %zu current-forced, %zu driven, %zu loaded dipole%s%s; reference "
      "impedance %g ohm\n",
      count[0], count[1], count[2], ports.size() == 1 ? "" : "s",
      count[1] + count[2] > 0 ? " (currents solved)" : "", c.reference_impedance_ohm);
  // The direct route (LU of the whole matrix) is the usual one and says nothing; the
  // iterative one (above the matrix limit) says how far it went.
  if (c.route.iterative) {
    const double n = static_cast<double>(ports.size());
    s << Printf(
        "solve        iterative (restarted GMRES on streamed products, %zu unknowns, %zu "
        "preconditioner blocks): %d iterations, relative residual %.2g (target %.2g), %.3g s; "
        "no %.3g GB impedance matrix\n",
        c.route.unknowns, c.route.blocks, c.route.iterations, c.route.relative_residual,
        c.route.target_residual, c.route.seconds, 16 * n * n / 1e9);
  }
  if (ports.size() <= kFullTableUpTo) {
    s << "     #  port                    |I| (A)  phase (deg)  X_self (ohm)  Z_in (ohm)         "
         "  VSWR\n";
    for (std::size_t m = 0; m < ports.size(); ++m) {
      const auto e = static_cast<Eigen::Index>(m);
      // VSWR describes a feed: a loaded element has none.
      const bool fed = ports[m].kind != PortKind::kLoad && !std::isnan(c.vswr[e]);
      const double xs = c.self_reactance_ohm[e];
      s << Printf("  %4zu  %-22s %10.4g  %10.2f  %12s  %-20s %s\n", m, PortText(ports[m]).c_str(),
                  std::abs(i[e]), std::arg(i[e]) / kDegree,
                  std::isnan(xs) ? "unknown" : Printf("%.5g", xs).c_str(),
                  ports[m].kind == PortKind::kLoad
                      ? "-"
                      : Impedance(c.circuit.input_impedance_ohm[e]).c_str(),
                  fed ? Printf("%.4g", c.vswr[e]).c_str() : "-");
    }
  } else {
    Eigen::Index worst = -1;
    for (Eigen::Index e = 0; e < c.vswr.size(); ++e) {
      if (ports[static_cast<std::size_t>(e)].kind != PortKind::kDrive || std::isnan(c.vswr[e]))
        continue;
      if (worst < 0 || c.vswr[e] > c.vswr[worst]) worst = e;
    }
    if (worst >= 0) {
      s << Printf("worst VSWR   %.4g at element %ld (Z_in %s ohm)\n", c.vswr[worst],
                  static_cast<long>(worst),
                  Impedance(c.circuit.input_impedance_ohm[worst]).c_str());
    }
  }
  if (c.thin_for_skin_effect > 0) {
    s << Printf(
        "caution      %zu wire%s thinner than twice the skin depth: the current fills more of "
        "the wire than the skin-effect formula assumes, so the ohmic loss is underestimated\n",
        c.thin_for_skin_effect, c.thin_for_skin_effect == 1 ? "" : "s");
  }
  if (c.close_pairs.count > 0) {
    const auto [m, q] = c.close_pairs.first.front();
    s << Printf(
        "caution      %zu pair%s of dipoles closer than their length (closest %.2g lengths, "
        "e.g. %zu and %zu): the point-dipole coupling model wants several lengths (common "
        "practice); treat their impedances as rough\n",
        c.close_pairs.count, c.close_pairs.count == 1 ? "" : "s", c.close_pairs.closest_ratio, m,
        q);
  }
  s << Printf(
      "budget       supplied %.6g W = accepted %.6g W + in the sources' impedances %.6g W; "
      "accepted = radiated %.6g W + ohmic %.6g W + in parasitic loads %.6g W (efficiency "
      "%.4g %%)\n",
      c.supplied_w, c.accepted_w, c.source_loss_w, c.radiated_w, c.ohmic_w, c.load_loss_w,
      100 * c.efficiency);
  if (!(peak_directivity > 0)) return s.str();  // no pattern (lobecast check)
  const RealizedGainReference ref = RealizedGainReferenceOf(c);
  const double g = peak_directivity * c.radiated_w / ref.power_w;
  s << "gain         " << (c.available_w > 0 ? "realized gain" : "gain") << " at the peak "
    << FormatDb(g) << " dBi (directivity " << FormatDb(peak_directivity) << " dBi";
  if (c.available_w > 0) {
    s << Printf(", %.6g W available from the sources", c.available_w);
  }
  s << ")\n";
  return s.str();
}

}  // namespace lobecast::text
