// Writes a pattern result as an HDF5 file, schema version 1 (CONVENTIONS §3).
//
// The file is built under a temporary name beside the target ("<target>.tmp-<pid>")
// and renamed onto the target only when complete, so an interrupted run never
// leaves a file that looks finished and a failed run never clobbers an existing
// one. The root attributes `format` / `format_version` are written last of all,
// so even a stray temporary is not recognized as a lobecast result.
//
// Layout (names and units from io/hdf5/schema.h; units attribute on every dataset;
// (Nt, Np) datasets are theta-major, chunked by theta rows and deflate-compressed):
//   /                      format, format_version, software_version, time_convention,
//                          created, input, input_path (when known)
//   /array                 frequency_hz, wavelength_m, ground, name, description
//     position (N,3) m, orientation (N,3) 1, effective_length (N) m,
//     length_m (N) m, distribution (N) string, current (N) complex A
//   /grid                  theta_deg (Nt) deg, phi_deg (Np) deg
//   /field                 rE_theta, rE_phi (Nt,Np) complex V
//   /pattern               intensity (Nt,Np) W/sr, directivity (Nt,Np) 1
//   /polarization          axial_ratio_db dB, tilt_deg deg, sense int8 (Nt,Np)
//   /power                 radiated_w () W, resistance_ohm (N,N), active_resistance_ohm (N)
//                          (Re Z_act, CONVENTIONS §1: with the mutual reactances)
//   /summary               attributes from ComputeSummary
//   /summary/analysis      the pattern analysis, when written (io/hdf5/analysis_writer.h)
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/types.h"
#include "io/hdf5/schema.h"
#include "io/io_error.h"

namespace lobecast {

inline constexpr std::string_view kResultFormat = schema::kFormat;
inline constexpr int kResultFormatVersion = schema::kFormatVersion;

// What the file records about where the result came from.
struct ResultMetadata {
  std::string name;         // /array attribute `name`, written when non-empty
  std::string description;  // /array attribute `description`, written when non-empty
  std::string input_text;   // root attribute `input`: the array description as read
  std::string input_path;   // root attribute `input_path`, written when non-empty
  std::string created;      // ISO 8601 UTC; empty: the time the writer is created
};

class PatternFileWriter;

struct ResultWriteOptions {
  // gzip level 0..9 for the (Nt, Np) datasets; -1 stores them uncompressed. Level 1:
  // on a random 1024-dipole array's pattern (shuffled doubles, mostly noise in the
  // low bytes) level 4 made the grid's datasets 1.3 % smaller for 20 % more CPU
  // (tests/bench/RESULTS.md, "The whole job's parts").
  int deflate_level = 1;
  // Theta rows per chunk of the (Nt, Np) datasets. 0 picks about 64 KiB of doubles
  // per chunk (at least one row): big enough to compress well, small enough that
  // reading one cut does not decompress the whole pattern.
  std::size_t chunk_theta_rows = 0;
  // Called with each object's path (e.g. "/field/rE_theta", "rename") just before
  // it is written. Throwing from it aborts the write exactly as an I/O failure
  // would; tests inject failures through it.
  std::function<void(std::string_view)> before_write;
  // WriteResult only: called after the result and its summary are written and
  // before the file is finished, to add more under /summary (the pattern
  // analysis). Throwing from it aborts the write like an I/O failure.
  std::function<void(PatternFileWriter&)> before_finish;
};

// Rows [first, first + num_rows) of the (Nt, Np) quantities: each pointer holds
// num_rows * Np values, theta-major (the layout of PatternResult's vectors).
struct PatternRows {
  std::size_t num_rows = 0;
  const Complex* e_theta = nullptr;  // V
  const Complex* e_phi = nullptr;    // V
  const double* intensity_w_sr = nullptr;
  const double* directivity = nullptr;
  const double* axial_ratio_db = nullptr;
  const double* tilt_deg = nullptr;
  const std::int8_t* sense = nullptr;
};

// A view of rows [first_row, first_row + num_rows) of a complete result.
PatternRows RowsOf(const PatternResult& result, std::size_t first_row, std::size_t num_rows);

// Writes one result file incrementally, so a grid can be computed and stored in
// blocks of theta rows:
//   PatternFileWriter w(path, array, currents, grid, meta);
//   for each block: w.WriteRows(first_row, rows);
//   w.WritePower(...); w.WriteSummary(...); w.Finish();
// Every method throws IoError (or whatever before_write throws) after removing
// the temporary file; the writer is then dead and further calls throw. A writer
// destroyed before Finish() removes its temporary file.
class PatternFileWriter {
 public:
  // Creates the temporary file and writes /array (with the terminal currents, one
  // per dipole, as /array/current), /grid and the empty (Nt, Np) datasets. Throws
  // InvalidArgument for an array, currents or grid that cannot be stored.
  PatternFileWriter(const std::string& path, const Array& array, const Eigen::VectorXcd& currents_a,
                    const AngularGrid& grid, const ResultMetadata& meta,
                    const ResultWriteOptions& options = {});
  ~PatternFileWriter();
  PatternFileWriter(PatternFileWriter&&) noexcept;
  PatternFileWriter& operator=(PatternFileWriter&&) noexcept;

  void WriteRows(std::size_t first_theta_row, const PatternRows& rows);
  // active_resistance_omitted: when not empty, the /power attribute saying why the
  // active resistances are NaN.
  void WritePower(double radiated_power_w, const Eigen::MatrixXd& resistance_ohm,
                  const Eigen::VectorXd& active_resistance_ohm,
                  std::string_view active_resistance_omitted = {});
  void WriteSummary(const ComputeSummary& summary);

  // Extra attributes and small tables (later analyses store theirs under
  // /summary). `object_path` is a group, created with its parents when missing.
  void WriteAttribute(const std::string& object_path, const std::string& name, double value);
  void WriteIntAttribute(const std::string& object_path, const std::string& name,
                         std::int64_t value);
  void WriteStringAttribute(const std::string& object_path, const std::string& name,
                            std::string_view value);
  // A row-major double table, e.g. "/summary/beamwidths" with dims {n, 2}.
  void WriteTable(const std::string& dataset_path, const std::vector<std::size_t>& dims,
                  const double* data, std::string_view units);
  void WriteTable(const std::string& dataset_path, const std::vector<std::size_t>& dims,
                  const Complex* data, std::string_view units);
  // A one-dimensional table of strings.
  void WriteStrings(const std::string& dataset_path, const std::vector<std::string>& values,
                    std::string_view units);

  // Checks that every theta row and the power were written, writes the root
  // attributes, closes the file and renames it onto the target.
  void Finish();
  // Removes the temporary file now; the target is left as it was.
  void Abandon() noexcept;

  const std::string& path() const;
  const std::string& temporary_path() const;

 private:
  template <typename T>
  void WriteTableOf(const std::string& dataset_path, const std::vector<std::size_t>& dims,
                    const T* data, std::string_view units);

  struct Impl;
  std::unique_ptr<Impl> impl_;
};

// The whole result in one call. Throws InvalidArgument when the result's sizes do
// not match its grid and array (or the currents the array), IoError when the file
// cannot be written.
void WriteResult(const std::string& path, const Array& array, const Eigen::VectorXcd& currents_a,
                 const PatternResult& result, const ResultMetadata& meta,
                 const ResultWriteOptions& options = {});

// Streaming (compute --stream, cli/compute_command.cpp): the rest of a result
// after its rows, from ComputePatternBlocks' result (no per-direction data needed):
// /power (with the note on omitted active resistances) and /summary. WriteResult
// ends the same way.
void WriteResultTail(PatternFileWriter& writer, const PatternResult& result);

// An upper bound of a result file's size before it is written, bytes: the (Nt, Np)
// datasets uncompressed (65 bytes a direction; deflate never grows a chunk by more
// than a fraction of a percent, counted) with their chunk index, the per-dipole
// datasets, the matrix when stored, and a fixed allowance for the header, summary
// and analysis.
double EstimatedResultBytes(std::size_t num_dipoles, std::size_t num_directions,
                            bool resistance_matrix);

// Current UTC time as ISO 8601, e.g. "2026-12-02T01:23:45Z".
std::string Iso8601UtcNow();

}  // namespace lobecast
