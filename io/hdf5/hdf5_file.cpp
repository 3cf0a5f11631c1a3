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

// --- untrusted files ------------------------------------------------------------
//
// A result file is input: a damaged one must be refused, never crash or hang the
// reader. HDF5 checks the structure it parses, but not everything that a damaged
// file can claim, so what the library trusts is checked here first.

[[noreturn]] void Invalid(const std::string& path, const std::string& what) {
  H5Eclear2(H5E_DEFAULT);
  throw NotAResultError(path, std::string(kInvalidResult) + what);
}

// The most bytes one read may allocate: what the file can hold, decompressed
// (deflate expands at most about 1032-fold, RFC 1951 sec. 3.2.5 lengths of 258
// from 2 bits; 1100 with margin), plus 1 MiB for fill values. A shape taken from a
// damaged file cannot ask for more.
std::uint64_t MaxReadBytes(hid_t loc) {
  hsize_t size = 0;
  if (H5Fget_filesize(loc, &size) < 0) {
    H5Eclear2(H5E_DEFAULT);
    size = 0;
  }
  return static_cast<std::uint64_t>(size) * 1100 + (1u << 20);
}

std::uint64_t LittleEndian(const unsigned char* p, int bytes) {
  std::uint64_t v = 0;
  for (int k = bytes - 1; k >= 0; --k) v = (v << 8) | p[k];
  return v;
}

// Calls found(offset) for every occurrence of `needle` in the file, in order.
template <typename Found>
void ForEachOccurrence(const std::string& path, std::string_view needle, Found&& found) {
  constexpr std::size_t kBlock = std::size_t{1} << 20;
  std::ifstream in(path, std::ios::binary);
  const std::unique_ptr<char[]> block(new char[kBlock]);  // not zeroed: read into
  std::string buffer;  // the tail of the previous block (a match may straddle) and this block
  std::uint64_t buffer_start = 0;
  while (in) {
    in.read(block.get(), static_cast<std::streamsize>(kBlock));
    const auto got = static_cast<std::size_t>(in.gcount());
    if (got == 0) break;
    const std::size_t keep = std::min(buffer.size(), needle.size() - 1);
    buffer_start += buffer.size() - keep;
    buffer.erase(0, buffer.size() - keep);
    buffer.append(block.get(), got);
    for (std::size_t at = buffer.find(needle); at != std::string::npos;
         at = buffer.find(needle, at + 1)) {
      found(buffer_start + at);
    }
  }
}

bool ReadAt(std::ifstream& in, std::uint64_t offset, unsigned char* out, std::size_t n) {
  in.clear();
  in.seekg(static_cast<std::streamoff>(offset));
  in.read(reinterpret_cast<char*>(out), static_cast<std::streamsize>(n));
  return static_cast<std::size_t>(in.gcount()) == n;
}

void WalkGlobalHeaps(const std::string& path);

// The global heap holds every variable-length string. HDF5 1.10 (H5HGcache.c)
// walks a collection ("GCOL", version 1, reserved, collection size, then objects
// of index u16, references u16, reserved u32, size u64, data padded to 8 bytes;
// index 0 is the free space, whose size counts its header) by the stored sizes: a
// free-space object of size 0 never advances (the read spins forever) and an
// object past the collection's end is copied from beyond it. A string refers to
// its object by (length u32, collection address u64, index u32), and a length
// beyond the object sends the read running. So before HDF5 reads a string,
// every collection is walked the same way here, and every reference to one must
// name an object that exists and holds its length. Addresses and lengths are
// 8 bytes in every file lobecast writes (the superblock says so; checked).
void CheckGlobalHeaps(const std::string& path) {
  // report, export and plot open one file up to three times: the last file walked
  // is remembered (path, size, modification time) and not walked again.
  struct Stamp {
    std::string path;
    std::uintmax_t size = 0;
    std::filesystem::file_time_type time;
    bool operator==(const Stamp&) const = default;
  };
  static std::optional<Stamp> last;
  std::error_code size_error, time_error;
  Stamp stamp{path, std::filesystem::file_size(path, size_error), {}};
  stamp.time = std::filesystem::last_write_time(path, time_error);
  const bool stamped = !size_error && !time_error;
  if (stamped && last && *last == stamp) return;
  last.reset();
  WalkGlobalHeaps(path);
  if (stamped) last = stamp;
}

void WalkGlobalHeaps(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return;  // OpenFileReadOnly reports an unreadable file itself
  in.seekg(0, std::ios::end);
  const auto file_size = static_cast<std::uint64_t>(in.tellg());
  unsigned char super[16] = {};
  if (ReadAt(in, 0, super, sizeof super) && std::memcmp(super, "\x89HDF\r\n\x1a\n", 8) == 0) {
    const int version = super[8];
    const int offsets = version >= 2 ? super[9] : super[13];
    const int lengths = version >= 2 ? super[10] : super[14];
    if (version <= 3 && (offsets != 8 || lengths != 8)) {
      Invalid(path, "the superblock gives addresses of " + std::to_string(offsets) +
                        " and lengths of " + std::to_string(lengths) + " bytes, expected 8 and 8");
    }
  }

  constexpr std::string_view kSignature("GCOL\x01", 5);
  constexpr std::uint64_t kHeader = 16;  // collection header, and object header
  // Collection address -> (object index -> object size).
  std::map<std::uint64_t, std::map<std::uint64_t, std::uint64_t>> heaps;
  ForEachOccurrence(path, kSignature, [&](std::uint64_t at) {
    unsigned char head[kHeader];
    if (!ReadAt(in, at, head, kHeader)) return;
    const std::uint64_t size = LittleEndian(head + 8, 8);
    if (size > file_size - at) return;  // HDF5 refuses a collection past the file's end
    auto& objects = heaps[at];
    std::uint64_t p = kHeader;
    while (p < size) {
      const std::uint64_t room = size - p;
      if (room < kHeader) break;  // a tail too short for an object: free space
      if (!ReadAt(in, at + p, head, kHeader)) break;
      const std::uint64_t index = LittleEndian(head, 2);
      const std::uint64_t object = LittleEndian(head + 8, 8);
      std::uint64_t need = object;
      if (index > 0) {
        if (object > room - kHeader) {
          Invalid(path, "global heap object " + std::to_string(index) + " at byte " +
                            std::to_string(at + p) + " claims " + std::to_string(object) +
                            " bytes, past the end of its collection");
        }
        need = kHeader + (object + 7) / 8 * 8;
        objects[index] = object;
      } else if (object == 0 || object > room) {
        Invalid(path, "the free space of the global heap at byte " + std::to_string(at) +
                          " has size " + std::to_string(object) + " (a damaged heap)");
      }
      p += need;
    }
  });
  for (const auto& heap : heaps) {
    // Not a structured binding: clang 14 cannot capture one in the lambda below.
    const std::uint64_t address = heap.first;
    const auto& objects = heap.second;
    char needle[8];
    for (int k = 0; k < 8; ++k) needle[k] = static_cast<char>((address >> (8 * k)) & 0xff);
    ForEachOccurrence(path, std::string_view(needle, 8), [&](std::uint64_t at) {
      unsigned char ref[16];
      if (at < 4 || !ReadAt(in, at - 4, ref, sizeof ref)) return;
      const std::uint64_t length = LittleEndian(ref, 4);
      const std::uint64_t index = LittleEndian(ref + 12, 4);
      // The address's 8 bytes also turn up in other structures (a collection at
      // 4096 is 00 10 00 00 00 00 00 00), followed by bytes that are no
      // reference. So index 0 (the free space; HDF5 reads it harmlessly), an empty
      // string and an index past 16 bits (heap indices are u16) are not taken for
      // one, and an index the collection lacks counts as damage only beside a
      // length that one of its objects has (a damaged index keeps its length).
      if (index == 0 || length == 0 || index > 0xFFFF) return;
      const auto object = objects.find(index);
      if (object == objects.end()) {
        const bool a_length_of_this_heap = std::any_of(
            objects.begin(), objects.end(), [&](const auto& o) { return o.second == length; });
        if (!a_length_of_this_heap) return;
        Invalid(path, "a string at byte " + std::to_string(at - 4) +
                          " refers to global heap object " + std::to_string(index) +
                          ", which its collection does not hold");
      }
      if (length > object->second) {
        Invalid(path, "a string at byte " + std::to_string(at - 4) + " claims " +
                          std::to_string(length) + " bytes, its global heap object holds " +
                          std::to_string(object->second));
      }
    });
  }
}

// What a dataset or attribute must hold before HDF5 converts it to ours.
enum class Stored { kReal, kInteger, kComplex, kString };

bool IsOneOf(hid_t type, std::initializer_list<hid_t> standard) {
  for (hid_t t : standard) {
    if (H5Tequal(type, t) > 0) return true;
  }
  H5Eclear2(H5E_DEFAULT);
  return false;
}

bool IsStandardReal(hid_t type) {
  return IsOneOf(type, {H5T_IEEE_F64LE, H5T_IEEE_F64BE, H5T_IEEE_F32LE, H5T_IEEE_F32BE});
}

bool IsStandardInteger(hid_t type) {
  return IsOneOf(
      type, {H5T_STD_I8LE, H5T_STD_I8BE, H5T_STD_U8LE, H5T_STD_U8BE, H5T_STD_I16LE, H5T_STD_I16BE,
             H5T_STD_U16LE, H5T_STD_U16BE, H5T_STD_I32LE, H5T_STD_I32BE, H5T_STD_U32LE,
             H5T_STD_U32BE, H5T_STD_I64LE, H5T_STD_I64BE, H5T_STD_U64LE, H5T_STD_U64BE});
}

// {r, i} of standard reals inside the compound (HDF5 converts members by name; a
// damaged member offset past the compound's size is copied from beyond it).
bool IsComplexCompound(hid_t type) {
  if (H5Tget_class(type) != H5T_COMPOUND || H5Tget_nmembers(type) != 2) return false;
  const std::size_t size = H5Tget_size(type);
  if (size == 0 || size > 64) return false;
  bool seen[2] = {false, false};
  for (unsigned k = 0; k < 2; ++k) {
    char* name = H5Tget_member_name(type, k);
    const std::string member_name = name != nullptr ? name : "";
    H5free_memory(name);
    const int which = member_name == "r" ? 0 : member_name == "i" ? 1 : -1;
    Handle member(H5Tget_member_type(type, k));
    if (which < 0 || seen[which] || !member.valid() || !IsStandardReal(member)) return false;
    seen[which] = true;
    if (H5Tget_member_offset(type, k) + H5Tget_size(member) > size) return false;
  }
  return true;
}

const char* StoredName(Stored kind) {
  switch (kind) {
    case Stored::kReal:
      return "real numbers";
    case Stored::kInteger:
      return "integers";
    case Stored::kComplex:
      return "complex numbers {r, i}";
    case Stored::kString:
      return "strings";
  }
  return "?";
}

// Throws "not a valid lobecast result" unless `type` stores `kind` in a standard
// layout (and, for fixed-length strings, a size the file can hold).
void ExpectType(hid_t loc, hid_t type, Stored kind, const std::string& what) {
  bool ok = false;
  switch (kind) {
    case Stored::kReal:
      ok = IsStandardReal(type);
      break;
    case Stored::kInteger:
      ok = IsStandardInteger(type);
      break;
    case Stored::kComplex:
      ok = IsComplexCompound(type);
      break;
    case Stored::kString:
      ok = H5Tget_class(type) == H5T_STRING &&
           (H5Tis_variable_str(type) > 0 || H5Tget_size(type) <= MaxReadBytes(loc));
      break;
  }
  H5Eclear2(H5E_DEFAULT);
  if (!ok) Invalid(FileNameOf(loc), what + " does not hold " + StoredName(kind));
}

// The number of values in `space`, refused when reading them as `bytes_each`
// bytes could not come from the file.
std::size_t BoundedCount(hid_t loc, hid_t space, std::size_t bytes_each, const std::string& what) {
  const hssize_t n = H5Sget_simple_extent_npoints(space);
  if (n < 0) Fail(FileNameOf(loc), "reading the shape of " + what);
  const std::uint64_t limit = MaxReadBytes(loc) / std::max<std::size_t>(bytes_each, 1);
  if (static_cast<std::uint64_t>(n) > limit) {
    Invalid(FileNameOf(loc),
            what + " claims " + std::to_string(n) + " values, more than the file can hold");
  }
  return static_cast<std::size_t>(n);
}

template <typename T>
std::vector<T> ReadAll(hid_t loc, const std::string& name, hid_t mem_type, Stored kind,
                       std::vector<hsize_t>* dims_out) {
  Handle ds = OpenDataset(loc, name);
  Handle type(Check(H5Dget_type(ds), loc, Describe("reading the type of dataset", name)));
  ExpectType(loc, type, kind, Describe("dataset", name));
  Handle space(Check(H5Dget_space(ds), loc, Describe("reading the shape of dataset", name)));
  const std::size_t n = BoundedCount(loc, space, sizeof(T), Describe("dataset", name));
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
  if (is_hdf5 > 0) CheckGlobalHeaps(path);
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
