#include "io/input/excitation_synthesis.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/synthesis/beam_setup.h"
#include "engine/synthesis/crossed_pair.h"
#include "engine/synthesis/envelope.h"
#include "engine/synthesis/grating_lobes.h"
#include "engine/synthesis/max_directivity.h"
#include "engine/synthesis/null_placement.h"
#include "engine/synthesis/taper.h"

namespace lobecast {
namespace {

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
  const SideLobeSamples s = SampleSideLobes(desc.array, beam, o.main_beam_factor);
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
    // Crossed pairs: the objective's polarization is their circular one (crossed_pair.h).
    const PolarizationVector pol =
        d.crossed ? CircularPolarizationOf(*d.crossed)
                  : ElementPolarization(desc.array.dipoles.front().orientation, beam);
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
    const double phase_deg = WrappedDegrees(std::arg(currents[i]));
    d.polar_currents[n] = {magnitude, phase_deg};
    desc.currents[i] = std::polar(magnitude, phase_deg * kDegree);
    desc.ports[static_cast<std::size_t>(i)].current_a = desc.currents[i];
    d.taper_amplitudes[n] = peak > 0 ? magnitude / peak : 0.0;
  }
  d.taper_efficiency = TaperEfficiency(d.taper_amplitudes);
}

}  // namespace lobecast
