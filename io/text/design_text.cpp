#include "io/text/design_text.h"

#include <cmath>
#include <complex>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "io/text/number_text.h"
#include "io/text/text_format.h"
#include "io/version.h"

namespace lobecast::text {

std::string ShortestNumber(double v) {
  std::string s;
  AppendShortest(s, v);
  return s;
}

std::string TomlEscaped(const std::string& in) {
  std::string out;
  for (char ch : in) {
    if (ch == '"' || ch == '\\') out += '\\';
    if (ch == '\n') {
      out += "\\n";
      continue;
    }
    out += ch;
  }
  return out;
}

namespace {

std::string Vec(const Vec3& v) {
  std::string s = "[";
  AppendShortest(s, v.x());
  s += ", ";
  AppendShortest(s, v.y());
  s += ", ";
  AppendShortest(s, v.z());
  s += "]";
  return s;
}

// Magnitude (A peak) and phase (deg) of dipole i: the design's own values where they
// still give the current exactly, so the file reads back to the same bits.
std::pair<double, double> PolarOf(const ArrayDescription& desc, std::size_t i) {
  const Complex c = desc.currents[static_cast<Eigen::Index>(i)];
  if (desc.design && i >= desc.design->first_generated &&
      i - desc.design->first_generated < desc.design->polar_currents.size()) {
    const auto p = desc.design->polar_currents[i - desc.design->first_generated];
    if (std::polar(p.first, p.second * kDegree) == c) return p;
  }
  return {std::abs(c), std::arg(c) / kDegree};
}

std::string LatticeLine(const DesignInfo& d, double lambda) {
  const LatticeSpec& l = d.lattice;
  std::string s = "lattice      " + std::string(ToString(l.kind)) + ", ";
  switch (l.kind) {
    case LatticeKind::kLine:
      s += Printf("%d elements, spacing %.6g m (%.4g wavelength)", l.count_x, l.spacing_x_m,
                  l.spacing_x_m / lambda);
      break;
    case LatticeKind::kRectangular:
    case LatticeKind::kTriangular:
      s += Printf("%d x %d %s, spacing %.6g x %.6g m (%.4g x %.4g wavelength)", l.count_x,
                  l.count_y, d.crossed ? "sites" : "elements", l.spacing_x_m, l.spacing_y_m,
                  l.spacing_x_m / lambda, l.spacing_y_m / lambda);
      break;
    case LatticeKind::kRing:
      for (std::size_t r = 0; r < l.ring_counts.size(); ++r)
        s += Printf("%s%d at radius %.6g m (%.4g wavelength)", r ? ", " : "", l.ring_counts[r],
                    l.ring_radii_m[r], l.ring_radii_m[r] / lambda);
      break;
  }
  if (!d.crossed) {
    s += Printf("; %zu generated", d.generated);
    if (d.generated != d.lattice_size) s += Printf(" (%zu removed)", d.lattice_size - d.generated);
    return s + "\n";
  }
  s += Printf("; %zu sites", d.sites());
  if (d.sites() != d.lattice_size) s += Printf(" (%zu removed)", d.lattice_size - d.sites());
  s += Printf(", %zu dipoles generated\n", d.generated);
  return s + Printf(
                 "element      crossed pairs, %s toward the beam: each site's second dipole "
                 "(n x the first) %s the first by 90 deg\n",
                 std::string(ToString(*d.crossed)).c_str(),
                 d.crossed_phase_deg < 0 ? "lags" : "leads");
}

// "-inf (below rounding)" for an exact zero, else the level to 0.01 dB.
std::string DepthText(double db) {
  return std::isinf(db) ? (db < 0 ? "-inf (below rounding)" : "+inf") : Printf("%.2f", db);
}

// What the excitation synthesis achieved (io/input/excitation_synthesis.h).
std::string SynthesisLines(const DesignInfo& d) {
  const std::string more = "             ";  // a continuation line
  std::string s;
  if (d.max_directivity) {
    const MaxDirectivityResult& r = *d.max_directivity;
    s += Printf(
        "objective    maximum directivity toward the beam: D %.3f dBi (%.3f dBi in the "
        "elements' polarization)\n",
        ToDb(r.directivity), ToDb(r.partial_directivity));
    s += more + Printf("regularization %.3g of the mean self resistance; solver %s",
                       r.regularization, std::string(ToString(r.solver_used)).c_str());
    if (r.solver_used == DirectivitySolver::kConjugateGradient)
      s += Printf(" (%d iterations, residual %.2g)", r.cg_iterations, r.cg_residual_relative);
    s += "\n";
    s += Printf(
        "sensitivity  %.4g = %.4g x the uniform array's 1/N (sum |I|^2 over the beam's "
        "field power)\n",
        r.sensitivity_factor, r.sensitivity_re_uniform);
    if (r.superdirective) {
      s += more + "WARNING: superdirective: losses, bandwidth and tolerances make these\n";
      s += more + "currents impractical; raise objective.regularization\n";
    }
    if (r.digits_in_power < 9)
      s += Printf(
          "precision    the radiated power of these currents keeps about %s%.0f "
          "significant digits (its terms cancel)\n",
          r.digits_is_lower_bound ? "at least " : "", std::floor(r.digits_in_power));
  }
  if (d.envelope) {
    const EnvelopeResult& r = *d.envelope;
    const bool mask = d.objective && (d.objective->sidelobe_db || !d.objective->mask.empty());
    s += Printf(
        "objective    side-lobe envelope, %zu directions sampled outside the free main "
        "beam (%.3g first-null radii of the uniform excitation)\n",
        d.envelope_samples, d.objective ? d.objective->main_beam_factor : 0.0);
    s += more +
         Printf("%s %.2f dB (LP bound %.2f dB, %d rounds)\n",
                mask ? "margin to the mask (< 0: met)" : "highest sampled side lobe re the beam",
                r.margin_db, r.lp_bound_db, r.rounds);
  }
  const std::vector<double>* depths = d.null_placement ? &d.null_placement->depth_db
                                      : d.envelope     ? &d.envelope->null_depth_db
                                                       : nullptr;
  for (std::size_t j = 0; depths && j < depths->size() && j < d.nulls.size(); ++j)
    s += Printf("null         theta %.6g deg, phi %.6g deg: %s dB re the beam\n",
                d.nulls[j].theta_deg, d.nulls[j].phi_deg, DepthText((*depths)[j]).c_str());
  if (d.null_placement) {
    const NullResult& r = *d.null_placement;
    s += Printf(
        "nulling      %s: currents changed by %.3g (relative norm); %.3f dB of "
        "directivity toward the beam lost\n",
        d.phase_only_nulls ? "phase only (magnitudes kept)" : "least squares", r.change_relative,
        r.directivity_lost_db);
    if (d.phase_only_nulls && !r.converged)
      s += more + "WARNING: the phases did not reach the target depth (see above)\n";
  }
  return s;
}

std::string TaperLine(const DesignInfo& d) {
  const TaperSpec& t = d.taper;
  if (d.objective) {
    return Printf("currents     set by the objective (%s); peak current %.6g A\n",
                  std::string(ToString(d.objective->kind)).c_str(), d.peak_current_a) +
           Printf("efficiency   %.6f (%.3f dB): |sum a|^2 / (N sum a^2) of the amplitudes\n",
                  d.taper_efficiency, ToDb(d.taper_efficiency));
  }
  std::string s = "taper        " + std::string(ToString(t.kind));
  switch (t.kind) {
    case TaperKind::kChebyshev:
      s += Printf(", side lobes %.6g dB", t.sidelobe_db);
      break;
    case TaperKind::kTaylor:
    case TaperKind::kCircularTaylor:
      s += Printf(", side lobes %.6g dB, nbar %d", t.sidelobe_db, t.nbar);
      break;
    case TaperKind::kCosine:
      s += Printf(", pedestal %.6g dB", t.pedestal_db);
      break;
    default:
      break;
  }
  if (t.kind != TaperKind::kUniform && t.kind != TaperKind::kBinomial &&
      t.kind != TaperKind::kCosine && t.kind != TaperKind::kChebyshev)
    s += " (the design level; a sampled Taylor taper meets it only approximately)";
  s += Printf("; peak current %.6g A\n", d.peak_current_a);
  s += Printf("efficiency   %.6f (%.3f dB): |sum a|^2 / (N sum a^2)\n", d.taper_efficiency,
              ToDb(d.taper_efficiency));
  return s;
}

}  // namespace

std::string DescribeDesign(const ArrayDescription& desc) {
  if (!desc.design) return "";
  const DesignInfo& d = *desc.design;
  std::string s = LatticeLine(d, desc.array.wavelength_m());
  if (d.first_generated + d.generated < desc.array.size())
    s += Printf("explicit     %zu dipole%s as written (neither tapered nor steered)\n",
                desc.array.size() - d.generated, desc.array.size() - d.generated == 1 ? "" : "s");
  s += TaperLine(d);
  if (d.steering) {
    s += Printf("steering     theta %.6g deg, phi %.6g deg, %s", d.steer_theta_deg, d.steer_phi_deg,
                d.steering->mode == SteeringMode::kPhase
                    ? "phase (exact at the design frequency; the beam squints off it)"
                    : "true time delay (no squint over frequency)");
    s += "\n";
  } else {
    s += "steering     none (broadside)\n";
  }
  if (d.grating_lobes.empty()) {
    s += "grating      none in visible space at the beam direction\n";
  } else {
    for (const GratingLobe& g : d.grating_lobes)
      s += Printf(
          "grating      WARNING: a lobe as strong as the main beam at theta %.4g deg, phi %.4g "
          "deg\n",
          g.theta_rad / kDegree, g.phi_rad / kDegree);
  }
  return s + SynthesisLines(d);
}

bool WritesCsv(const ArrayDescription& desc) {
  if (desc.array.size() <= kCsvThreshold) return false;
  for (const Port& p : desc.ports)
    if (p.kind != PortKind::kCurrent) return false;
  return true;
}

ArrayFileText ArrayFile(const ArrayDescription& desc, const std::string& csv_name) {
  ArrayFileText out;
  std::string& t = out.toml;
  t += "# Explicit array description written by lobecast " + std::string(SoftwareVersion()) +
       " synth from the design\n# " + desc.source_path +
       "; edit freely. Lengths in metres, currents A peak and degrees.\n#\n";
  std::string summary = DescribeDesign(desc);
  std::size_t start = 0;
  while (start < summary.size()) {
    const std::size_t end = summary.find('\n', start);
    t += "# " + summary.substr(start, end - start) + "\n";
    start = end + 1;
  }
  if (desc.design && desc.design->steering && desc.design->steering->mode == SteeringMode::kDelay)
    t += "# The phases below are the true-time-delay steering at the design frequency.\n";
  if (!desc.frequencies_hz.empty()) {
    t += "# The design's frequency sweep (" + std::to_string(desc.frequencies_hz.size()) +
         " frequencies) is not carried over: this file holds the design frequency, and its\n"
         "# currents are fixed phasors (as phase steering); compute the design file itself for "
         "the sweep.\n";
  }
  t += "\n";
  if (!desc.name.empty()) t += "name = \"" + TomlEscaped(desc.name) + "\"\n";
  if (!desc.description.empty()) t += "description = \"" + TomlEscaped(desc.description) + "\"\n";
  t += "frequency = " + ShortestNumber(desc.array.frequency_hz) + "   # Hz\n";
  t += "ground = \"" + std::string(ToString(desc.array.ground)) + "\"\n";
  t += "length_unit = \"m\"\n";
  if (desc.reference_impedance_ohm != 50)
    t += "reference_impedance = " + ShortestNumber(desc.reference_impedance_ohm) + "\n";
  const bool csv = !csv_name.empty() && WritesCsv(desc);
  if (csv)
    t += "dipoles_csv = \"" + csv_name + "\"   # " + std::to_string(desc.array.size()) +
         " dipoles\n";
  auto range = [](const AngleRange& r) {
    return "{ start = " + ShortestNumber(r.start_deg) + ", stop = " + ShortestNumber(r.stop_deg) +
           ", step = " + ShortestNumber(r.step_deg) + " }";
  };
  t += "\n[grid]\ntheta = " + range(desc.theta) + "\nphi = " + range(desc.phi) + "\n";

  bool any_radius = false, any_x = false, any_sigma = false;
  for (const Wire& w : desc.wires) {
    any_radius = any_radius || w.radius_m > 0;
    any_x = any_x || !std::isnan(w.reactance_ohm);
    any_sigma = any_sigma || w.conductivity_s_m > 0;
  }
  if (csv) {
    std::string& c = out.csv;
    c += "# Dipoles of " + desc.source_path + " (lobecast synth): metres, A peak, degrees\n";
    c += "x, y, z, ux, uy, uz, length, magnitude, phase, distribution";
    if (any_radius) c += ", radius";
    if (any_x) c += ", self_reactance";
    if (any_sigma) c += ", conductivity";
    c += "\n";
    for (std::size_t i = 0; i < desc.array.size(); ++i) {
      const Dipole& d = desc.array.dipoles[i];
      const auto [mag, ph] = PolarOf(desc, i);
      c += ShortestNumber(d.position_m.x()) + ", " + ShortestNumber(d.position_m.y()) + ", " +
           ShortestNumber(d.position_m.z()) + ", " + ShortestNumber(d.orientation.x()) + ", " +
           ShortestNumber(d.orientation.y()) + ", " + ShortestNumber(d.orientation.z()) + ", " +
           ShortestNumber(d.length_m) + ", " + ShortestNumber(mag) + ", " + ShortestNumber(ph) +
           ", " + std::string(ToString(d.distribution));
      const Wire& w = desc.wires[i];
      if (any_radius) c += ", " + (w.radius_m > 0 ? ShortestNumber(w.radius_m) : "");
      if (any_x) c += ", " + (std::isnan(w.reactance_ohm) ? "" : ShortestNumber(w.reactance_ohm));
      if (any_sigma) c += ", " + (w.conductivity_s_m > 0 ? ShortestNumber(w.conductivity_s_m) : "");
      c += "\n";
    }
    return out;
  }
  for (std::size_t i = 0; i < desc.array.size(); ++i) {
    const Dipole& d = desc.array.dipoles[i];
    t += "\n[[dipole]]   # " + std::to_string(i) + "\n";
    t += "position = " + Vec(d.position_m) + "\n";
    t += "orientation = " + Vec(d.orientation) + "\n";
    t += "length = " + ShortestNumber(d.length_m) + "\n";
    t += "distribution = \"" + std::string(ToString(d.distribution)) + "\"\n";
    const Wire& w = desc.wires[i];
    if (w.radius_m > 0) t += "radius = " + ShortestNumber(w.radius_m) + "\n";
    if (!std::isnan(w.reactance_ohm))
      t += "self_reactance = " + ShortestNumber(w.reactance_ohm) + "\n";
    if (w.conductivity_s_m > 0) t += "conductivity = " + ShortestNumber(w.conductivity_s_m) + "\n";
    const Port& p = desc.ports[i];
    if (p.kind == PortKind::kCurrent) {
      const auto [mag, ph] = PolarOf(desc, i);
      t += "current = { magnitude = " + ShortestNumber(mag) + ", phase = " + ShortestNumber(ph) +
           " }\n";
    } else if (p.kind == PortKind::kDrive) {
      t += "drive = { voltage = " + ShortestNumber(std::abs(p.voltage_v)) +
           ", phase = " + ShortestNumber(std::arg(p.voltage_v) / kDegree) +
           ", resistance = " + ShortestNumber(p.impedance_ohm.real()) +
           ", reactance = " + ShortestNumber(p.impedance_ohm.imag()) + " }\n";
    } else {
      t += "load = { resistance = " + ShortestNumber(p.impedance_ohm.real()) +
           ", reactance = " + ShortestNumber(p.impedance_ohm.imag()) + " }\n";
    }
  }
  return out;
}

}  // namespace lobecast::text
