// Sizing (engine/sizing): grating-lobe-free spacing against the lattice conditions
// and against a brute-force search of computed patterns, the large-array
// directivity estimate, and every sized candidate's computed figures against its
// requirements; the candidate design files read back to the array that was checked.
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <string>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/pattern.h"
#include "engine/sizing/grating_free.h"
#include "engine/sizing/sizing.h"
#include "engine/synthesis/steering.h"
#include "engine/synthesis/taper.h"
#include "io/input/array_reader.h"
#include "io/input/requirements_reader.h"
#include "io/text/sizing_text.h"

namespace lobecast {
namespace {

// Mailloux, Phased Array Antenna Handbook, 2nd ed., 2005, ch. 2 (from memory): a
// rectangular lattice scanned to theta_s in every azimuth is free of grating lobes for
// d <= lambda / (1 + sin theta_s) along both axes; the equilateral triangular lattice
// for row pitch dy <= lambda / (1 + sin theta_s) with dx = 2 dy / sqrt(3) along the rows
// (its six nearest grating lobes at equal distance 1 / dy in sine space).
TEST(GratingFree, LargestSpacingMatchesTheLatticeConditions) {
  for (double scan_deg : {0.0, 20.0, 30.0, 45.0, 60.0}) {
    const double s = std::sin(scan_deg * kDegree);
    const ScanRegion region{s, s};
    const LatticeSpacing r = LargestSpacing(LatticeKind::kRectangular, region, 0);
    EXPECT_NEAR(r.dx, 1 / (1 + s), 1e-12) << scan_deg;
    EXPECT_NEAR(r.dy, 1 / (1 + s), 1e-12) << scan_deg;
    const LatticeSpacing t = LargestSpacing(LatticeKind::kTriangular, region, 0);
    EXPECT_NEAR(t.dy, 1 / (1 + s), 1e-6) << scan_deg;
    EXPECT_NEAR(t.dx, 2 / (std::sqrt(3.0) * (1 + s)), 1e-6) << scan_deg;
    // At the condition the nearest lobe is on the edge of visible space.
    EXPECT_NEAR(GratingLobeMargin(LatticeKind::kRectangular, r.dx, r.dy, region), 0, 1e-9);
    EXPECT_NEAR(GratingLobeMargin(LatticeKind::kTriangular, t.dx, t.dy, region), 0, 1e-6);
    // The triangular lattice needs 2 / sqrt(3) fewer elements per area (Mailloux, ch. 2,
    // from memory: about 13.4 % fewer).
    EXPECT_NEAR(t.dx * t.dy / (r.dx * r.dy), 2 / std::sqrt(3.0), 1e-5);
  }
  // Per-plane scan: the rectangular condition holds axis by axis.
  const ScanRegion wide{std::sin(50 * kDegree), std::sin(10 * kDegree)};
  const LatticeSpacing r = LargestSpacing(LatticeKind::kRectangular, wide, 0);
  EXPECT_NEAR(r.dx, 1 / (1 + wide.sin_xz), 1e-12);
  EXPECT_NEAR(r.dy, 1 / (1 + wide.sin_yz), 1e-12);
  EXPECT_GE(GratingLobeMargin(LatticeKind::kTriangular,
                              LargestSpacing(LatticeKind::kTriangular, wide, 0).dx,
                              LargestSpacing(LatticeKind::kTriangular, wide, 0).dy, wide),
            -1e-9);
}

// The brute-force check: a 24 x 24 panel of z dipoles (element pattern sin theta, full
// at the horizon where grating lobes enter) steered to the worst direction of the scan
// cone, its pattern computed by the engine on a 0.25 deg grid of the upper hemisphere.
// The array factor's largest value away from the main beam (the computed directivity
// over the element factor sin^2 theta, re the same at the beam) is a grating lobe when
// it comes within 1 dB of the beam: 5 % inside the lattice condition none is, 5 %
// outside one is.
double HighestOtherLobeDb(LatticeKind kind, double dx, double dy, double theta_s, double phi_s) {
  LatticeSpec spec;
  spec.kind = kind;
  spec.count_x = spec.count_y = 24;
  Array a;
  a.frequency_hz = 1e9;
  const double lambda = a.wavelength_m();
  spec.spacing_x_m = dx * lambda;
  spec.spacing_y_m = dy * lambda;
  for (const LatticeSite& s : GenerateLattice(spec)) {
    Dipole d;
    d.position_m = s.position_m;
    d.orientation = Vec3::UnitZ();
    d.length_m = 0.05 * lambda;
    a.dipoles.push_back(d);
  }
  const Eigen::VectorXcd i = SteeringPhasors(a, theta_s, phi_s);
  const AngularGrid grid = AngularGrid::FromRanges({0.25, 90, 0.25}, {0, 360, 0.25});
  const PatternResult r = ComputePattern(a, i, grid);
  const Vec3 beam = UnitVectorAt(theta_s, phi_s);
  double beam_af = 0, other = 0;
  for (std::size_t t = 0; t < grid.theta_deg.size(); ++t) {
    for (std::size_t p = 0; p < grid.phi_deg.size(); ++p) {
      const double th = grid.theta_deg[t] * kDegree, ph = grid.phi_deg[p] * kDegree;
      const double af = r.directivity[static_cast<Eigen::Index>(t * grid.phi_deg.size() + p)] /
                        std::pow(std::sin(th), 2);
      double& into = (UnitVectorAt(th, ph) - beam).norm() < 0.3 ? beam_af : other;
      into = std::max(into, af);
    }
  }
  return 10 * std::log10(other / beam_af);
}

TEST(GratingFree, BruteForceSearchOfComputedPatternsAgrees) {
  const double theta_s = 45 * kDegree;
  const double s = std::sin(theta_s);
  const ScanRegion region{s, s};
  struct Case {
    LatticeKind kind;
    double phi_s;  // toward the nearest reciprocal vector: the worst scan azimuth
  };
  for (const Case& k : {Case{LatticeKind::kRectangular, 0.0}, Case{LatticeKind::kTriangular, 90.0},
                        Case{LatticeKind::kTriangular, 30.0}}) {
    const LatticeSpacing d = LargestSpacing(k.kind, region, 0);
    const double inside =
        HighestOtherLobeDb(k.kind, 0.95 * d.dx, 0.95 * d.dy, theta_s, k.phi_s * kDegree);
    const double outside =
        HighestOtherLobeDb(k.kind, 1.05 * d.dx, 1.05 * d.dy, theta_s, k.phi_s * kDegree);
    std::printf(
        "%s, scan 45 deg at phi %g: highest other lobe %.2f dB at 0.95 of the spacing, "
        "%.2f dB at 1.05\n",
        std::string(ToString(k.kind)).c_str(), k.phi_s, inside, outside);
    EXPECT_LT(inside, -1.0) << ToString(k.kind) << " phi " << k.phi_s;
    EXPECT_GT(outside, -1.0) << ToString(k.kind) << " phi " << k.phi_s;
  }
}

// A large uniformly excited panel over a PEC ground: D = 4 pi A / lambda^2 cos(theta0),
// A = N dx dy (common practice; R. C. Hansen, Phased Array Antennas, 2nd ed., 2009,
// ch. 1, from memory: valid for large arrays without grating lobes), and with a taper
// reduced by the taper efficiency |sum a|^2 / (N sum a^2) computed from the
// amplitudes. A 32 x 32 panel is within 0.25 dB (its edge elements see no neighbours
// on one side; the estimate's error shrinks as the perimeter over the area).
double ComputedDirectivityDbi(TaperKind taper, double theta0_deg, Ground ground) {
  SizingRequirements req;
  req.frequency_hz = 3e9;
  req.ground = ground;
  req.ground_height_m = 0.25 * req.wavelength_m();
  req.element_length_m = 0.05 * req.wavelength_m();
  SizingCandidate c;
  c.count_x = c.count_y = 32;
  c.spacing_x_m = c.spacing_y_m = 0.5 * req.wavelength_m();
  c.taper.kind = taper;
  c.taper.sidelobe_db = -30;
  c.taper.nbar = 5;
  const CandidateArray ca = BuildCandidateArray(req, c);
  Eigen::VectorXcd i = ca.currents;
  if (theta0_deg > 0) i = i.cwiseProduct(SteeringPhasors(ca.array, theta0_deg * kDegree, 0));
  const double t0 = theta0_deg;
  const PatternResult r =
      ComputePattern(ca.array, i, AngularGrid::FromRanges({t0, t0, 1}, {0, 0, 1}));
  std::printf("32 x 32 %s, %s, theta0 %g deg: D %.3f dBi\n", std::string(ToString(taper)).c_str(),
              ground == Ground::kPec ? "pec" : "free space", theta0_deg,
              10 * std::log10(r.directivity[0]));
  return 10 * std::log10(r.directivity[0]);
}

TEST(SizingEstimate, LargeUniformPanelDirectivityIsFourPiAOverLambdaSquared) {
  const double area = 32 * 32 * 0.25;  // square wavelengths
  const double expected = 10 * std::log10(4 * kPi * area);
  EXPECT_NEAR(ComputedDirectivityDbi(TaperKind::kUniform, 0, Ground::kPec), expected, 0.25);
  EXPECT_NEAR(ComputedDirectivityDbi(TaperKind::kUniform, 30, Ground::kPec),
              expected + 10 * std::log10(std::cos(30 * kDegree)), 0.25);
  // Taylor -30 dB, nbar 5: reduced by the efficiency of its own amplitudes.
  TaperSpec t;
  t.kind = TaperKind::kTaylor;
  t.sidelobe_db = -30;
  t.nbar = 5;
  const double eta = std::pow(TaperEfficiency(LineTaper(t, 32)), 2);  // separable: x times y
  EXPECT_LT(eta, 0.85);
  EXPECT_NEAR(ComputedDirectivityDbi(TaperKind::kTaylor, 0, Ground::kPec),
              expected + 10 * std::log10(eta), 0.25);
  // Free space: the mirror beam takes half the power, 2 pi A / lambda^2.
  EXPECT_NEAR(ComputedDirectivityDbi(TaperKind::kUniform, 0, Ground::kNone),
              10 * std::log10(2 * kPi * area), 0.25);
}

// Every candidate's computed figures, read from its ComputedBeam records here (not from
// the candidate's own verdict), meet the requirements it was sized for, or it is marked.
void ExpectMetOrMarked(const SizingRequirements& req, const SizingResult& res, bool some_meet) {
  ASSERT_FALSE(res.candidates.empty());
  bool any = false;
  for (const SizingCandidate& c : res.candidates) {
    ASSERT_TRUE(c.checked);
    bool ok = true;
    int states = 0;
    for (const ComputedBeam& b : c.computed) {
      ++states;
      if (b.steer_theta_deg == 0) {
        if (req.directivity_dbi) ok &= b.peak_dbi >= *req.directivity_dbi;
        if (req.beamwidth_xz_deg) ok &= b.beamwidth_xz_deg <= *req.beamwidth_xz_deg;
        if (req.beamwidth_yz_deg) ok &= b.beamwidth_yz_deg <= *req.beamwidth_yz_deg;
      } else {
        // The beam went where it was steered, within a quarter of its width (the
        // element factor pulls a wide beam toward broadside).
        const double width = b.plane == ScanPlane::kXZ ? c.beamwidth_xz_deg : c.beamwidth_yz_deg;
        EXPECT_NEAR(b.peak_theta_deg, b.steer_theta_deg,
                    0.25 * width / std::cos(b.steer_theta_deg * kDegree));
      }
      ok &= b.sidelobe_db <= req.sidelobe_db;
      ok &= b.grating_lobes == 0;
    }
    EXPECT_EQ(states, 1 + (req.scan_xz_deg > 0) + (req.scan_yz_deg > 0));
    EXPECT_EQ(ok, c.meets) << ToString(c.lattice) << " " << ToString(c.taper.kind);
    EXPECT_EQ(c.meets, c.shortfalls.empty());
    any |= ok;
    // The grating-lobe guard: the nearest lobe stays outside visible space.
    EXPECT_GT(c.grating_margin, 0);
    if (req.max_elements) {
      EXPECT_LE(static_cast<long>(c.elements()), *req.max_elements);
    }
  }
  EXPECT_EQ(any, some_meet);
  // Ranked: those that meet first, then by element count.
  for (std::size_t i = 1; i < res.candidates.size(); ++i) {
    const SizingCandidate& a = res.candidates[i - 1];
    const SizingCandidate& b = res.candidates[i];
    EXPECT_GE(a.meets, b.meets);
    if (a.meets && b.meets) {
      EXPECT_LE(a.elements(), b.elements());
    }
  }
}

SizingRequirements Requirements(const std::string& text) {
  return ParseRequirements(text, "req.toml").requirements;
}

TEST(Sizing, SampleRequirementsAreMet) {
  const RequirementsFile rf =
      ReadRequirements(std::string(LOBECAST_SAMPLES) + "/requirements-kestrel-relay.toml");
  const SizingResult res = SizeArray(rf.requirements);
  ExpectMetOrMarked(rf.requirements, res, true);
  EXPECT_EQ(res.candidates.size(), 4u);
  EXPECT_TRUE(res.binding.empty());
}

TEST(Sizing, FreeSpaceBeamwidthsAndPerPlaneScanAreMetOrMarked) {
  const SizingRequirements req = Requirements(R"(frequency = "2.4 GHz"
beamwidth_deg = [12, 20]
sidelobe_db = -20
scan_deg = [40, 0]
polarization = "y"
lattice = "rectangular"
)");
  const SizingResult res = SizeArray(req);
  ExpectMetOrMarked(req, res, true);
  EXPECT_EQ(res.candidates.size(), 3u);  // Taylor, Dolph-Chebyshev, circular Taylor
  // A per-plane scan: the spacing along y is that of broadside (no yz scan).
  for (const SizingCandidate& c : res.candidates) EXPECT_GT(c.spacing_y_m, c.spacing_x_m);
}

TEST(Sizing, TriangularSavesElementsOverRectangular) {
  const SizingRequirements req = Requirements(R"(frequency = "10 GHz"
directivity_dbi = 24
sidelobe_db = -25
scan_deg = 45
ground = "pec"
)");
  const SizingResult res = SizeArray(req);
  ExpectMetOrMarked(req, res, true);
  std::size_t rect = 0, tri = 0;
  for (const SizingCandidate& c : res.candidates) {
    if (!c.meets) continue;
    std::size_t& n = c.lattice == LatticeKind::kRectangular ? rect : tri;
    if (n == 0 || c.elements() < n) n = c.elements();
  }
  ASSERT_GT(rect, 0u);
  ASSERT_GT(tri, 0u);
  EXPECT_LT(tri, rect);
}

TEST(Sizing, AnUnmeetableSetSaysWhatBindsAndByHowMuch) {
  const SizingRequirements req = Requirements(R"(frequency = "10 GHz"
directivity_dbi = 30
sidelobe_db = -25
scan_deg = 30
ground = "pec"
max_elements = 100
)");
  const SizingResult res = SizeArray(req);
  ExpectMetOrMarked(req, res, false);
  ASSERT_FALSE(res.binding.empty());
  const Shortfall& f = res.binding.front();
  EXPECT_EQ(f.what, Requirement::kDirectivity);
  EXPECT_EQ(f.bound_by, Constraint::kMaxElements);
  EXPECT_EQ(f.asked, 30);
  // 100 elements at about 0.67 wavelength with a -25 dB taper give about 26 dBi.
  EXPECT_LT(f.reached, 27.5);
  EXPECT_GT(f.reached, 24.5);
}

TEST(Sizing, AMaxApertureThatBindsTheBeamwidthIsNamed) {
  const SizingRequirements req = Requirements(R"(frequency = "10 GHz"
beamwidth_deg = [5, 30]
sidelobe_db = -20
ground = "pec"
lattice = "rectangular"
max_aperture = [0.1, 0.5]
)");
  SizingOptions o;
  o.check = false;
  const SizingResult res = SizeArray(req, o);
  ASSERT_FALSE(res.binding.empty());
  const Shortfall& f = res.binding.front();
  EXPECT_EQ(f.what, Requirement::kBeamwidthXZ);
  EXPECT_EQ(f.bound_by, Constraint::kMaxApertureX);
  EXPECT_EQ(f.asked, 5);
  // 0.1 m is 3.3 wavelengths: a tapered beam about 50.8 deg / 3.3 wide, or more.
  EXPECT_GT(f.reached, 50.8 / 3.34);
  for (const SizingCandidate& c : res.candidates) EXPECT_LE(c.aperture_x_m(), 0.1 + 1e-12);
}

// The design file of every candidate reads back (through the design reader, as synth
// and compute read it) to exactly the array and currents the check computed.
TEST(SizingText, CandidateFilesReadBackToTheCheckedArray) {
  const RequirementsFile rf =
      ReadRequirements(std::string(LOBECAST_SAMPLES) + "/requirements-kestrel-relay.toml");
  SizingOptions o;
  o.check = false;
  const SizingResult res = SizeArray(rf.requirements, o);
  for (std::size_t k = 0; k < res.candidates.size(); ++k) {
    const SizingCandidate& c = res.candidates[k];
    const std::string text = text::CandidateDesign(rf, c, k + 1, res.candidates.size());
    const ArrayDescription d = ParseArrayDescription(text, "candidate.toml", "");
    ASSERT_TRUE(d.design);
    EXPECT_EQ(d.design->lattice.kind, c.lattice);
    EXPECT_EQ(d.design->lattice.count_x, c.count_x);
    EXPECT_EQ(d.design->lattice.count_y, c.count_y);
    EXPECT_EQ(d.design->taper.kind, c.taper.kind);
    EXPECT_EQ(d.design->taper.sidelobe_db, c.taper.sidelobe_db);
    EXPECT_EQ(d.design->taper_efficiency, c.taper_efficiency);
    EXPECT_TRUE(d.design->grating_lobes.empty());
    const CandidateArray ca = BuildCandidateArray(rf.requirements, c);
    ASSERT_EQ(d.array.size(), ca.array.size());
    EXPECT_EQ(d.array.frequency_hz, ca.array.frequency_hz);
    EXPECT_EQ(d.array.ground, ca.array.ground);
    for (std::size_t n = 0; n < d.array.size(); ++n) {
      EXPECT_EQ(d.array.dipoles[n].position_m, ca.array.dipoles[n].position_m) << n;
      EXPECT_EQ(d.array.dipoles[n].orientation, ca.array.dipoles[n].orientation) << n;
      EXPECT_EQ(d.array.dipoles[n].length_m, ca.array.dipoles[n].length_m) << n;
      EXPECT_EQ(d.currents[static_cast<Eigen::Index>(n)], ca.currents[static_cast<Eigen::Index>(n)])
          << n;
    }
    EXPECT_EQ(d.grid.size(), CheckGrid(rf.requirements, c).size());
  }
}

}  // namespace
}  // namespace lobecast
