// The object headers of a result file, checked before HDF5 decodes their messages
// (untrusted_file.h, CheckObjectHeaders).
//
// HDF5 1.10.8 decodes an attribute message (H5O_attr_decode, reached from H5Aexists
// through H5O__msg_iterate) by the sizes the message claims, without comparing them
// with the message's own size: a name, datatype or dataspace size past the message,
// or a datatype or dataspace whose encoding runs past the size given for it, makes
// the library copy the attribute's value from beyond its buffer (AddressSanitizer:
// heap-buffer-overflow; a release build reads whatever lies there, or crashes). The
// same holds for the datatype and dataspace messages of a dataset. So every object
// header HDF5 can reach by a link is walked here first, from the file's bytes, the
// way the HDF5 File Format Specification (version 2.0, sections IV.A.1 and IV.A.2)
// lays it out, and every such message must fit:
//   - the header (version 1, or version 2 "OHDR"), its continuation chunks and each
//     message lie inside the file and inside their chunk;
//   - a dataspace message (0x0001): rank <= 32, its dimensions inside the message;
//   - a datatype message (0x0003): its encoding, nested types included (compound
//     members, enumeration names and values, array dimensions, the base of a
//     variable-length type, an opaque tag), inside the message;
//   - an attribute message (0x000C): the name (NUL-terminated), the datatype and the
//     dataspace each inside their stated sizes, those inside the message, and the
//     value (elements x element size, as HDF5 computes it) inside what is left;
//   - a chunked layout (version 3): its element size is the datatype's size;
//   - every variable-length value (lobecast's strings), of an attribute or of a
//     dataset (compact or contiguous), refers to a global-heap object that exists
//     and holds it (ExpectHeapObject, untrusted_file.cpp).
// Refused outright, because they cannot be checked from the header alone and
// lobecast never writes them: attributes with a shared datatype or dataspace,
// attributes in dense storage (an attribute-info message naming a fractal heap),
// variable-length types inside other types, and variable-length datasets stored
// in chunks.
// What this does not check: the messages HDF5 decodes with bounds of its own or
// which lobecast's reads never reach (links, layouts, fill values, filters, B-trees
// and heaps other than the global heap, which CheckGlobalHeaps walks).
#include <algorithm>
#include <cstdint>
#include <fstream>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "io/hdf5/untrusted_file.h"

namespace lobecast::hdf5 {
namespace {

std::uint64_t LittleEndianAt(const unsigned char* p, int bytes) {
  std::uint64_t v = 0;
  for (int k = bytes - 1; k >= 0; --k) v = (v << 8) | p[k];
  return v;
}

std::uint64_t Align8(std::uint64_t n) { return (n + 7) / 8 * 8; }

// A message's bytes with the reader's position: every read is bounded by the
// message, and a read past it marks the message bad instead of reading on.
struct Cursor {
  const unsigned char* data;
  std::uint64_t size;
  std::uint64_t at = 0;
  bool bad = false;
  int variable_length = 0;         // variable-length types met by Datatype, nested ones too
  std::uint64_t vlen_element = 0;  // the base type's size of the last one

  bool Has(std::uint64_t n) {
    if (bad || n > size - at) bad = true;
    return !bad;
  }
  std::uint64_t Take(int bytes) {
    if (!Has(static_cast<std::uint64_t>(bytes))) return 0;
    const std::uint64_t v = LittleEndianAt(data + at, bytes);
    at += static_cast<std::uint64_t>(bytes);
    return v;
  }
  void Skip(std::uint64_t n) {
    if (Has(n)) at += n;
  }
  // A NUL-terminated name, padded to a multiple of 8 bytes when `padded`.
  void Name(bool padded) {
    if (bad) return;
    const unsigned char* end = std::find(data + at, data + size, 0);
    if (end == data + size) {
      bad = true;
      return;
    }
    const auto length = static_cast<std::uint64_t>(end - (data + at)) + 1;
    Skip(padded ? Align8(length) : length);
  }
};

// The encoded datatype at the cursor (spec IV.A.2.d), nested types included; returns
// the size of one element as HDF5 holds it in the file (a variable-length value and
// a reference take their on-disk size, not the stored size field). Marks the cursor
// bad when the encoding runs past it or nests deeper than HDF5 would sensibly go.
std::uint64_t Datatype(Cursor& c, int depth = 0) {
  if (depth > 16) {
    c.bad = true;
    return 0;
  }
  const std::uint64_t class_and_version = c.Take(1);
  const std::uint64_t bits = c.Take(3);
  const std::uint64_t size = c.Take(4);
  const unsigned type_class = class_and_version & 0x0f;
  const unsigned version = static_cast<unsigned>(class_and_version >> 4);
  switch (type_class) {
    case 0:  // fixed-point: bit offset, precision
    case 4:  // bitfield: the same
      c.Skip(4);
      return size;
    case 1:  // floating point: offset, precision, exponent and mantissa fields, bias
      c.Skip(12);
      return size;
    case 2:  // time: precision
      c.Skip(2);
      return size;
    case 3:  // string: no properties
      return size;
    case 5:  // opaque: an ASCII tag of (bits & 0xff) bytes, padded to 8
      c.Skip(bits & 0xff);
      return size;
    case 6: {  // compound: members
      const std::uint64_t members = bits & 0xffff;
      if (members == 0) c.bad = true;
      for (std::uint64_t m = 0; m < members && !c.bad; ++m) {
        c.Name(version < 3);
        if (version == 1) {
          c.Skip(4 + 1 + 3 + 4 + 4 + 16);  // offset, rank, reserved, permutation, 4 sizes
        } else if (version == 2) {
          c.Skip(4);  // offset
        } else {
          int offset_bytes = 1;  // the fewest bytes that hold the compound's size
          while (offset_bytes < 8 && (size >> (8 * offset_bytes)) != 0) ++offset_bytes;
          c.Skip(static_cast<std::uint64_t>(offset_bytes));
        }
        Datatype(c, depth + 1);
      }
      return size;
    }
    case 7:  // reference: object (an address) or dataset region (4 + address)
      return (bits & 0x0f) == 1 ? 12 : 8;
    case 8: {  // enumeration: base type, names, values
      const std::uint64_t members = bits & 0xffff;
      const std::uint64_t base = Datatype(c, depth + 1);
      for (std::uint64_t m = 0; m < members && !c.bad; ++m) c.Name(version < 3);
      if (!c.bad && members > 0 && base > (c.size - c.at) / members) c.bad = true;
      c.Skip(members * base);
      return size;
    }
    case 9: {  // variable-length: the base type; (length u32, heap address, index u32)
      // HDF5 allocates length x the base type's size to read a value: a damaged base
      // size (1 -> 0xC1000001, found by the fuzzer) asked for 16 GB. lobecast writes
      // variable-length strings only (base size 1); no base type of a sequence HDF5
      // reads here is wider than 16 bytes.
      const std::uint64_t base = Datatype(c, depth + 1);
      if (base == 0 || base > 16) c.bad = true;
      ++c.variable_length;
      c.vlen_element = base;
      return 16;
    }
    case 10: {  // array: rank, dimensions (u32), permutation before version 3, base
      const std::uint64_t rank = c.Take(1);
      if (rank == 0 || rank > 32) c.bad = true;
      c.Skip(version < 3 ? 3 + rank * 8 : rank * 4);
      Datatype(c, depth + 1);
      return size;
    }
    default:
      c.bad = true;  // HDF5 refuses an unknown class itself, but without a bound
      return 0;
  }
}

// The encoded dataspace at the cursor (spec IV.A.2.b); returns its number of
// elements, or marks the cursor bad (a rank over 32, dimensions past the message,
// a count that overflows).
std::uint64_t Dataspace(Cursor& c) {
  const std::uint64_t version = c.Take(1);
  const std::uint64_t rank = c.Take(1);
  const std::uint64_t flags = c.Take(1);
  std::uint64_t kind = 1;  // version 1: simple (rank 0 is a scalar)
  if (version == 1) {
    c.Skip(5);
  } else {
    kind = c.Take(1);  // 0 scalar, 1 simple, 2 null
  }
  if (c.bad || rank > 32) {
    c.bad = true;
    return 0;
  }
  std::uint64_t count = 1;
  bool overflow = false;
  for (std::uint64_t d = 0; d < rank && !c.bad; ++d) {
    const std::uint64_t n = c.Take(8);
    if (n != 0 && count > UINT64_MAX / n) overflow = true;
    count *= n;
  }
  if ((flags & 1) != 0) c.Skip(rank * 8);  // maximum dimensions
  if (overflow) c.bad = true;
  if (version >= 2 && kind == 2) return 0;
  return count;
}

class HeaderWalker {
 public:
  HeaderWalker(const std::string& path, std::uint64_t base, const GlobalHeaps& heaps)
      : path_(path), base_(base), heaps_(heaps), in_(path, std::ios::binary) {
    in_.seekg(0, std::ios::end);
    file_size_ = in_ ? static_cast<std::uint64_t>(in_.tellg()) : 0;
  }

  void Header(std::uint64_t relative) {
    const std::uint64_t at = base_ + relative;
    if (!seen_.insert(at).second) return;
    unsigned char head[16];
    if (!Read(at, head, 4)) Bad(at, "lies past the end of the file");
    if (head[0] == 1) {
      if (!Read(at, head, 16)) Bad(at, "lies past the end of the file");
      Chunks(at, at + 16, LittleEndianAt(head + 8, 4), false);
    } else if (std::string(reinterpret_cast<char*>(head), 4) == "OHDR") {
      HeaderVersion2(at);
    } else {
      Bad(at, "is neither a version 1 nor a version 2 object header");
    }
  }

 private:
  [[noreturn]] void Bad(std::uint64_t at, const std::string& what) const {
    Invalid(path_, "the object header at byte " + std::to_string(at) + " " + what);
  }

  bool Read(std::uint64_t offset, unsigned char* out, std::uint64_t n) {
    if (offset > file_size_ || n > file_size_ - offset) return false;
    in_.clear();
    in_.seekg(static_cast<std::streamoff>(offset));
    in_.read(reinterpret_cast<char*>(out), static_cast<std::streamsize>(n));
    return static_cast<std::uint64_t>(in_.gcount()) == n;
  }

  void HeaderVersion2(std::uint64_t at) {
    unsigned char head[6 + 16 + 4 + 8];
    if (!Read(at, head, 6)) Bad(at, "lies past the end of the file");
    const unsigned flags = head[5];
    std::uint64_t p = 6 + ((flags & 0x20) ? 16 : 0) + ((flags & 0x10) ? 4 : 0);
    const int size_bytes = 1 << (flags & 3);
    if (!Read(at, head, p + static_cast<std::uint64_t>(size_bytes)))
      Bad(at, "lies past the end of the file");
    const std::uint64_t chunk = LittleEndianAt(head + p, size_bytes);
    p += static_cast<std::uint64_t>(size_bytes);
    creation_order_ = (flags & 0x04) != 0;
    Chunks(at, at + p, chunk, true);
  }

  // What a dataset's header says of its data, from messages in any order: a compact
  // layout's buffer must hold exactly elements x element size bytes, or HDF5 may read
  // past it (unverified: written while chasing a fuzzed file that turned out to be a
  // chunked read, ExpectChunksWithin; lobecast writes no compact data).
  struct DataFacts {
    std::optional<std::uint64_t> elements;      // the dataspace message
    std::optional<std::uint64_t> element_size;  // the datatype message
    std::optional<std::uint64_t> compact_size;  // a compact layout message
    std::uint64_t compact_at = 0;               //   and the file position of its data
    bool variable_length = false;               // the datatype is variable-length
    std::uint64_t vlen_element = 0;             //   of elements of this size
    std::optional<std::uint64_t> contiguous_address, contiguous_size;  // a contiguous layout
    std::optional<std::uint64_t> chunk_element_size;  // a chunked layout's last dimension
    bool other_layout = false;                        // a layout message of another kind
  };

  // Walks the chunk [start, start + size) and every continuation it names.
  void Chunks(std::uint64_t header, std::uint64_t start, std::uint64_t size, bool v2) {
    std::vector<std::pair<std::uint64_t, std::uint64_t>> chunks{{start, size}};
    DataFacts facts;
    for (std::size_t k = 0; k < chunks.size(); ++k) {
      if (chunks.size() > 4096) Bad(header, "has more than 4096 continuation chunks");
      auto [begin, length] = chunks[k];
      if (k > 0 && v2) {  // "OCHK" before the messages
        unsigned char sig[4];
        if (!Read(begin, sig, 4) || std::string(reinterpret_cast<char*>(sig), 4) != "OCHK")
          Bad(header, "names a continuation chunk without its signature");
        begin += 4;
        length = length >= 4 ? length - 4 : 0;
      }
      if (k > 0 && v2) length = length >= 4 ? length - 4 : 0;  // the checksum
      if (begin > file_size_ || length > file_size_ - begin)
        Bad(header, "has a chunk of " + std::to_string(length) + " bytes past the end of the file");
      std::vector<unsigned char> bytes(length);
      if (!Read(begin, bytes.data(), length)) Bad(header, "cannot be read");
      const std::uint64_t message_header = v2 ? 4 + (creation_order_ ? 2 : 0) : 8;
      std::uint64_t p = 0;
      while (length - p >= message_header) {
        const unsigned char* m = bytes.data() + p;
        const std::uint64_t type = v2 ? m[0] : LittleEndianAt(m, 2);
        const std::uint64_t data_size = v2 ? LittleEndianAt(m + 1, 2) : LittleEndianAt(m + 2, 2);
        const unsigned flags = v2 ? m[3] : m[4];
        p += message_header;
        if (data_size > length - p) {
          Bad(header, "has a message of " + std::to_string(data_size) + " bytes at byte " +
                          std::to_string(begin + p) + ", past the end of its chunk");
        }
        Message(header, begin + p, type, flags, bytes.data() + p, data_size, chunks, facts);
        p += data_size;
      }
    }
    if (facts.variable_length) DatasetReferences(header, facts);
    // HDF5 1.10.8 sizes a chunk's buffer by the layout's element size and copies out
    // of it by the datatype's: a datatype of 50 bytes over chunks of 16-byte elements
    // (a fuzzed file) read past the buffer.
    if (facts.chunk_element_size && facts.element_size &&
        *facts.chunk_element_size != *facts.element_size) {
      Bad(header, "has chunks of " + std::to_string(*facts.chunk_element_size) +
                      "-byte elements for a datatype of " + std::to_string(*facts.element_size) +
                      " bytes");
    }
    if (facts.compact_size && facts.elements && facts.element_size) {
      const std::uint64_t n = *facts.elements, e = *facts.element_size;
      if ((e != 0 && n > *facts.compact_size / e) || n * e != *facts.compact_size) {
        Bad(header, "has a compact dataset of " + std::to_string(*facts.compact_size) +
                        " bytes for " + std::to_string(n) + " elements of " + std::to_string(e) +
                        " bytes");
      }
    }
  }

  void Message(std::uint64_t header, std::uint64_t at, std::uint64_t type, unsigned flags,
               const unsigned char* data, std::uint64_t size,
               std::vector<std::pair<std::uint64_t, std::uint64_t>>& chunks, DataFacts& facts) {
    const bool shared = (flags & 0x02) != 0;  // the message is elsewhere: a reference
    auto bad = [&](const std::string& what) {
      Bad(header, "has a damaged " + what + " message at byte " + std::to_string(at));
    };
    if (type == 0x0010) {  // continuation: offset and length of the next chunk
      if (size < 16) bad("continuation");
      chunks.emplace_back(base_ + LittleEndianAt(data, 8), LittleEndianAt(data + 8, 8));
    } else if (type == 0x0001 && !shared) {
      Cursor c{data, size};
      facts.elements = Dataspace(c);
      if (c.bad) bad("dataspace");
    } else if (type == 0x0003 && !shared) {
      Cursor c{data, size};
      facts.element_size = Datatype(c);
      if (c.bad) bad("datatype");
      if (!TopLevelVariableLength(c, data)) bad("datatype (variable-length inside another type)");
      facts.variable_length = c.variable_length == 1;
      facts.vlen_element = c.vlen_element;
    } else if (type == 0x0008 && !shared) {  // data layout (spec IV.A.2.i)
      // Versions 3 and 4, class 0 (compact): the size (u16) and that many bytes of
      // data; class 1 (contiguous): the address and the size (8 bytes each).
      const bool v3 = size >= 2 && (data[0] == 3 || data[0] == 4);
      if (v3 && data[1] == 0) {
        if (size < 4 || LittleEndianAt(data + 2, 2) > size - 4) bad("data layout");
        facts.compact_size = LittleEndianAt(data + 2, 2);
        facts.compact_at = at + 4;
      } else if (v3 && data[1] == 1) {
        if (size < 18) bad("data layout");
        facts.contiguous_address = LittleEndianAt(data + 2, 8);
        facts.contiguous_size = LittleEndianAt(data + 10, 8);
      } else if (data[0] == 3 && size >= 3 && data[1] == 2) {
        // Version 3, chunked: dimensionality (the rank + 1), the B-tree's address,
        // then that many u32 sizes, the last the size of one element.
        const std::uint64_t dims = data[2];
        if (dims < 2 || size < 3 + 8 + 4 * dims) bad("data layout");
        facts.chunk_element_size = LittleEndianAt(data + 3 + 8 + 4 * (dims - 1), 4);
        facts.other_layout = true;
      } else {
        facts.other_layout = true;
      }
    } else if (type == 0x000C) {
      if (shared) bad("attribute (shared, which lobecast never writes)");
      if (!Attribute(at, data, size)) bad("attribute");
    } else if (type == 0x0015 && size >= 2 + 8) {  // attribute info: dense storage?
      const unsigned info_flags = data[1];
      const std::uint64_t heap = LittleEndianAt(data + 2 + ((info_flags & 1) ? 2 : 0), 8);
      if (heap != UINT64_MAX)
        bad("attribute info (dense attribute storage, which lobecast never writes)");
    }
  }

  // Spec IV.A.2.m: version 1 pads name, datatype and dataspace to 8 bytes; version
  // 3 adds the name's character set. HDF5 copies elements x element size bytes of
  // value from after the dataspace.
  bool Attribute(std::uint64_t at, const unsigned char* data, std::uint64_t size) {
    Cursor c{data, size};
    const std::uint64_t version = c.Take(1);
    const std::uint64_t flags = c.Take(1);
    const std::uint64_t name_size = c.Take(2);
    const std::uint64_t type_size = c.Take(2);
    const std::uint64_t space_size = c.Take(2);
    if (version == 3) c.Skip(1);
    if (c.bad || version < 1 || version > 3 || (flags & 0x03) != 0 || name_size == 0) return false;
    const auto padded = [&](std::uint64_t n) { return version == 1 ? Align8(n) : n; };
    // The name: NUL-terminated within its size (HDF5 copies it up to the NUL).
    if (!c.Has(padded(name_size)) || data[c.at + name_size - 1] != 0) return false;
    if (std::find(data + c.at, data + c.at + name_size, 0) != data + c.at + name_size - 1)
      return false;
    c.at += padded(name_size);
    if (!c.Has(padded(type_size))) return false;
    Cursor type{data + c.at, type_size};
    const std::uint64_t element = Datatype(type);
    if (type.bad || !TopLevelVariableLength(type, data + c.at)) return false;
    c.at += padded(type_size);
    if (!c.Has(padded(space_size))) return false;
    Cursor space{data + c.at, space_size};
    const std::uint64_t count = Dataspace(space);
    if (space.bad) return false;
    c.at += padded(space_size);
    const std::uint64_t left = size - c.at;
    if (element != 0 && count > left / element) return false;
    if (type.variable_length == 1) {  // count references of 16 bytes, checked in place
      for (std::uint64_t k = 0; k < count; ++k)
        Reference(at + c.at + 16 * k, data + c.at + 16 * k, type.vlen_element);
    }
    return true;
  }

  // False when a datatype holds a variable-length type other than at its top (a
  // compound or array of them, a sequence of sequences): lobecast writes
  // variable-length strings only, and their references could not be found here.
  static bool TopLevelVariableLength(const Cursor& type, const unsigned char* encoded) {
    return type.variable_length == 0 || (type.variable_length == 1 && (encoded[0] & 0x0f) == 9);
  }

  // One reference (length u32, collection address u64, index u32) at file byte `at`.
  // Its address is relative to the base address; 0 is a null value.
  void Reference(std::uint64_t at, const unsigned char* bytes, std::uint64_t element) {
    const std::uint64_t address = LittleEndianAt(bytes + 4, 8);
    ExpectHeapObject(path_, heaps_, at, LittleEndianAt(bytes, 4), element,
                     address == 0 ? 0 : base_ + address, LittleEndianAt(bytes + 12, 4));
  }

  // The references of a variable-length dataset, read where its layout keeps them:
  // inside the header (compact) or at one address (contiguous, unless not yet
  // allocated); lobecast writes no other layout of them.
  void DatasetReferences(std::uint64_t header, const DataFacts& facts) {
    const std::uint64_t n = facts.elements.value_or(0);
    std::uint64_t at = 0;
    if (facts.compact_size) {
      at = facts.compact_at;
      if (n > *facts.compact_size / 16)
        Bad(header, "has a compact dataset too small for its strings");
    } else if (facts.contiguous_address && !facts.other_layout) {
      if (*facts.contiguous_address == UINT64_MAX) return;  // not allocated: no values
      at = base_ + *facts.contiguous_address;
      if (n > facts.contiguous_size.value_or(0) / 16)
        Bad(header, "has a dataset of strings larger than its storage");
    } else {
      Bad(header, "has variable-length data in a layout lobecast never writes");
    }
    if (n == 0) return;
    if (at > file_size_ || n > (file_size_ - at) / 16)
      Bad(header, "has a dataset of strings past the end of the file");
    std::vector<unsigned char> bytes(16 * n);
    if (!Read(at, bytes.data(), bytes.size())) Bad(header, "has strings that cannot be read");
    for (std::uint64_t k = 0; k < n; ++k)
      Reference(at + 16 * k, bytes.data() + 16 * k, facts.vlen_element);
  }

  const std::string& path_;
  std::uint64_t base_;
  const GlobalHeaps& heaps_;
  std::ifstream in_;
  std::uint64_t file_size_ = 0;
  std::set<std::uint64_t> seen_;
  bool creation_order_ = false;
};

herr_t VisitObject(hid_t /*obj*/, const char* /*name*/, const H5O_info_t* info, void* data) {
  static_cast<std::vector<std::uint64_t>*>(data)->push_back(info->addr);
  return 0;
}

// The base address that object addresses are relative to (superblock versions 0
// and 1: byte 24; 2 and 3: byte 12), 0 when the superblock cannot say.
std::uint64_t BaseAddress(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  unsigned char super[32] = {};
  in.read(reinterpret_cast<char*>(super), sizeof super);
  if (in.gcount() != sizeof super) return 0;
  return super[8] >= 2 ? LittleEndianAt(super + 12, 8) : LittleEndianAt(super + 24, 8);
}

}  // namespace

void CheckObjectHeaders(hid_t file, const std::string& path, const GlobalHeaps& heaps) {
  std::vector<std::uint64_t> addresses;
  // H5O_INFO_BASIC: address and type only; HDF5 decodes no attribute for them.
  if (H5Ovisit2(file, H5_INDEX_NAME, H5_ITER_NATIVE, VisitObject, &addresses, H5O_INFO_BASIC) < 0) {
    Invalid(path, "HDF5 cannot walk its groups (a damaged group or link)");
  }
  HeaderWalker walker(path, BaseAddress(path), heaps);
  for (const std::uint64_t address : addresses) walker.Header(address);
}

}  // namespace lobecast::hdf5
