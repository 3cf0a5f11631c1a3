#include "io/hdf5/result_reader.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <type_traits>

#include "engine/rounding_floor.h"
#include "engine/run_estimate.h"
#include "io/echo_text.h"
#include "io/hdf5/hdf5_file.h"
#include "io/hdf5/schema.h"
#include "io/hdf5/untrusted_file.h"
#include "io/input_error.h"

namespace lobecast {
namespace {

using hdf5::Handle;

std::string ShapeText(const std::vector<hsize_t>& dims) {
  std::string s = "(";
  for (std::size_t k = 0; k < dims.size(); ++k) {
    if (k > 0) s += ", ";
    s += std::to_string(dims[k]);
  }
  return s + ")";
}

void ExpectShape(const std::string& path, const std::string& name,
                 const std::vector<hsize_t>& found, const std::vector<hsize_t>& expected) {
  if (found != expected) {
    throw IoError(path, "dataset '" + name + "' has shape " + ShapeText(found) + ", expected " +
                            ShapeText(expected));
  }
}

Eigen::VectorXd ToVector(const std::vector<double>& v) {
  return Eigen::Map<const Eigen::VectorXd>(v.data(), static_cast<Eigen::Index>(v.size()));
}

Eigen::VectorXcd ToVector(const std::vector<Complex>& v) {
  return Eigen::Map<const Eigen::VectorXcd>(v.data(), static_cast<Eigen::Index>(v.size()));
}

std::string OptionalString(hid_t obj, const std::string& name) {
  return hdf5::HasAttribute(obj, name) ? hdf5::ReadStringAttribute(obj, name) : std::string();
}

using schema::S;

// --- what a result can hold (CONVENTIONS §3) ------------------------------------
//
// A file that is well-formed HDF5 but holds what no computation writes (a NaN
// grid, theta running backwards, a zero orientation, frequency 0) is refused
// as bad input naming the dataset, before anything is drawn or reported from it.

[[noreturn]] void Refuse(const std::string& path, const std::string& where,
                         const std::string& what) {
  throw NotAResultError(path, std::string(kInvalidResult) + where + " " + what);
}

std::string DatasetName(const schema::Dataset& d) { return "dataset '" + S(d.path) + "'"; }

std::string ValueText(double v) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.17g", v);
  return buffer;
}
std::string ValueText(const Complex& v) {
  return "(" + ValueText(v.real()) + ", " + ValueText(v.imag()) + ")";
}

// Every value of `values` satisfies `ok`; else the first that does not is named.
template <typename T, typename Ok>
void ExpectEach(const std::string& path, const schema::Dataset& d, const T& values, Ok ok,
                const std::string& expected) {
  for (Eigen::Index k = 0; k < static_cast<Eigen::Index>(values.size()); ++k) {
    if (!ok(values[k])) {
      Refuse(path, DatasetName(d),
             "holds " + ValueText(values[k]) + " at index " + std::to_string(k) + ", expected " +
                 expected);
    }
  }
}

// An axis of the grid: at least one angle, each finite and in [0, max_deg], rising.
void ExpectAxis(const std::string& path, const schema::Dataset& d, const std::vector<double>& v,
                double max_deg) {
  if (v.empty()) Refuse(path, DatasetName(d), "is empty, expected at least one angle");
  const std::string bounds = "angles in [0, " + ValueText(max_deg) + "] deg";
  ExpectEach(
      path, d, v, [&](double x) { return x >= 0.0 && x <= max_deg; }, bounds);
  for (std::size_t k = 1; k < v.size(); ++k) {
    if (!(v[k] > v[k - 1])) {
      Refuse(path, DatasetName(d),
             "goes from " + ValueText(v[k - 1]) + " to " + ValueText(v[k]) + " at index " +
                 std::to_string(k) + ", expected strictly increasing angles");
    }
  }
}

bool Finite(double v) { return std::isfinite(v); }
bool FiniteComplex(const Complex& v) { return std::isfinite(v.real()) && std::isfinite(v.imag()); }

// The array and its currents, as soon as they are read.
void ValidateArray(const std::string& path, const StoredResult& out) {
  const Array& a = out.array;
  if (!(std::isfinite(a.frequency_hz) && a.frequency_hz > 0.0)) {
    Refuse(path, S(schema::kArrayGroup) + " attribute " + S(schema::kFrequencyAttribute),
           "is " + ValueText(a.frequency_hz) + ", expected a finite frequency > 0 (Hz)");
  }
  for (std::size_t k = 0; k < a.dipoles.size(); ++k) {
    const Dipole& d = a.dipoles[k];
    const std::string row = " in row " + std::to_string(k);
    if (!d.position_m.allFinite()) {
      Refuse(path, DatasetName(schema::kPosition), "is not finite" + row);
    }
    if (a.ground == Ground::kPec && !(d.position_m.z() > 0.0)) {
      Refuse(path, DatasetName(schema::kPosition),
             "has z = " + ValueText(d.position_m.z()) + row + ", expected z > 0 over pec ground");
    }
    const double norm = d.orientation.norm();
    if (!d.orientation.allFinite() || !(std::abs(norm - 1.0) <= 1e-9)) {
      Refuse(path, DatasetName(schema::kOrientation),
             "has length " + ValueText(norm) + row + ", expected a unit vector");
    }
    if (!(std::isfinite(d.length_m) && d.length_m > 0.0)) {
      Refuse(path, DatasetName(schema::kLength),
             "holds " + ValueText(d.length_m) + row + ", expected a finite length > 0 (m)");
    }
    if (!FiniteComplex(out.currents[static_cast<Eigen::Index>(k)])) {
      Refuse(path, DatasetName(schema::kCurrent), "is not finite" + row);
    }
  }
}

// The grid, before the datasets whose shape it gives are read.
void ValidateGrid(const std::string& path, const AngularGrid& grid) {
  ExpectAxis(path, schema::kTheta, grid.theta_deg, 180.0);
  ExpectAxis(path, schema::kPhi, grid.phi_deg, 360.0);
}

// Everything computed on the grid, and the power.
void ValidateValues(const std::string& path, const PatternResult& r) {
  ExpectEach(path, schema::kETheta, r.field.e_theta, FiniteComplex, "a finite field");
  ExpectEach(path, schema::kEPhi, r.field.e_phi, FiniteComplex, "a finite field");
  const auto finite_non_negative = [](double v) { return std::isfinite(v) && v >= 0.0; };
  ExpectEach(path, schema::kIntensity, r.intensity_w_sr, finite_non_negative,
             "a finite intensity >= 0");
  ExpectEach(path, schema::kDirectivity, r.directivity, finite_non_negative,
             "a finite directivity >= 0");
  // Linear polarization has an infinite axial ratio, and no field no ratio (NaN).
  ExpectEach(
      path, schema::kAxialRatio, r.axial_ratio_db, [](double v) { return !(v < 0.0); },
      "an axial ratio >= 0 dB");
  ExpectEach(
      path, schema::kTilt, r.tilt_deg, [](double v) { return !std::isinf(v); },
      "a finite tilt (or NaN where there is no field)");
  ExpectEach(
      path, schema::kSense, r.sense, [](std::int8_t v) { return v >= -1 && v <= 1; },
      "-1, 0 or +1");
  if (!(std::isfinite(r.radiated_power_w) && r.radiated_power_w > 0.0)) {
    Refuse(path, DatasetName(schema::kRadiatedPower),
           "is " + ValueText(r.radiated_power_w) + ", expected a finite power > 0 (W)");
  }
  ExpectEach(path, schema::kResistance, r.resistance_ohm.reshaped(), Finite, "a finite resistance");
  // A dipole without current has no active resistance (NaN).
  ExpectEach(
      path, schema::kActiveResistance, r.active_resistance_ohm,
      [](double v) { return !std::isinf(v); }, "a finite resistance (or NaN without current)");
}

// The schema's visitor that reads /summary: attributes that are missing keep their
// defaults (files from before they were added); an unknown enum name is an IoError.
struct SummaryReader {
  const std::string& path;
  Handle g;

  bool Has(const schema::Field& f) const { return hdf5::HasAttribute(g, S(f.name)); }
  void Value(const schema::Field& f, double& v) {
    if (Has(f)) v = hdf5::ReadDoubleAttribute(g, S(f.name));
  }
  template <typename Int>
  requires std::is_integral_v<Int>
  void Value(const schema::Field& f, Int& v) {
    if (!Has(f)) return;
    // A damaged -1 must not become 2^64 - 1 (threads_used, num_directions, ...).
    const std::int64_t value = hdf5::ReadIntAttribute(g, S(f.name));
    const std::int64_t high = static_cast<std::uint64_t>(std::numeric_limits<Int>::max()) <
                                      static_cast<std::uint64_t>(hdf5::kMaxStoredCount)
                                  ? static_cast<std::int64_t>(std::numeric_limits<Int>::max())
                                  : hdf5::kMaxStoredCount;
    if (value < 0 || value > high) {
      hdf5::Invalid(path, S(schema::kSummaryGroup) + " attribute " + S(f.name) + " is " +
                              std::to_string(value) + ", expected a whole number in [0, " +
                              std::to_string(high) + "]");
    }
    v = static_cast<Int>(value);
  }
  void Value(const schema::Field& f, FieldMethod& v) { Enum(f, FieldMethodFromString, v); }
  void Value(const schema::Field& f, PowerRoute& v) { Enum(f, PowerRouteFromString, v); }
  void Value(const schema::Field& f, std::vector<FastTransform>& v) {
    Enum(f, FastTransformsFromString, v);
  }
  template <typename T, typename FromString>
  void Enum(const schema::Field& f, FromString from_string, T& out) {
    if (!Has(f)) return;
    const std::string text = hdf5::ReadStringAttribute(g, S(f.name));
    const auto value = from_string(text);
    if (!value) {
      throw IoError(path, S(schema::kSummaryGroup) + " attribute " + S(f.name) + " is \"" +
                              EchoText(text) + "\", which this lobecast does not know");
    }
    out = *value;
  }
};

// Streaming: a grid too large to hold is refused before its datasets are read.
void CheckGridFitsInMemory(const std::string& path, const AngularGrid& grid,
                           double max_memory_bytes) {
  const double limit = max_memory_bytes > 0 ? max_memory_bytes : PhysicalMemoryBytes();
  const double need = kReadBytesPerDirection * static_cast<double>(grid.size());
  if (limit <= 0 || need <= limit) return;
  char text[320];
  std::snprintf(text, sizeof text,
                "the result's grid of %zu directions needs about %.3g GB of memory to read "
                "whole, above the %.3g GB available; this command reads the whole grid (read "
                "such a file in parts, e.g. with h5py or the HDF5 tools)",
                grid.size(), need / 1e9, limit / 1e9);
  throw InputError(SourceLocation{path}, text);
}

StoredResult ReadOpen(const std::string& path, hid_t file, double max_memory_bytes) {
  StoredResult out;
  Handle root = hdf5::OpenGroup(file, "/");
  const std::string format = OptionalString(root, S(schema::kFormatAttribute));
  if (format != kResultFormat) {
    throw NotAResultError(
        path, std::string(kIncompleteResult) + "the root attribute format is " +
                  (format.empty() ? std::string("missing") : "\"" + EchoText(format) + "\"") +
                  ", expected \"" + std::string(kResultFormat) + "\" (" +
                  (format.starts_with("lobecast.")
                       ? "another lobecast output, not a lobecast result file"
                       : "not a lobecast result file: another program's HDF5?") +
                  ")");
  }
  const std::int64_t version = hdf5::ReadIntAttribute(root, S(schema::kFormatVersionAttribute));
  if (version > kResultFormatVersion) {
    throw NotAResultError(path, "format_version " + std::to_string(version) +
                                    " is newer than this lobecast (reads " +
                                    std::to_string(kResultFormatVersion) + ")");
  }
  if (version < 1) {
    throw IoError(path, "format_version " + std::to_string(version) + " is not valid");
  }
  out.format_version = static_cast<int>(version);
  out.software_version = OptionalString(root, S(schema::kSoftwareVersionAttribute));
  out.time_convention = OptionalString(root, S(schema::kTimeConventionAttribute));
  out.metadata.created = OptionalString(root, S(schema::kCreatedAttribute));
  out.metadata.input_text = OptionalString(root, S(schema::kInputAttribute));
  out.metadata.input_path = OptionalString(root, S(schema::kInputPathAttribute));

  // /array
  Handle array_group = hdf5::OpenGroup(file, S(schema::kArrayGroup));
  out.metadata.name = OptionalString(array_group, S(schema::kNameAttribute));
  out.metadata.description = OptionalString(array_group, S(schema::kDescriptionAttribute));
  out.array.frequency_hz = hdf5::ReadDoubleAttribute(array_group, S(schema::kFrequencyAttribute));
  const std::string ground = hdf5::ReadStringAttribute(array_group, S(schema::kGroundAttribute));
  const auto g = GroundFromString(ground);
  if (!g)
    throw IoError(path, S(schema::kArrayGroup) + " attribute " + S(schema::kGroundAttribute) +
                            " is \"" + EchoText(ground) + "\", expected none or pec");
  out.array.ground = *g;

  std::vector<hsize_t> dims;
  const std::vector<double> position = hdf5::ReadDoubles(file, S(schema::kPosition.path), &dims);
  if (dims.size() != 2 || dims[1] != 3) {
    throw IoError(path, "dataset '" + S(schema::kPosition.path) + "' has shape " + ShapeText(dims) +
                            ", expected (N, 3)");
  }
  const hsize_t n = dims[0];
  const std::vector<double> orientation =
      hdf5::ReadDoubles(file, S(schema::kOrientation.path), &dims);
  ExpectShape(path, S(schema::kOrientation.path), dims, {n, 3});
  const std::vector<double> effective =
      hdf5::ReadDoubles(file, S(schema::kEffectiveLength.path), &dims);
  ExpectShape(path, S(schema::kEffectiveLength.path), dims, {n});
  const std::vector<Complex> current = hdf5::ReadComplex(file, S(schema::kCurrent.path), &dims);
  ExpectShape(path, S(schema::kCurrent.path), dims, {n});
  std::vector<double> length;
  std::vector<std::string> distribution;
  if (hdf5::Exists(file, S(schema::kLength.path)) &&
      hdf5::Exists(file, S(schema::kDistribution.path))) {
    length = hdf5::ReadDoubles(file, S(schema::kLength.path), &dims);
    ExpectShape(path, S(schema::kLength.path), dims, {n});
    distribution = hdf5::ReadStrings(file, S(schema::kDistribution.path));
    ExpectShape(path, S(schema::kDistribution.path), {distribution.size()}, {n});
  }
  out.array.dipoles.resize(n);
  out.currents = Eigen::Map<const Eigen::VectorXcd>(current.data(), static_cast<Eigen::Index>(n));
  for (std::size_t k = 0; k < n; ++k) {
    Dipole& d = out.array.dipoles[k];
    d.position_m = Vec3(position[3 * k], position[3 * k + 1], position[3 * k + 2]);
    d.orientation = Vec3(orientation[3 * k], orientation[3 * k + 1], orientation[3 * k + 2]);
    if (!length.empty()) {
      const auto dist = DistributionFromString(distribution[k]);
      if (!dist) {
        throw IoError(path, S(schema::kDistribution.path) + "[" + std::to_string(k) + "] is \"" +
                                EchoText(distribution[k]) + "\", expected uniform or triangular");
      }
      d.distribution = *dist;
      d.length_m = length[k];
    } else {
      // Only the effective length is in the schema's minimum: store it as a
      // uniform (Hertzian) dipole of that length, which radiates the same.
      d.distribution = Distribution::kUniform;
      d.length_m = effective[k];
    }
  }

  ValidateArray(path, out);

  // /grid
  PatternResult& r = out.result;
  r.grid.theta_deg = hdf5::ReadDoubles(file, S(schema::kTheta.path), &dims);
  ExpectShape(path, S(schema::kTheta.path), dims, {r.grid.theta_deg.size()});
  r.grid.phi_deg = hdf5::ReadDoubles(file, S(schema::kPhi.path), &dims);
  ExpectShape(path, S(schema::kPhi.path), dims, {r.grid.phi_deg.size()});
  ValidateGrid(path, r.grid);
  CheckGridFitsInMemory(path, r.grid, max_memory_bytes);
  const std::vector<hsize_t> grid_shape = {r.grid.theta_deg.size(), r.grid.phi_deg.size()};

  auto complex2d = [&](const schema::Dataset& d) {
    std::vector<Complex> v = hdf5::ReadComplex(file, S(d.path), &dims);
    ExpectShape(path, S(d.path), dims, grid_shape);
    return ToVector(v);
  };
  auto real2d = [&](const schema::Dataset& d) {
    std::vector<double> v = hdf5::ReadDoubles(file, S(d.path), &dims);
    ExpectShape(path, S(d.path), dims, grid_shape);
    return ToVector(v);
  };
  r.field.e_theta = complex2d(schema::kETheta);
  r.field.e_phi = complex2d(schema::kEPhi);
  r.intensity_w_sr = real2d(schema::kIntensity);
  r.directivity = real2d(schema::kDirectivity);
  r.axial_ratio_db = real2d(schema::kAxialRatio);
  r.tilt_deg = real2d(schema::kTilt);
  r.sense = hdf5::ReadInt8(file, S(schema::kSense.path), &dims);
  ExpectShape(path, S(schema::kSense.path), dims, grid_shape);

  // /power
  const std::vector<double> power = hdf5::ReadDoubles(file, S(schema::kRadiatedPower.path), &dims);
  if (power.size() != 1) {
    throw IoError(path, "dataset '" + S(schema::kRadiatedPower.path) + "' has shape " +
                            ShapeText(dims) + ", expected a scalar");
  }
  r.radiated_power_w = power[0];
  // Large arrays may be stored without the matrix (resistance_ohm stays 0 x 0).
  if (hdf5::Exists(file, S(schema::kResistance.path))) {
    const std::vector<double> resistance =
        hdf5::ReadDoubles(file, S(schema::kResistance.path), &dims);
    ExpectShape(path, S(schema::kResistance.path), dims, {n, n});
    r.resistance_ohm.resize(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
    for (std::size_t i = 0; i < n; ++i) {
      for (std::size_t j = 0; j < n; ++j) {
        r.resistance_ohm(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) =
            resistance[i * n + j];
      }
    }
  }
  r.active_resistance_ohm =
      ToVector(hdf5::ReadDoubles(file, S(schema::kActiveResistance.path), &dims));
  ExpectShape(path, S(schema::kActiveResistance.path), dims, {n});

  if (hdf5::Exists(file, S(schema::kSummaryGroup))) {
    SummaryReader v{path, hdf5::OpenGroup(file, S(schema::kSummaryGroup))};
    schema::VisitSummary(r.summary, v);
    schema::VisitPowerQuadrature(r.summary, v);
    out.has_summary = true;
  }
  ValidateValues(path, r);
  // The numerical floor again, from the stored array and currents (not stored), for
  // everything derived from the field after reading (analysis, exports, plots). The
  // stored field is floored already (DeriveFromField); flooring it again changes
  // nothing but a file written before the floor existed.
  r.field_floor_v = FieldFloor_v(out.array, out.currents);
  for (Eigen::Index i = 0; i < r.field.e_theta.size(); ++i) {
    r.field.e_theta[i] = Floored(r.field.e_theta[i], r.field_floor_v);
    r.field.e_phi[i] = Floored(r.field.e_phi[i], r.field_floor_v);
  }
  return out;
}

#if H5_VERSION_GE(1, 12, 0)
using LinkInfo = H5L_info2_t;
#else
using LinkInfo = H5L_info_t;
#endif

herr_t CollectDataset(hid_t group, const char* name, const LinkInfo* /*info*/, void* data) {
  auto* names = static_cast<std::vector<std::string>*>(data);
  const hid_t obj = H5Oopen(group, name, H5P_DEFAULT);
  if (obj < 0) return -1;
  if (H5Iget_type(obj) == H5I_DATASET) names->push_back(std::string("/") + name);
  H5Oclose(obj);
  return 0;
}

std::string TypeName(hid_t type) {
  switch (H5Tget_class(type)) {
    case H5T_FLOAT:
      return H5Tget_size(type) == 8 ? "float64" : "other";
    case H5T_INTEGER:
      return H5Tget_size(type) == 1 && H5Tget_sign(type) == H5T_SGN_2 ? "int8" : "other";
    case H5T_STRING:
      return "string";
    case H5T_COMPOUND: {
      if (H5Tget_nmembers(type) != 2 || H5Tget_size(type) != 16) return "other";
      for (unsigned k = 0; k < 2; ++k) {
        char* name = H5Tget_member_name(type, k);
        const bool name_ok = name != nullptr && std::string(name) == (k == 0 ? "r" : "i");
        H5free_memory(name);
        Handle member(H5Tget_member_type(type, k));
        if (!name_ok || H5Tget_member_offset(type, k) != 8 * k ||
            H5Tequal(member, H5T_IEEE_F64LE) <= 0) {
          return "other";
        }
      }
      return "complex128";
    }
    default:
      return "other";
  }
}

}  // namespace

StoredResult ReadResult(const std::string& path, double max_memory_bytes) {
  hdf5::ErrorSilencer silencer;
  Handle file = hdf5::OpenFileReadOnly(path);
  try {
    return ReadOpen(path, file, max_memory_bytes);
  } catch (const NotAResultError& e) {
    if (e.path() == path) throw;
    throw NotAResultError(path, e.detail());
  } catch (const IoError& e) {
    // The file opened but does not hold what a result holds (a dataset missing or
    // unreadable, a shape wrong): truncated, damaged or another program's file.
    throw NotAResultError(path, std::string(kIncompleteResult) + e.detail());
  }
}

std::vector<StoredDatasetInfo> ListDatasets(const std::string& path) {
  hdf5::ErrorSilencer silencer;
  Handle file = hdf5::OpenFileReadOnly(path);
  std::vector<std::string> names;
  if (H5Lvisit(file, H5_INDEX_NAME, H5_ITER_INC, CollectDataset, &names) < 0) {
    hdf5::Fail(path, "listing the datasets");
  }
  std::sort(names.begin(), names.end());
  std::vector<StoredDatasetInfo> out;
  for (const std::string& name : names) {
    StoredDatasetInfo info;
    info.path = name;
    for (hsize_t d : hdf5::DatasetDims(file, name)) info.shape.push_back(d);
    Handle ds = hdf5::OpenDataset(file, name);
    Handle type(hdf5::Check(H5Dget_type(ds), file, "reading the type of " + name));
    info.type = TypeName(type);
    if (hdf5::HasAttribute(ds, "units")) info.units = hdf5::ReadStringAttribute(ds, "units");
    Handle dcpl(hdf5::Check(H5Dget_create_plist(ds), file, "reading the layout of " + name));
    info.chunked = H5Pget_layout(dcpl) == H5D_CHUNKED;
    for (int k = 0; k < H5Pget_nfilters(dcpl); ++k) {
      unsigned flags = 0;
      std::size_t nelmts = 0;
      unsigned config = 0;
      if (H5Pget_filter2(dcpl, static_cast<unsigned>(k), &flags, &nelmts, nullptr, 0, nullptr,
                         &config) == H5Z_FILTER_DEFLATE) {
        info.deflated = true;
      }
    }
    out.push_back(std::move(info));
  }
  return out;
}

}  // namespace lobecast
