#include "io/hdf5/hdf5_file.h"

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <memory>
#include <optional>
#include <string_view>
#include <system_error>

#include "io/echo_text.h"
#include "io/hdf5/untrusted_file.h"
#include "io/io_error.h"

namespace lobecast::hdf5 {
namespace {

// HDF5 1.10 keeps a file whose close failed (a full disk: the last flush fails) in
// its table of open objects, half torn down, and its exit handler
// (H5_term_library) then crashes closing it again: `compute` on a full disk
// printed its error and died of SIGSEGV. lobecast closes every file it opens
// through Handle, so that handler has nothing to do: it is turned off before the
// library starts (H5dont_atexit must precede every other HDF5 call).
[[maybe_unused]] const herr_t kNoExitHandler = H5dont_atexit();

herr_t CollectError(unsigned /*n*/, const H5E_error2_t* err, void* data) {
  auto* lines = static_cast<std::vector<std::string>*>(data);
  if (err->desc != nullptr && err->desc[0] != '\0') {
    std::string line = err->desc;
    if (std::find(lines->begin(), lines->end(), line) == lines->end()) lines->push_back(line);
  }
  return 0;
}

Handle MakeComplexType(hid_t member_type) {
  Handle t(H5Tcreate(H5T_COMPOUND, sizeof(Complex)));
  if (!t.valid() || H5Tinsert(t, "r", 0, member_type) < 0 ||
      H5Tinsert(t, "i", sizeof(double), member_type) < 0) {
    Fail("(memory)", "cannot build the complex compound type");
  }
  return t;
}

Handle Dataspace(const std::vector<hsize_t>& dims) {
  Handle space(dims.empty()
                   ? H5Screate(H5S_SCALAR)
                   : H5Screate_simple(static_cast<int>(dims.size()), dims.data(), nullptr));
  if (!space.valid()) Fail("(memory)", "cannot create a dataspace");
  return space;
}

std::string Describe(const std::string& what, const std::string& name) {
  return what + " '" + name + "'";
}

template <typename T>
std::vector<T> ReadAll(hid_t loc, const std::string& name, hid_t mem_type, Stored kind,
                       std::vector<hsize_t>* dims_out) {
  Handle ds = OpenDataset(loc, name);
  Handle type(Check(H5Dget_type(ds), loc, Describe("reading the type of dataset", name)));
  ExpectType(loc, type, kind, Describe("dataset", name));
  Handle space(Check(H5Dget_space(ds), loc, Describe("reading the shape of dataset", name)));
  const std::size_t n = BoundedCount(loc, space, sizeof(T), Describe("dataset", name));
  ExpectChunksWithin(loc, ds, space, Describe("dataset", name));
  std::vector<T> values(n);
  if (n > 0) {
    Check(H5Dread(ds, mem_type, H5S_ALL, H5S_ALL, H5P_DEFAULT, values.data()), loc,
          Describe("reading dataset", name));
  }
  if (dims_out != nullptr) *dims_out = DatasetDims(loc, name);
  return values;
}

void WriteTyped(hid_t loc, const std::string& name, const std::vector<hsize_t>& dims,
                hid_t file_type, hid_t mem_type, const void* data, std::string_view units,
                const DatasetLayout& layout) {
  Handle ds = CreateDataset(loc, name, file_type, dims, units, layout);
  hsize_t total = 1;
  for (hsize_t d : dims) total *= d;
  if (total > 0) {
    Check(H5Dwrite(ds, mem_type, H5S_ALL, H5S_ALL, H5P_DEFAULT, data), loc,
          Describe("writing dataset", name));
  }
  Check(ds.Close(), loc, Describe("closing dataset", name));
}

Handle OpenAttribute(hid_t obj, const std::string& name) {
  return Handle(
      Check(H5Aopen(obj, name.c_str(), H5P_DEFAULT), obj, Describe("opening attribute", name)));
}

// Strings are stored as UTF-8 (CONVENTIONS §3); a damaged one would reach a plot's
// text renderer or the terminal.
std::string Utf8(hid_t loc, std::string value, const std::string& what) {
  if (!IsUtf8(value)) {
    Invalid(FileNameOf(loc), what + " holds \"" + EchoText(value) + "\", which is not UTF-8 text");
  }
  return value;
}

// A numeric attribute is read into one value: it must hold exactly one.
void ExpectSingleValue(hid_t obj, hid_t attr, const std::string& name) {
  Handle space(Check(H5Aget_space(attr), obj, Describe("reading attribute", name)));
  if (H5Sget_simple_extent_npoints(space) != 1) {
    Invalid(FileNameOf(obj), "attribute '" + name + "' is not a single value");
  }
}

void WriteAttribute(hid_t obj, const std::string& name, hid_t file_type, hid_t mem_type,
                    const void* data) {
  if (HasAttribute(obj, name)) {
    Check(H5Adelete(obj, name.c_str()), obj, Describe("replacing attribute", name));
  }
  Handle space = Dataspace({});
  Handle attr(Check(H5Acreate2(obj, name.c_str(), file_type, space, H5P_DEFAULT, H5P_DEFAULT), obj,
                    Describe("creating attribute", name)));
  Check(H5Awrite(attr, mem_type, data), obj, Describe("writing attribute", name));
  Check(attr.Close(), obj, Describe("closing attribute", name));
}

}  // namespace

// --- Handle -------------------------------------------------------------------------

Handle& Handle::operator=(Handle&& other) noexcept {
  if (this != &other) {
    Reset();
    id_ = std::exchange(other.id_, H5I_INVALID_HID);
  }
  return *this;
}

herr_t Handle::Close() {
  if (id_ < 0) return 0;
  const hid_t id = std::exchange(id_, H5I_INVALID_HID);
  switch (H5Iget_type(id)) {
    case H5I_FILE:
      return H5Fclose(id);
    case H5I_GROUP:
      return H5Gclose(id);
    case H5I_DATATYPE:
      return H5Tclose(id);
    case H5I_DATASPACE:
      return H5Sclose(id);
    case H5I_DATASET:
      return H5Dclose(id);
    case H5I_ATTR:
      return H5Aclose(id);
    case H5I_GENPROP_LST:
      return H5Pclose(id);
    default:
      return H5Idec_ref(id) < 0 ? -1 : 0;
  }
}

void Handle::Reset() {
  if (id_ >= 0) {
    Close();
    H5Eclear2(H5E_DEFAULT);
  }
}

// --- errors -------------------------------------------------------------------------

ErrorSilencer::ErrorSilencer() {
  H5Eget_auto2(H5E_DEFAULT, &old_func_, &old_data_);
  H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);
}

ErrorSilencer::~ErrorSilencer() { H5Eset_auto2(H5E_DEFAULT, old_func_, old_data_); }

std::string TakeErrorStack() {
  std::vector<std::string> lines;
  H5Ewalk2(H5E_DEFAULT, H5E_WALK_DOWNWARD, CollectError, &lines);
  H5Eclear2(H5E_DEFAULT);
  if (lines.empty()) return "";
  // The outermost entry says what failed, the innermost why (errno text for
  // file-system errors); the ones between repeat them.
  std::string out = lines.front();
  if (lines.size() > 1) out += "; " + lines.back();
  std::replace(out.begin(), out.end(), '\n', ' ');
  return out;
}

std::string TakeErrorCause() {
  std::vector<std::string> lines;
  H5Ewalk2(H5E_DEFAULT, H5E_WALK_DOWNWARD, CollectError, &lines);
  H5Eclear2(H5E_DEFAULT);
  for (const std::string& line : lines) {
    // "unable to open file: name = '...', errno = 13, error message = 'Permission
    // denied', flags = 13, o_flags = 242": the system's message alone.
    const std::string key = "error message = '";
    const std::size_t at = line.find(key);
    if (at != std::string::npos) {
      const std::size_t end = line.find('\'', at + key.size());
      if (end != std::string::npos) return line.substr(at + key.size(), end - at - key.size());
    }
    if (line.find("truncated file") != std::string::npos) return "the file is truncated";
  }
  return "";
}

void Fail(const std::string& path, const std::string& what) {
  const std::string cause = TakeErrorCause();
  throw IoError(path, cause.empty() ? what : what + ": " + cause);
}

std::string FileNameOf(hid_t loc) {
  const ssize_t n = H5Fget_name(loc, nullptr, 0);
  if (n <= 0) {
    H5Eclear2(H5E_DEFAULT);
    return "(unknown file)";
  }
  std::string name(static_cast<std::size_t>(n) + 1, '\0');
  H5Fget_name(loc, name.data(), name.size());
  name.resize(static_cast<std::size_t>(n));
  return name;
}

hid_t Check(hid_t status, hid_t loc, const std::string& what) {
  if (status < 0) {
    // The cause first: every HDF5 API call, H5Fget_name in FileNameOf too, clears
    // the error stack (a full disk said "writing rows" with no reason).
    const std::string cause = TakeErrorCause();
    throw IoError(FileNameOf(loc), cause.empty() ? what : what + ": " + cause);
  }
  return status;
}

// --- files and groups ---------------------------------------------------------------

Handle CreateFile(const std::string& path) {
  // STRONG: closing the file closes every object still open in it, so a file
  // handle's Close() really releases the file (needed before the rename).
  Handle fapl(H5Pcreate(H5P_FILE_ACCESS));
  if (!fapl.valid() || H5Pset_fclose_degree(fapl, H5F_CLOSE_STRONG) < 0) {
    Fail(path, "cannot set up file access properties");
  }
  Handle file(H5Fcreate(path.c_str(), H5F_ACC_TRUNC, H5P_DEFAULT, fapl));
  if (!file.valid()) Fail(path, "cannot create the file");
  return file;
}

Handle OpenFileReadOnly(const std::string& path) {
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) {
    // Only a missing file is "no such file"; a permission or other error says itself.
    throw IoError(path,
                  ec && ec != std::errc::no_such_file_or_directory ? ec.message() : "no such file");
  }
  if (std::filesystem::is_directory(path, ec)) throw IoError(path, "is a directory, not a file");
  if (!std::filesystem::is_regular_file(path, ec)) {
    // A device or a pipe: reading it would never end (or wait for a writer).
    throw NotAResultError(path,
                          "not a regular file (a device, pipe or socket), so not a "
                          "lobecast result file");
  }
  {
    // A file the system will not let us read is a failure to run (exit 1), not bad
    // input; whatever HDF5 cannot open beyond that is not a complete result.
    std::ifstream probe(path, std::ios::binary);
    if (!probe) throw IoError(path, std::string("cannot read the file: ") + std::strerror(errno));
  }
  const htri_t is_hdf5 = H5Fis_hdf5(path.c_str());
  if (is_hdf5 == 0) {
    H5Eclear2(H5E_DEFAULT);
    throw NotAResultError(path, "not an HDF5 file, so not a lobecast result file");
  }
  const GlobalHeaps heaps = is_hdf5 > 0 ? CheckGlobalHeaps(path) : GlobalHeaps{};
  Handle fapl(H5Pcreate(H5P_FILE_ACCESS));
  if (!fapl.valid() || H5Pset_fclose_degree(fapl, H5F_CLOSE_STRONG) < 0) {
    Fail(path, "cannot set up file access properties");
  }
  Handle file(is_hdf5 > 0 ? H5Fopen(path.c_str(), H5F_ACC_RDONLY, fapl) : -1);
  if (!file.valid()) {
    const std::string cause = TakeErrorCause();
    throw NotAResultError(path, "not a complete lobecast result: HDF5 cannot open it (" +
                                    (cause.empty() ? std::string("damaged") : cause) +
                                    "; an interrupted copy or a file still being written?)");
  }
  CheckObjectHeaders(file, path, heaps);
  return file;
}

Handle CreateGroup(hid_t loc, const std::string& name) {
  return Handle(Check(H5Gcreate2(loc, name.c_str(), H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT), loc,
                      Describe("creating group", name)));
}

Handle OpenGroup(hid_t loc, const std::string& name) {
  return Handle(
      Check(H5Gopen2(loc, name.c_str(), H5P_DEFAULT), loc, Describe("opening group", name)));
}

Handle OpenDataset(hid_t loc, const std::string& name) {
  if (!Exists(loc, name)) throw IoError(FileNameOf(loc), "missing dataset '" + name + "'");
  return Handle(
      Check(H5Dopen2(loc, name.c_str(), H5P_DEFAULT), loc, Describe("opening dataset", name)));
}

bool Exists(hid_t loc, const std::string& path) {
  std::string prefix;
  std::size_t pos = 0;
  if (!path.empty() && path[0] == '/') {
    prefix = "/";
    pos = 1;
  }
  while (pos < path.size()) {
    std::size_t next = path.find('/', pos);
    if (next == std::string::npos) next = path.size();
    if (next > pos) {
      if (!prefix.empty() && prefix.back() != '/') prefix += '/';
      prefix += path.substr(pos, next - pos);
      const htri_t e = H5Lexists(loc, prefix.c_str(), H5P_DEFAULT);
      if (e <= 0) {
        H5Eclear2(H5E_DEFAULT);
        return false;
      }
    }
    pos = next + 1;
  }
  return true;
}

// --- types ----------------------------------------------------------------------------

Handle ComplexType() { return MakeComplexType(H5T_NATIVE_DOUBLE); }

Handle StringType() {
  Handle t(H5Tcopy(H5T_C_S1));
  if (!t.valid() || H5Tset_size(t, H5T_VARIABLE) < 0 || H5Tset_cset(t, H5T_CSET_UTF8) < 0) {
    Fail("(memory)", "cannot build the string type");
  }
  return t;
}

// --- attributes -------------------------------------------------------------------------

void WriteStringAttribute(hid_t obj, const std::string& name, std::string_view value) {
  const std::string copy(value);
  const char* p = copy.c_str();
  Handle type = StringType();
  WriteAttribute(obj, name, type, type, &p);
}

void WriteScalarAttribute(hid_t obj, const std::string& name, double value) {
  WriteAttribute(obj, name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, &value);
}

void WriteIntAttribute(hid_t obj, const std::string& name, std::int64_t value) {
  WriteAttribute(obj, name, H5T_STD_I64LE, H5T_NATIVE_INT64, &value);
}

bool HasAttribute(hid_t obj, const std::string& name) {
  const htri_t e = H5Aexists(obj, name.c_str());
  if (e < 0) H5Eclear2(H5E_DEFAULT);
  return e > 0;
}

std::string ReadStringAttribute(hid_t obj, const std::string& name) {
  if (!HasAttribute(obj, name)) {
    throw IoError(FileNameOf(obj), "missing attribute '" + name + "'");
  }
  Handle attr = OpenAttribute(obj, name);
  Handle type(Check(H5Aget_type(attr), obj, Describe("reading the type of attribute", name)));
  if (H5Tget_class(type) != H5T_STRING) {
    throw IoError(FileNameOf(obj), "attribute '" + name + "' is not a string");
  }
  ExpectType(obj, type, Stored::kString, Describe("attribute", name));
  Handle space(Check(H5Aget_space(attr), obj, Describe("reading attribute", name)));
  if (H5Sget_simple_extent_npoints(space) != 1) {
    throw IoError(FileNameOf(obj), "attribute '" + name + "' is not a single string");
  }
  if (H5Tis_variable_str(type) > 0) {
    Handle mem(Check(H5Tcopy(type), obj, Describe("reading attribute", name)));
    char* p = nullptr;
    if (H5Aread(attr, mem, &p) < 0) {
      H5free_memory(p);  // nullptr unless the read failed after allocating it
      Fail(FileNameOf(obj), Describe("reading attribute", name));
    }
    std::string value = p != nullptr ? std::string(p) : std::string();
    H5free_memory(p);
    return Utf8(obj, std::move(value), Describe("attribute", name));
  }
  const std::size_t size = H5Tget_size(type);
  std::string value(size, '\0');
  Check(H5Aread(attr, type, value.data()), obj, Describe("reading attribute", name));
  value.resize(std::min(value.find('\0'), value.size()));
  if (H5Tget_strpad(type) == H5T_STR_SPACEPAD) {
    value.erase(value.find_last_not_of(' ') + 1);
  }
  return Utf8(obj, std::move(value), Describe("attribute", name));
}

double ReadDoubleAttribute(hid_t obj, const std::string& name) {
  if (!HasAttribute(obj, name)) {
    throw IoError(FileNameOf(obj), "missing attribute '" + name + "'");
  }
  Handle attr = OpenAttribute(obj, name);
  Handle type(Check(H5Aget_type(attr), obj, Describe("reading the type of attribute", name)));
  const H5T_class_t cls = H5Tget_class(type);
  if (cls != H5T_FLOAT && cls != H5T_INTEGER) {
    throw IoError(FileNameOf(obj), "attribute '" + name + "' is not a number");
  }
  ExpectType(obj, type, cls == H5T_FLOAT ? Stored::kReal : Stored::kInteger,
             Describe("attribute", name));
  ExpectSingleValue(obj, attr, name);
  double value = 0;
  Check(H5Aread(attr, H5T_NATIVE_DOUBLE, &value), obj, Describe("reading attribute", name));
  return value;
}

std::int64_t ReadIntAttribute(hid_t obj, const std::string& name) {
  if (!HasAttribute(obj, name)) {
    throw IoError(FileNameOf(obj), "missing attribute '" + name + "'");
  }
  Handle attr = OpenAttribute(obj, name);
  Handle type(Check(H5Aget_type(attr), obj, Describe("reading the type of attribute", name)));
  if (H5Tget_class(type) != H5T_INTEGER) {
    throw IoError(FileNameOf(obj), "attribute '" + name + "' is not an integer");
  }
  ExpectType(obj, type, Stored::kInteger, Describe("attribute", name));
  ExpectSingleValue(obj, attr, name);
  std::int64_t value = 0;
  Check(H5Aread(attr, H5T_NATIVE_INT64, &value), obj, Describe("reading attribute", name));
  return value;
}

// --- datasets -------------------------------------------------------------------------------

Handle CreateDataset(hid_t loc, const std::string& name, hid_t file_type,
                     const std::vector<hsize_t>& dims, std::string_view units,
                     const DatasetLayout& layout) {
  Handle space = Dataspace(dims);
  Handle dcpl(Check(H5Pcreate(H5P_DATASET_CREATE), loc, "creating dataset properties"));
  const bool nonempty =
      !dims.empty() && std::all_of(dims.begin(), dims.end(), [](hsize_t d) { return d > 0; });
  if (layout.chunk_rows > 0 && nonempty) {
    std::vector<hsize_t> chunk = dims;
    chunk[0] = std::min<hsize_t>(layout.chunk_rows, dims[0]);
    Check(H5Pset_chunk(dcpl, static_cast<int>(chunk.size()), chunk.data()), loc,
          Describe("setting the chunk shape of", name));
    if (layout.deflate_level >= 0 && H5Zfilter_avail(H5Z_FILTER_DEFLATE) > 0) {
      if (H5Tget_size(file_type) > 1) {
        Check(H5Pset_shuffle(dcpl), loc, Describe("setting the shuffle filter of", name));
      }
      Check(H5Pset_deflate(dcpl, static_cast<unsigned>(std::min(layout.deflate_level, 9))), loc,
            Describe("setting the deflate filter of", name));
    }
  }
  Handle ds(Check(H5Dcreate2(loc, name.c_str(), file_type, space, H5P_DEFAULT, dcpl, H5P_DEFAULT),
                  loc, Describe("creating dataset", name)));
  WriteStringAttribute(ds, "units", units);
  return ds;
}

void WriteRows(hid_t dataset, hid_t mem_type, hsize_t first_row, hsize_t num_rows,
               const void* data) {
  Handle space(Check(H5Dget_space(dataset), dataset, "reading a dataset's shape"));
  const int rank = H5Sget_simple_extent_ndims(space);
  if (rank < 1) throw IoError(FileNameOf(dataset), "row write into a scalar dataset");
  std::vector<hsize_t> dims(static_cast<std::size_t>(rank));
  H5Sget_simple_extent_dims(space, dims.data(), nullptr);
  if (first_row + num_rows > dims[0]) {
    throw IoError(FileNameOf(dataset), "rows " + std::to_string(first_row) + ".." +
                                           std::to_string(first_row + num_rows) +
                                           " exceed the dataset's " + std::to_string(dims[0]));
  }
  if (num_rows == 0) return;
  std::vector<hsize_t> start(dims.size(), 0);
  std::vector<hsize_t> count = dims;
  start[0] = first_row;
  count[0] = num_rows;
  Check(H5Sselect_hyperslab(space, H5S_SELECT_SET, start.data(), nullptr, count.data(), nullptr),
        dataset, "selecting rows");
  Handle mem = Dataspace(count);
  Check(H5Dwrite(dataset, mem_type, mem, space, H5P_DEFAULT, data), dataset, "writing rows");
}

void WriteDataset(hid_t loc, const std::string& name, const std::vector<hsize_t>& dims,
                  const double* data, std::string_view units, const DatasetLayout& layout) {
  WriteTyped(loc, name, dims, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, data, units, layout);
}

void WriteDataset(hid_t loc, const std::string& name, const std::vector<hsize_t>& dims,
                  const Complex* data, std::string_view units, const DatasetLayout& layout) {
  Handle file_type = MakeComplexType(H5T_IEEE_F64LE);
  Handle mem_type = ComplexType();
  WriteTyped(loc, name, dims, file_type, mem_type, data, units, layout);
}

void WriteDataset(hid_t loc, const std::string& name, const std::vector<hsize_t>& dims,
                  const std::int8_t* data, std::string_view units, const DatasetLayout& layout) {
  WriteTyped(loc, name, dims, H5T_STD_I8LE, H5T_NATIVE_INT8, data, units, layout);
}

void WriteScalarDataset(hid_t loc, const std::string& name, double value, std::string_view units) {
  WriteTyped(loc, name, {}, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, &value, units, {});
}

void WriteStringDataset(hid_t loc, const std::string& name, const std::vector<std::string>& values,
                        std::string_view units) {
  std::vector<const char*> pointers;
  pointers.reserve(values.size());
  for (const std::string& v : values) pointers.push_back(v.c_str());
  Handle type = StringType();
  WriteTyped(loc, name, {static_cast<hsize_t>(values.size())}, type, type, pointers.data(), units,
             {});
}

std::vector<hsize_t> DatasetDims(hid_t loc, const std::string& name) {
  Handle ds = OpenDataset(loc, name);
  Handle space(Check(H5Dget_space(ds), loc, Describe("reading the shape of dataset", name)));
  const int rank = H5Sget_simple_extent_ndims(space);
  Check(rank, loc, Describe("reading the shape of dataset", name));
  std::vector<hsize_t> dims(static_cast<std::size_t>(rank));
  if (rank > 0) H5Sget_simple_extent_dims(space, dims.data(), nullptr);
  return dims;
}

std::vector<double> ReadDoubles(hid_t loc, const std::string& name, std::vector<hsize_t>* dims) {
  return ReadAll<double>(loc, name, H5T_NATIVE_DOUBLE, Stored::kReal, dims);
}

std::vector<Complex> ReadComplex(hid_t loc, const std::string& name, std::vector<hsize_t>* dims) {
  // HDF5 matches compound members by name, so any {r, i} layout converts.
  Handle mem_type = ComplexType();
  return ReadAll<Complex>(loc, name, mem_type, Stored::kComplex, dims);
}

std::vector<std::int8_t> ReadInt8(hid_t loc, const std::string& name, std::vector<hsize_t>* dims) {
  return ReadAll<std::int8_t>(loc, name, H5T_NATIVE_INT8, Stored::kInteger, dims);
}

std::vector<std::string> ReadStrings(hid_t loc, const std::string& name) {
  Handle ds = OpenDataset(loc, name);
  Handle type(Check(H5Dget_type(ds), loc, Describe("reading the type of dataset", name)));
  if (H5Tget_class(type) != H5T_STRING) {
    throw IoError(FileNameOf(loc), "dataset '" + name + "' does not hold strings");
  }
  ExpectType(loc, type, Stored::kString, Describe("dataset", name));
  Handle space(Check(H5Dget_space(ds), loc, Describe("reading the shape of dataset", name)));
  // A variable-length string is 16 bytes in the file (length, heap address, index).
  const std::size_t each = H5Tis_variable_str(type) > 0 ? 16 : H5Tget_size(type);
  const std::size_t n = BoundedCount(loc, space, each, Describe("dataset", name));
  std::vector<std::string> values;
  values.reserve(n);
  if (n == 0) return values;
  if (H5Tis_variable_str(type) > 0) {
    Handle mem(Check(H5Tcopy(type), loc, Describe("reading dataset", name)));
    std::vector<char*> pointers(n, nullptr);
    if (H5Dread(ds, mem, H5S_ALL, H5S_ALL, H5P_DEFAULT, pointers.data()) < 0) {
      // A read that fails part-way (a damaged string) leaves the ones before it
      // allocated (found by result_fuzz as a leak).
      for (char* p : pointers) H5free_memory(p);
      Fail(FileNameOf(loc), Describe("reading dataset", name));
    }
    for (char* p : pointers) values.emplace_back(p != nullptr ? p : "");
    for (std::string& v : values) v = Utf8(loc, std::move(v), Describe("dataset", name));
#if H5_VERSION_GE(1, 12, 0)
    H5Treclaim(mem, space, H5P_DEFAULT, pointers.data());
#else
    H5Dvlen_reclaim(mem, space, H5P_DEFAULT, pointers.data());
#endif
    return values;
  }
  const std::size_t size = H5Tget_size(type);
  std::string buffer(n * size, '\0');
  Check(H5Dread(ds, type, H5S_ALL, H5S_ALL, H5P_DEFAULT, buffer.data()), loc,
        Describe("reading dataset", name));
  for (std::size_t k = 0; k < n; ++k) {
    std::string v = buffer.substr(k * size, size);
    v.resize(std::min(v.find('\0'), v.size()));
    values.push_back(Utf8(loc, std::move(v), Describe("dataset", name)));
  }
  return values;
}

}  // namespace lobecast::hdf5
