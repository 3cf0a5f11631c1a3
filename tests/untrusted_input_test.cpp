// Files given by name are untrusted input (issue 12): a device, a pipe or a huge
// file is refused at once with its location instead of being read forever, and
// every count a file gives is bounded, the message naming the limit.
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "io/input/array_reader.h"
#include "io/input/requirements_reader.h"
#include "io/input/text_file.h"
#include "io/input_error.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;

std::string ErrorOf(const std::string& text, const std::string& base_dir = "") {
  try {
    ParseArrayDescription(text, "t.toml", base_dir);
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

template <typename Read>
std::string ErrorOfRead(Read&& read) {
  try {
    read();
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

class TempDir {
 public:
  TempDir()
      : path_(fs::temp_directory_path() / ("lobecast-untrusted-" + std::to_string(getpid()))) {
    fs::create_directories(path_);
  }
  ~TempDir() { fs::remove_all(path_); }
  std::string operator/(const std::string& name) const { return (path_ / name).string(); }

 private:
  fs::path path_;
};

const char* kDipole =
    "[[dipole]]\nposition = [0, 0, 0]\norientation = [0, 0, 1]\nlength = 0.01\n"
    "current = { magnitude = 1 }\n";

TEST(UntrustedInput, DevZeroAsCsvIsRefusedAtItsKey) {
  // Read forever before: /dev/zero never ends.
  const std::string m = ErrorOf("frequency = 1e9\ndipoles_csv = \"/dev/zero\"\n");
  EXPECT_THAT(m, HasSubstr("t.toml:2:15: key 'dipoles_csv'"));
  EXPECT_THAT(m, HasSubstr("not a regular file"));
}

TEST(UntrustedInput, PipesAndDevicesAreNotRead) {
  TempDir dir;
  const std::string fifo = dir / "pipe.toml";
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0600), 0);
  // Opening a pipe with no writer waited forever before.
  EXPECT_THAT(ErrorOfRead([&] { ReadArrayDescription(fifo); }), HasSubstr("not a regular file"));
  EXPECT_THAT(ErrorOfRead([&] { ReadRequirements("/dev/zero"); }),
              HasSubstr("/dev/zero: cannot read the file"));
  EXPECT_THAT(ErrorOfRead([&] { ReadRequirements("/dev/zero"); }), HasSubstr("not a regular file"));
  std::string why;
  EXPECT_FALSE(ReadTextFile("/dev/null", &why).has_value());
  EXPECT_THAT(why, HasSubstr("not a regular file"));
}

TEST(UntrustedInput, HugeFilesAreRefusedBeforeTheyAreRead) {
  TempDir dir;
  // Sparse files: the size is checked before a byte is read.
  const std::string toml = dir / "huge.toml";
  std::ofstream(toml).put('#');
  fs::resize_file(toml, kMaxTomlBytes + 1);
  const std::string m = ErrorOfRead([&] { ReadArrayDescription(toml); });
  EXPECT_THAT(m, HasSubstr("huge.toml"));
  EXPECT_THAT(m, HasSubstr("larger than 64 MiB"));

  const std::string csv = dir / "huge.csv";
  std::ofstream(csv).put('x');
  fs::resize_file(csv, kMaxCsvBytes + 1);
  const std::string c = ErrorOf("frequency = 1e9\ndipoles_csv = \"huge.csv\"\n", dir / "");
  EXPECT_THAT(c, HasSubstr("t.toml:2:15: key 'dipoles_csv'"));
  EXPECT_THAT(c, HasSubstr("larger than 1 GiB"));

  // At the limit a file is read (a comment only: refused for what it holds).
  fs::resize_file(toml, 0);
  std::ofstream(toml) << "frequency = 1e9\n" << kDipole;
  EXPECT_NO_THROW(ReadArrayDescription(toml));
}

TEST(UntrustedInput, FrequencyListsAreBounded) {
  std::string list = "frequencies = [";
  for (int i = 0; i <= 100000; ++i) list += std::to_string(1e9 + 1e3 * i) + ",";
  list += "]\n";
  EXPECT_THAT(ErrorOf(list + kDipole),
              HasSubstr("t.toml:1:15: key 'frequencies': found 100001 frequencies, expected at "
                        "most 100000"));
  EXPECT_THAT(
      ErrorOf("frequencies = { start = 1e9, stop = 2e9, count = 100001 }\n" + std::string(kDipole)),
      HasSubstr("expected a whole number in [1, 100000]"));
  // The stored directivity of a sweep: frequencies x directions.
  EXPECT_THAT(
      ErrorOf("frequencies = { start = 1e9, stop = 2e9, count = 2000 }\n" + std::string(kDipole)),
      HasSubstr("key 'frequencies': found 2000 frequencies x 65341 directions, expected "
                "at most 1e+08 directions over all frequencies"));
}

TEST(UntrustedInput, RepeatedFrequenciesAreFoundAmongMany) {
  // The duplicate check is sorted (100000 frequencies took 5e9 comparisons); it still
  // names the first frequency that repeats an earlier one, at its place.
  EXPECT_THAT(ErrorOf("frequencies = [\"2 GHz\", \"1 GHz\", \"3 GHz\", \"1000 MHz\"]\n" +
                      std::string(kDipole)),
              HasSubstr("t.toml:1:43: key 'frequencies': found 1e+09 Hz twice"));
  EXPECT_THAT(ErrorOf("frequencies = [1e9, 2e9, 1.0000000005e9]\n" + std::string(kDipole)),
              HasSubstr("t.toml:1:26: key 'frequencies': found 1000000000.5 Hz twice"));
  EXPECT_THAT(ErrorOf("frequencies = [1e9, 2e9, 1.000000002e9]\n" + std::string(kDipole)),
              HasSubstr("(no error)"));
}

TEST(UntrustedInput, RingsAreBoundedTogether) {
  // Each ring was bounded, their sum was not.
  const std::string m = ErrorOf(
      "frequency = 1e9\n[element]\nlength = 0.01\n[lattice]\nkind = \"ring\"\n"
      "count = [9000000, 9000000]\nradius = [1, 2]\n");
  EXPECT_THAT(m, HasSubstr("t.toml:6:9: key 'lattice.count': found more than 10000000 elements"));
}

}  // namespace
}  // namespace lobecast
