#include "io/text/scan_text.h"

#include <cmath>
#include <limits>
#include <sstream>

#include "io/text/number_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

constexpr Eigen::Index kColumnsUpTo = 12;

}  // namespace

std::string ScanTable(const ScanImpedanceTable& t, const std::string& reference) {
  std::ostringstream s;
  const Eigen::Index ns = t.reflection.rows(), n = t.reflection.cols();
  s << "scan         active reflection |Gamma| per element against " << reference << "\n";
  s << "theta (deg)  phi (deg)";
  const Eigen::Index shown = std::min(n, kColumnsUpTo);
  for (Eigen::Index m = 0; m < shown; ++m) s << Printf("  #%-5ld", static_cast<long>(m));
  s << "   worst VSWR (element)\n";
  for (Eigen::Index i = 0; i < ns; ++i) {
    const auto si = static_cast<std::size_t>(i);
    s << Printf("%11.2f  %9.2f", t.theta_rad[si] / kDegree, t.phi_rad[si] / kDegree);
    Eigen::Index worst = -1;
    for (Eigen::Index m = 0; m < n; ++m) {
      const double a = std::abs(t.reflection(i, m));
      if (m < shown) s << (std::isnan(a) ? std::string("       -") : Printf("  %6.4f", a));
      if (!std::isnan(a) && (worst < 0 || a > std::abs(t.reflection(i, worst)))) worst = m;
    }
    if (worst >= 0) {
      s << Printf("   %.4g (#%ld)", Vswr(t.reflection(i, worst)), static_cast<long>(worst));
    }
    s << "\n";
  }
  if (n > shown)
    s << Printf("(%ld elements: the first %ld shown; the CSV has all)\n", static_cast<long>(n),
                static_cast<long>(shown));
  return s.str();
}

std::string ScanCsv(const ScanImpedanceTable& t) {
  std::ostringstream s;
  s << "theta_deg,phi_deg,element,active_resistance_ohm,active_reactance_ohm,"
       "reflection_magnitude,reflection_phase_deg,vswr\n";
  std::string row;
  for (Eigen::Index i = 0; i < t.reflection.rows(); ++i) {
    const auto si = static_cast<std::size_t>(i);
    for (Eigen::Index m = 0; m < t.reflection.cols(); ++m) {
      const Complex z = t.active_impedance_ohm(i, m), g = t.reflection(i, m);
      row.clear();
      const double values[] = {t.theta_rad[si] / kDegree,
                               t.phi_rad[si] / kDegree,
                               static_cast<double>(m),
                               z.real(),
                               z.imag(),
                               std::abs(g),
                               std::arg(g) / kDegree,
                               Vswr(g)};
      for (double v : values) {
        if (!row.empty()) row += ',';
        AppendShortest(row, v);
      }
      s << row << '\n';
    }
  }
  return s.str();
}

}  // namespace lobecast::text

namespace lobecast::text {
namespace {

// The scan pattern's numeric columns (the CSV's, in order).
template <typename F>
void VisitScanPatternColumns(const ScanPoint& p, F&& f) {
  f("steer_theta_deg", p.steer_theta_deg);
  f("steer_phi_deg", p.steer_phi_deg);
  f("peak_directivity_dbi", p.peak_directivity_dbi);
  f("scan_loss_db", p.scan_loss_db);
  f("peak_theta_deg", p.peak_theta_deg);
  f("peak_phi_deg", p.peak_phi_deg);
  f("pointing_error_deg", p.pointing_error_deg);
  f("half_power_first_deg", p.half_power_first_deg);
  f("half_power_second_deg", p.half_power_second_deg);
  f("sidelobe_db", p.sidelobe_db);
}

std::string PatternCell(double v, const char* fmt, const char* if_inf) {
  if (std::isnan(v)) return Printf("%9s", "n/a");
  if (std::isinf(v)) return Printf("%9s", v > 0 ? if_inf : "-inf");
  return Printf(fmt, v);
}

}  // namespace

std::string ScanPatternTable(const ScanSweep& s, const std::string& broadside) {
  std::string out =
      Printf("Scan pattern: %zu steering directions; scan loss re broadside (%s, %.3f dBi)\n",
             s.points.size(), broadside.c_str(), s.broadside_directivity_dbi);
  out += Printf("  %8s %8s %9s %9s %9s %9s %9s %9s %9s %9s %7s %7s\n", "steer", "steer", "peak",
                "scan loss", "beam", "beam", "pointing", "HPBW", "HPBW", "SLL", "major", "grating");
  out += Printf("  %8s %8s %9s %9s %9s %9s %9s %9s %9s %9s %7s %7s\n", "theta", "phi", "dBi", "dB",
                "theta", "phi", "error", "first", "second", "dB", "lobes", "lobes");
  for (std::size_t i = 0; i < s.points.size(); ++i) {
    const ScanPoint& p = s.points[i];
    out += Printf("%c %8.3f %8.3f", s.grating_onset && *s.grating_onset == i ? '!' : ' ',
                  p.steer_theta_deg, p.steer_phi_deg);
    (out += ' ') += PatternCell(p.peak_directivity_dbi, "%9.3f", "inf");
    (out += ' ') += PatternCell(p.scan_loss_db, "%9.3f", "inf");
    (out += ' ') += PatternCell(p.peak_theta_deg, "%9.3f", "inf");
    (out += ' ') += PatternCell(p.peak_phi_deg, "%9.3f", "inf");
    (out += ' ') += PatternCell(p.pointing_error_deg, "%9.3f", "inf");
    (out += ' ') += PatternCell(p.half_power_first_deg, "%9.3f", "none");
    (out += ' ') += PatternCell(p.half_power_second_deg, "%9.3f", "none");
    (out += ' ') += PatternCell(p.sidelobe_db, "%9.2f", "inf");
    for (int count : {p.other_major_lobes, p.grating_lobes})
      out += count < 0 ? Printf(" %7s", "n/a") : Printf(" %7d", count);
    out += "\n";
  }
  out +=
      "  (HPBW in the principal planes of each beam's analysis, first: elevation, second: "
      "orthogonal; none: the beam does not fall to half power there; SLL -inf: no side lobe; "
      "major lobes: other lobes as high as the beam (the mirror beam, a full grating lobe), "
      "which the SLL leaves out; grating lobes: the lattice's in visible space)\n";
  if (s.points.front().grating_lobes < 0)
    out += "  grating lobes: n/a (an explicit array: no lattice to take them from)\n";
  else if (s.grating_onset)
    out += Printf(
        "  grating-lobe onset (!): a grating lobe enters visible space at steering "
        "theta %.3f deg\n",
        s.points[*s.grating_onset].steer_theta_deg);
  else
    out += "  no grating lobe in visible space at any steering angle\n";
  return out;
}

std::string ScanPatternCsv(const ScanSweep& s) {
  std::string out;
  bool first = true;
  VisitScanPatternColumns(s.points.front(), [&](const char* name, double) {
    // Appended piece by piece (GCC 12 warns falsely on operator+ of short strings).
    if (!first) out += ',';
    out += name;
    first = false;
  });
  out += ",other_major_lobes,grating_lobes\n";
  for (const ScanPoint& p : s.points) {
    first = true;
    VisitScanPatternColumns(p, [&](const char*, double v) {
      if (!first) out += ",";
      if (!std::isnan(v)) AppendShortest(out, v);
      first = false;
    });
    for (int count : {p.other_major_lobes, p.grating_lobes}) {
      out += ",";
      if (count >= 0) out += std::to_string(count);
    }
    out += "\n";
  }
  return out;
}

}  // namespace lobecast::text
