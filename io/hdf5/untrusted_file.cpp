// Checks of a result file before HDF5 reads it (untrusted_file.h).
#include "io/hdf5/untrusted_file.h"

#include <algorithm>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <map>
#include <memory>
#include <optional>
#include <string_view>
#include <vector>

#include <zlib.h>

#include "io/io_error.h"

namespace lobecast::hdf5 {

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
static std::uint64_t MaxReadBytes(hid_t loc) {
  hsize_t size = 0;
  if (H5Fget_filesize(loc, &size) < 0) {
    H5Eclear2(H5E_DEFAULT);
    size = 0;
  }
  return static_cast<std::uint64_t>(size) * 1100 + (1u << 20);
}

static std::uint64_t LittleEndian(const unsigned char* p, int bytes) {
  std::uint64_t v = 0;
  for (int k = bytes - 1; k >= 0; --k) v = (v << 8) | p[k];
  return v;
}

// Calls found(offset) for every occurrence of `needle` in the file, in order.
template <typename Found>
static void ForEachOccurrence(const std::string& path, std::string_view needle, Found&& found) {
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

static bool ReadAt(std::ifstream& in, std::uint64_t offset, unsigned char* out, std::size_t n) {
  in.clear();
  in.seekg(static_cast<std::streamoff>(offset));
  in.read(reinterpret_cast<char*>(out), static_cast<std::streamsize>(n));
  return static_cast<std::size_t>(in.gcount()) == n;
}

static GlobalHeaps WalkGlobalHeaps(const std::string& path);

// The global heap holds every variable-length string. HDF5 1.10 (H5HGcache.c)
// walks a collection ("GCOL", version 1, reserved, collection size, then objects
// of index u16, references u16, reserved u32, size u64, data padded to 8 bytes;
// index 0 is the free space, whose size counts its header) by the stored sizes: a
// free-space object of size 0 never advances (the read spins forever) and an
// object past the collection's end is copied from beyond it. So before HDF5 reads
// anything, every collection is walked the same way here. A value refers to its
// object by (length u32, collection address u64, index u32); HDF5 1.10.8 trusts
// the index (an index past the collection's objects, 0x02000009 in a fuzzed file,
// read outside them: a segmentation fault) and the length (one beyond the object
// sends the read running). So every reference is checked too, exactly: the object
// headers' walk (object_headers.cpp) reads each variable-length value where its
// attribute or dataset holds it and calls ExpectHeapObject. Addresses and lengths
// are 8 bytes in every file lobecast writes (the superblock says so; checked).
GlobalHeaps CheckGlobalHeaps(const std::string& path) {
  // report, export and plot open one file up to three times: the last file walked
  // is remembered (path, size, modification time) with its collections.
  struct Stamp {
    std::string path;
    std::uintmax_t size = 0;
    std::filesystem::file_time_type time;
    bool operator==(const Stamp&) const = default;
  };
  static std::optional<std::pair<Stamp, GlobalHeaps>> last;
  std::error_code size_error, time_error;
  Stamp stamp{path, std::filesystem::file_size(path, size_error), {}};
  stamp.time = std::filesystem::last_write_time(path, time_error);
  const bool stamped = !size_error && !time_error;
  if (stamped && last && last->first == stamp) return last->second;
  last.reset();
  GlobalHeaps heaps = WalkGlobalHeaps(path);
  if (stamped) last.emplace(stamp, heaps);
  return heaps;
}

void ExpectHeapObject(const std::string& path, const GlobalHeaps& heaps, std::uint64_t at,
                      std::uint64_t length, std::uint64_t element_size, std::uint64_t address,
                      std::uint64_t index) {
  if (address == 0 || length == 0) return;  // null or empty: HDF5 reads no object
  const std::string where = "the variable-length value at byte " + std::to_string(at);
  const auto heap = heaps.find(address);
  if (heap == heaps.end()) {
    Invalid(path, where + " refers to a global heap at byte " + std::to_string(address) +
                      ", where the file has none");
  }
  const auto object = heap->second.find(index);
  if (index == 0 || object == heap->second.end()) {
    Invalid(path, where + " refers to global heap object " + std::to_string(index) +
                      ", which its collection does not hold");
  }
  if (length > object->second / std::max<std::uint64_t>(element_size, 1)) {
    Invalid(path, where + " claims " + std::to_string(length) + " x " +
                      std::to_string(element_size) + " bytes, its global heap object holds " +
                      std::to_string(object->second));
  }
}

static GlobalHeaps WalkGlobalHeaps(const std::string& path) {
  GlobalHeaps heaps;
  std::ifstream in(path, std::ios::binary);
  if (!in) return heaps;  // OpenFileReadOnly reports an unreadable file itself
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
  return heaps;
}

static bool IsOneOf(hid_t type, std::initializer_list<hid_t> standard) {
  for (hid_t t : standard) {
    if (H5Tequal(type, t) > 0) return true;
  }
  H5Eclear2(H5E_DEFAULT);
  return false;
}

static bool IsStandardReal(hid_t type) {
  return IsOneOf(type, {H5T_IEEE_F64LE, H5T_IEEE_F64BE, H5T_IEEE_F32LE, H5T_IEEE_F32BE});
}

static bool IsStandardInteger(hid_t type) {
  return IsOneOf(
      type, {H5T_STD_I8LE, H5T_STD_I8BE, H5T_STD_U8LE, H5T_STD_U8BE, H5T_STD_I16LE, H5T_STD_I16BE,
             H5T_STD_U16LE, H5T_STD_U16BE, H5T_STD_I32LE, H5T_STD_I32BE, H5T_STD_U32LE,
             H5T_STD_U32BE, H5T_STD_I64LE, H5T_STD_I64BE, H5T_STD_U64LE, H5T_STD_U64BE});
}

// {r, i} of standard reals inside the compound (HDF5 converts members by name; a
// damaged member offset past the compound's size is copied from beyond it).
static bool IsComplexCompound(hid_t type) {
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

static const char* StoredName(Stored kind) {
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

// Every stored chunk of a chunked dataset, read raw and inflated here: it must come
// to exactly one chunk's bytes. HDF5 1.10.8 copies a whole chunk out of whatever
// its filters gave (a fuzzed deflate stream that inflated short: a read of 360
// bytes past the buffer). lobecast writes shuffle and deflate only.
static void ExpectChunksInflate(hid_t loc, hid_t dataset, hid_t space, hid_t plist,
                                std::uint64_t chunk_bytes, const std::string& what) {
  const std::string path = FileNameOf(loc);
  const int nfilters = H5Pget_nfilters(plist);
  if (nfilters < 0 || nfilters > 8) Invalid(path, what + " has a damaged filter pipeline");
  int deflate = -1;
  for (int f = 0; f < nfilters; ++f) {
    unsigned flags = 0, config = 0;
    std::size_t n_values = 0;
    const H5Z_filter_t id = H5Pget_filter2(plist, static_cast<unsigned>(f), &flags, &n_values,
                                           nullptr, 0, nullptr, &config);
    if (id == H5Z_FILTER_DEFLATE && deflate < 0) {
      deflate = f;
    } else if (id != H5Z_FILTER_SHUFFLE) {
      Invalid(path, what + " has a filter lobecast never writes (" + std::to_string(id) + ")");
    }
  }
  hsize_t count = 0;
  if (H5Dget_num_chunks(dataset, space, &count) < 0)
    Invalid(path, what + ": HDF5 cannot count its chunks (a damaged chunk index)");
  hsize_t file_size = 0;
  if (H5Fget_filesize(loc, &file_size) < 0) file_size = 0;
  std::vector<unsigned char> raw, inflated(chunk_bytes + 1);
  for (hsize_t c = 0; c < count; ++c) {
    hsize_t offset[H5S_MAX_RANK] = {};
    unsigned mask = 0;
    haddr_t address = 0;
    hsize_t size = 0;
    if (H5Dget_chunk_info(dataset, space, c, offset, &mask, &address, &size) < 0 ||
        size > file_size)
      Invalid(path, what + " has a damaged chunk index");
    raw.resize(static_cast<std::size_t>(size));
    std::uint32_t filters = 0;
    if (size > 0 && H5Dread_chunk(dataset, H5P_DEFAULT, offset, &filters, raw.data()) < 0)
      Invalid(path, what + " has a chunk that cannot be read");
    std::uint64_t got = size;
    if (deflate >= 0 && (filters & (1u << deflate)) == 0) {
      uLongf length = static_cast<uLongf>(inflated.size());
      if (uncompress(inflated.data(), &length, raw.data(), static_cast<uLong>(raw.size())) != Z_OK)
        Invalid(path, what + " has a chunk whose compressed data is damaged");
      got = length;
    }
    if (got != chunk_bytes) {
      Invalid(path, what + " has a chunk of " + std::to_string(got) + " bytes, expected " +
                        std::to_string(chunk_bytes));
    }
  }
  H5Eclear2(H5E_DEFAULT);
}

void ExpectChunksWithin(hid_t loc, hid_t dataset, hid_t space, const std::string& what) {
  const hid_t plist = H5Dget_create_plist(dataset);
  if (plist < 0) Fail(FileNameOf(loc), "reading the layout of " + what);
  bool within = true;
  std::uint64_t chunk_bytes = 0;
  if (H5Pget_layout(plist) == H5D_CHUNKED) {
    hsize_t chunk[H5S_MAX_RANK] = {}, dims[H5S_MAX_RANK] = {};
    const int rank = H5Sget_simple_extent_ndims(space);
    const int chunk_rank = H5Pget_chunk(plist, H5S_MAX_RANK, chunk);
    within =
        rank >= 0 && rank == chunk_rank && H5Sget_simple_extent_dims(space, dims, nullptr) == rank;
    for (int k = 0; within && k < rank; ++k) within = chunk[k] <= std::max<hsize_t>(dims[k], 1);
    if (within) {
      const hid_t type = H5Dget_type(dataset);
      chunk_bytes = type >= 0 ? H5Tget_size(type) : 0;
      if (type >= 0) H5Tclose(type);
      for (int k = 0; k < rank; ++k) chunk_bytes *= chunk[k];
    }
  }
  if (!within) {
    H5Pclose(plist);
    Invalid(FileNameOf(loc), what + " has chunks larger than the dataset");
  }
  try {
    if (chunk_bytes > 0) ExpectChunksInflate(loc, dataset, space, plist, chunk_bytes, what);
  } catch (...) {
    H5Pclose(plist);
    throw;
  }
  H5Pclose(plist);
}

}  // namespace lobecast::hdf5
