#include "io/text/summary_text.h"

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>

#include "engine/decibels.h"
#include "engine/polarization.h"
#include "io/safety_note.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

// The angles actually sampled: "0..175 deg step 7 (26)" for a stop of 180.
std::string FormatRange(const std::vector<double>& values, double step_deg) {
  if (values.size() == 1) return Printf("%g deg", values.front());
  return Printf("%g..%g deg step %g (%zu)", values.front(), values.back(), step_deg, values.size());
}

std::string FormatCurrent(Complex i) {
  return Printf("%10.4g A  %8.2f deg", std::abs(i), std::arg(i) / kDegree);
}

constexpr std::size_t kFullTableUpTo = 16;

// "given", or "solved" when driven or loaded dipoles made the circuit decide them.
const char* CurrentsWord(const ArrayDescription& desc) {
  for (const Port& p : desc.ports)
    if (p.kind != PortKind::kCurrent) return "solved";
  return "given";
}

}  // namespace

std::string FormatDirection(double theta_deg, double phi_deg) {
  // On the z axis every phi names the same direction; don't print an arbitrary one.
  if (theta_deg == 0.0) return "theta 0 deg (the +z axis)";
  if (theta_deg == 180.0) return "theta 180 deg (the -z axis)";
  return Printf("theta %g deg, phi %g deg", theta_deg, phi_deg);
}

std::string FormatFrequency(double hz) {
  const double a = std::abs(hz);
  if (a >= 1e12) return Printf("%.9g THz", hz / 1e12);
  if (a >= 1e9) return Printf("%.9g GHz", hz / 1e9);
  if (a >= 1e6) return Printf("%.9g MHz", hz / 1e6);
  if (a >= 1e3) return Printf("%.9g kHz", hz / 1e3);
  return Printf("%.9g Hz", hz);
}

std::string FormatDb(double linear) {
  const double db = ToDb(linear);
  return std::isinf(db) && db < 0 ? "-inf" : Fixed2(db);
}

namespace {

// "sweep        5 frequencies, 9 GHz .. 11 GHz; design (first) 10 GHz\n" for a
// frequency sweep; "" otherwise.
std::string SweepLine(const ArrayDescription& desc) {
  if (desc.frequencies_hz.empty()) return "";
  const auto [lo, hi] = std::minmax_element(desc.frequencies_hz.begin(), desc.frequencies_hz.end());
  return "sweep        " + std::to_string(desc.frequencies_hz.size()) + " frequencies, " +
         FormatFrequency(*lo) + " .. " + FormatFrequency(*hi) + "; design (first) " +
         FormatFrequency(desc.frequencies_hz.front()) + "\n";
}

}  // namespace

std::string DescribeArray(const ArrayDescription& desc) {
  const Array& a = desc.array;
  std::ostringstream s;
  s << "array        " << (desc.name.empty() ? "(unnamed)" : "\"" + desc.name + "\"") << "  ["
    << desc.source_path << "]\n";
  if (!desc.description.empty()) s << "description  " << desc.description << "\n";
  s << "frequency    " << FormatFrequency(a.frequency_hz)
    << Printf("   wavelength %.6g m   k = %.6g rad/m\n", a.wavelength_m(), a.wavenumber_rad_m())
    << SweepLine(desc);
  s << "ground       "
    << (a.ground == Ground::kPec ? "PEC plane z = 0 (image theory)" : "none (free space)") << "\n";
  s << "grid         theta " << FormatRange(desc.grid.theta_deg, desc.theta.step_deg) << ", phi "
    << FormatRange(desc.grid.phi_deg, desc.phi.step_deg) << " = " << desc.grid.size()
    << " directions\n";
  s << "dipoles      " << a.size()
    << (desc.csv_path.empty() ? "" : " (rows from " + desc.csv_path + ")") << "\n";
  const std::size_t shown = std::min(a.size(), kFullTableUpTo);
  s << "     #     x (m)      y (m)      z (m)    ux     uy     uz   length (m)  dist.       "
       "|I|        phase\n";
  for (std::size_t n = 0; n < shown; ++n) {
    const Dipole& d = a.dipoles[n];
    s << Printf("  %4zu %10.4g %10.4g %10.4g %6.3f %6.3f %6.3f %11.4g  %-10s", n, d.position_m.x(),
                d.position_m.y(), d.position_m.z(), d.orientation.x(), d.orientation.y(),
                d.orientation.z(), d.length_m, std::string(ToString(d.distribution)).c_str())
      << FormatCurrent(desc.currents[static_cast<Eigen::Index>(n)]) << "\n";
  }
  if (shown < a.size()) s << "  ... " << a.size() - shown << " more\n";
  double longest = 0;
  for (const Dipole& d : a.dipoles) longest = std::max(longest, d.length_m);
  s << Printf("longest      %.4g m = %.4g wavelengths\n", longest, longest / a.wavelength_m());
  return s.str();
}

std::string DescribeResult(const ArrayDescription& desc, const PatternResult& r,
                           const std::string& output_path, double wall_seconds,
                           const AngularGrid* computed_grid) {
  const AngularGrid& grid = computed_grid ? *computed_grid : r.grid;
  const Array& a = desc.array;
  const ComputeSummary& sm = r.summary;
  std::ostringstream s;
  s << "array        " << (desc.name.empty() ? "(unnamed)" : "\"" + desc.name + "\"") << ", "
    << a.size() << " dipole" << (a.size() == 1 ? "" : "s") << ", ground " << ToString(a.ground)
    << "\n";
  s << "frequency    " << FormatFrequency(a.frequency_hz)
    << Printf("   wavelength %.6g m\n", a.wavelength_m()) << SweepLine(desc);
  s << "grid         " << grid.theta_deg.size() << " theta x " << grid.phi_deg.size()
    << " phi = " << sm.num_directions << " directions\n";

  // Peak on the grid, and the polarization there.
  const Eigen::Index peak = PeakIndex(r.directivity);  // the peak the summary reports
  const auto ip = static_cast<std::size_t>(peak);
  s << "peak         D = " << FormatDb(sm.peak_directivity) << " dBi ("
    << Printf("%.6g", sm.peak_directivity) << ") at "
    << FormatDirection(sm.peak_theta_deg, sm.peak_phi_deg) << " (grid maximum)\n";
  const double ar = r.axial_ratio_db[peak];
  // Tilt is measured from theta_hat toward phi_hat; it is undefined for circular
  // polarization (AR ~ 0 dB), so it is not printed there.
  // Tilt is undefined (NaN) for a circular field (PolarizationOf with the floor).
  s << "polarization at the peak: axial ratio "
    << (std::isinf(ar) ? std::string("inf") : Printf("%.2f", ar)) << " dB, "
    << SenseName(r.sense[ip])
    << (std::isnan(r.tilt_deg[peak])
            ? std::string(", tilt undefined (circular)\n")
            : Printf(", tilt %.2f deg from theta_hat toward phi_hat\n", r.tilt_deg[peak]));
  s << PowerLine(
      desc, r.radiated_power_w, sm.power_significant_digits,
      sm.power_route == PowerRoute::kQuadrature
          ? Printf("band-limited quadrature, within %.2g of P", sm.power_error_bound_relative)
          : std::string("closed form"));

  const Eigen::VectorXd& ra = r.active_resistance_ohm;
  if (sm.power_route == PowerRoute::kQuadrature) {
    s << "active resistance: not computed (the quadrature gives no mutual reactances; "
         "--power-method closed computes them in O(N^2))\n";
  } else if (a.size() <= kFullTableUpTo) {
    s << "active (driving-point) resistance per element:\n"
      << "     #          |I|        phase   R_active (ohm)   R_self (ohm)\n";
    for (std::size_t n = 0; n < a.size(); ++n) {
      const auto e = static_cast<Eigen::Index>(n);
      s << Printf("  %4zu ", n) << FormatCurrent(desc.currents[e])
        << Printf("   %14.6g   %12.6g\n", ra[e],
                  r.resistance_ohm.size() ? r.resistance_ohm(e, e) : std::nan(""));
    }
  } else {
    Eigen::Index lo = -1, hi = -1;
    for (Eigen::Index e = 0; e < ra.size(); ++e) {
      if (std::isnan(ra[e])) continue;
      if (lo < 0 || ra[e] < ra[lo]) lo = e;
      if (hi < 0 || ra[e] > ra[hi]) hi = e;
    }
    if (lo >= 0) {
      s << Printf("active resistance: min %.6g ohm (element %ld), max %.6g ohm (element %ld)\n",
                  ra[lo], static_cast<long>(lo), ra[hi], static_cast<long>(hi));
    }
  }
  s << "method       " << sm.BriefReport() << "\n";
  s << Printf("time         %.3f s wall (field %.3f s, power %.3f s), %d thread%s, %.3g pairs\n",
              wall_seconds, sm.seconds_field, sm.seconds_power, sm.threads_used,
              sm.threads_used == 1 ? "" : "s", sm.pairs);
  if (!output_path.empty()) s << "wrote        " << output_path << "\n";
  return s.str();
}

std::string PowerLine(const ArrayDescription& desc, double radiated_power_w,
                      double power_significant_digits, std::string_view how) {
  std::string out = Printf("power        %.6g W radiated for the %s currents (%s)\n",
                           radiated_power_w, CurrentsWord(desc), std::string(how).c_str());
  const std::string note = PowerDigitsNote(power_significant_digits);
  if (!note.empty()) out += "caution      " + note + "\n";
  return out;
}

std::string SafetyNote() { return WrappedNote("note:", kSafetyNote); }

std::string WrappedNote(std::string_view label, std::string_view text) {
  // `text` wrapped at about 88 columns after the label.
  std::string out(label);
  std::size_t column = out.size();
  std::istringstream words{std::string(text)};
  std::string w;
  while (words >> w) {
    if (column + 1 + w.size() > 88) {
      out += '\n';  // continuation lines align under the first word
      out.append(label.size(), ' ');
      column = label.size();
    }
    out += " " + w;
    column += 1 + w.size();
  }
  return out + "\n";
}

}  // namespace lobecast::text
