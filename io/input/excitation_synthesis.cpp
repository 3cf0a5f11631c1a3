#include "io/input/excitation_synthesis.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include <Eigen/Eigenvalues>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/synthesis/envelope.h"
#include "engine/synthesis/grating_lobes.h"
#include "engine/synthesis/max_directivity.h"
#include "engine/synthesis/null_placement.h"
#include "engine/synthesis/taper.h"

namespace lobecast {
namespace {

// k sigma of a uniform line at its first null: k du L = 2 pi with sigma = L / sqrt(12).
// A uniform disc gives 1.92 (3.83 / 2); the line's value is the free main beam's unit.
constexpr double kFirstNullSpread = 2.0 * kPi / 3.4641016151377544;
// The side-lobe LP samples at most about this many directions.
constexpr double kMaxEnvelopeSamples = 3000;

Direction ToDirection(const Vec3& r) {
  return {std::acos(std::clamp(r.z(), -1.0, 1.0)), std::atan2(r.y(), r.x())};
}

// The element template's own polarization at the beam: the unit vector of
// r_hat x (r_hat x u) in (theta_hat, phi_hat), what parallel elements radiate there.
PolarizationVector ElementPolarization(const Vec3& u, const Direction& beam) {
  const double a = u.dot(ThetaHatAt(beam.theta_rad, beam.phi_rad));
  const double b = u.dot(PhiHatAt(beam.phi_rad));
  const double n = std::hypot(a, b);
  if (!(n > 1e-12)) {
    throw InvalidArgument(
        "the beam direction lies along the elements' axis, where they radiate nothing");
  }
  return {a / n, b / n};
}

// The beam of an unsteered design: the lattice's broadside (grating_lobes.h), except
// that a line's broadside is a whole plane, in which the direction perpendicular to
// the elements too is the one they radiate best (z dipoles along x: +-y, not z);
// the sign makes the largest component positive.
Vec3 UnsteeredBeam(const LatticeSpec& lattice, const Vec3& element) {
  if (lattice.kind != LatticeKind::kLine) return BroadsideOf(lattice);
  Vec3 b = (lattice.rotation * lattice.axis).normalized().cross(element);
  if (!(b.norm() > 1e-9)) return BroadsideOf(lattice);
  b.normalize();
  Eigen::Index i = 0;
  b.cwiseAbs().maxCoeff(&i);
  return b[i] < 0 ? Vec3(-b) : b;
}

// Covariance of the generated positions (m^2): the aperture's spread per direction.
Eigen::Matrix3d PositionCovariance(const Array& array) {
  Vec3 mean = Vec3::Zero();
  for (const Dipole& d : array.dipoles) mean += d.position_m;
  mean /= static_cast<double>(array.size());
  Eigen::Matrix3d c = Eigen::Matrix3d::Zero();
  for (const Dipole& d : array.dipoles) {
    const Vec3 p = d.position_m - mean;
    c += p * p.transpose();
  }
  return c / static_cast<double>(array.size());
}

// Side-lobe samples for the envelope LP: rings of constant theta about every
// ~step (phi spacing step / sin theta), above the ground plane, leaving out the free
// main beam: directions s with k sqrt((s - s0)^T C (s - s0)) < factor * kFirstNullSpread
// (C the position covariance), the region where the uniform excitation's main lobe
// lies, widened by the factor for the taper the optimum will need. In direction
// cosines this is an ellipse for a panel and a band about the cone of a line.
struct EnvelopeSamples {
  Directions directions;
  std::vector<double> theta_deg, phi_deg;
};
EnvelopeSamples SampleSideLobes(const Array& array, const Direction& beam, double factor) {
  const Eigen::Matrix3d c = PositionCovariance(array);
  const double k = array.wavenumber_rad_m();
  const double spread_max =
      k * std::sqrt(std::max(
              Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d>(c).eigenvalues().maxCoeff(), 0.0));
  const double theta_max = array.ground == Ground::kPec ? kPi / 2 : kPi;
  // A quarter of the first-null radius of the widest aperture, then as coarse as the
  // sample budget needs (about 2 pi / step^2 directions on the sphere).
  double step = std::min(2.0 * kDegree, 0.25 * kFirstNullSpread / std::max(spread_max, 1e-9));
  step = std::max(step, std::sqrt(4.0 * theta_max / kMaxEnvelopeSamples));
  const Vec3 s0 = UnitVectorAt(beam.theta_rad, beam.phi_rad);
  const double free_spread = factor * kFirstNullSpread / k;
  EnvelopeSamples out;
  std::vector<double> th, ph;
  const int rings = static_cast<int>(std::ceil(theta_max / step));
  for (int i = 0; i <= rings; ++i) {
    const double t = theta_max * i / rings;
    const int n_phi = std::max(1, static_cast<int>(std::ceil(2 * kPi * std::sin(t) / step)));
    for (int j = 0; j < n_phi; ++j) {
      const double p = 2 * kPi * j / n_phi;
      const Vec3 d = UnitVectorAt(t, p) - s0;
      if (std::sqrt(std::max(d.dot(c * d), 0.0)) < free_spread) continue;
      th.push_back(t);
      ph.push_back(p);
      out.theta_deg.push_back(t / kDegree);
      out.phi_deg.push_back(p / kDegree);
    }
  }
  out.directions = Directions::FromAngles(th, ph);
  return out;
}

bool InRegion(const MaskRegion& r, double theta_deg, double phi_deg) {
  return theta_deg >= r.theta_min_deg && theta_deg <= r.theta_max_deg && phi_deg >= r.phi_min_deg &&
         phi_deg <= r.phi_max_deg;
}

Eigen::VectorXcd MaximumDirectivity(const ArrayDescription& desc, const DesignObjective& o,
                                    const Direction& beam, const PolarizationVector& pol,
                                    DesignInfo& d) {
  MaxDirectivityOptions opt;
  if (o.regularization) opt.regularization = *o.regularization;
  d.max_directivity = MaximizeDirectivity(desc.array, beam, pol, opt);
  return d.max_directivity->currents_a;
}

Eigen::VectorXcd Envelope(const ArrayDescription& desc, const DesignObjective& o,
                          const Direction& beam, const PolarizationVector& pol,
                          const Directions& nulls, DesignInfo& d) {
  const EnvelopeSamples s = SampleSideLobes(desc.array, beam, o.main_beam_factor);
  EnvelopeProblem p;
  p.beam = beam;
  p.polarization = pol;
  p.samples = s.directions;
  p.nulls = nulls;
  const bool mask = o.sidelobe_db || !o.mask.empty();
  if (mask) {
    for (std::size_t i = 0; i < s.theta_deg.size(); ++i) {
      double level = o.sidelobe_db.value_or(0.0);
      for (const MaskRegion& r : o.mask)
        if (InRegion(r, s.theta_deg[i], s.phi_deg[i])) level = std::min(level, r.level_db);
      p.mask_db.push_back(level);
    }
  }
  const EnvelopeResult r = SynthesizeEnvelope(desc.array, p);
  if (mask && r.margin_db > r.approximation_db) {
    char why[320];
    std::snprintf(why, sizeof why,
                  "the side-lobe envelope cannot be met: the best currents exceed it by %.2f dB "
                  "somewhere (raise sidelobe_db or the mask levels, widen the free main beam "
                  "with main_beam_factor, or add elements)",
                  r.margin_db);
    throw InvalidArgument(why);
  }
  d.envelope = r;
  d.envelope_samples = s.theta_deg.size();
  return r.currents_a;
}

Eigen::VectorXcd Nulls(const ArrayDescription& desc, const Eigen::VectorXcd& currents,
                       const Directions& nulls, const Direction& beam, DesignInfo& d) {
  d.null_placement = d.phase_only_nulls ? PlaceNullsPhaseOnly(desc.array, currents, nulls, beam)
                                        : PlaceNulls(desc.array, currents, nulls, beam);
  return d.null_placement->currents_a;
}

}  // namespace

void ApplyExcitationSynthesis(ArrayDescription& desc) {
  if (!desc.design) return;
  DesignInfo& d = *desc.design;
  if (d.nulls.empty() && !d.objective) return;
  const SourceLocation where = d.objective ? d.objective->where : d.nulls.front().where;
  if (d.generated != desc.array.size()) {
    throw InputError(where,
                     "[[null]] and [objective] act on the whole array's currents: remove the "
                     "explicit [[dipole]] tables or CSV rows (or give their currents in a "
                     "separate array)");
  }
  const Direction beam =
      ToDirection(d.steering ? d.steering->direction
                             : UnsteeredBeam(d.lattice, desc.array.dipoles.front().orientation));
  std::vector<double> nt, np;
  for (const DesignNull& n : d.nulls) {
    nt.push_back(n.theta_deg * kDegree);
    np.push_back(n.phi_deg * kDegree);
  }
  const Directions nulls = Directions::FromAngles(nt, np);

  Eigen::VectorXcd currents = desc.currents;
  try {
    const PolarizationVector pol =
        ElementPolarization(desc.array.dipoles.front().orientation, beam);
    if (d.objective && d.objective->kind == ObjectiveKind::kMaxDirectivity) {
      currents = MaximumDirectivity(desc, *d.objective, beam, pol, d) * d.peak_current_a;
      if (!d.nulls.empty()) currents = Nulls(desc, currents, nulls, beam, d);
    } else if (d.objective) {
      currents = Envelope(desc, *d.objective, beam, pol, nulls, d) * d.peak_current_a;
    } else {
      currents = Nulls(desc, currents, nulls, beam, d);
    }
  } catch (const InvalidArgument& e) {
    throw InputError(where, std::string("the design cannot be met: ") + e.what());
  }

  // Back into the description as magnitude and phase, so a written array file reads
  // back to the same bits (design.h, polar_currents).
  const double peak = currents.cwiseAbs().maxCoeff();
  for (std::size_t n = 0; n < d.generated; ++n) {
    const auto i = static_cast<Eigen::Index>(d.first_generated + n);
    const double magnitude = std::abs(currents[i]);
    double phase_deg = std::remainder(std::arg(currents[i]) / kDegree, 360.0);
    if (phase_deg <= -180.0) phase_deg += 360.0;
    d.polar_currents[n] = {magnitude, phase_deg};
    desc.currents[i] = std::polar(magnitude, phase_deg * kDegree);
    desc.ports[static_cast<std::size_t>(i)].current_a = desc.currents[i];
    d.taper_amplitudes[n] = peak > 0 ? magnitude / peak : 0.0;
  }
  d.taper_efficiency = TaperEfficiency(d.taper_amplitudes);
}

}  // namespace lobecast
