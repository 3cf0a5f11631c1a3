// Scale-out with MPI: the driver that splits a run among processes (built only with
// -DLOBECAST_MPI=ON; the only room that sees MPI). This header is plain C++: the
// executable calls it through cli/scale_out.h, the engine never.
//
// Processes. MPI is initialized only when a launcher started the process (mpirun
// sets OMPI_COMM_WORLD_SIZE, a PMI or PMIx launcher PMI_SIZE or PMIX_RANK): run
// alone, lobecast is rank 0 of 1 and does exactly what a build without MPI does.
// Rank 0 reads, writes and prints; the other ranks compute their share and stay
// silent. Commands that are not split run on rank 0 only (the others exit 0).
//
// Splits (each process runs the engine's own entry points on its share; rank 0
// gathers and writes through the ordinary writers, so there is one HDF5 library
// and one writer code path: Debian's serial libhdf5-dev and its parallel
// libhdf5-openmpi-dev define the same H5* symbols, so one executable cannot link
// both, and the io room would need a second, collective writer):
//  - tolerance: by trials, contiguous ranges [k0, k1) (ToleranceStudy). Per block of
//    theta rows the ranks send their D and U values (16 bytes per trial and
//    direction) to rank 0, which takes the statistics over the full columns in trial
//    order: the single-process bits. Every rank computes the error-free pattern (one
//    pattern of the K + 1, duplicated so that each has the main beam and the beam
//    direction without a broadcast).
//  - compute: by blocks of theta rows (ComputePatternRows, FinishPattern). The ranks send
//    their rows' field (32 bytes per direction) to rank 0, which applies the floor,
//    derives U, D and the polarization and runs the analysis. When the grid has at
//    least as many of compute's blocks as there are ranks, each rank takes whole
//    blocks: the plans, and so the field, are the single process's whatever the
//    method. Otherwise the rows are shared evenly: the direct sums are the same bits
//    (each direction's sum is its own), the fast path meets its tolerance on each
//    rank's rows instead of the whole block's. The power (closed form or quadrature)
//    is computed on every rank (duplicated: it is the same bits everywhere and costs
//    one O(N^2) or O(L^2 log L) pass; split it when it dominates).
//  - a frequency sweep (compute with `frequencies`): by frequency, the design one
//    (already computed, split by rows) on rank 0, the others shared in contiguous
//    ranges (ComputeSweepFrequency); each sends its figures and directivity grid (8
//    bytes a direction) to rank 0. Each frequency is the single process's
//    computation, so the same bits. The analysis' polarization reference is rank 0's
//    (the auto choice needs the design result, which only rank 0 holds).
//
// Failure. Every stage of a split runs under an agreement: a rank that throws
// reports it, and then every rank throws RankFailure (cli/exit_code.h) with the
// failing rank's exit code and "lobecast: rank R failed: <its message>"; rank 0
// prints it, no rank writes. A rank that dies (a signal, exit) makes mpirun end the
// others; rank 0 commits its output (OutputFile: temporary, then rename) only after
// every stage succeeded, so no partial file ever looks finished.
// Test hook: LOBECAST_TEST_FAIL_RANK=R makes rank R fail its share of a split (an
// exception; with LOBECAST_TEST_FAIL_HOW=exit it ends the process with status 3
// instead, without a word to the others).
#pragma once

#include <cstddef>
#include <exception>
#include <utility>

#include <Eigen/Core>

#include "cli/exit_code.h"
#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/sweep/frequency_sweep.h"
#include "engine/tolerance/tolerance.h"
#include "engine/types.h"

namespace lobecast::mpi {

// MPI for the life of the process (one, in main): initialized when a launcher
// started it, finalized at the end.
class Session {
 public:
  Session(int* argc, char*** argv);
  ~Session();
  Session(const Session&) = delete;
  Session& operator=(const Session&) = delete;
};

int Rank();  // 0 without a launcher
int Size();  // 1 without a launcher

// Whether the command in argv is split among processes (compute, tolerance).
bool SplitsCommand(int argc, char** argv);

// After an error in main (`error` from std::current_exception()): prints its report
// where it belongs (rank 0; or a rank whose own failure, outside an agreement, the
// others cannot know) and returns its exit code; ends the whole run (MPI_Abort) when
// other ranks may be waiting for this one.
int ExitAfterError(const std::exception_ptr& error);

// [first, last) of `count` items for `rank` of `size`: contiguous, sizes differing by
// at most one, the larger shares first.
std::pair<std::size_t, std::size_t> Share(std::size_t count, int rank, int size);

// The engine's RunTolerance split by trials; rank 0 gets the whole result (the
// others: their trials' figures only).
ToleranceResult RunTolerance(const Array& array, const Eigen::VectorXcd& currents_a,
                             const AngularGrid& grid, const ToleranceTargets& targets,
                             const ToleranceOptions& options);

// The engine's ComputePattern split by theta rows; rank 0 gets the whole result (the
// others: a result whose field is their own rows only).
PatternResult ComputePattern(const Array& array, const Eigen::VectorXcd& currents_a,
                             const AngularGrid& grid, const PatternOptions& options);

// The engine's RunFrequencySweep split by frequency; rank 0 gets the whole sweep (the
// others: an empty one). design: rank 0's (the others' is not read, but its result
// must be set on every rank or on none).
FrequencySweep RunFrequencySweep(const Array& array, const std::vector<double>& frequencies_hz,
                                 const SweepExcitation& excitation, const AngularGrid& grid,
                                 const SweepOptions& options, const DesignPoint& design);

}  // namespace lobecast::mpi
