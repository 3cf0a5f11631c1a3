#include "engine/sizing/sizing.h"
#include "engine/decibels.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <limits>

#include "engine/analysis/pattern_analysis.h"
#include "engine/check.h"
#include "engine/constants.h"
#include "engine/error.h"
#include "engine/pattern.h"
#include "engine/sizing/grating_free.h"
#include "engine/synthesis/crossed_pair.h"
#include "engine/synthesis/steering.h"
#include "engine/text_case.h"

namespace lobecast {

std::string_view ToString(Requirement r) {
  switch (r) {
    case Requirement::kDirectivity:
      return "directivity";
    case Requirement::kBeamwidthXZ:
      return "beamwidth_xz";
    case Requirement::kBeamwidthYZ:
      return "beamwidth_yz";
    case Requirement::kSidelobes:
      return "sidelobes";
    case Requirement::kGratingLobes:
      return "grating_lobes";
    case Requirement::kAxialRatio:
      break;
  }
  return "axial_ratio";
}

std::string_view ToString(Constraint c) {
  switch (c) {
    case Constraint::kNone:
      return "none";
    case Constraint::kMaxElements:
      return "max_elements";
    case Constraint::kMaxApertureX:
      return "max_aperture_x";
    case Constraint::kMaxApertureY:
      return "max_aperture_y";
    case Constraint::kTaper:
      return "taper";
    case Constraint::kElement:
      break;
  }
  return "element";
}

namespace {

constexpr double kSidelobeGuardDb = 0.3;  // design below the requirement by this much
constexpr double kLowestTaperDb = -80;

// x rounded down to `digits` significant digits, as the double a reader of that
// decimal text gets (the design file writes it so).
double FloorSignificant(double x, int digits) {
  const int e = static_cast<int>(std::floor(std::log10(x))) - (digits - 1);
  const double k = std::floor(x / std::pow(10.0, e) * (1 + 1e-12));
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.0fe%d", k, e);
  return std::strtod(buf, nullptr);
}

// Taylor's rule for a taper that falls monotonically to the edge: nbar >= 2 A^2 + 1/2,
// A = acosh(R) / pi (R. C. Hansen, Phased Array Antennas, 2nd ed., ch. 3, from memory).
int NbarFor(double sidelobe_db) {
  const double a = std::acosh(std::pow(10.0, -sidelobe_db / 20)) / kPi;
  return std::max(3, static_cast<int>(std::ceil(2 * a * a + 0.5)));
}

struct Adjust {
  double design_sll = 0;
  double area_factor = 1;  // directivity asked of the formula, re the requirement
  int nx_min = 2, ny_min = 2;
  double extra_guard = 0;  // sine space, added to the first-null guard
};

struct Sized {
  SizingCandidate c;
  Constraint capped_x = Constraint::kNone, capped_y = Constraint::kNone;
  bool elements_capped = false;
};

LatticeSpec Lattice(const SizingRequirements& req, LatticeKind kind, int nx, int ny, double dx_m,
                    double dy_m) {
  LatticeSpec spec;
  spec.kind = kind;
  spec.count_x = nx;
  spec.count_y = ny;
  spec.spacing_x_m = dx_m;
  spec.spacing_y_m = dy_m;
  if (req.ground == Ground::kPec) spec.center_m = Vec3(0, 0, req.ground_height_m);
  return spec;
}

// The panel's amplitudes (LatticeTaper) and their projections.
struct Panel {
  PanelModel model;
  double efficiency = 1;
};

Panel MakePanel(const SizingRequirements& req, LatticeKind kind, const TaperSpec& t, int nx, int ny,
                double dx, double dy) {
  const double lambda = req.wavelength_m();
  const LatticeSpec spec = Lattice(req, kind, nx, ny, dx * lambda, dy * lambda);
  const std::vector<LatticeSite> sites = GenerateLattice(spec);
  const std::vector<double> a = LatticeTaper(t, spec, sites);
  Panel p;
  p.model = ProjectPanel(sites, a, lambda);
  p.model.orientation = req.polarization;
  p.model.crossed = req.circular.has_value();
  p.model.pec = req.ground == Ground::kPec;
  p.model.height = req.ground_height_m / lambda;
  p.efficiency = TaperEfficiency(a);
  return p;
}

// The cut step for an aperture of n d wavelengths: a fortieth of the beam.
double CutStep(int n, double d) { return std::min(0.1, 50.0 / (n * d) / 40.0); }

// The smallest count along one axis whose predicted broadside beamwidth meets `bw`.
int CountForBeamwidth(const SizingRequirements& req, LatticeKind kind, const TaperSpec& t,
                      ScanPlane plane, double d, int other, double other_d, double bw) {
  const auto width = [&](int n) {
    const Panel p = plane == ScanPlane::kXZ ? MakePanel(req, kind, t, n, other, d, other_d)
                                            : MakePanel(req, kind, t, other, n, other_d, d);
    return PredictCut(p.model, plane, 0, CutStep(n, d)).half_power_width_deg;
  };
  // Uniform estimate 50.8 deg / (N d), then up by the ratio, then down while it holds.
  int n = std::max(2, static_cast<int>(std::floor(50.8 / (d * bw))));
  for (int i = 0; i < 30 && !(width(n) <= bw); ++i)
    n = std::max(n + 1, static_cast<int>(std::ceil(n * std::min(width(n) / bw, 2.0))));
  while (n > 2 && width(n - 1) <= bw) --n;
  return n;
}

Sized SizeOnce(const SizingRequirements& req, LatticeKind kind, TaperKind taper_kind,
               const Adjust& adj) {
  const double lambda = req.wavelength_m();
  const ScanRegion region{std::sin(req.scan_xz_deg * kDegree), std::sin(req.scan_yz_deg * kDegree)};
  const double k_ground = req.ground == Ground::kPec ? 4 * kPi : 2 * kPi;
  const double target_sll = req.sidelobe_db - kSidelobeGuardDb;
  Sized s;
  SizingCandidate& c = s.c;
  c.lattice = kind;
  double design_sll = adj.design_sll;
  double guard = 0, eta = 1;
  int nx = 0, ny = 0;
  double dx = 0, dy = 0;
  TaperSpec t;
  Panel panel;
  for (int it = 0; it < 80; ++it) {
    const LatticeSpacing sp = LargestSpacing(kind, region, guard + adj.extra_guard);
    const double ndx = FloorSignificant(sp.dx * lambda, 4) / lambda;
    const double ndy = FloorSignificant(sp.dy * lambda, 4) / lambda;
    t = TaperSpec{};
    t.kind = taper_kind;
    t.sidelobe_db = design_sll;
    t.nbar = NbarFor(design_sll);

    // Counts for the directivity: a square aperture unless max_aperture bounds a side.
    const double cap_x =
        req.max_aperture_x_m ? std::floor(*req.max_aperture_x_m / (ndx * lambda) + 1e-9) + 1 : 1e9;
    const double cap_y =
        req.max_aperture_y_m ? std::floor(*req.max_aperture_y_m / (ndy * lambda) + 1e-9) + 1 : 1e9;
    int nnx = adj.nx_min, nny = adj.ny_min;
    if (req.directivity_dbi) {
      const double area = std::pow(10.0, *req.directivity_dbi / 10) * adj.area_factor /
                          (k_ground * eta);  // wavelengths^2
      double cx = std::min(std::ceil(std::sqrt(area) / ndx - 1e-9), cap_x);
      if (std::ceil(area / (cx * ndx * ndy) - 1e-9) > cap_y)
        cx = std::min(cap_x, std::ceil(area / (cap_y * ndx * ndy) - 1e-9));
      nnx = std::max(nnx, static_cast<int>(cx));
      nny = std::max(nny, static_cast<int>(std::ceil(area / (cx * ndx * ndy) - 1e-9)));
    }
    if (req.beamwidth_xz_deg)
      nnx = std::max(nnx, CountForBeamwidth(req, kind, t, ScanPlane::kXZ, ndx, std::max(nny, 2),
                                            ndy, *req.beamwidth_xz_deg));
    if (req.beamwidth_yz_deg)
      nny = std::max(nny, CountForBeamwidth(req, kind, t, ScanPlane::kYZ, ndy, std::max(nnx, 2),
                                            ndx, *req.beamwidth_yz_deg));
    s.capped_x = s.capped_y = Constraint::kNone;
    if (nnx > cap_x) nnx = static_cast<int>(cap_x), s.capped_x = Constraint::kMaxApertureX;
    if (nny > cap_y) nny = static_cast<int>(cap_y), s.capped_y = Constraint::kMaxApertureY;
    nnx = std::max(nnx, 2);
    nny = std::max(nny, 2);
    s.elements_capped = false;
    if (req.max_elements && double(nnx) * nny > static_cast<double>(*req.max_elements)) {
      const double f = std::sqrt(static_cast<double>(*req.max_elements) / (double(nnx) * nny));
      nnx = std::max(2, static_cast<int>(std::floor(nnx * f)));
      nny = std::max(2, static_cast<int>(std::floor(nny * f)));
      while ((nnx + 1.0) * nny <= *req.max_elements && nnx < cap_x && nnx * ndx <= nny * ndy) ++nnx;
      while (nnx * (nny + 1.0) <= *req.max_elements && nny < cap_y) ++nny;
      s.elements_capped = true;
    }

    panel = MakePanel(req, kind, t, nnx, nny, ndx, ndy);
    eta = panel.efficiency;
    const bool same = nnx == nx && nny == ny && ndx == dx && ndy == dy;
    nx = nnx, ny = nny, dx = ndx, dy = ndy;
    // First the guard: the nearest grating lobe kept out to its first null.
    const double w = std::max(FirstNullSine(panel.model.x), FirstNullSine(panel.model.y));
    if (w > guard + 1e-9) {
      guard = w;
      continue;
    }

    // Predicted side lobes: broadside and the scan edges, both principal planes.
    const double step = std::min(CutStep(nx, dx), CutStep(ny, dy));
    const double none = -std::numeric_limits<double>::infinity();
    const PanelModel& m = panel.model;
    c.sidelobe_broadside_db = std::max(PredictCut(m, ScanPlane::kXZ, 0, step).sidelobe_db,
                                       PredictCut(m, ScanPlane::kYZ, 0, step).sidelobe_db);
    c.sidelobe_scan_xz_db = req.scan_xz_deg > 0
                                ? PredictCut(m, ScanPlane::kXZ, req.scan_xz_deg, step).sidelobe_db
                                : none;
    c.sidelobe_scan_yz_db = req.scan_yz_deg > 0
                                ? PredictCut(m, ScanPlane::kYZ, req.scan_yz_deg, step).sidelobe_db
                                : none;
    const double worst =
        std::max({c.sidelobe_broadside_db, c.sidelobe_scan_xz_db, c.sidelobe_scan_yz_db});
    c.sidelobe_db = worst;
    if (worst > target_sll && design_sll > kLowestTaperDb) {
      // To 0.01 dB (k / 100 is the double the written decimal reads back as).
      design_sll = std::max(kLowestTaperDb,
                            std::floor((design_sll - (worst - target_sll) - 0.05) * 100) / 100);
      continue;
    }
    if (same) break;
  }

  c.count_x = nx;
  c.count_y = ny;
  c.spacing_x_m = dx * lambda;
  c.spacing_y_m = dy * lambda;
  const LatticeSpacing sp0 = LargestSpacing(kind, region, 0);
  c.largest_spacing_x_m = sp0.dx * lambda;
  c.largest_spacing_y_m = sp0.dy * lambda;
  c.taper = t;
  c.taper_efficiency = eta;
  const double d_lin = k_ground * nx * ny * dx * dy * eta;
  c.directivity_dbi = ToDb(d_lin);
  c.scan_directivity_xz_dbi = ToDb(d_lin * std::cos(req.scan_xz_deg * kDegree));
  c.scan_directivity_yz_dbi = ToDb(d_lin * std::cos(req.scan_yz_deg * kDegree));
  c.beamwidth_xz_deg =
      PredictCut(panel.model, ScanPlane::kXZ, 0, CutStep(nx, dx)).half_power_width_deg;
  c.beamwidth_yz_deg =
      PredictCut(panel.model, ScanPlane::kYZ, 0, CutStep(ny, dy)).half_power_width_deg;
  c.grating_margin = GratingLobeMargin(kind, dx, dy, region);
  if (req.circular) {
    c.dipoles_per_site = 2;
    // At the predicted peak of the scanned cut (the element and ground factors pull
    // it toward broadside).
    const auto ar = [&](ScanPlane p, double scan_deg, int n, double d) {
      return scan_deg > 0 ? CrossedPairAxialRatioDb(
                                PredictCut(panel.model, p, scan_deg, CutStep(n, d)).peak_deg)
                          : 0.0;
    };
    c.axial_ratio_scan_xz_db = ar(ScanPlane::kXZ, req.scan_xz_deg, nx, dx);
    c.axial_ratio_scan_yz_db = ar(ScanPlane::kYZ, req.scan_yz_deg, ny, dy);
  }

  const Constraint count_cap = s.elements_capped                 ? Constraint::kMaxElements
                               : s.capped_x != Constraint::kNone ? s.capped_x
                                                                 : s.capped_y;
  auto& miss = c.predicted_shortfalls;
  if (req.directivity_dbi && c.directivity_dbi < *req.directivity_dbi)
    miss.push_back({Requirement::kDirectivity, *req.directivity_dbi, c.directivity_dbi, 0,
                    ScanPlane::kXZ, count_cap});
  if (req.beamwidth_xz_deg && !(c.beamwidth_xz_deg <= *req.beamwidth_xz_deg))
    miss.push_back({Requirement::kBeamwidthXZ, *req.beamwidth_xz_deg, c.beamwidth_xz_deg, 0,
                    ScanPlane::kXZ, s.elements_capped ? Constraint::kMaxElements : s.capped_x});
  if (req.beamwidth_yz_deg && !(c.beamwidth_yz_deg <= *req.beamwidth_yz_deg))
    miss.push_back({Requirement::kBeamwidthYZ, *req.beamwidth_yz_deg, c.beamwidth_yz_deg, 0,
                    ScanPlane::kYZ, s.elements_capped ? Constraint::kMaxElements : s.capped_y});
  if (c.sidelobe_db > req.sidelobe_db) {
    // Named at the beam state of the worst predicted cut.
    Shortfall f{Requirement::kSidelobes, req.sidelobe_db,   c.sidelobe_db, 0,
                ScanPlane::kXZ,          Constraint::kTaper};
    if (c.sidelobe_scan_xz_db == c.sidelobe_db) f.scan_theta_deg = req.scan_xz_deg;
    if (c.sidelobe_scan_yz_db == c.sidelobe_db)
      f.scan_theta_deg = req.scan_yz_deg, f.scan_plane = ScanPlane::kYZ;
    miss.push_back(f);
  }
  if (req.circular) {
    for (ScanPlane p : {ScanPlane::kXZ, ScanPlane::kYZ}) {
      const bool xz = p == ScanPlane::kXZ;
      const double ar = xz ? c.axial_ratio_scan_xz_db : c.axial_ratio_scan_yz_db;
      if (ar > req.max_axial_ratio_db)
        miss.push_back({Requirement::kAxialRatio, req.max_axial_ratio_db, ar,
                        xz ? req.scan_xz_deg : req.scan_yz_deg, p, Constraint::kElement});
    }
  }
  return s;
}

bool Better(const SizingCandidate& a, const SizingCandidate& b) {
  const bool ma = a.checked ? a.meets : a.predicted_shortfalls.empty();
  const bool mb = b.checked ? b.meets : b.predicted_shortfalls.empty();
  if (ma != mb) return ma;
  if (!ma) {
    const std::size_t sa = a.shortfalls.size() + a.predicted_shortfalls.size();
    const std::size_t sb = b.shortfalls.size() + b.predicted_shortfalls.size();
    if (sa != sb) return sa < sb;
  }
  if (a.elements() != b.elements()) return a.elements() < b.elements();
  return a.grating_margin > b.grating_margin;
}

}  // namespace

CandidateArray BuildCandidateArray(const SizingRequirements& req, const SizingCandidate& c) {
  const LatticeSpec spec =
      Lattice(req, c.lattice, c.count_x, c.count_y, c.spacing_x_m, c.spacing_y_m);
  const std::vector<LatticeSite> sites = GenerateLattice(spec);
  const std::vector<double> a = LatticeTaper(c.taper, spec, sites);
  CandidateArray out;
  out.array.frequency_hz = req.frequency_hz;
  out.array.ground = req.ground;
  // One dipole per site, or a crossed pair as the design reader generates it: the
  // second dipole's phase wrapped in degrees, then turned back to radians (the
  // written file's bits).
  std::vector<std::pair<Vec3, double>> per_site{{req.polarization, 0.0}};
  if (req.circular) {
    const CrossedPair pair = CrossedPairFor(spec, req.polarization, Vec3::UnitZ(), *req.circular);
    per_site.emplace_back(pair.second, WrappedDegrees(pair.second_phase_deg * kDegree));
  }
  out.currents.resize(static_cast<Eigen::Index>(per_site.size() * sites.size()));
  Eigen::Index i = 0;
  for (std::size_t n = 0; n < sites.size(); ++n) {
    for (const auto& [orientation, phase_deg] : per_site) {
      Dipole d;
      d.position_m = sites[n].position_m;
      d.orientation = orientation;
      d.length_m = req.element_length_m;
      out.array.dipoles.push_back(d);
      out.currents[i++] = std::polar(a[n], phase_deg * kDegree);
    }
  }
  return out;
}

double CheckGridStepDeg(const SizingCandidate& c) {
  const double narrowest = std::min(c.beamwidth_xz_deg, c.beamwidth_yz_deg);
  for (double step : {1.0, 0.5, 0.25, 0.2})
    if (step <= narrowest / 5) return step;
  return 0.1;
}

AngularGrid CheckGrid(const SizingRequirements& req, const SizingCandidate& c) {
  const double step = CheckGridStepDeg(c);
  return AngularGrid::FromRanges({0, req.ground == Ground::kPec ? 90.0 : 180.0, step},
                                 {0, 360, step});
}

void CheckCandidate(const SizingRequirements& req, SizingCandidate& c, int threads) {
  const CandidateArray ca = BuildCandidateArray(req, c);
  const AngularGrid grid = CheckGrid(req, c);
  struct State {
    double theta, phi;
    ScanPlane plane;
  };
  std::vector<State> states{{0, 0, ScanPlane::kXZ}};
  if (req.scan_xz_deg > 0) states.push_back({req.scan_xz_deg, 0, ScanPlane::kXZ});
  if (req.scan_yz_deg > 0) states.push_back({req.scan_yz_deg, 90, ScanPlane::kYZ});
  c.computed.clear();
  c.shortfalls.clear();
  PatternOptions po;
  po.field.num_threads = threads;
  AnalysisOptions ao;
  ao.max_nulls = 0;
  ao.null_threshold_db = -300;
  ao.side_lobe_threshold_db = -3;  // listed: lobes within 3 dB of the peak (grating lobes)
  ao.max_side_lobes = 8;
  ao.axial_ratio_phi_planes = 4;
  ao.axial_ratio_theta_step_deg = 10;
  ao.beam_rays = 4;
  ao.beam_ray_samples = 1;
  for (const State& st : states) {
    Eigen::VectorXcd currents = ca.currents;
    if (st.theta > 0)
      currents =
          currents.cwiseProduct(SteeringPhasors(ca.array, st.theta * kDegree, st.phi * kDegree));
    const PatternResult r = ComputePattern(ca.array, currents, grid, po);
    const PatternAnalysis a = AnalyzePattern(ca.array, currents, r, ao);
    ComputedBeam b;
    b.steer_theta_deg = st.theta;
    b.steer_phi_deg = st.phi;
    b.plane = st.plane;
    b.grid_step_deg = grid.theta_deg.size() > 1 ? grid.theta_deg[1] - grid.theta_deg[0] : 0;
    b.peak_dbi = a.peak.directivity_dbi;
    b.peak_theta_deg = a.peak.direction.theta_deg;
    b.peak_phi_deg = a.peak.direction.phi_deg;
    b.sidelobe_db = a.highest_side_lobe ? a.highest_side_lobe->level_db
                                        : -std::numeric_limits<double>::infinity();
    for (const BeamCut* cut : {&a.elevation_cut, &a.orthogonal_cut}) {
      const double p = std::fmod(cut->plane_phi_deg + 360.0, 180.0);
      if (std::abs(p) < 1e-6 || std::abs(p - 180) < 1e-6)
        b.beamwidth_xz_deg = cut->half_power_width_deg;
      else if (std::abs(p - 90) < 1e-6)
        b.beamwidth_yz_deg = cut->half_power_width_deg;
    }
    // Other major lobes and lobes within 3 dB of the peak, less the free-space mirror
    // beam (the panel's pattern is symmetric about its plane).
    const Vec3 peak = UnitVectorAt(b.peak_theta_deg * kDegree,
                                   std::isnan(b.peak_phi_deg) ? 0.0 : b.peak_phi_deg * kDegree);
    const Vec3 mirror(peak.x(), peak.y(), -peak.z());
    const auto is_mirror = [&](const Lobe& l) {
      const Vec3 d =
          UnitVectorAt(l.direction.theta_deg * kDegree,
                       std::isnan(l.direction.phi_deg) ? 0.0 : l.direction.phi_deg * kDegree);
      return req.ground == Ground::kNone && (d - mirror).norm() < 0.02;
    };
    for (const Lobe& l : a.major_lobes) b.grating_lobes += is_mirror(l) ? 0 : 1;
    for (const Lobe& l : a.side_lobes) b.grating_lobes += is_mirror(l) ? 0 : 1;
    b.axial_ratio_db = a.polarization.axial_ratio_at_peak_db;
    b.sense = a.polarization.sense_at_peak;
    c.computed.push_back(b);

    const auto bound = [&](Requirement what) {
      for (const Shortfall& s : c.predicted_shortfalls)
        if (s.what == what) return s.bound_by;
      return Constraint::kNone;
    };
    if (st.theta == 0) {
      if (req.directivity_dbi && b.peak_dbi < *req.directivity_dbi)
        c.shortfalls.push_back({Requirement::kDirectivity, *req.directivity_dbi, b.peak_dbi, 0,
                                ScanPlane::kXZ, bound(Requirement::kDirectivity)});
      if (req.beamwidth_xz_deg && !(b.beamwidth_xz_deg <= *req.beamwidth_xz_deg))
        c.shortfalls.push_back({Requirement::kBeamwidthXZ, *req.beamwidth_xz_deg,
                                b.beamwidth_xz_deg, 0, ScanPlane::kXZ,
                                bound(Requirement::kBeamwidthXZ)});
      if (req.beamwidth_yz_deg && !(b.beamwidth_yz_deg <= *req.beamwidth_yz_deg))
        c.shortfalls.push_back({Requirement::kBeamwidthYZ, *req.beamwidth_yz_deg,
                                b.beamwidth_yz_deg, 0, ScanPlane::kYZ,
                                bound(Requirement::kBeamwidthYZ)});
    }
    if (b.sidelobe_db > req.sidelobe_db)
      c.shortfalls.push_back({Requirement::kSidelobes, req.sidelobe_db, b.sidelobe_db, st.theta,
                              st.plane, bound(Requirement::kSidelobes)});
    if (b.grating_lobes > 0)
      c.shortfalls.push_back({Requirement::kGratingLobes, 0, double(b.grating_lobes), st.theta,
                              st.plane, Constraint::kNone});
    if (req.circular) {
      // A field of the other hand (or linear) misses however small its axial ratio.
      const int asked = *req.circular == CircularSense::kRight ? 1 : -1;
      const double ar =
          b.sense == asked ? b.axial_ratio_db : std::numeric_limits<double>::infinity();
      if (!(ar <= req.max_axial_ratio_db))
        c.shortfalls.push_back({Requirement::kAxialRatio, req.max_axial_ratio_db, ar, st.theta,
                                st.plane, Constraint::kElement});
    }
  }
  c.checked = true;
  c.meets = c.shortfalls.empty();
}

SizingResult SizeArray(const SizingRequirements& req, const SizingOptions& options) {
  Validate(req);
  const auto start = std::chrono::steady_clock::now();
  SizingResult out;
  std::vector<LatticeKind> kinds;
  if (req.lattice != LatticeChoice::kTriangular) kinds.push_back(LatticeKind::kRectangular);
  if (req.lattice != LatticeChoice::kRectangular) kinds.push_back(LatticeKind::kTriangular);
  for (LatticeKind kind : kinds) {
    // Separable tapers index the rows and columns; on a triangular lattice, whose odd
    // rows are shifted by half a pitch, that shifts the odd rows' whole aperture and
    // leaves lobes near (u0, v0 +- 1 / (2 dy)) falling only as 1/N. Its taper is sampled
    // at the elements' own positions (circular Taylor) instead.
    const std::vector<TaperKind> tapers =
        kind == LatticeKind::kRectangular
            ? std::vector<TaperKind>{TaperKind::kTaylor, TaperKind::kChebyshev,
                                     TaperKind::kCircularTaylor}
            : std::vector<TaperKind>{TaperKind::kCircularTaylor};
    for (TaperKind taper : tapers) {
      Adjust adj;
      adj.design_sll = std::floor((req.sidelobe_db - kSidelobeGuardDb) * 100) / 100;
      SizingCandidate c;
      for (int round = 0; round < std::max(1, options.max_rounds); ++round) {
        const Sized s = SizeOnce(req, kind, taper, adj);
        c = s.c;
        c.rounds = round + 1;
        if (!options.check) break;
        CheckCandidate(req, c, options.threads);
        if (c.meets) break;
        // The element sets the axial ratio: sizing again cannot help it.
        bool resizable = false;
        for (const Shortfall& f : c.shortfalls) resizable |= f.what != Requirement::kAxialRatio;
        if (!resizable) break;
        bool capped = false;
        for (const Shortfall& f : c.predicted_shortfalls) capped |= f.bound_by != Constraint::kNone;
        if (capped) break;
        // Raise what missed by the shortfall, and size again.
        for (const Shortfall& f : c.shortfalls) {
          switch (f.what) {
            case Requirement::kDirectivity:
              adj.area_factor *= std::pow(10.0, (f.asked - f.reached + 0.02) / 10);
              break;
            case Requirement::kBeamwidthXZ:
              adj.nx_min =
                  std::max(adj.nx_min,
                           c.count_x + 1 + static_cast<int>(c.count_x * (f.reached / f.asked - 1)));
              break;
            case Requirement::kBeamwidthYZ:
              adj.ny_min =
                  std::max(adj.ny_min,
                           c.count_y + 1 + static_cast<int>(c.count_y * (f.reached / f.asked - 1)));
              break;
            case Requirement::kSidelobes:
              adj.design_sll = std::min(
                  adj.design_sll,
                  std::floor((c.taper.sidelobe_db - (f.reached - f.asked) - 0.2) * 100) / 100);
              break;
            case Requirement::kGratingLobes:
              adj.extra_guard += 0.05;
              break;
            case Requirement::kAxialRatio:
              break;
          }
        }
      }
      out.candidates.push_back(c);
    }
  }
  LOBECAST_CHECK_LE(out.candidates.size(), kMaxSizingCandidates);
  std::stable_sort(out.candidates.begin(), out.candidates.end(), Better);
  const SizingCandidate& best = out.candidates.front();
  const bool best_meets = best.checked ? best.meets : best.predicted_shortfalls.empty();
  if (!best_meets) {
    out.binding = best.predicted_shortfalls;
    for (const Shortfall& s : best.shortfalls) {
      bool seen = false;
      for (const Shortfall& p : out.binding) seen |= p.what == s.what;
      if (!seen) out.binding.push_back(s);
    }
  }
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return out;
}

}  // namespace lobecast
