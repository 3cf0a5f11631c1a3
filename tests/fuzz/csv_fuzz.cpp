// Fuzz target: a CSV element table through ParseCsvDipoles (what `dipoles_csv`
// reads), in metres and in a small unit so scaling is exercised too.
#include "io/input/csv_dipoles.h"
#include "tests/fuzz/fuzz_target.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text = lobecast::fuzz::Text(data, size);
  lobecast::fuzz::Refusable([&] { (void)lobecast::ParseCsvDipoles(text, "fuzz.csv", 1.0, 0); });
  lobecast::fuzz::Refusable([&] { (void)lobecast::ParseCsvDipoles(text, "fuzz.csv", 1e-3, 3); });
  return 0;
}
