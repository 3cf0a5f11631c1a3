// Fuzz target: a result file, as report, export and plot read it: ReadResult,
// then the stored analysis and coupling. The bytes go to a temporary file because
// the readers take a path; a new name for every input, since the global-heap walk
// is remembered per path, size and modification time (hdf5_file.cpp), and two
// inputs of one size can be written within one tick of the file clock.
#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <string>

#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"
#include "tests/fuzz/fuzz_target.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static unsigned long long count = 0;
  const std::string path = "/tmp/lobecast-result-fuzz-" + std::to_string(::getpid()) + "-" +
                           std::to_string(count++) + ".h5";
  {
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  }
  lobecast::fuzz::Refusable([&] {
    const lobecast::StoredResult stored = lobecast::ReadResult(path);
    (void)lobecast::ReadAnalysis(path);
    (void)lobecast::ReadCoupling(path, stored.array, stored.currents);
  });
  std::remove(path.c_str());
  return 0;
}
