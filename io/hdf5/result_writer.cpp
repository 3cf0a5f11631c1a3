#include "io/hdf5/result_writer.h"

#include <algorithm>
#include <cerrno>
#include <chrono>
#include <cstdio>
#include <cstring>
#include <ctime>
#include <utility>

#include "engine/error.h"
#include "io/hdf5/hdf5_file.h"
#include "io/hdf5/schema.h"
#include "io/output_file.h"
#include "io/safety_note.h"
#include "io/version.h"

namespace lobecast {
namespace {

using hdf5::Handle;

std::size_t ChunkRows(const ResultWriteOptions& options, std::size_t nt, std::size_t np) {
  std::size_t rows = options.chunk_theta_rows;
  if (rows == 0) rows = (64 * 1024 / sizeof(double)) / std::max<std::size_t>(np, 1);
  return std::clamp<std::size_t>(rows, 1, std::max<std::size_t>(nt, 1));
}

// Eigen matrices are column-major; HDF5 datasets are row-major.
std::vector<double> RowMajor(const Eigen::MatrixXd& m) {
  std::vector<double> out(static_cast<std::size_t>(m.size()));
  for (Eigen::Index i = 0; i < m.rows(); ++i) {
    for (Eigen::Index j = 0; j < m.cols(); ++j) {
      out[static_cast<std::size_t>(i * m.cols() + j)] = m(i, j);
    }
  }
  return out;
}

using schema::S;

// A dataset of the schema, written into its group `g`.
template <typename T>
void Write(hid_t g, const schema::Dataset& d, const std::vector<hsize_t>& dims, const T* data) {
  hdf5::WriteDataset(g, S(d.name()), dims, data, d.units);
}

// The schema's visitor that writes the /summary attributes; enums as their names.
struct SummaryWriter {
  Handle g;
  void Value(const schema::Field& f, double v) { hdf5::WriteScalarAttribute(g, S(f.name), v); }
  void Value(const schema::Field& f, int v) { hdf5::WriteIntAttribute(g, S(f.name), v); }
  void Value(const schema::Field& f, std::size_t v) {
    hdf5::WriteIntAttribute(g, S(f.name), static_cast<std::int64_t>(v));
  }
  void Value(const schema::Field& f, FieldMethod v) { Text(f, ToString(v)); }
  void Value(const schema::Field& f, PowerRoute v) { Text(f, ToString(v)); }
  void Value(const schema::Field& f, const std::vector<FastTransform>& v) {
    Text(f, FastTransformsToString(v));
  }
  void Text(const schema::Field& f, std::string_view v) {
    hdf5::WriteStringAttribute(g, S(f.name), v);
  }
};

void CheckSize(const char* what, std::size_t found, std::size_t expected) {
  if (found != expected) {
    throw InvalidArgument(std::string("result to write: ") + what + " has " +
                          std::to_string(found) + " values, expected " + std::to_string(expected));
  }
}

}  // namespace

std::string Iso8601UtcNow() {
  const std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm utc{};
  gmtime_r(&now, &utc);
  char buffer[32];
  std::strftime(buffer, sizeof buffer, "%Y-%m-%dT%H:%M:%SZ", &utc);
  return buffer;
}

PatternRows RowsOf(const PatternResult& result, std::size_t first_row, std::size_t num_rows) {
  const std::size_t np = result.grid.phi_deg.size();
  const std::size_t offset = first_row * np;
  PatternRows rows;
  rows.num_rows = num_rows;
  rows.e_theta = result.field.e_theta.data() + offset;
  rows.e_phi = result.field.e_phi.data() + offset;
  rows.intensity_w_sr = result.intensity_w_sr.data() + offset;
  rows.directivity = result.directivity.data() + offset;
  rows.axial_ratio_db = result.axial_ratio_db.data() + offset;
  rows.tilt_deg = result.tilt_deg.data() + offset;
  rows.sense = result.sense.data() + offset;
  return rows;
}

struct PatternFileWriter::Impl {
  std::string path;
  std::string temp_path;
  std::unique_ptr<OutputFile> out;  // the temporary, its cleanup and the rename
  ResultMetadata meta;
  ResultWriteOptions options;
  std::size_t num_dipoles = 0;
  std::size_t nt = 0;
  std::size_t np = 0;
  std::vector<bool> rows_written;
  bool power_written = false;
  bool finished = false;
  bool dead = false;
  hdf5::ErrorSilencer silencer;  // for the writer's lifetime
  Handle file;
  Handle complex_file_type;
  Handle e_theta, e_phi, intensity, directivity, axial_ratio, tilt, sense;

  void Hook(std::string_view what) const {
    if (options.before_write) options.before_write(what);
  }

  void RemoveTemporary() noexcept {
    e_theta.Reset(), e_phi.Reset(), intensity.Reset(), directivity.Reset();
    axial_ratio.Reset(), tilt.Reset(), sense.Reset(), complex_file_type.Reset();
    file.Reset();
    if (out) out->Abandon();
  }

  // Runs one step; on any failure removes the temporary file, marks the writer
  // dead and rethrows (HDF5 errors name the target, not the temporary).
  template <typename F>
  void Step(F&& f) {
    if (dead) throw IoError(path, "the result writer already failed or finished");
    try {
      f();
    } catch (const IoError& e) {
      dead = true;
      RemoveTemporary();
      if (e.path() == path) throw;
      throw IoError(path, e.detail());
    } catch (...) {
      dead = true;
      RemoveTemporary();
      throw;
    }
  }

  Handle Group(const std::string& group_path) {
    if (hdf5::Exists(file, group_path)) return hdf5::OpenGroup(file, group_path);
    std::size_t pos = 0;
    while ((pos = group_path.find('/', pos + 1)) != std::string::npos) {
      const std::string parent = group_path.substr(0, pos);
      if (!hdf5::Exists(file, parent)) hdf5::CreateGroup(file, parent);
    }
    return hdf5::CreateGroup(file, group_path);
  }

  Handle Create2D(const schema::Dataset& d, hid_t type) {
    Hook(d.path);
    hdf5::DatasetLayout layout;
    layout.chunk_rows = ChunkRows(options, nt, np);
    layout.deflate_level = options.deflate_level;
    return hdf5::CreateDataset(file, S(d.path), type, {nt, np}, d.units, layout);
  }

  void WriteHeader(const Array& array, const Eigen::VectorXcd& currents, const AngularGrid& grid) {
    const std::size_t n = array.size();
    std::vector<double> position(3 * n), orientation(3 * n), effective_length(n), length(n);
    std::vector<std::string> distribution(n);
    std::vector<Complex> current(n);
    for (std::size_t k = 0; k < n; ++k) {
      const Dipole& d = array.dipoles[k];
      for (int c = 0; c < 3; ++c) {
        position[3 * k + c] = d.position_m[c];
        orientation[3 * k + c] = d.orientation[c];
      }
      effective_length[k] = d.effective_length_m();
      length[k] = d.length_m;
      distribution[k] = std::string(ToString(d.distribution));
      current[k] = currents[static_cast<Eigen::Index>(k)];
    }
    const auto N = static_cast<hsize_t>(n);

    Hook(schema::kArrayGroup);
    Handle g = hdf5::CreateGroup(file, S(schema::kArrayGroup));
    hdf5::WriteScalarAttribute(g, S(schema::kFrequencyAttribute), array.frequency_hz);
    hdf5::WriteScalarAttribute(g, S(schema::kWavelengthAttribute), array.wavelength_m());
    hdf5::WriteStringAttribute(g, S(schema::kGroundAttribute), ToString(array.ground));
    if (!meta.name.empty()) hdf5::WriteStringAttribute(g, S(schema::kNameAttribute), meta.name);
    if (!meta.description.empty()) {
      hdf5::WriteStringAttribute(g, S(schema::kDescriptionAttribute), meta.description);
    }
    Hook(schema::kPosition.path);
    Write(g, schema::kPosition, {N, 3}, position.data());
    Write(g, schema::kOrientation, {N, 3}, orientation.data());
    Write(g, schema::kEffectiveLength, {N}, effective_length.data());
    Write(g, schema::kLength, {N}, length.data());
    hdf5::WriteStringDataset(g, S(schema::kDistribution.name()), distribution,
                             schema::kDistribution.units);
    Write(g, schema::kCurrent, {N}, current.data());

    Hook(schema::kGridGroup);
    Handle gg = hdf5::CreateGroup(file, S(schema::kGridGroup));
    Write(gg, schema::kTheta, {nt}, grid.theta_deg.data());
    Write(gg, schema::kPhi, {np}, grid.phi_deg.data());

    hdf5::CreateGroup(file, S(schema::kFieldGroup));
    hdf5::CreateGroup(file, S(schema::kPatternGroup));
    hdf5::CreateGroup(file, S(schema::kPolarizationGroup));
    e_theta = Create2D(schema::kETheta, complex_file_type);
    e_phi = Create2D(schema::kEPhi, complex_file_type);
    intensity = Create2D(schema::kIntensity, H5T_IEEE_F64LE);
    directivity = Create2D(schema::kDirectivity, H5T_IEEE_F64LE);
    axial_ratio = Create2D(schema::kAxialRatio, H5T_IEEE_F64LE);
    tilt = Create2D(schema::kTilt, H5T_IEEE_F64LE);
    sense = Create2D(schema::kSense, H5T_STD_I8LE);
    hdf5::WriteStringAttribute(sense, S(schema::kSenseValuesAttribute), schema::kSenseValues);
  }
};

PatternFileWriter::PatternFileWriter(const std::string& path, const Array& array,
                                     const Eigen::VectorXcd& currents_a, const AngularGrid& grid,
                                     const ResultMetadata& meta, const ResultWriteOptions& options)
    : impl_(std::make_unique<Impl>()) {
  Impl& w = *impl_;
  w.out = std::make_unique<OutputFile>(path, "the result");  // refuses a device
  w.path = path;
  w.temp_path = w.out->temporary();
  w.meta = meta;
  if (w.meta.created.empty()) w.meta.created = Iso8601UtcNow();
  w.options = options;
  w.num_dipoles = array.size();
  w.nt = grid.theta_deg.size();
  w.np = grid.phi_deg.size();
  w.rows_written.assign(w.nt, false);
  if (array.size() == 0) throw InvalidArgument("result to write: the array has no dipoles");
  CheckSize("currents", static_cast<std::size_t>(currents_a.size()), array.size());
  if (w.nt == 0 || w.np == 0) throw InvalidArgument("result to write: the grid is empty");

  w.Step([&] {
    w.Hook("create");
    w.out->CreatedByLibrary();
    w.file = hdf5::CreateFile(w.temp_path);
    w.complex_file_type = Handle(H5Tcreate(H5T_COMPOUND, 2 * sizeof(double)));
    hdf5::Check(w.complex_file_type.get(), w.file, "building the complex type");
    hdf5::Check(H5Tinsert(w.complex_file_type, "r", 0, H5T_IEEE_F64LE), w.file,
                "building the complex type");
    hdf5::Check(H5Tinsert(w.complex_file_type, "i", sizeof(double), H5T_IEEE_F64LE), w.file,
                "building the complex type");
    w.WriteHeader(array, currents_a, grid);
  });
}

PatternFileWriter::~PatternFileWriter() { Abandon(); }
PatternFileWriter::PatternFileWriter(PatternFileWriter&&) noexcept = default;
PatternFileWriter& PatternFileWriter::operator=(PatternFileWriter&& other) noexcept {
  if (this != &other) {
    Abandon();
    impl_ = std::move(other.impl_);
  }
  return *this;
}

void PatternFileWriter::Abandon() noexcept {
  if (impl_ && !impl_->finished) {
    impl_->dead = true;
    impl_->RemoveTemporary();
  }
}

const std::string& PatternFileWriter::path() const { return impl_->path; }
const std::string& PatternFileWriter::temporary_path() const { return impl_->temp_path; }

void PatternFileWriter::WriteRows(std::size_t first_theta_row, const PatternRows& rows) {
  Impl& w = *impl_;
  w.Step([&] {
    if (first_theta_row + rows.num_rows > w.nt) {
      throw InvalidArgument("result to write: theta rows " + std::to_string(first_theta_row) +
                            ".." + std::to_string(first_theta_row + rows.num_rows - 1) +
                            " exceed the grid's " + std::to_string(w.nt));
    }
    if (rows.num_rows == 0) return;
    if (!rows.e_theta || !rows.e_phi || !rows.intensity_w_sr || !rows.directivity ||
        !rows.axial_ratio_db || !rows.tilt_deg || !rows.sense) {
      throw InvalidArgument("result to write: PatternRows has a null quantity");
    }
    const auto first = static_cast<hsize_t>(first_theta_row);
    const auto count = static_cast<hsize_t>(rows.num_rows);
    Handle complex_mem = hdf5::ComplexType();
    w.Hook(schema::kETheta.path);
    hdf5::WriteRows(w.e_theta, complex_mem, first, count, rows.e_theta);
    w.Hook(schema::kEPhi.path);
    hdf5::WriteRows(w.e_phi, complex_mem, first, count, rows.e_phi);
    w.Hook(schema::kIntensity.path);
    hdf5::WriteRows(w.intensity, H5T_NATIVE_DOUBLE, first, count, rows.intensity_w_sr);
    w.Hook(schema::kDirectivity.path);
    hdf5::WriteRows(w.directivity, H5T_NATIVE_DOUBLE, first, count, rows.directivity);
    w.Hook(schema::kAxialRatio.path);
    hdf5::WriteRows(w.axial_ratio, H5T_NATIVE_DOUBLE, first, count, rows.axial_ratio_db);
    w.Hook(schema::kTilt.path);
    hdf5::WriteRows(w.tilt, H5T_NATIVE_DOUBLE, first, count, rows.tilt_deg);
    w.Hook(schema::kSense.path);
    hdf5::WriteRows(w.sense, H5T_NATIVE_INT8, first, count, rows.sense);
    std::fill_n(w.rows_written.begin() + static_cast<std::ptrdiff_t>(first_theta_row),
                rows.num_rows, true);
  });
}

void PatternFileWriter::WritePower(double radiated_power_w, const Eigen::MatrixXd& resistance_ohm,
                                   const Eigen::VectorXd& active_resistance_ohm,
                                   std::string_view active_resistance_omitted) {
  Impl& w = *impl_;
  w.Step([&] {
    const auto n = static_cast<std::size_t>(w.num_dipoles);
    // An empty matrix means the power was streamed without it (large arrays):
    // the dataset is then left out and the group says why.
    const bool with_matrix = resistance_ohm.size() != 0;
    if (with_matrix) {
      CheckSize("resistance_ohm rows", static_cast<std::size_t>(resistance_ohm.rows()), n);
      CheckSize("resistance_ohm columns", static_cast<std::size_t>(resistance_ohm.cols()), n);
    }
    CheckSize("active_resistance_ohm", static_cast<std::size_t>(active_resistance_ohm.size()), n);
    w.Hook(schema::kPowerGroup);
    Handle g = w.Group(S(schema::kPowerGroup));
    hdf5::WriteScalarDataset(g, S(schema::kRadiatedPower.name()), radiated_power_w,
                             schema::kRadiatedPower.units);
    if (with_matrix) {
      const std::vector<double> r = RowMajor(resistance_ohm);
      Write(g, schema::kResistance, {n, n}, r.data());
    } else {
      hdf5::WriteStringAttribute(g, S(schema::kResistanceOmittedAttribute),
                                 "the N x N matrix was not stored for this array size; "
                                 "power and active resistances were streamed without it "
                                 "(lobecast compute --resistance-matrix stores it)");
    }
    Write(g, schema::kActiveResistance, {n}, active_resistance_ohm.data());
    if (!active_resistance_omitted.empty()) {
      hdf5::WriteStringAttribute(g, S(schema::kActiveResistanceOmittedAttribute),
                                 S(active_resistance_omitted));
    }
    w.power_written = true;
  });
}

void PatternFileWriter::WriteSummary(const ComputeSummary& s) {
  Impl& w = *impl_;
  w.Step([&] {
    w.Hook(schema::kSummaryGroup);
    SummaryWriter v{w.Group(S(schema::kSummaryGroup))};
    schema::VisitSummary(s, v);
    if (s.power_route == PowerRoute::kQuadrature) schema::VisitPowerQuadrature(s, v);
  });
}

void PatternFileWriter::WriteAttribute(const std::string& object_path, const std::string& name,
                                       double value) {
  Impl& w = *impl_;
  w.Step([&] {
    w.Hook(object_path);
    hdf5::WriteScalarAttribute(w.Group(object_path), name, value);
  });
}

void PatternFileWriter::WriteIntAttribute(const std::string& object_path, const std::string& name,
                                          std::int64_t value) {
  Impl& w = *impl_;
  w.Step([&] {
    w.Hook(object_path);
    hdf5::WriteIntAttribute(w.Group(object_path), name, value);
  });
}

void PatternFileWriter::WriteStringAttribute(const std::string& object_path,
                                             const std::string& name, std::string_view value) {
  Impl& w = *impl_;
  w.Step([&] {
    w.Hook(object_path);
    hdf5::WriteStringAttribute(w.Group(object_path), name, value);
  });
}

namespace {

// "/group/name" -> ("/group", "name"); InvalidArgument for anything else.
std::pair<std::string, std::string> SplitTablePath(const std::string& dataset_path) {
  const std::size_t slash = dataset_path.rfind('/');
  if (slash == std::string::npos || slash == 0 || slash + 1 == dataset_path.size()) {
    throw InvalidArgument("result to write: table path '" + dataset_path + "' must be /group/name");
  }
  return {dataset_path.substr(0, slash), dataset_path.substr(slash + 1)};
}

}  // namespace

template <typename T>
void PatternFileWriter::WriteTableOf(const std::string& dataset_path,
                                     const std::vector<std::size_t>& dims, const T* data,
                                     std::string_view units) {
  Impl& w = *impl_;
  w.Step([&] {
    const auto [group, name] = SplitTablePath(dataset_path);
    w.Hook(dataset_path);
    Handle g = w.Group(group);
    std::vector<hsize_t> h5dims(dims.begin(), dims.end());
    hdf5::WriteDataset(g, name, h5dims, data, units);
  });
}

void PatternFileWriter::WriteTable(const std::string& dataset_path,
                                   const std::vector<std::size_t>& dims, const double* data,
                                   std::string_view units) {
  WriteTableOf(dataset_path, dims, data, units);
}

void PatternFileWriter::WriteTable(const std::string& dataset_path,
                                   const std::vector<std::size_t>& dims, const Complex* data,
                                   std::string_view units) {
  WriteTableOf(dataset_path, dims, data, units);
}

void PatternFileWriter::WriteStrings(const std::string& dataset_path,
                                     const std::vector<std::string>& values,
                                     std::string_view units) {
  Impl& w = *impl_;
  w.Step([&] {
    const auto [group, name] = SplitTablePath(dataset_path);
    w.Hook(dataset_path);
    Handle g = w.Group(group);
    hdf5::WriteStringDataset(g, name, values, units);
  });
}

void PatternFileWriter::Finish() {
  Impl& w = *impl_;
  w.Step([&] {
    const auto missing = std::find(w.rows_written.begin(), w.rows_written.end(), false);
    if (missing != w.rows_written.end()) {
      throw IoError(w.path, "theta row " + std::to_string(missing - w.rows_written.begin()) +
                                " of " + std::to_string(w.nt) + " was never written");
    }
    if (!w.power_written) throw IoError(w.path, "the /power group was never written");

    w.Hook("/");
    Handle root = hdf5::OpenGroup(w.file, "/");
    hdf5::WriteStringAttribute(root, S(schema::kSoftwareVersionAttribute), SoftwareVersion());
    hdf5::WriteStringAttribute(root, S(schema::kTimeConventionAttribute), schema::kTimeConvention);
    hdf5::WriteStringAttribute(root, S(schema::kSafetyNoteAttribute), kSafetyNote);
    hdf5::WriteStringAttribute(root, S(schema::kCreatedAttribute), w.meta.created);
    hdf5::WriteStringAttribute(root, S(schema::kInputAttribute), w.meta.input_text);
    if (!w.meta.input_path.empty()) {
      hdf5::WriteStringAttribute(root, S(schema::kInputPathAttribute), w.meta.input_path);
    }
    // Last: only a complete file says what it is.
    hdf5::WriteIntAttribute(root, S(schema::kFormatVersionAttribute), kResultFormatVersion);
    hdf5::WriteStringAttribute(root, S(schema::kFormatAttribute), kResultFormat);
    root.Reset();

    w.e_theta.Reset(), w.e_phi.Reset(), w.intensity.Reset(), w.directivity.Reset();
    w.axial_ratio.Reset(), w.tilt.Reset(), w.sense.Reset(), w.complex_file_type.Reset();
    if (w.file.Close() < 0) hdf5::Fail(w.path, "closing the file");

    // Synced, then renamed onto the target (io/output_file.h).
    w.Hook("rename");
    w.out->Commit();
    w.finished = true;
    w.dead = true;
  });
}

void WriteResult(const std::string& path, const Array& array, const Eigen::VectorXcd& currents_a,
                 const PatternResult& result, const ResultMetadata& meta,
                 const ResultWriteOptions& options) {
  const std::size_t nt = result.grid.theta_deg.size();
  const std::size_t np = result.grid.phi_deg.size();
  const std::size_t m = nt * np;
  CheckSize("field.e_theta", result.field.size(), m);
  CheckSize("field.e_phi", static_cast<std::size_t>(result.field.e_phi.size()), m);
  CheckSize("intensity_w_sr", static_cast<std::size_t>(result.intensity_w_sr.size()), m);
  CheckSize("directivity", static_cast<std::size_t>(result.directivity.size()), m);
  CheckSize("axial_ratio_db", static_cast<std::size_t>(result.axial_ratio_db.size()), m);
  CheckSize("tilt_deg", static_cast<std::size_t>(result.tilt_deg.size()), m);
  CheckSize("sense", result.sense.size(), m);

  PatternFileWriter writer(path, array, currents_a, result.grid, meta, options);
  const std::size_t block = ChunkRows(options, nt, np);
  for (std::size_t first = 0; first < nt; first += block) {
    writer.WriteRows(first, RowsOf(result, first, std::min(block, nt - first)));
  }
  WriteResultTail(writer, result);
  if (options.before_finish) options.before_finish(writer);
  writer.Finish();
}

void WriteResultTail(PatternFileWriter& writer, const PatternResult& result) {
  writer.WritePower(result.radiated_power_w, result.resistance_ohm, result.active_resistance_ohm,
                    result.summary.power_route == PowerRoute::kQuadrature
                        ? "the power came from the band-limited quadrature, which gives no "
                          "mutual reactances; the active resistances need them (O(N^2)): "
                          "lobecast compute --power-method closed computes them"
                        : "");
  writer.WriteSummary(result.summary);
}

double EstimatedResultBytes(std::size_t num_dipoles, std::size_t num_directions,
                            bool resistance_matrix) {
  // Per direction: rE_theta and rE_phi (16 bytes each), intensity, directivity,
  // axial ratio and tilt (8 each), sense (1); deflate's worst case adds 5 bytes per
  // 16 KiB block plus a few per chunk (zlib's deflateBound), and the chunk B-tree
  // under 100 bytes a chunk of >= 8 KiB: 1 % covers both.
  constexpr double kBytesPerDirection = 65.0 * 1.01;
  // Position, orientation (48), lengths (16), current (16), active resistance (8),
  // the distribution string and per-dipole overheads: 256 is above all of it.
  constexpr double kBytesPerDipole = 256.0;
  constexpr double kFixedBytes = 4e6;  // header, attributes, summary, analysis tables
  const auto n = static_cast<double>(num_dipoles);
  return kBytesPerDirection * static_cast<double>(num_directions) + kBytesPerDipole * n +
         (resistance_matrix ? 8.0 * n * n : 0.0) + kFixedBytes;
}

}  // namespace lobecast
