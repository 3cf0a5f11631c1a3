#include "io/hdf5/result_reader.h"

#include <algorithm>
#include <cmath>

#include "io/hdf5/hdf5_file.h"

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

// An enum attribute, read through its FromString; an unknown name is an IoError.
template <typename T, typename FromString>
void ReadEnum(const std::string& path, hid_t g, const char* name, FromString from_string, T& out) {
  if (!hdf5::HasAttribute(g, name)) return;
  const std::string text = hdf5::ReadStringAttribute(g, name);
  const auto value = from_string(text);
  if (!value) {
    throw IoError(path, std::string("/summary attribute ") + name + " is \"" + text +
                            "\", which this lobecast does not know");
  }
  out = *value;
}

void ReadSummary(const std::string& path, hid_t file, ComputeSummary& s) {
  Handle g = hdf5::OpenGroup(file, "/summary");
  auto number = [&](const char* name, double& out) {
    if (hdf5::HasAttribute(g, name)) out = hdf5::ReadDoubleAttribute(g, name);
  };
  auto count = [&](const char* name, auto& out) {
    if (hdf5::HasAttribute(g, name)) {
      out = static_cast<std::remove_reference_t<decltype(out)>>(hdf5::ReadIntAttribute(g, name));
    }
  };
  ReadEnum(path, g, "method", FieldMethodFromString, s.field_method_used);
  ReadEnum(path, g, "method_requested", FieldMethodFromString, s.field_method_given);
  ReadEnum(path, g, "fast_transform", FastTransformsFromString, s.fast_transforms_used);
  ReadEnum(path, g, "power_method", PowerRouteFromString, s.power_route);
  number("field_error_bound_relative", s.field_error_bound_relative);
  count("threads_used", s.threads_used);
  count("num_dipoles", s.num_dipoles);
  count("num_sources", s.num_sources);
  count("num_directions", s.num_directions);
  number("pairs", s.pairs);
  number("seconds_plan", s.seconds_plan);
  number("seconds_field", s.seconds_field);
  number("seconds_power", s.seconds_power);
  number("seconds_polarization", s.seconds_polarization);
  number("radiated_power_w", s.radiated_power_w);
  number("peak_directivity", s.peak_directivity);
  number("peak_theta_deg", s.peak_theta_deg);
  number("peak_phi_deg", s.peak_phi_deg);
}

StoredResult ReadOpen(const std::string& path, hid_t file) {
  StoredResult out;
  Handle root = hdf5::OpenGroup(file, "/");
  const std::string format =
      hdf5::HasAttribute(root, "format") ? hdf5::ReadStringAttribute(root, "format") : "";
  if (format != kResultFormat) {
    throw NotAResultError(path,
                          "not a lobecast result file (root attribute format is " +
                              (format.empty() ? std::string("missing") : "\"" + format + "\"") +
                              ", expected \"" + std::string(kResultFormat) + "\")");
  }
  const std::int64_t version = hdf5::ReadIntAttribute(root, "format_version");
  if (version > kResultFormatVersion) {
    throw NotAResultError(path, "format_version " + std::to_string(version) +
                                    " is newer than this lobecast (reads " +
                                    std::to_string(kResultFormatVersion) + ")");
  }
  if (version < 1) {
    throw IoError(path, "format_version " + std::to_string(version) + " is not valid");
  }
  out.format_version = static_cast<int>(version);
  out.software_version = OptionalString(root, "software_version");
  out.time_convention = OptionalString(root, "time_convention");
  out.metadata.created = OptionalString(root, "created");
  out.metadata.input_text = OptionalString(root, "input");
  out.metadata.input_path = OptionalString(root, "input_path");

  // /array
  Handle array_group = hdf5::OpenGroup(file, "/array");
  out.metadata.name = OptionalString(array_group, "name");
  out.metadata.description = OptionalString(array_group, "description");
  out.array.frequency_hz = hdf5::ReadDoubleAttribute(array_group, "frequency_hz");
  const std::string ground = hdf5::ReadStringAttribute(array_group, "ground");
  const auto g = GroundFromString(ground);
  if (!g)
    throw IoError(path, "/array attribute ground is \"" + ground + "\", expected none or pec");
  out.array.ground = *g;

  std::vector<hsize_t> dims;
  const std::vector<double> position = hdf5::ReadDoubles(file, "/array/position", &dims);
  if (dims.size() != 2 || dims[1] != 3) {
    throw IoError(path,
                  "dataset '/array/position' has shape " + ShapeText(dims) + ", expected (N, 3)");
  }
  const hsize_t n = dims[0];
  const std::vector<double> orientation = hdf5::ReadDoubles(file, "/array/orientation", &dims);
  ExpectShape(path, "/array/orientation", dims, {n, 3});
  const std::vector<double> effective = hdf5::ReadDoubles(file, "/array/effective_length", &dims);
  ExpectShape(path, "/array/effective_length", dims, {n});
  const std::vector<Complex> current = hdf5::ReadComplex(file, "/array/current", &dims);
  ExpectShape(path, "/array/current", dims, {n});
  std::vector<double> length;
  std::vector<std::string> distribution;
  if (hdf5::Exists(file, "/array/length_m") && hdf5::Exists(file, "/array/distribution")) {
    length = hdf5::ReadDoubles(file, "/array/length_m", &dims);
    ExpectShape(path, "/array/length_m", dims, {n});
    distribution = hdf5::ReadStrings(file, "/array/distribution");
    ExpectShape(path, "/array/distribution", {distribution.size()}, {n});
  }
  out.array.dipoles.resize(n);
  for (std::size_t k = 0; k < n; ++k) {
    Dipole& d = out.array.dipoles[k];
    d.position_m = Vec3(position[3 * k], position[3 * k + 1], position[3 * k + 2]);
    d.orientation = Vec3(orientation[3 * k], orientation[3 * k + 1], orientation[3 * k + 2]);
    d.current_a = current[k];
    if (!length.empty()) {
      const auto dist = DistributionFromString(distribution[k]);
      if (!dist) {
        throw IoError(path, "/array/distribution[" + std::to_string(k) + "] is \"" +
                                distribution[k] + "\", expected uniform or triangular");
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

  // /grid
  PatternResult& r = out.result;
  r.grid.theta_deg = hdf5::ReadDoubles(file, "/grid/theta_deg", &dims);
  ExpectShape(path, "/grid/theta_deg", dims, {r.grid.theta_deg.size()});
  r.grid.phi_deg = hdf5::ReadDoubles(file, "/grid/phi_deg", &dims);
  ExpectShape(path, "/grid/phi_deg", dims, {r.grid.phi_deg.size()});
  const std::vector<hsize_t> grid_shape = {r.grid.theta_deg.size(), r.grid.phi_deg.size()};

  auto complex2d = [&](const char* name) {
    std::vector<Complex> v = hdf5::ReadComplex(file, name, &dims);
    ExpectShape(path, name, dims, grid_shape);
    return ToVector(v);
  };
  auto real2d = [&](const char* name) {
    std::vector<double> v = hdf5::ReadDoubles(file, name, &dims);
    ExpectShape(path, name, dims, grid_shape);
    return ToVector(v);
  };
  r.field.e_theta = complex2d("/field/rE_theta");
  r.field.e_phi = complex2d("/field/rE_phi");
  r.intensity_w_sr = real2d("/pattern/intensity");
  r.directivity = real2d("/pattern/directivity");
  r.axial_ratio_db = real2d("/polarization/axial_ratio_db");
  r.tilt_deg = real2d("/polarization/tilt_deg");
  r.sense = hdf5::ReadInt8(file, "/polarization/sense", &dims);
  ExpectShape(path, "/polarization/sense", dims, grid_shape);

  // /power
  const std::vector<double> power = hdf5::ReadDoubles(file, "/power/radiated_w", &dims);
  if (power.size() != 1) {
    throw IoError(
        path, "dataset '/power/radiated_w' has shape " + ShapeText(dims) + ", expected a scalar");
  }
  r.radiated_power_w = power[0];
  // Large arrays may be stored without the matrix (resistance_ohm stays 0 x 0).
  if (hdf5::Exists(file, "/power/resistance_ohm")) {
    const std::vector<double> resistance = hdf5::ReadDoubles(file, "/power/resistance_ohm", &dims);
    ExpectShape(path, "/power/resistance_ohm", dims, {n, n});
    r.resistance_ohm.resize(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
    for (std::size_t i = 0; i < n; ++i) {
      for (std::size_t j = 0; j < n; ++j) {
        r.resistance_ohm(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) =
            resistance[i * n + j];
      }
    }
  }
  r.active_resistance_ohm =
      ToVector(hdf5::ReadDoubles(file, "/power/active_resistance_ohm", &dims));
  ExpectShape(path, "/power/active_resistance_ohm", dims, {n});

  if (hdf5::Exists(file, "/summary")) {
    ReadSummary(path, file, r.summary);
    out.has_summary = true;
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

StoredResult ReadResult(const std::string& path) {
  hdf5::ErrorSilencer silencer;
  Handle file = hdf5::OpenFileReadOnly(path);
  try {
    return ReadOpen(path, file);
  } catch (const NotAResultError& e) {
    if (e.path() == path) throw;
    throw NotAResultError(path, e.detail());
  } catch (const IoError& e) {
    if (e.path() == path) throw;
    throw IoError(path, e.detail());
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
