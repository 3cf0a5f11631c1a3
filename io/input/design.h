// What a design file asked for and what was generated from it (CONVENTIONS §3,
// design files), kept in ArrayDescription::design for `synth` and the other
// commands to describe. The generated elements themselves are ordinary dipoles
// of the description (indices first_generated .. first_generated + generated - 1).
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "engine/synthesis/crossed_pair.h"
#include "engine/synthesis/envelope.h"
#include "engine/synthesis/grating_lobes.h"
#include "engine/synthesis/lattice_generator.h"
#include "engine/synthesis/max_directivity.h"
#include "engine/synthesis/null_placement.h"
#include "engine/synthesis/steering.h"
#include "engine/synthesis/taper.h"
#include "io/input_error.h"

namespace lobecast {

// A direction where the total far field must vanish ([[null]]).
struct DesignNull {
  double theta_deg = 0;
  double phi_deg = 0;
  SourceLocation where;  // its [[null]] table
};

enum class ObjectiveKind { kMaxDirectivity, kSidelobeEnvelope };
std::string_view ToString(ObjectiveKind k);  // "max-directivity", "sidelobe-envelope"
std::optional<ObjectiveKind> ObjectiveKindFromString(std::string_view s);

// A side-lobe mask region: directions with theta and phi in the ranges (degrees,
// inclusive) must stay at or below level_db re the peak.
struct MaskRegion {
  double theta_min_deg = 0, theta_max_deg = 180;
  double phi_min_deg = 0, phi_max_deg = 360;
  double level_db = -30;
  SourceLocation where;
};

struct DesignObjective {
  ObjectiveKind kind = ObjectiveKind::kMaxDirectivity;
  // max-directivity: Tikhonov regularization of the near-singular resistance
  // matrix, relative to its mean self resistance tr R / N (>= 0; unset: the engine's
  // choice, MaxDirectivityOptions).
  std::optional<double> regularization;
  // sidelobe-envelope: the highest side lobe allowed re the peak (dB < 0; unset:
  // as low as possible), and mask regions that override it where they apply.
  std::optional<double> sidelobe_db;
  std::vector<MaskRegion> mask;
  // sidelobe-envelope: the main beam left free, as a multiple of the first-null
  // radius of the uniform excitation (excitation_synthesis.h); > 0.
  double main_beam_factor = 1.5;
  SourceLocation where;  // the [objective] table
};

struct DesignInfo {
  LatticeSpec lattice;
  TaperSpec taper;
  bool taper_given = false;     // a [taper] table was written
  double peak_current_a = 1.0;  // the largest generated current (A peak)
  std::optional<Steering> steering;
  double steer_theta_deg = 0, steer_phi_deg = 0;  // as written ([steer])

  std::size_t first_generated = 0;       // index of the first generated dipole
  std::size_t generated = 0;             // dipoles present (after removal)
  std::size_t lattice_size = 0;          // sites before removal
  std::vector<double> taper_amplitudes;  // per generated dipole, peak 1
  // [element] crossed_pair: two dipoles per site (crossed_pair.h), site n's at
  // generated indices 2n (the template's orientation) and 2n + 1 (n x it, its current
  // exp(j crossed_phase_deg) times the first's). Unset: one dipole per site.
  std::optional<CircularSense> crossed;
  double crossed_phase_deg = 0;
  std::size_t dipoles_per_site = 1;
  std::size_t sites() const { return generated / dipoles_per_site; }
  double taper_efficiency = 1.0;
  // The currents of the generated elements as magnitude (A peak) and phase (deg),
  // exactly the values whose std::polar the description holds, so a written array
  // file reads back to the same bits.
  std::vector<std::pair<double, double>> polar_currents;
  // Grating lobes in visible space at the beam direction (the steering direction, or
  // the lattice's broadside when not steered).
  std::vector<GratingLobe> grating_lobes;

  std::vector<DesignNull> nulls;
  // [[null]] method = "phase-only": |I_n| kept, phases free (phase-shifter-only
  // arrays); otherwise the least-squares change of the complex currents.
  bool phase_only_nulls = false;
  std::optional<DesignObjective> objective;
  // What the excitation synthesis achieved (excitation_synthesis.h), for the design
  // text: one of the objectives' results, and the null placement's.
  std::optional<MaxDirectivityResult> max_directivity;
  std::optional<EnvelopeResult> envelope;
  std::size_t envelope_samples = 0;  // side-lobe directions the LP sampled
  std::optional<NullResult> null_placement;

  SourceLocation lattice_where;  // the [lattice] table
  SourceLocation element_where;  // the [element] table (the template of generated dipoles)
};

}  // namespace lobecast
