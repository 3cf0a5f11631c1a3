// Fuzz target: an array description (TOML) through ParseArrayDescription, the
// reader behind check and compute. Inputs naming a `dipoles_csv` file are skipped:
// they would send the fuzzer through the file system (the CSV table itself has its
// own target, csv_fuzz.cpp).
#include <string>

#include "io/input/array_reader.h"
#include "tests/fuzz/fuzz_target.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text = lobecast::fuzz::Text(data, size);
  if (text.find("dipoles_csv") != std::string_view::npos) return 0;
  lobecast::fuzz::Refusable(
      [&] { (void)lobecast::ParseArrayDescription(text, "fuzz.toml", "/nonexistent"); });
  return 0;
}
