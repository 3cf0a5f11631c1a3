// Internal to engine/field: what the field plan's files share about the fast
// path (its error model, the scout tolerance and the per-plan cache). Not a
// public header.
#pragma once

#include <map>
#include <memory>
#include <mutex>

#include <Eigen/Core>

#include "engine/field/far_field.h"
#include "engine/field/lattice.h"
#include "engine/field/nufft.h"

namespace lobecast {

// Fast path error model: each component of the NUFFT output is within
// kErrorModel * eps * sum_j |c_j| of the exact sum, eps a power of ten. Barnett
// et al. 2019 observe errors near eps * sum |c| for one stage; with the two stages
// of type 3 we measured up to 3.5 eps (a 16-dipole array, tests/bench), so the
// factor leaves a margin of about 3 over that. Tests check that the reported bound
// is met (tests/field_methods_test.cpp).
constexpr double kErrorModel = 10.0;
// The first fast pass runs at this tolerance (cheap, w = 5) to locate the peak.
constexpr double kScoutTolerance = 1e-4;

struct FieldPlan::FastCache {
  std::mutex mutex;
  bool valid = false;
  Eigen::VectorXcd currents;  // the key: the field below belongs to these currents
  FarField field;             // every plan direction
  double error_bound = 0;     // relative to the peak; 0 after a direct fallback
  // NUFFT plans by tolerance exponent (the kernel width depends only on it), kept
  // for the next current vector: O(directions) memory each, at most two in use.
  std::map<int, std::shared_ptr<const PointSum>> plans;
  // ExecuteAtFast's: the transform (for targets anywhere in the plan directions' box),
  // the grid of the currents kept, and the bound of its values (V).
  std::shared_ptr<const PointSum> probe_sum;
  std::shared_ptr<const PointSum::Prepared> probe_grid;
  Eigen::VectorXcd probe_currents;
  double probe_bound_v = 0;
};

}  // namespace lobecast
