// Fuzz target: a design file ([lattice], [element], [taper], [steer], [[null]],
// [objective]: io/input/design_reader.h and the synthesis it asks for). A design
// is read wherever an array is (ParseArrayDescription), so this is the entry of
// array_fuzz.cpp with a corpus of designs; an input without a [lattice] table
// gets one, so every input reaches the design reader.
#include <string>

#include "io/input/array_reader.h"
#include "tests/fuzz/fuzz_target.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  std::string text(lobecast::fuzz::Text(data, size));
  if (text.find("dipoles_csv") != std::string::npos) return 0;
  if (text.find("[lattice]") == std::string::npos) text += "\n[lattice]\n";
  lobecast::fuzz::Refusable(
      [&] { (void)lobecast::ParseArrayDescription(text, "fuzz.toml", "/nonexistent"); });
  return 0;
}
