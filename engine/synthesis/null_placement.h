// Null placement: the smallest change of the current vector (Euclidean norm) that
// makes the total far field, both components, vanish at every null direction.
// With A the (2K x N) field map of the K null directions (field_map.h) the answer
// is the orthogonal projection onto A's null space,
//
//   I = I0 - A^H (A A^H)^+ A I0,
//
// computed stably from a thin SVD of A^H = U S V^H (never forming A A^H): I = I0 -
// U_r U_r^H I0 over the r singular values above rank_tolerance times the largest.
// Dependent constraints (a repeated null, the E_phi rows of a z dipole, the rows a
// ground zeroes) drop out this way; r = N would leave only I = 0 and is refused.
//
// Phase-only nulling (arrays with phase shifters only: |I_n| kept, phases free) is
// nonlinear: Gauss-Newton on the phases with minimum-norm steps (the least change
// of the phases that zeroes the linearized null fields), halved while the null
// fields do not shrink. The problem is that of H. Steyskal, R. A. Shore and R. L.
// Haupt, "Methods for null control and their effects on the radiation pattern",
// IEEE Trans. AP-34, 1986 (from memory); the iteration is ours.
#pragma once

#include <vector>

#include <Eigen/Core>

#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/synthesis/field_map.h"
#include "engine/types.h"

namespace lobecast {

struct NullOptions {
  // Singular values of A below this times the largest count as dependent constraints.
  double rank_tolerance = 1e-10;
  // A null where the original pattern is at or above this level re the beam
  // direction's field lies inside the main beam: refused (InvalidArgument).
  double main_beam_level_db = -3.0;
  // Phase-only: stop when every null is this deep re the beam direction (dB), or
  // after max_iterations Gauss-Newton steps.
  double phase_only_target_db = -150.0;
  int phase_only_max_iterations = 100;
  // Thread count of the power computation (0: the OpenMP default).
  int num_threads = 0;
};

struct NullResult {
  Eigen::VectorXcd currents_a;  // the new currents, A peak
  // Per null: |E| there re |E| at the beam direction (both new), dB. A field below
  // the numerical floor (1e-13 of (w mu0 / 4 pi) sum |I Le|, CONVENTIONS §1) is -inf.
  std::vector<double> depth_db;
  int constraints = 0;  // 2K
  int rank = 0;         // independent ones (linear placement; 0 for phase-only)
  // Directivity toward the beam direction before and after (linear), and the loss,
  // 10 log10(before / after) dB (negative when the nulls happen to raise D: the
  // given currents need not be the directivity optimum).
  double directivity_before = 0;
  double directivity_after = 0;
  double directivity_lost_db = 0;
  // ||I - I0|| / ||I0||.
  double change_relative = 0;
  // Phase-only: Gauss-Newton steps taken, and whether every null reached the target.
  int iterations = 0;
  bool converged = true;
};

// Throws InvalidArgument for an invalid array or currents, no nulls, a null inside
// the main beam (see NullOptions), or nulls that leave no current vector (rank = N).
NullResult PlaceNulls(const Array& array, const Eigen::VectorXcd& currents_a,
                      const Directions& nulls, const Direction& beam,
                      const NullOptions& options = {});

// |I_n| fixed, phases free (see above). The same checks; a design the phases cannot
// meet is not an error: converged = false and the depths say what was reached.
NullResult PlaceNullsPhaseOnly(const Array& array, const Eigen::VectorXcd& currents_a,
                               const Directions& nulls, const Direction& beam,
                               const NullOptions& options = {});

}  // namespace lobecast
