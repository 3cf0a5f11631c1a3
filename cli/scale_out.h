// Where a command's work may be split among MPI processes: with -DLOBECAST_MPI=ON
// these call the driver (cli/mpi/scale_out.h); without it they are the engine's
// functions and this process is rank 0 of 1, so nothing about MPI is compiled.
#pragma once

#include <vector>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/sweep/frequency_sweep.h"
#include "engine/tolerance/tolerance.h"
#include "engine/types.h"
#ifdef LOBECAST_WITH_MPI
#include "cli/mpi/scale_out.h"
#endif

namespace lobecast::cli {

// Rank 0 reads, prints and writes; the other ranks of an MPI run compute and stay silent.
inline bool IsLeadProcess() {
#ifdef LOBECAST_WITH_MPI
  return mpi::Rank() == 0;
#else
  return true;
#endif
}

// The processes of this run: mpirun's count under MPI, else 1.
inline int ProcessCount() {
#ifdef LOBECAST_WITH_MPI
  return mpi::Size();
#else
  return 1;
#endif
}

// RunTolerance, split by trials under MPI (the whole result on rank 0 only).
inline ToleranceResult RunToleranceSplit(const Array& array, const Eigen::VectorXcd& currents_a,
                                         const AngularGrid& grid, const ToleranceTargets& targets,
                                         const ToleranceOptions& options) {
#ifdef LOBECAST_WITH_MPI
  return mpi::RunTolerance(array, currents_a, grid, targets, options);
#else
  return RunTolerance(array, currents_a, grid, targets, options);
#endif
}

// ComputePattern, split by theta rows under MPI (the whole result on rank 0 only).
inline PatternResult ComputePatternSplit(const Array& array, const Eigen::VectorXcd& currents_a,
                                         const AngularGrid& grid, const PatternOptions& options) {
#ifdef LOBECAST_WITH_MPI
  return mpi::ComputePattern(array, currents_a, grid, options);
#else
  return ComputePattern(array, currents_a, grid, options);
#endif
}

// RunFrequencySweep, split by frequency under MPI (the whole sweep on rank 0 only).
inline FrequencySweep RunFrequencySweepSplit(const Array& array,
                                             const std::vector<double>& frequencies_hz,
                                             const SweepExcitation& excitation,
                                             const AngularGrid& grid, const SweepOptions& options,
                                             const DesignPoint& design) {
#ifdef LOBECAST_WITH_MPI
  return mpi::RunFrequencySweep(array, frequencies_hz, excitation, grid, options, design);
#else
  return RunFrequencySweep(array, frequencies_hz, excitation, grid, options, design);
#endif
}

}  // namespace lobecast::cli
