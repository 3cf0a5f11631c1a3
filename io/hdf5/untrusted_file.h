// A result file is input: a damaged one must be refused, never crash or hang the
// reader. HDF5 checks the structure it parses, but not everything that a damaged
// file can claim, so what the library would trust is checked first
// (io/hdf5/hdf5_file.cpp calls these before it reads). Internal to io/hdf5.
#pragma once

#include <cstddef>
#include <cstdint>
#include <map>
#include <string>

#include <hdf5.h>

#include "io/hdf5/hdf5_file.h"

namespace lobecast::hdf5 {

// Throws NotAResultError(path, "not a valid lobecast result: " + what).
[[noreturn]] void Invalid(const std::string& path, const std::string& what);

// The file's global-heap collections: collection address -> (object index ->
// object size in bytes).
using GlobalHeaps = std::map<std::uint64_t, std::map<std::uint64_t, std::uint64_t>>;

// Walks every global-heap collection of the file the way HDF5 1.10 does (see the
// .cpp); Invalid when one would make the library spin or read past an object.
// Returns the collections, for the check of the references into them.
GlobalHeaps CheckGlobalHeaps(const std::string& path);

// Invalid unless the variable-length value at byte `at` of the file, (`length`
// elements of `element_size` bytes, collection `address`, `index`), names an
// object of `heaps` that holds it. A null value (address 0) or an empty one holds
// no reference.
void ExpectHeapObject(const std::string& path, const GlobalHeaps& heaps, std::uint64_t at,
                      std::uint64_t length, std::uint64_t element_size, std::uint64_t address,
                      std::uint64_t index);

// Walks the object header of every object `file` links to (object_headers.cpp) and
// checks that its dataspace, datatype and attribute messages fit where they claim
// to be, and that every variable-length value of a dataset or attribute refers to
// an object of `heaps` that holds it; Invalid when one would make HDF5 read past a
// message or an object.
void CheckObjectHeaders(hid_t file, const std::string& path, const GlobalHeaps& heaps);

// The largest count or index a result file may store (max_nulls, list lengths,
// numbers of dipoles and directions): far above any run lobecast can make, far
// below what would overflow when it is multiplied or converted.
inline constexpr std::int64_t kMaxStoredCount = 1'000'000'000;

// What a dataset or attribute must hold before HDF5 converts it to ours.
enum class Stored { kReal, kInteger, kComplex, kString };

// Invalid unless `type` stores `kind` in a standard layout (and, for fixed-length
// strings, a size the file can hold).
void ExpectType(hid_t loc, hid_t type, Stored kind, const std::string& what);

// The number of values in `space`; Invalid when reading them as `bytes_each` bytes
// could not come from the file.
std::size_t BoundedCount(hid_t loc, hid_t space, std::size_t bytes_each, const std::string& what);

// Invalid when a chunked dataset's chunks are larger than the dataset in some
// dimension (lobecast's never are): HDF5 1.10.8 then copies a whole chunk out of
// the smaller inflated buffer (a fuzzed file whose chunk of 5 x 9 read as 5 x 777
// made `report` segfault); and when a stored chunk, read raw and inflated, does not
// come to exactly one chunk's bytes or the pipeline holds a filter other than
// shuffle and deflate (HDF5 copies a whole chunk out of whatever its filters gave).
// Reads every chunk once more than HDF5 does.
void ExpectChunksWithin(hid_t loc, hid_t dataset, hid_t space, const std::string& what);

}  // namespace lobecast::hdf5
