#include "io/text/sizing_text.h"

#include <cmath>
#include <filesystem>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/sizing/grating_free.h"
#include "io/text/design_text.h"
#include "io/text/json_writer.h"
#include "io/text/number_text.h"
#include "io/text/text_format.h"
#include "io/version.h"

namespace lobecast::text {
namespace {

// "433.92 MHz", "10.5 GHz": the frequency in the unit that reads best.
std::string Frequency(double hz) {
  if (hz >= 1e9) return Printf("%.6g GHz", hz / 1e9);
  if (hz >= 1e6) return Printf("%.6g MHz", hz / 1e6);
  if (hz >= 1e3) return Printf("%.6g kHz", hz / 1e3);
  return Printf("%.6g Hz", hz);
}

// A length in mm below a metre, else in m.
std::string Length(double m) { return m < 1 ? Printf("%.5g mm", m * 1e3) : Printf("%.5g m", m); }

std::string Axis(const Vec3& o) { return o.x() != 0 ? "x" : "y"; }

// "x", "y", "rhcp" or "lhcp": the requirements' polarization as written.
std::string PolarizationName(const SizingRequirements& r) {
  return r.circular ? std::string(ToString(*r.circular)) : Axis(r.polarization);
}

std::string TaperText(const TaperSpec& t) {
  if (t.kind == TaperKind::kTaylor) return Printf("Taylor %.2f dB nbar %d", t.sidelobe_db, t.nbar);
  if (t.kind == TaperKind::kCircularTaylor)
    return Printf("circ. Taylor %.2f dB nbar %d", t.sidelobe_db, t.nbar);
  if (t.kind == TaperKind::kChebyshev) return Printf("Dolph-Chebyshev %.2f dB", t.sidelobe_db);
  return std::string(ToString(t.kind));
}

std::string PlaneName(ScanPlane p) { return p == ScanPlane::kXZ ? "xz" : "yz"; }

// "broadside" or "scan xz 45 deg".
std::string BeamName(double theta_deg, ScanPlane plane) {
  return theta_deg == 0 ? "broadside"
                        : Printf("scan %s %g deg", PlaneName(plane).c_str(), theta_deg);
}

std::string Db(double v) { return std::isinf(v) ? (v < 0 ? "none" : "+inf") : Fixed2(v); }

// The requirement lines, as written.
std::string RequirementLines(const RequirementsFile& rf, const std::string& lead) {
  const SizingRequirements& r = rf.requirements;
  const double lambda = r.wavelength_m();
  std::string s =
      lead + "frequency " + Frequency(r.frequency_hz) + " (wavelength " + Length(lambda) + ")\n";
  if (r.directivity_dbi)
    s += lead + Printf("directivity >= %g dBi at broadside\n", *r.directivity_dbi);
  if (r.beamwidth_xz_deg)
    s += lead + Printf("half-power beamwidth <= %g deg (xz) and %g deg (yz) at broadside\n",
                       *r.beamwidth_xz_deg, *r.beamwidth_yz_deg);
  s += lead + Printf("side lobes <= %g dB re the peak, at broadside and over the scan range\n",
                     r.sidelobe_db);
  s += lead + Printf("scan %g deg (xz plane) x %g deg (yz plane) from broadside\n", r.scan_xz_deg,
                     r.scan_yz_deg);
  s += lead + (r.ground == Ground::kPec
                   ? Printf("ground pec, elements %s (%.4g wavelength) above it\n",
                            Length(r.ground_height_m).c_str(), r.ground_height_m / lambda)
                   : std::string("ground none (free space)\n"));
  if (r.circular) {
    s += lead + Printf(
                    "elements crossed pairs of short dipoles along x and y (y %s x by 90 deg: "
                    "%s toward +z), %s long; lattice %s\n",
                    *r.circular == CircularSense::kRight ? "lagging" : "leading",
                    std::string(ToString(*r.circular)).c_str(), Length(r.element_length_m).c_str(),
                    std::string(ToString(r.lattice)).c_str());
    s += lead + Printf("axial ratio <= %g dB at the beam peak, at broadside and the scan edges\n",
                       r.max_axial_ratio_db);
  } else {
    s += lead + Printf("elements short dipoles along %s, %s long; lattice %s\n",
                       Axis(r.polarization).c_str(), Length(r.element_length_m).c_str(),
                       std::string(ToString(r.lattice)).c_str());
  }
  if (r.max_elements)
    s += lead +
         Printf(r.circular ? "max_elements %ld (sites)\n" : "max_elements %ld\n", *r.max_elements);
  if (r.max_aperture_x_m)
    s += lead + "max aperture " + Length(*r.max_aperture_x_m) + " x " +
         Length(*r.max_aperture_y_m) + " (element centres)\n";
  return s;
}

std::string ShortfallText(const Shortfall& f) {
  std::string s;
  const std::string beam = BeamName(f.scan_theta_deg, f.scan_plane);
  switch (f.what) {
    case Requirement::kDirectivity:
      s = Printf("directivity %.2f dBi, asked >= %g dBi (%.2f dB short)", f.reached, f.asked,
                 f.asked - f.reached);
      break;
    case Requirement::kBeamwidthXZ:
    case Requirement::kBeamwidthYZ:
      s = Printf("half-power beamwidth (%s) %.3g deg, asked <= %g deg (%.2g deg too wide)",
                 f.what == Requirement::kBeamwidthXZ ? "xz" : "yz", f.reached, f.asked,
                 f.reached - f.asked);
      break;
    case Requirement::kSidelobes:
      s = Printf("side lobes %.2f dB at %s, asked <= %g dB (%.2f dB too high)", f.reached,
                 beam.c_str(), f.asked, f.reached - f.asked);
      break;
    case Requirement::kGratingLobes:
      s = Printf("%d lobe(s) within 3 dB of the peak (grating lobes) at %s",
                 static_cast<int>(f.reached), beam.c_str());
      break;
    case Requirement::kAxialRatio:
      s = std::isinf(f.reached)
              ? Printf("the field at the peak at %s is not of the asked hand", beam.c_str())
              : Printf("axial ratio %.2f dB at the peak at %s, asked <= %g dB (%.2f dB too high)",
                       f.reached, beam.c_str(), f.asked, f.reached - f.asked);
      break;
  }
  if (f.bound_by == Constraint::kElement)
    s += "; set by the element: a crossed pair's axial ratio is 1 / cos(theta) off its normal";
  else if (f.bound_by == Constraint::kTaper)
    s += "; the taper's design level is at its floor (-80 dB): the outline sets these lobes";
  else if (f.bound_by != Constraint::kNone)
    s += "; bound by " + std::string(ToString(f.bound_by));
  return s;
}

// ", axial ratio 0.12 dB rhcp" at a computed beam's peak.
std::string AxialRatioText(const ComputedBeam& b) {
  return Printf(", axial ratio %s dB %s", Db(b.axial_ratio_db).c_str(),
                b.sense > 0   ? "rhcp"
                : b.sense < 0 ? "lhcp"
                              : "linear");
}

std::string Status(const SizingCandidate& c) {
  if (c.checked) return c.meets ? "meets" : "MISSES";
  return c.predicted_shortfalls.empty() ? "predicted to meet (not computed)" : "MISSES (predicted)";
}

}  // namespace

std::string CandidateFileName(std::size_t rank) {
  return "candidate-" + std::to_string(rank) + ".toml";
}

std::string CandidateDesign(const RequirementsFile& rf, const SizingCandidate& c, std::size_t rank,
                            std::size_t count) {
  const SizingRequirements& r = rf.requirements;
  const double lambda = r.wavelength_m();
  std::string t = "# Candidate " + std::to_string(rank) + " of " + std::to_string(count) +
                  " sized by lobecast " + std::string(SoftwareVersion()) + " size from\n# " +
                  rf.source_path + ": " + Status(c) + ".\n# Requirements:\n";
  t += RequirementLines(rf, "#   ");
  t += Printf(
      "# Predicted: %.2f dBi at broadside, beamwidths %.3g x %.3g deg, side lobes %.2f dB,\n",
      c.directivity_dbi, c.beamwidth_xz_deg, c.beamwidth_yz_deg, c.sidelobe_db);
  t += Printf("#   taper efficiency %.4f, grating-lobe margin %.4f (sine space).\n",
              c.taper_efficiency, c.grating_margin);
  for (const ComputedBeam& b : c.computed)
    t += Printf("# Computed at %s: %.2f dBi, side lobes %s dB%s%s\n",
                BeamName(b.steer_theta_deg, b.plane).c_str(), b.peak_dbi, Db(b.sidelobe_db).c_str(),
                r.circular ? AxialRatioText(b).c_str() : "",
                b.grating_lobes ? ", GRATING LOBES" : "");
  for (const Shortfall& f : c.shortfalls) t += "# MISSES: " + ShortfallText(f) + "\n";
  t += "# Steer it with a [steer] table (theta, phi); lengths below are metres.\n\n";
  t += "name = \"" +
       TomlEscaped((rf.name.empty() ? std::string("sized array") : rf.name) + ", candidate " +
                   std::to_string(rank)) +
       "\"\n";
  if (!rf.description.empty()) t += "description = \"" + TomlEscaped(rf.description) + "\"\n";
  t += "frequency = " + ShortestNumber(r.frequency_hz) + "   # Hz\n";
  t += "ground = \"" + std::string(ToString(r.ground)) + "\"\n";
  t += "length_unit = \"m\"\n";
  const double step = CheckGridStepDeg(c);
  t += "\n[grid]   # the grid the check computed on\n";
  t += "theta = { start = 0, stop = " + std::string(r.ground == Ground::kPec ? "90" : "180") +
       ", step = " + ShortestNumber(step) + " }\n";
  t += "phi = { start = 0, stop = 360, step = " + ShortestNumber(step) + " }\n";
  t += "\n[element]\norientation = [" +
       std::string(r.polarization.x() != 0 ? "1, 0, 0" : "0, 1, 0") + "]\n";
  if (r.circular)
    t += "crossed_pair = \"" + std::string(ToString(*r.circular)) +
         "\"   # and a y dipole at every site, a quarter period apart\n";
  t += "length = " + ShortestNumber(r.element_length_m) +
       Printf("   # %.4g wavelength\n", r.element_length_m / lambda);
  t += "distribution = \"uniform\"\n";
  t += "\n[lattice]\nkind = \"" + std::string(ToString(c.lattice)) + "\"\n";
  t += "count = [" + std::to_string(c.count_x) + ", " + std::to_string(c.count_y) + "]   # " +
       std::to_string(c.elements()) +
       (r.circular ? " sites, " + std::to_string(c.dipoles()) + " dipoles\n" : " elements\n");
  t += "spacing = [" + ShortestNumber(c.spacing_x_m) + ", " + ShortestNumber(c.spacing_y_m) +
       Printf("]   # %.4f x %.4f wavelength\n", c.spacing_x_m / lambda, c.spacing_y_m / lambda);
  if (r.ground == Ground::kPec) t += "center = [0, 0, " + ShortestNumber(r.ground_height_m) + "]\n";
  t += "\n[taper]\nkind = \"" + std::string(ToString(c.taper.kind)) + "\"\n";
  if (c.taper.kind != TaperKind::kUniform)
    t += "sidelobe_db = " + ShortestNumber(c.taper.sidelobe_db) +
         "   # design parameter, lowered until the predicted cuts met the requirement\n";
  if (c.taper.kind == TaperKind::kTaylor || c.taper.kind == TaperKind::kCircularTaylor)
    t += "nbar = " + std::to_string(c.taper.nbar) + "\n";
  return t;
}

std::string SizingTable(const RequirementsFile& rf, const SizingResult& res,
                        const std::string& folder) {
  const SizingRequirements& r = rf.requirements;
  const double lambda = r.wavelength_m();
  std::string s = "requirements\n" + RequirementLines(rf, "  ");
  s += "largest spacing without grating lobes over the scan range (lattice condition):\n";
  for (LatticeKind k : {LatticeKind::kRectangular, LatticeKind::kTriangular}) {
    const LatticeSpacing sp = LargestSpacing(
        k, {std::sin(r.scan_xz_deg * kDegree), std::sin(r.scan_yz_deg * kDegree)}, 0);
    s += Printf("  %-11s  %.4f x %.4f wavelength (%s x %s), %.4g %s per square wavelength\n",
                std::string(ToString(k)).c_str(), sp.dx, sp.dy, Length(sp.dx * lambda).c_str(),
                Length(sp.dy * lambda).c_str(), 1 / (sp.dx * sp.dy),
                r.circular ? "sites" : "elements");
  }
  s += std::string("\nrank  lattice      ") + (r.circular ? "sites   " : "elements") +
       "        spacing (wavelength)  taper (design level)           "
       "eff     margin  D broadside (dBi)  worst SLL (dB)  status\n";
  s +=
      "                                                                                            "
      "(sine)  pred    computed   pred   computed\n";
  for (std::size_t i = 0; i < res.candidates.size(); ++i) {
    const SizingCandidate& c = res.candidates[i];
    double comp_d = NAN, comp_sll = NAN;
    for (const ComputedBeam& b : c.computed) {
      if (b.steer_theta_deg == 0) comp_d = b.peak_dbi;
      comp_sll = std::isnan(comp_sll) ? b.sidelobe_db : std::max(comp_sll, b.sidelobe_db);
    }
    s += Printf(
        "%-4zu  %-11s  %4d x %-4d %5zu  %.4f x %.4f       %-29s  %.4f  %.4f  %6.2f  %8s   "
        "%6s %9s  %s\n",
        i + 1, std::string(ToString(c.lattice)).c_str(), c.count_x, c.count_y, c.elements(),
        c.spacing_x_m / lambda, c.spacing_y_m / lambda, TaperText(c.taper).c_str(),
        c.taper_efficiency, c.grating_margin, c.directivity_dbi,
        c.checked ? Db(comp_d).c_str() : "-", Db(c.sidelobe_db).c_str(),
        c.checked ? Db(comp_sll).c_str() : "-", Status(c).c_str());
  }
  if (r.circular)
    s += "(sites: lattice sites, each a crossed pair of two dipoles: dipoles = 2 x sites)\n";
  for (std::size_t i = 0; i < res.candidates.size(); ++i) {
    const SizingCandidate& c = res.candidates[i];
    s += Printf("\ncandidate %zu: %s", i + 1, Status(c).c_str());
    if (!folder.empty())
      s += "  -> " + (std::filesystem::path(folder) / CandidateFileName(i + 1)).string();
    s += "\n";
    s += Printf("  lattice      %s, %d x %d = %zu %s, spacing %s x %s, ",
                std::string(ToString(c.lattice)).c_str(), c.count_x, c.count_y, c.elements(),
                r.circular ? Printf("sites (%zu dipoles)", c.dipoles()).c_str() : "elements",
                Length(c.spacing_x_m).c_str(), Length(c.spacing_y_m).c_str()) +
         "aperture " + Length(c.aperture_x_m()) + " x " + Length(c.aperture_y_m()) +
         " (element centres)\n";
    s += Printf("  taper        %s; efficiency %.4f (%.2f dB)\n", TaperText(c.taper).c_str(),
                c.taper_efficiency, ToDb(c.taper_efficiency));
    s += Printf(
        "  grating      nearest lobe %.4f outside visible space (sine space) at the worst "
        "scan direction\n",
        c.grating_margin);
    s += "                          predicted   computed\n";
    const auto row = [&](const std::string& what, double pred, const std::string& unit, double comp,
                         bool has) {
      s += Printf("  %-22s  %9s  %9s  %s\n", what.c_str(), Db(pred).c_str(),
                  has ? Db(comp).c_str() : "-", unit.c_str());
    };
    const ComputedBeam* bs = nullptr;
    for (const ComputedBeam& b : c.computed)
      if (b.steer_theta_deg == 0) bs = &b;
    row("D broadside", c.directivity_dbi, "dBi", bs ? bs->peak_dbi : 0, bs);
    row("HPBW xz broadside", c.beamwidth_xz_deg, "deg", bs ? bs->beamwidth_xz_deg : 0, bs);
    row("HPBW yz broadside", c.beamwidth_yz_deg, "deg", bs ? bs->beamwidth_yz_deg : 0, bs);
    row("SLL broadside", c.sidelobe_broadside_db, "dB", bs ? bs->sidelobe_db : 0, bs);
    for (ScanPlane p : {ScanPlane::kXZ, ScanPlane::kYZ}) {
      const double edge = p == ScanPlane::kXZ ? r.scan_xz_deg : r.scan_yz_deg;
      if (!(edge > 0)) continue;
      const ComputedBeam* b = nullptr;
      for (const ComputedBeam& x : c.computed)
        if (x.steer_theta_deg > 0 && x.plane == p) b = &x;
      const std::string name = BeamName(edge, p);
      row("D " + name, p == ScanPlane::kXZ ? c.scan_directivity_xz_dbi : c.scan_directivity_yz_dbi,
          "dBi", b ? b->peak_dbi : 0, b);
      row("SLL " + name, p == ScanPlane::kXZ ? c.sidelobe_scan_xz_db : c.sidelobe_scan_yz_db, "dB",
          b ? b->sidelobe_db : 0, b);
    }
    if (r.circular) {
      // The pair's own axial ratio (crossed_pair.h) beside the one at each computed peak.
      for (const ComputedBeam& b : c.computed) {
        const double pred = b.steer_theta_deg == 0      ? 0.0
                            : b.plane == ScanPlane::kXZ ? c.axial_ratio_scan_xz_db
                                                        : c.axial_ratio_scan_yz_db;
        row("AR " + BeamName(b.steer_theta_deg, b.plane), pred,
            b.sense > 0   ? "dB rhcp"
            : b.sense < 0 ? "dB lhcp"
                          : "dB linear",
            b.axial_ratio_db, true);
      }
      if (!c.checked) {
        row("AR broadside", 0.0, "dB", 0, false);
        if (r.scan_xz_deg > 0)
          row("AR " + BeamName(r.scan_xz_deg, ScanPlane::kXZ), c.axial_ratio_scan_xz_db, "dB", 0,
              false);
        if (r.scan_yz_deg > 0)
          row("AR " + BeamName(r.scan_yz_deg, ScanPlane::kYZ), c.axial_ratio_scan_yz_db, "dB", 0,
              false);
      }
    }
    int lobes = 0;
    for (const ComputedBeam& b : c.computed) lobes += b.grating_lobes;
    if (c.checked) s += Printf("  grating lobes (computed)  %s\n", lobes ? "PRESENT" : "none");
    for (const Shortfall& f : c.predicted_shortfalls)
      s += "  predicted to miss: " + ShortfallText(f) + "\n";
    for (const Shortfall& f : c.shortfalls) s += "  MISSES: " + ShortfallText(f) + "\n";
  }
  if (!res.binding.empty()) {
    s += "\nNOT MET within the constraints; the best candidate's shortfalls:\n";
    for (const Shortfall& f : res.binding) s += "  " + ShortfallText(f) + "\n";
  }
  s += Printf("\nsized and computed in %.2f s\n", res.seconds);
  return s;
}

std::string SizingJson(const RequirementsFile& rf, const SizingResult& res,
                       const std::string& folder) {
  const SizingRequirements& r = rf.requirements;
  JsonWriter j;
  j.BeginObject();
  j.Member("format", "lobecast.sizing");
  j.Member("software_version", SoftwareVersion());
  j.Member("requirements_file", rf.source_path);
  const auto pair = [&](const char* key, double a, double b) {
    j.Key(key);
    j.BeginArray();
    j.Number(a);
    j.Number(b);
    j.EndArray();
  };
  j.Key("requirements");
  j.BeginObject();
  j.Member("frequency_hz", r.frequency_hz);
  j.Key("directivity_dbi");
  r.directivity_dbi ? j.Number(*r.directivity_dbi) : j.Null();
  if (r.beamwidth_xz_deg)
    pair("beamwidth_deg", *r.beamwidth_xz_deg, *r.beamwidth_yz_deg);
  else
    j.Key("beamwidth_deg"), j.Null();
  j.Member("sidelobe_db", r.sidelobe_db);
  pair("scan_deg", r.scan_xz_deg, r.scan_yz_deg);
  j.Member("ground", ToString(r.ground));
  j.Member("ground_height_m", r.ground_height_m);
  j.Member("polarization", PolarizationName(r));
  if (r.circular) j.Member("max_axial_ratio_db", r.max_axial_ratio_db);
  j.Member("lattice", ToString(r.lattice));
  j.Key("max_elements");
  r.max_elements ? j.Int(*r.max_elements) : j.Null();
  j.EndObject();
  const auto shortfalls = [&](const char* key, const std::vector<Shortfall>& v) {
    j.Key(key);
    j.BeginArray();
    for (const Shortfall& f : v) {
      j.BeginObject();
      j.Member("requirement", ToString(f.what));
      j.Member("asked", f.asked);
      j.Member("reached", f.reached);
      j.Member("scan_theta_deg", f.scan_theta_deg);
      j.Member("scan_plane", PlaneName(f.scan_plane));
      j.Member("bound_by", ToString(f.bound_by));
      j.EndObject();
    }
    j.EndArray();
  };
  j.Key("candidates");
  j.BeginArray();
  for (std::size_t i = 0; i < res.candidates.size(); ++i) {
    const SizingCandidate& c = res.candidates[i];
    j.BeginObject();
    j.MemberInt("rank", static_cast<long long>(i + 1));
    if (!folder.empty())
      j.Member("file", (std::filesystem::path(folder) / CandidateFileName(i + 1)).string());
    j.Member("lattice", ToString(c.lattice));
    j.Key("count");
    j.BeginArray();
    j.Int(c.count_x);
    j.Int(c.count_y);
    j.EndArray();
    j.MemberInt("elements", static_cast<long long>(c.elements()));
    if (r.circular) {  // "elements" are sites
      j.MemberInt("dipoles_per_site", c.dipoles_per_site);
      j.MemberInt("dipoles", static_cast<long long>(c.dipoles()));
    }
    pair("spacing_m", c.spacing_x_m, c.spacing_y_m);
    pair("largest_spacing_m", c.largest_spacing_x_m, c.largest_spacing_y_m);
    j.Key("taper");
    j.BeginObject();
    j.Member("kind", ToString(c.taper.kind));
    j.Member("sidelobe_db", c.taper.sidelobe_db);
    if (c.taper.kind == TaperKind::kTaylor || c.taper.kind == TaperKind::kCircularTaylor)
      j.MemberInt("nbar", c.taper.nbar);
    j.EndObject();
    j.Member("taper_efficiency", c.taper_efficiency);
    j.Member("grating_margin", c.grating_margin);
    j.Key("predicted");
    j.BeginObject();
    j.Member("directivity_dbi", c.directivity_dbi);
    j.Member("scan_directivity_xz_dbi", c.scan_directivity_xz_dbi);
    j.Member("scan_directivity_yz_dbi", c.scan_directivity_yz_dbi);
    j.Member("beamwidth_xz_deg", c.beamwidth_xz_deg);
    j.Member("beamwidth_yz_deg", c.beamwidth_yz_deg);
    j.Member("sidelobe_db", c.sidelobe_db);
    j.Member("sidelobe_broadside_db", c.sidelobe_broadside_db);
    j.Member("sidelobe_scan_xz_db", c.sidelobe_scan_xz_db);
    j.Member("sidelobe_scan_yz_db", c.sidelobe_scan_yz_db);
    if (r.circular) {
      j.Member("axial_ratio_scan_xz_db", c.axial_ratio_scan_xz_db);
      j.Member("axial_ratio_scan_yz_db", c.axial_ratio_scan_yz_db);
    }
    j.EndObject();
    j.Key("computed");
    j.BeginArray();
    for (const ComputedBeam& b : c.computed) {
      j.BeginObject();
      j.Member("steer_theta_deg", b.steer_theta_deg);
      j.Member("steer_phi_deg", b.steer_phi_deg);
      j.Member("peak_dbi", b.peak_dbi);
      j.Member("peak_theta_deg", b.peak_theta_deg);
      j.Member("peak_phi_deg", b.peak_phi_deg);
      if (b.steer_theta_deg == 0) {
        j.Member("beamwidth_xz_deg", b.beamwidth_xz_deg);
        j.Member("beamwidth_yz_deg", b.beamwidth_yz_deg);
      }
      j.Member("sidelobe_db", b.sidelobe_db);
      j.MemberInt("grating_lobes", b.grating_lobes);
      j.Member("grid_step_deg", b.grid_step_deg);
      if (r.circular) {
        j.Member("axial_ratio_db", b.axial_ratio_db);
        j.MemberInt("sense", b.sense);
      }
      j.EndObject();
    }
    j.EndArray();
    j.MemberBool("checked", c.checked);
    j.MemberBool("meets", c.meets);
    j.MemberInt("rounds", c.rounds);
    shortfalls("predicted_shortfalls", c.predicted_shortfalls);
    shortfalls("shortfalls", c.shortfalls);
    j.EndObject();
  }
  j.EndArray();
  shortfalls("binding", res.binding);
  j.Member("seconds", res.seconds);
  j.EndObject();
  return j.text();
}

}  // namespace lobecast::text
