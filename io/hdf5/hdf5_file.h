// Thin C++ layer over the HDF5 C API for io/: handles that close themselves,
// errors turned into IoError with HDF5's own description, and helpers for the
// datasets and attributes lobecast stores. Private to io/ (it includes hdf5.h,
// which is not on the include path of io's users).
//
// Storage conventions (CONVENTIONS §3): complex numbers are the compound
// {r: float64, i: float64} that h5py reads as complex128; strings are
// variable-length UTF-8, which h5py reads as str; every dataset carries a string
// attribute `units` ("1" when dimensionless).
#pragma once

#include <complex>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <hdf5.h>

namespace lobecast::hdf5 {

// Owns one HDF5 identifier and closes it with the matching H5*close. Never wrap
// a predefined type such as H5T_NATIVE_DOUBLE: those must not be closed.
class Handle {
 public:
  Handle() = default;
  explicit Handle(hid_t id) : id_(id) {}
  Handle(Handle&& other) noexcept : id_(std::exchange(other.id_, H5I_INVALID_HID)) {}
  Handle& operator=(Handle&& other) noexcept;
  Handle(const Handle&) = delete;
  Handle& operator=(const Handle&) = delete;
  ~Handle() { Reset(); }

  hid_t get() const { return id_; }
  operator hid_t() const { return id_; }  // NOLINT: handles pass straight into H5* calls
  bool valid() const { return id_ >= 0; }

  // Closes now and reports failure (closing a file flushes it, so this can fail).
  // Returns a negative value on failure; the handle is released either way.
  herr_t Close();
  // Closes, ignoring failure (destructors cannot report it).
  void Reset();

 private:
  hid_t id_ = H5I_INVALID_HID;
};

// Silences HDF5's automatic printing of its error stack for the lifetime of the
// guard (we capture the stack into the exception instead), restoring the
// previous handler afterwards. Every public io/ entry point that calls HDF5
// holds one.
class ErrorSilencer {
 public:
  ErrorSilencer();
  ~ErrorSilencer();
  ErrorSilencer(const ErrorSilencer&) = delete;
  ErrorSilencer& operator=(const ErrorSilencer&) = delete;

 private:
  H5E_auto2_t old_func_ = nullptr;
  void* old_data_ = nullptr;
};

// The current HDF5 error stack as one line (innermost cause last), then cleared.
// Empty when the stack is empty. For debugging: messages use TakeErrorCause.
std::string TakeErrorStack();

// What a user can act on in the current HDF5 error stack, then cleared: the
// system's message ("Permission denied", "No space left on device") or "the file
// is truncated"; empty otherwise. The library's own text (internal names, flags,
// temporary file names) never reaches a message.
std::string TakeErrorCause();

// Throws IoError(path, what + ": " + TakeErrorCause()) (just `what` without a cause).
[[noreturn]] void Fail(const std::string& path, const std::string& what);
// Name of the file that `loc` (any object in it) belongs to, for messages.
std::string FileNameOf(hid_t loc);
// Throws via Fail(FileNameOf(loc), what) when status < 0; returns status otherwise.
hid_t Check(hid_t status, hid_t loc, const std::string& what);

// --- files and groups ---------------------------------------------------------

// Creates (truncating) a file; throws IoError naming `path`.
Handle CreateFile(const std::string& path);
// Opens an existing file read-only; throws IoError naming `path`.
Handle OpenFileReadOnly(const std::string& path);
Handle CreateGroup(hid_t loc, const std::string& name);
Handle OpenGroup(hid_t loc, const std::string& name);
Handle OpenDataset(hid_t loc, const std::string& name);
// True when every component of the slash-separated `path` exists below `loc`.
bool Exists(hid_t loc, const std::string& path);

// --- types ----------------------------------------------------------------------

using Complex = std::complex<double>;
// {r: float64, i: float64}, 16 bytes, the layout of std::complex<double>.
Handle ComplexType();
// Variable-length UTF-8 string.
Handle StringType();

// --- attributes -------------------------------------------------------------------

void WriteStringAttribute(hid_t obj, const std::string& name, std::string_view value);
void WriteScalarAttribute(hid_t obj, const std::string& name, double value);
// Stored as a 64-bit signed integer.
void WriteIntAttribute(hid_t obj, const std::string& name, std::int64_t value);

bool HasAttribute(hid_t obj, const std::string& name);
// Reads variable-length and fixed-length strings alike.
std::string ReadStringAttribute(hid_t obj, const std::string& name);
double ReadDoubleAttribute(hid_t obj, const std::string& name);
std::int64_t ReadIntAttribute(hid_t obj, const std::string& name);

// --- datasets ----------------------------------------------------------------------

struct DatasetLayout {
  // 0: contiguous. Otherwise chunks of `chunk_rows` along the first dimension and
  // the full extent along the others (clamped to the dataset's size).
  std::size_t chunk_rows = 0;
  // gzip level 0..9 for chunked datasets; -1 for none. Skipped silently when the
  // HDF5 build lacks the deflate filter.
  int deflate_level = 4;
};

// Creates a dataset of `file_type` and shape `dims` (empty: scalar) with its
// `units` attribute, without writing data (for row-block writing).
Handle CreateDataset(hid_t loc, const std::string& name, hid_t file_type,
                     const std::vector<hsize_t>& dims, std::string_view units,
                     const DatasetLayout& layout = {});
// Writes rows [first_row, first_row + num_rows) along the first dimension; `data`
// holds them contiguously (row-major, the remaining dimensions in full).
void WriteRows(hid_t dataset, hid_t mem_type, hsize_t first_row, hsize_t num_rows,
               const void* data);

// Create-and-write in one call; `data` is row-major with prod(dims) elements.
void WriteDataset(hid_t loc, const std::string& name, const std::vector<hsize_t>& dims,
                  const double* data, std::string_view units, const DatasetLayout& layout = {});
void WriteDataset(hid_t loc, const std::string& name, const std::vector<hsize_t>& dims,
                  const Complex* data, std::string_view units, const DatasetLayout& layout = {});
void WriteDataset(hid_t loc, const std::string& name, const std::vector<hsize_t>& dims,
                  const std::int8_t* data, std::string_view units,
                  const DatasetLayout& layout = {});
void WriteScalarDataset(hid_t loc, const std::string& name, double value, std::string_view units);
void WriteStringDataset(hid_t loc, const std::string& name, const std::vector<std::string>& values,
                        std::string_view units);

// Shape of a dataset (empty for a scalar).
std::vector<hsize_t> DatasetDims(hid_t loc, const std::string& name);
// Whole-dataset reads, converted to the memory type; `dims` (if given) receives the shape.
std::vector<double> ReadDoubles(hid_t loc, const std::string& name,
                                std::vector<hsize_t>* dims = nullptr);
std::vector<Complex> ReadComplex(hid_t loc, const std::string& name,
                                 std::vector<hsize_t>* dims = nullptr);
std::vector<std::int8_t> ReadInt8(hid_t loc, const std::string& name,
                                  std::vector<hsize_t>* dims = nullptr);
std::vector<std::string> ReadStrings(hid_t loc, const std::string& name);

}  // namespace lobecast::hdf5
