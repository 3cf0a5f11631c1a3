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
