// Reads a lobecast result file (schema version 1, CONVENTIONS §3) back into
// engine types. Files from a newer schema version are refused with a message
// saying so; datasets added by later versions of version 1 are ignored.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "engine/pattern.h"
#include "engine/types.h"
#include "io/hdf5/result_writer.h"
#include "io/io_error.h"

namespace lobecast {

struct StoredResult {
  int format_version = 0;
  std::string software_version;
  std::string time_convention;
  ResultMetadata metadata;    // name, description, input text and path, created
  Array array;                // frequency, ground, dipoles
  Eigen::VectorXcd currents;  // /array/current: terminal currents (A peak), one per dipole
  // grid, field, intensity, directivity, polarization, power, resistances; the
  // summary when the file has a /summary group (has_summary).
  PatternResult result;
  bool has_summary = false;
};

// Throws IoError naming the path: not an HDF5 file, "not a lobecast result file",
// "format_version 2 is newer than this lobecast (reads 1)", a missing dataset or
// one of the wrong shape.
//
// Streaming: the whole grid is read into memory (~80 bytes a direction while
// reading), so a result whose grid needs more than `max_memory_bytes` (0: the
// machine's physical memory) is refused before its (Nt, Np) datasets are read,
// with InputError (exit 2) naming both sizes, rather than exhausting the memory: a
// streamed result of 1e8 directions is read in parts (h5py, the HDF5 tools).
StoredResult ReadResult(const std::string& path, double max_memory_bytes = 0);

// Bytes ReadResult holds per grid direction at its peak: the stored quantities
// (65) and one complex dataset's read buffer (16).
inline constexpr double kReadBytesPerDirection = 81.0;

// One dataset of a file, as stored (for inspection and tests).
struct StoredDatasetInfo {
  std::string path;                  // e.g. "/field/rE_theta"
  std::vector<std::uint64_t> shape;  // empty for a scalar
  // "float64", "int8", "string", "complex128" (the compound {r, i} of two
  // little-endian float64 at offsets 0 and 8), or "other".
  std::string type;
  std::string units;  // the `units` attribute; empty when absent
  bool chunked = false;
  bool deflated = false;
};

// Every dataset in the file, sorted by path. Throws IoError.
std::vector<StoredDatasetInfo> ListDatasets(const std::string& path);

}  // namespace lobecast
