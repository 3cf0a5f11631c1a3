// The MPI session, the agreement on failures and the splits (scale_out.h).
#include "cli/mpi/scale_out.h"

#include <mpi.h>

#include <algorithm>
#include <chrono>
#include <climits>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "engine/error.h"

namespace lobecast::mpi {
namespace {

bool g_active = false;        // MPI initialized (a launcher started the process)
bool g_work_started = false;  // a split has begun: ranks may wait for each other

bool LaunchedByMpirun() {
  for (const char* v : {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_SIZE"})
    if (std::getenv(v) != nullptr) return true;
  return false;
}

std::string WithoutPrefix(const std::string& line) {
  constexpr std::string_view kPrefix = "lobecast: ";
  return line.compare(0, kPrefix.size(), kPrefix) == 0 ? line.substr(kPrefix.size()) : line;
}

// The test hook (scale_out.h): this rank fails its share at `stage`.
void InjectedFailure(const char* stage) {
  const char* which = std::getenv("LOBECAST_TEST_FAIL_RANK");
  if (which == nullptr || std::atoi(which) != Rank()) return;
  const char* how = std::getenv("LOBECAST_TEST_FAIL_HOW");
  if (how != nullptr && std::strcmp(how, "exit") == 0) std::_Exit(3);
  throw std::runtime_error(std::string("injected failure in ") + stage +
                           " (LOBECAST_TEST_FAIL_RANK)");
}

// Runs this rank's part of a stage, then agrees with every rank on how it went: when
// any rank threw, every rank throws RankFailure naming the lowest such rank, with its
// exit code and message. Every rank must call it the same number of times.
template <class Work>
void Agree(Work&& work) {
  std::exception_ptr local;
  try {
    work();
  } catch (...) {
    local = std::current_exception();
  }
  const int rank = Rank(), size = Size();
  int mine = local ? rank : size, first = size;
  MPI_Allreduce(&mine, &first, 1, MPI_INT, MPI_MIN, MPI_COMM_WORLD);
  if (first == size) return;
  cli::ExitReport report;
  if (rank == first) report = cli::ReportFor(local);
  int code = report.code;
  MPI_Bcast(&code, 1, MPI_INT, first, MPI_COMM_WORLD);
  int length = static_cast<int>(std::min<std::size_t>(report.message.size(), 4096));
  MPI_Bcast(&length, 1, MPI_INT, first, MPI_COMM_WORLD);
  report.message.resize(static_cast<std::size_t>(length));
  MPI_Bcast(report.message.data(), length, MPI_CHAR, first, MPI_COMM_WORLD);
  throw cli::RankFailure(code, "lobecast: rank " + std::to_string(first) +
                                   " failed: " + WithoutPrefix(report.message));
}

int ToInt(std::size_t n, const char* what) {
  if (n > static_cast<std::size_t>(INT_MAX)) {
    throw std::runtime_error(std::string(what) + ": " + std::to_string(n) +
                             " values, more than one MPI message holds (2^31 - 1): use fewer "
                             "trials or a coarser grid per run");
  }
  return static_cast<int>(n);
}

using Clock = std::chrono::steady_clock;

// TrialFigures as doubles (a count below 2^53 is exact): 11 scalars, then the
// protected directions' intensities and depths.
constexpr std::size_t kScalarFigures = 11;
void Pack(const TrialFigures& f, std::vector<double>& out) {
  out.insert(out.end(),
             {f.radiated_w, f.beam_directivity, f.peak_sidelobe_db, f.peak_r_hat.x(),
              f.peak_r_hat.y(), f.peak_r_hat.z(), f.peak_directivity, f.pointing_error_deg,
              f.directivity_loss_db, static_cast<double>(f.failed_elements), 0.0});
  out.insert(out.end(), f.protected_intensity_w_sr.begin(), f.protected_intensity_w_sr.end());
  out.insert(out.end(), f.null_depth_db.begin(), f.null_depth_db.end());
}
TrialFigures Unpack(const double* v, std::size_t protect) {
  TrialFigures f;
  f.radiated_w = v[0];
  f.beam_directivity = v[1];
  f.peak_sidelobe_db = v[2];
  f.peak_r_hat = Vec3(v[3], v[4], v[5]);
  f.peak_directivity = v[6];
  f.pointing_error_deg = v[7];
  f.directivity_loss_db = v[8];
  f.failed_elements = static_cast<std::size_t>(v[9]);
  const double* p = v + kScalarFigures;
  f.protected_intensity_w_sr.assign(p, p + protect);
  f.null_depth_db.assign(p + protect, p + 2 * protect);
  return f;
}

// Every rank's `packed` values (per values for each of its Share of `items`) to rank
// 0, in item order; empty on the other ranks.
std::vector<double> GatherShares(const std::vector<double>& packed, std::size_t items,
                                 std::size_t per) {
  const int size = Size();
  std::vector<int> counts(static_cast<std::size_t>(size)), offsets(static_cast<std::size_t>(size));
  for (int q = 0; q < size; ++q) {
    const auto [q0, q1] = Share(items, q, size);
    counts[static_cast<std::size_t>(q)] = ToInt((q1 - q0) * per, "a share");
    offsets[static_cast<std::size_t>(q)] = ToInt(q0 * per, "a share's offset");
  }
  std::vector<double> all(Rank() == 0 ? items * per : 0);
  MPI_Gatherv(packed.data(), static_cast<int>(packed.size()), MPI_DOUBLE, all.data(), counts.data(),
              offsets.data(), MPI_DOUBLE, 0, MPI_COMM_WORLD);
  return all;
}

}  // namespace

Session::Session(int* argc, char*** argv) {
  if (!LaunchedByMpirun()) return;
  // OpenMP threads compute; only the main thread calls MPI.
  int provided = 0;
  MPI_Init_thread(argc, argv, MPI_THREAD_FUNNELED, &provided);
  g_active = true;
}

Session::~Session() {
  if (g_active) MPI_Finalize();
}

int Rank() {
  int rank = 0;
  if (g_active) MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  return rank;
}

int Size() {
  int size = 1;
  if (g_active) MPI_Comm_size(MPI_COMM_WORLD, &size);
  return size;
}

bool SplitsCommand(int argc, char** argv) {
  for (int i = 1; i < argc; ++i) {
    if (argv[i][0] == '-') continue;
    return std::strcmp(argv[i], "compute") == 0 || std::strcmp(argv[i], "tolerance") == 0;
  }
  return false;
}

int ExitAfterError(const std::exception_ptr& error) {
  const cli::ExitReport report = cli::ReportFor(error);
  bool agreed = false;
  try {
    std::rethrow_exception(error);
  } catch (const cli::RankFailure&) {
    agreed = true;
  } catch (...) {
  }
  const int rank = Rank(), size = Size();
  if (size == 1) {
    std::fprintf(stderr, "%s\n", report.message.c_str());
    return report.code;
  }
  if (rank == 0) {
    std::fprintf(stderr, "%s\n", report.message.c_str());
    if (agreed) return report.code;  // every rank knows and ends
    // Rank 0 alone may have failed (its output checks, its write): the others may be
    // waiting for it, or for MPI_Finalize; end them all.
    std::fflush(stderr);
    MPI_Abort(MPI_COMM_WORLD, report.code);
    return report.code;
  }
  // Before a split every rank meets the same error as rank 0 (the same input and
  // options), and an agreed failure every rank knows: rank 0 says it.
  if (agreed || !g_work_started) return report.code;
  // This rank alone failed outside an agreement: the others may be waiting for it.
  std::fprintf(stderr, "lobecast: rank %d failed: %s\n", rank,
               WithoutPrefix(report.message).c_str());
  std::fflush(stderr);
  MPI_Abort(MPI_COMM_WORLD, report.code);
  return report.code;
}

std::pair<std::size_t, std::size_t> Share(std::size_t count, int rank, int size) {
  const auto r = static_cast<std::size_t>(rank), s = static_cast<std::size_t>(size);
  const std::size_t base = count / s, extra = count % s;
  const std::size_t first = r * base + std::min(r, extra);
  return {first, first + base + (r < extra ? 1 : 0)};
}

ToleranceResult RunTolerance(const Array& array, const Eigen::VectorXcd& currents,
                             const AngularGrid& grid, const ToleranceTargets& targets,
                             const ToleranceOptions& options) {
  const int size = Size();
  if (size == 1) return lobecast::RunTolerance(array, currents, grid, targets, options);
  g_work_started = true;
  const int rank = Rank();
  ToleranceOptions o = options;
  if (rank != 0) o.progress = {};
  std::optional<ToleranceStudy> study;
  Agree([&] { study.emplace(array, currents, grid, targets, o); });
  const auto t0 = Clock::now();
  const std::size_t k_trials = options.trials;
  const auto [k0, k1] = Share(k_trials, rank, size);
  const std::size_t mine = k1 - k0;
  Agree([&] { study->ComputePowers(k0, k1); });

  // Per block: each rank's D and U of its trials, then rank 0 places every rank's
  // values straight into the direction-major columns (a strided datatype per sender)
  // and takes the statistics.
  std::vector<double> d, u, d_all, u_all;
  for (std::size_t b = 0; b < study->blocks(); ++b) {
    const std::size_t nb = study->BlockDirections(b);
    Agree([&] {
      ToInt(nb * k_trials, "a block's values");
      d.assign(nb * mine, 0.0);
      u.assign(nb * mine, 0.0);
      if (mine > 0) study->TrialsOnBlock(b, k0, k1, d.data(), u.data(), false);
      InjectedFailure("its trials");
      if (rank == 0) {
        d_all.assign(nb * k_trials, 0.0);
        u_all.assign(nb * k_trials, 0.0);
      }
    });
    if (rank == 0) {
      for (std::size_t i = 0; i < nb; ++i) {
        std::copy_n(d.data() + i * mine, mine, d_all.data() + i * k_trials + k0);
        std::copy_n(u.data() + i * mine, mine, u_all.data() + i * k_trials + k0);
      }
      for (int from = 1; from < size; ++from) {
        const auto [f0, f1] = Share(k_trials, from, size);
        if (f1 == f0) continue;
        MPI_Datatype columns;
        MPI_Type_vector(static_cast<int>(nb), static_cast<int>(f1 - f0), static_cast<int>(k_trials),
                        MPI_DOUBLE, &columns);
        MPI_Type_commit(&columns);
        MPI_Recv(d_all.data() + f0, 1, columns, from, 0, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
        MPI_Recv(u_all.data() + f0, 1, columns, from, 1, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
        MPI_Type_free(&columns);
      }
    } else if (mine > 0) {
      const int n = static_cast<int>(d.size());
      MPI_Send(d.data(), n, MPI_DOUBLE, 0, 0, MPI_COMM_WORLD);
      MPI_Send(u.data(), n, MPI_DOUBLE, 0, 1, MPI_COMM_WORLD);
    }
    Agree([&] {
      if (rank == 0) study->BlockStatistics(b, d_all.data(), u_all.data(), false);
    });
  }
  d_all = {};
  u_all = {};
  Agree([&] { study->FinishTrials(k0, k1); });

  // The per-trial figures, gathered by trial index.
  ToleranceResult& r = study->result();
  const std::size_t protect = r.protected_directions.size();
  const std::size_t per = kScalarFigures + 2 * protect;
  std::vector<double> packed;
  for (std::size_t k = k0; k < k1; ++k) Pack(r.trials[k], packed);
  const std::vector<double> all = GatherShares(packed, k_trials, per);
  if (rank == 0) {
    for (std::size_t k = 0; k < k_trials; ++k) r.trials[k] = Unpack(all.data() + k * per, protect);
  }
  r.seconds_trials = std::chrono::duration<double>(Clock::now() - t0).count();
  return std::move(r);
}

PatternResult ComputePattern(const Array& array, const Eigen::VectorXcd& currents,
                             const AngularGrid& grid, const PatternOptions& options) {
  const int size = Size();
  if (size == 1) return lobecast::ComputePattern(array, currents, grid, options);
  g_work_started = true;
  const int rank = Rank();
  const std::size_t nt = grid.theta_deg.size(), np = std::max<std::size_t>(1, grid.phi_deg.size());
  // Whole blocks of the single process when there are enough (the same plans), else
  // theta rows shared evenly (scale_out.h).
  const std::size_t rows_per_block = std::max<std::size_t>(1, options.block_directions / np);
  const std::size_t blocks = (nt + rows_per_block - 1) / rows_per_block;
  auto rows_of = [&](int q) -> std::pair<std::size_t, std::size_t> {
    if (blocks < static_cast<std::size_t>(size)) return Share(nt, q, size);
    const auto [b0, b1] = Share(blocks, q, size);
    return {std::min(nt, b0 * rows_per_block), std::min(nt, b1 * rows_per_block)};
  };
  PatternOptions o = options;
  if (rank != 0) o.progress = {};
  const auto [row0, row1] = rows_of(rank);
  PatternInProgress part;
  Agree([&] {
    part = ComputePatternRows(array, currents, grid, o, row0, row1);
    InjectedFailure("its rows");
  });

  // Every rank's rows of the field to rank 0 (complex<double> is two doubles).
  PatternResult& r = part.result;
  if (rank == 0) {
    for (int from = 1; from < size; ++from) {
      const auto [f0, f1] = rows_of(from);
      const int count = ToInt(2 * (f1 - f0) * np, "a share of the field");
      if (count == 0) continue;
      MPI_Recv(r.field.e_theta.data() + f0 * np, count, MPI_DOUBLE, from, 0, MPI_COMM_WORLD,
               MPI_STATUS_IGNORE);
      MPI_Recv(r.field.e_phi.data() + f0 * np, count, MPI_DOUBLE, from, 1, MPI_COMM_WORLD,
               MPI_STATUS_IGNORE);
    }
  } else if (row1 > row0) {
    const int count = ToInt(2 * (row1 - row0) * np, "a share of the field");
    MPI_Send(r.field.e_theta.data() + row0 * np, count, MPI_DOUBLE, 0, 0, MPI_COMM_WORLD);
    MPI_Send(r.field.e_phi.data() + row0 * np, count, MPI_DOUBLE, 0, 1, MPI_COMM_WORLD);
  }
  // The summary's per-block entries: counts summed, the largest bound, the
  // transforms in rank order (each once).
  ComputeSummary& s = r.summary;
  unsigned long counts[2] = {part.blocks, part.fast_blocks}, total[2] = {0, 0};
  MPI_Reduce(counts, total, 2, MPI_UNSIGNED_LONG, MPI_SUM, 0, MPI_COMM_WORLD);
  double bound = 0.0;
  MPI_Reduce(&s.field_error_bound_relative, &bound, 1, MPI_DOUBLE, MPI_MAX, 0, MPI_COMM_WORLD);
  double seconds[2] = {s.seconds_plan, s.seconds_field}, slowest[2] = {0, 0};
  MPI_Reduce(seconds, slowest, 2, MPI_DOUBLE, MPI_MAX, 0, MPI_COMM_WORLD);
  constexpr int kMaxTransforms = 8;
  int mine[kMaxTransforms];
  std::fill(mine, mine + kMaxTransforms, -1);
  for (std::size_t i = 0; i < s.fast_transforms_used.size() && i < kMaxTransforms; ++i)
    mine[i] = static_cast<int>(s.fast_transforms_used[i]);
  std::vector<int> every(rank == 0 ? kMaxTransforms * static_cast<std::size_t>(size) : 0);
  MPI_Gather(mine, kMaxTransforms, MPI_INT, every.data(), kMaxTransforms, MPI_INT, 0,
             MPI_COMM_WORLD);
  if (rank == 0) {
    part.blocks = total[0];
    part.fast_blocks = total[1];
    s.field_error_bound_relative = bound;
    s.seconds_plan = slowest[0];
    s.seconds_field = slowest[1];
    s.fast_transforms_used.clear();
    for (int t : every) {
      if (t < 0) continue;
      const auto transform = static_cast<FastTransform>(t);
      if (std::find(s.fast_transforms_used.begin(), s.fast_transforms_used.end(), transform) ==
          s.fast_transforms_used.end())
        s.fast_transforms_used.push_back(transform);
    }
  }
  PatternResult result;
  Agree([&] {
    if (rank == 0) result = FinishPattern(std::move(part), o);
  });
  if (rank != 0) result = std::move(part.result);
  return result;
}

FrequencySweep RunFrequencySweep(const Array& array, const std::vector<double>& frequencies_hz,
                                 const SweepExcitation& excitation, const AngularGrid& grid,
                                 const SweepOptions& options, const DesignPoint& design) {
  const int size = Size();
  if (size == 1)
    return lobecast::RunFrequencySweep(array, frequencies_hz, excitation, grid, options, design);
  g_work_started = true;
  const int rank = Rank();
  SweepOptions o = options;
  if (rank != 0) o.progress = {};
  int reference = static_cast<int>(o.analysis.reference);
  MPI_Bcast(&reference, 1, MPI_INT, 0, MPI_COMM_WORLD);
  o.analysis.reference = static_cast<PolarizationReference>(reference);
  // The frequencies still to compute, [first, F), shared in contiguous ranges.
  const std::size_t first = design.result ? 1 : 0;
  const std::size_t todo = frequencies_hz.size() - std::min(first, frequencies_hz.size());
  const auto [j0, j1] = Share(todo, rank, size);
  const std::size_t ng = grid.size();
  constexpr std::size_t kPointValues = 15;
  const std::size_t per = kPointValues + ng;
  std::vector<double> packed;
  Agree([&] {
    if (frequencies_hz.empty() || frequencies_hz.front() != array.frequency_hz)
      throw InvalidArgument("a sweep's first frequency must be the array's design frequency");
    ToInt(todo * per, "a sweep's grids");
    for (std::size_t j = j0; j < j1; ++j) {
      const SweepFrequency one =
          ComputeSweepFrequency(array, frequencies_hz, first + j, excitation, grid, o);
      const FrequencyPoint& p = one.point;
      packed.insert(
          packed.end(),
          {p.frequency_hz, p.peak_directivity_dbi, p.peak_theta_deg, p.peak_phi_deg, p.radiated_w,
           static_cast<double>(p.first_plane), static_cast<double>(p.second_plane),
           p.half_power_first_deg, p.half_power_second_deg, p.sidelobe_db, p.analysed ? 1.0 : 0.0,
           p.gain_is_realized ? 1.0 : 0.0, p.gain_dbi, p.worst_reflection, p.worst_vswr});
      packed.insert(packed.end(), one.directivity.data(),
                    one.directivity.data() + one.directivity.size());
    }
    InjectedFailure("its frequencies");
  });
  const std::vector<double> all = GatherShares(packed, todo, per);
  FrequencySweep out;
  if (rank != 0) return out;
  out.num_directions = ng;
  out.directivity.reserve(frequencies_hz.size() * ng);
  if (design.result) {
    out.points.push_back(SummarizeFrequency(frequencies_hz.front(), *design.result, design.analysis,
                                            design.coupling));
    const Eigen::VectorXd& d = design.result->directivity;
    out.directivity.insert(out.directivity.end(), d.data(), d.data() + d.size());
  }
  for (std::size_t j = 0; j < todo; ++j) {
    const double* v = all.data() + j * per;
    FrequencyPoint p;
    p.frequency_hz = v[0];
    p.peak_directivity_dbi = v[1];
    p.peak_theta_deg = v[2];
    p.peak_phi_deg = v[3];
    p.radiated_w = v[4];
    p.first_plane = static_cast<CutPlane>(static_cast<int>(v[5]));
    p.second_plane = static_cast<CutPlane>(static_cast<int>(v[6]));
    p.half_power_first_deg = v[7];
    p.half_power_second_deg = v[8];
    p.sidelobe_db = v[9];
    p.analysed = v[10] != 0.0;
    p.gain_is_realized = v[11] != 0.0;
    p.gain_dbi = v[12];
    p.worst_reflection = v[13];
    p.worst_vswr = v[14];
    out.points.push_back(p);
    out.directivity.insert(out.directivity.end(), v + kPointValues, v + per);
  }
  if (options.progress) options.progress(frequencies_hz.size() - 1, 1.0);
  return out;
}

}  // namespace lobecast::mpi
