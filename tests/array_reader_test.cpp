// Tests for io/input/array_reader, io/input/csv_dipoles and io/input/units: good descriptions parse
// to the right engine values, and every file in tests/data/bad is rejected with a
// message naming the file, the line and the key.
//
// Expected numbers are exact conversions of the inputs (unit scales, c0 = 299792458
// m/s exact, |(3, 4, 0)| = 5); nothing here is a physics reference value.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "bad_corpus.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "engine/constants.h"
#include "io/input/array_reader.h"
#include "io/input/csv_dipoles.h"
#include "io/input/solve_circuit.h"
#include "io/input/units.h"
#include "io/input_error.h"
#include "io/text/number_text.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;

const std::string kData = std::string(LOBECAST_TESTS_DIR) + "/data";

constexpr double kTight = 1e-12;  // relative; only unit conversions and normalization involved

void ExpectNear(double expected, double actual) {
  EXPECT_NEAR(actual, expected, kTight * std::max(1.0, std::abs(expected)))
      << "expected " << expected << ", got " << actual;
}

std::string ErrorOf(std::string_view text, const std::string& name = "t.toml") {
  try {
    ParseArrayDescription(text, name, kData + "/good");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

// ---------------------------------------------------------------- units

TEST(Units, Frequencies) {
  ExpectNear(433.92e6, FrequencyFromString("433.92 MHz").value());
  ExpectNear(2.45e9, FrequencyFromString("2.45 GHz").value());
  ExpectNear(915e6, FrequencyFromString("915e6 Hz").value());
  ExpectNear(125e3, FrequencyFromString("125kHz").value());
  ExpectNear(0.3e12, FrequencyFromString("  0.3 THz ").value());
  ExpectNear(1e6, FrequencyFromString("+1 MHz").value());
  EXPECT_FALSE(FrequencyFromString("433.92 mHz"));  // millihertz is not megahertz
  EXPECT_FALSE(FrequencyFromString("433.92 mhz"));
  EXPECT_FALSE(FrequencyFromString("433.92 Mhz"));
  EXPECT_FALSE(FrequencyFromString("433.92"));  // a string needs its unit
  EXPECT_FALSE(FrequencyFromString("MHz"));
  EXPECT_FALSE(FrequencyFromString(""));
  EXPECT_FALSE(FrequencyFromString("1 2 MHz"));
  EXPECT_FALSE(FrequencyFromString("++1 MHz"));
}

TEST(Units, NumbersAndLengthUnits) {
  EXPECT_EQ(ParseNumber(" 0.01 ").value(), 0.01);
  EXPECT_EQ(ParseNumber("+3").value(), 3.0);
  EXPECT_EQ(ParseNumber("-2.5e-3").value(), -2.5e-3);
  EXPECT_FALSE(ParseNumber("0.01m"));
  EXPECT_FALSE(ParseNumber(""));
  EXPECT_FALSE(ParseNumber("short"));
  EXPECT_TRUE(std::isinf(ParseNumber("1e999").value()));
  // Underflow is a tiny number, not infinity (from_chars calls both out of range).
  EXPECT_EQ(ParseNumber("1e-400").value(), 0.0);
  EXPECT_EQ(ParseNumber("-1e-99999").value(), 0.0);
  EXPECT_EQ(ParseNumber("4e-320").value(), 4e-320);  // subnormal
  EXPECT_FALSE(ParseNumber("+-5"));
  EXPECT_EQ(ParseFiniteNumber("+5").value(), 5.0);
  EXPECT_FALSE(ParseFiniteNumber("+-5"));  // as ParseNumber: one sign only
  EXPECT_FALSE(ParseFiniteNumber("inf"));
  EXPECT_EQ(FormatNumber(0.01), "0.01");
  EXPECT_EQ(FormatNumber(433920000.0), "433920000");
  EXPECT_EQ(LengthUnitFromString("cm"), LengthUnit::kCentimetre);
  EXPECT_EQ(LengthUnitFromString("wavelength"), LengthUnit::kWavelength);
  EXPECT_FALSE(LengthUnitFromString("Mm"));
  EXPECT_FALSE(LengthUnitFromString("M"));
  EXPECT_EQ(MetresPer(LengthUnit::kMillimetre, 5.0), 1e-3);
  EXPECT_EQ(MetresPer(LengthUnit::kWavelength, 0.7), 0.7);
}

// ---------------------------------------------------------------- good files

TEST(ArrayReader, ConventionsMinimum) {
  const ArrayDescription d = ReadArrayDescription(kData + "/good/minimum.toml");
  ExpectNear(433.92e6, d.array.frequency_hz);
  EXPECT_EQ(d.array.ground, Ground::kNone);
  EXPECT_EQ(d.length_unit, "m");
  ASSERT_EQ(d.array.size(), 1u);
  const Dipole& p = d.array.dipoles[0];
  EXPECT_EQ(p.position_m, Vec3(0, 0, 0));
  EXPECT_EQ(p.orientation, Vec3(0, 0, 1));
  ExpectNear(0.01, p.length_m);
  EXPECT_EQ(p.distribution, Distribution::kUniform);
  ExpectNear(1.0, d.currents[0].real());
  ExpectNear(0.0, d.currents[0].imag());
  EXPECT_EQ(d.theta.start_deg, 0.0);
  EXPECT_EQ(d.theta.stop_deg, 180.0);
  EXPECT_EQ(d.phi.stop_deg, 360.0);
  EXPECT_EQ(d.grid.theta_deg.size(), 181u);
  EXPECT_EQ(d.grid.phi_deg.size(), 361u);
  EXPECT_TRUE(d.warnings.empty());
  ASSERT_EQ(d.dipole_locations.size(), 1u);
  EXPECT_EQ(d.dipole_locations[0].line, 7);
  EXPECT_THAT(d.source_text, HasSubstr("frequency = 433.92e6"));
  EXPECT_THAT(d.source_path, HasSubstr("minimum.toml"));
  EXPECT_TRUE(d.csv_path.empty());
}

TEST(ArrayReader, DefaultsWhenOptionalKeysAreOmitted) {
  const ArrayDescription d = ParseArrayDescription(
      "frequency = 1e9\n[[dipole]]\nposition = [0, 0, 0]\norientation = [1, 0, 0]\n"
      "length = 0.001\ncurrent = { magnitude = 2 }\n",
      "t.toml", "");
  EXPECT_EQ(d.array.ground, Ground::kNone);
  EXPECT_EQ(d.theta.start_deg, 0.0);
  EXPECT_EQ(d.theta.stop_deg, 180.0);
  EXPECT_EQ(d.theta.step_deg, 1.0);
  EXPECT_EQ(d.phi.stop_deg, 360.0);
  EXPECT_EQ(d.grid.size(), 181u * 361u);
  EXPECT_EQ(d.array.dipoles[0].distribution, Distribution::kUniform);
  EXPECT_EQ(d.currents[0], Complex(2.0, 0.0));  // phase defaults to 0
  EXPECT_TRUE(d.name.empty());
}

TEST(ArrayReader, CentimetresUnitStringsAndNormalization) {
  const ArrayDescription d = ReadArrayDescription(kData + "/good/units_cm.toml");
  EXPECT_EQ(d.name, "quillmoor bench pair");
  EXPECT_EQ(d.description, "two crossed elements, 90 degrees apart in phase");
  ExpectNear(2.45e9, d.array.frequency_hz);
  EXPECT_EQ(d.array.ground, Ground::kPec);  // "PEC": ground names are case-insensitive
  EXPECT_EQ(d.length_unit, "cm");
  ASSERT_EQ(d.array.size(), 2u);
  const Dipole& a = d.array.dipoles[0];
  ExpectNear(0.015, a.position_m.x());
  ExpectNear(-0.02, a.position_m.y());
  ExpectNear(0.03, a.position_m.z());
  ExpectNear(0.6, a.orientation.x());  // (3, 4, 0) / 5
  ExpectNear(0.8, a.orientation.y());
  ExpectNear(0.0, a.orientation.z());
  ExpectNear(0.005, a.length_m);
  EXPECT_EQ(a.distribution, Distribution::kTriangular);
  ExpectNear(0.0025, a.effective_length_m());
  ExpectNear(0.0, d.currents[0].real() / 2.0);  // 2 A at 90 degrees = 2j
  ExpectNear(2.0, d.currents[0].imag());
  const Dipole& b = d.array.dipoles[1];
  ExpectNear(0.10, b.position_m.z());
  EXPECT_EQ(b.orientation, Vec3(0, 0, -1));
  ExpectNear(0.0025, b.length_m);
  EXPECT_EQ(d.currents[1], Complex(0.5, 0.0));
  // theta 0..90 step 2.5 -> 37 angles; phi = 45 is a single cut.
  EXPECT_EQ(d.grid.theta_deg.size(), 37u);
  ASSERT_EQ(d.grid.phi_deg.size(), 1u);
  EXPECT_EQ(d.grid.phi_deg[0], 45.0);
  EXPECT_EQ(d.dipole_locations[1].line, 16);
}

TEST(ArrayReader, WavelengthUnitAndLengthWarning) {
  const ArrayDescription d = ReadArrayDescription(kData + "/good/wavelength.toml");
  const double lambda = kSpeedOfLight_m_s / 915e6;
  ExpectNear(915e6, d.array.frequency_hz);
  ExpectNear(-0.25 * lambda, d.array.dipoles[0].position_m.x());
  ExpectNear(0.25 * lambda, d.array.dipoles[1].position_m.x());
  ExpectNear(0.05 * lambda, d.array.dipoles[0].length_m);
  ExpectNear(0.15 * lambda, d.array.dipoles[1].length_m);
  ExpectNear(0.0, d.currents[1].real());
  ExpectNear(-1.0, d.currents[1].imag());
  // 0.15 lambda is accepted with a warning (beyond lambda/10), pointing at line 12.
  ASSERT_EQ(d.warnings.size(), 1u);
  EXPECT_THAT(d.warnings[0], HasSubstr("wavelength.toml:12:10: warning: key 'dipole[1].length'"));
  EXPECT_THAT(d.warnings[0], HasSubstr("dipole[1].length"));
  EXPECT_THAT(d.warnings[0], HasSubstr("lambda/10"));
}

TEST(ArrayReader, CsvRowsFollowTableDipoles) {
  const ArrayDescription d = ReadArrayDescription(kData + "/good/with_csv.toml");
  ExpectNear(868e6, d.array.frequency_hz);
  ASSERT_EQ(d.array.size(), 4u);
  EXPECT_THAT(d.csv_path, HasSubstr("elements.csv"));
  EXPECT_THAT(d.csv_text, HasSubstr("Larkspur"));
  // dipole 0: the [[dipole]] table, in mm.
  ExpectNear(0.5, d.array.dipoles[0].position_m.z());
  ExpectNear(0.01, d.array.dipoles[0].length_m);
  // dipole 1: first CSV row (columns in a shuffled order, header in mixed case).
  const Dipole& c1 = d.array.dipoles[1];
  ExpectNear(0.1, c1.position_m.x());
  EXPECT_EQ(c1.orientation, Vec3(0, 0, 1));
  ExpectNear(0.01, c1.length_m);
  EXPECT_EQ(c1.distribution, Distribution::kTriangular);
  ExpectNear(0.0, d.currents[1].real());
  ExpectNear(0.5, d.currents[1].imag());
  // dipole 2: switched off (magnitude 0), empty distribution cell -> uniform, (0,2,0) normalized.
  const Dipole& c2 = d.array.dipoles[2];
  ExpectNear(-0.1, c2.position_m.y());
  ExpectNear(0.005, c2.position_m.z());
  EXPECT_EQ(c2.orientation, Vec3(0, 1, 0));
  EXPECT_EQ(d.currents[2], Complex(0.0, 0.0));
  EXPECT_EQ(c2.distribution, Distribution::kUniform);
  // dipole 3: no blanks around cells, (ux, uy, uz) = (0, 1, 1), phase -45 degrees.
  const Dipole& c3 = d.array.dipoles[3];
  ExpectNear(0.003, c3.position_m.x());
  ExpectNear(0.001, c3.position_m.z());
  ExpectNear(0.0, c3.orientation.x());
  ExpectNear(std::sqrt(0.5), c3.orientation.y());
  ExpectNear(std::sqrt(0.5), c3.orientation.z());
  ExpectNear(1.5 * std::cos(-45 * kDegree), d.currents[3].real());
  ExpectNear(1.5 * std::sin(-45 * kDegree), d.currents[3].imag());
  // Where each dipole came from: the TOML table, then CSV lines 4, 6 and 7.
  ASSERT_EQ(d.dipole_locations.size(), 4u);
  EXPECT_THAT(d.dipole_locations[0].file, HasSubstr("with_csv.toml"));
  EXPECT_EQ(d.dipole_locations[0].line, 8);
  EXPECT_THAT(d.dipole_locations[1].file, HasSubstr("elements.csv"));
  EXPECT_EQ(d.dipole_locations[1].line, 4);
  EXPECT_EQ(d.dipole_locations[2].line, 6);
  EXPECT_EQ(d.dipole_locations[3].line, 7);
  EXPECT_EQ(d.grid.phi_deg.size(), 72u);
}

TEST(ArrayReader, CsvAloneIsEnough) {
  const std::string csv = "x,y,z,ux,uy,uz,length,magnitude,phase\n0,0,0,0,0,1,0.01,1,0\n";
  const std::vector<CsvDipole> rows = ParseCsvDipoles(csv, "e.csv", 1.0, 0);
  ASSERT_EQ(rows.size(), 1u);
  EXPECT_EQ(rows[0].row.line, 2);
  EXPECT_EQ(rows[0].length_cell.column, 13);  // "0,0,0,0,0,1,0.01": the 13th character
  EXPECT_EQ(rows[0].z_cell.column, 5);
}

TEST(ArrayReader, WarnsWhenStopIsNotOnTheStep) {
  const ArrayDescription d = ParseArrayDescription(
      "frequency = 1e9\n[grid]\ntheta = { start = 0, stop = 90, step = 7 }\n[[dipole]]\n"
      "position = [0, 0, 0]\norientation = [0, 0, 1]\nlength = 0.001\ncurrent = { magnitude = 1 "
      "}\n",
      "t.toml", "");
  ASSERT_EQ(d.warnings.size(), 1u);
  EXPECT_THAT(d.warnings[0], HasSubstr("t.toml:3:"));
  EXPECT_THAT(d.warnings[0], HasSubstr("last angle is 84"));
}

TEST(ArrayReader, UnreadableFile) {
  try {
    ReadArrayDescription(kData + "/good/does_not_exist.toml");
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_THAT(e.what(), HasSubstr("does_not_exist.toml"));
    EXPECT_THAT(e.what(), HasSubstr("no such file"));
  }
  EXPECT_THAT(ErrorOf("frequency = 1e9\n"), HasSubstr("t.toml:1:1: key 'dipole'"));
}

TEST(ArrayReader, MessageFormat) {
  const std::string m = ErrorOf(
      "frequency = 1e9\n[[dipole]]\nposition = [0, 0, 0]\norientation = [0, 0, 1]\n"
      "length = 0.001\ncurrent = { magnitude = 1 }\n\n[[dipole]]\npostion = [1, 0, 0]\n",
      "arr.toml");
  EXPECT_EQ(m,
            "arr.toml:9:1: key 'dipole[1].postion': found unknown key, expected one of position, "
            "orientation, length, distribution, current, drive, load, radius, self_reactance, "
            "conductivity (did you mean 'position'?)");
  EXPECT_EQ(ErrorOf("frequency = \"433.92 mHz\"\n", "arr.toml"),
            "arr.toml:1:13: key 'frequency': found string \"433.92 mHz\", expected a number "
            "followed by a unit, one of Hz, kHz, MHz, GHz, THz (e.g. \"433.92 MHz\")");
}

TEST(ArrayReader, InlineDipoleArrayAndHugeOrientation) {
  const ArrayDescription d = ParseArrayDescription(
      "frequency = \"1 GHz\"\ndipole = [ { position = [0, 0, 0], orientation = [1e300, 1e300, 0],"
      " length = 0.001, current = { magnitude = 1, phase = 180 } } ]\n",
      "t.toml", "");
  ASSERT_EQ(d.array.size(), 1u);
  ExpectNear(std::sqrt(0.5), d.array.dipoles[0].orientation.x());  // no overflow in the norm
  ExpectNear(std::sqrt(0.5), d.array.dipoles[0].orientation.y());
  ExpectNear(-1.0, d.currents[0].real());
}

TEST(ArrayReader, CsvEdgeCases) {
  // Header only: no rows is not an error when [[dipole]] tables exist, but is worth a warning.
  const fs::path dir = fs::temp_directory_path() / "lobecast_array_reader_test";
  fs::create_directories(dir);
  std::ofstream(dir / "empty.csv") << "# nothing yet\nx,y,z,ux,uy,uz,length,magnitude,phase\n";
  const ArrayDescription d = ParseArrayDescription(
      "frequency = 1e9\ndipoles_csv = \"empty.csv\"\n[[dipole]]\nposition = [0, 0, 0]\n"
      "orientation = [0, 0, 1]\nlength = 0.001\ncurrent = { magnitude = 1 }\n",
      "t.toml", dir.string());
  EXPECT_EQ(d.array.size(), 1u);
  ASSERT_EQ(d.warnings.size(), 1u);
  EXPECT_THAT(d.warnings[0], HasSubstr("no dipole rows"));
  fs::remove_all(dir);

  auto csv_error = [](std::string_view text) {
    try {
      ParseCsvDipoles(text, "e.csv", 1.0, 0);
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("(no error)");
  };
  EXPECT_THAT(csv_error("# only comments\n\n"), HasSubstr("e.csv:1:1: key 'header'"));
  EXPECT_THAT(csv_error("x,y,z,ux,uy,uz,length,magnitude,phase,x\n"),
              HasSubstr("e.csv:1:39: key 'x': found a second 'x' column"));
  EXPECT_THAT(csv_error("x,y,z,ux,uy,uz,length,magnitude,phase\n0,0,0,0,0,1,0.01,-1,0\n"),
              HasSubstr("e.csv:2:18: key 'dipole[0].magnitude'"));
  EXPECT_THAT(
      csv_error("x,y,z,ux,uy,uz,length,magnitude,phase\r\n0,0,0,0,0,1,0.01,1,inf\r\n"),
      HasSubstr("e.csv:2:20: key 'dipole[0].phase': found 'inf', expected a finite number"));
  EXPECT_THAT(csv_error("x,y,z,ux,uy,uz,length,magnitude,phase\n0,0,,0,0,1,0.01,1,0\n"),
              HasSubstr("e.csv:2:5: key 'dipole[0].z': found an empty cell"));
}

TEST(ArrayReader, DirectoryIsNotADescription) {
  try {
    ReadArrayDescription(kData + "/good");
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_THAT(e.what(), HasSubstr("a directory"));
  }
}

// ---------------------------------------------------------------- bad corpus

// The corpus format is described in bad_corpus.h (shared with cli_test.cpp).
using lobecast::testing::BadCase;
std::vector<BadCase> BadCases() { return lobecast::testing::BadCases(kData + "/bad"); }

class BadInput : public ::testing::TestWithParam<BadCase> {};

TEST_P(BadInput, RejectedWithFileLineAndKey) {
  const BadCase& c = GetParam();
  ASSERT_TRUE(c.expect.count("line")) << c.path << ": no '# expect:' header";
  const std::string file =
      c.expect.count("file") ? c.expect.at("file") : fs::path(c.path).filename().string();
  try {
    const ArrayDescription d = ReadArrayDescription(c.path);
    FAIL() << c.path << " was accepted (" << d.array.size() << " dipoles)";
  } catch (const InputError& e) {
    const std::string m = e.what();
    std::string where = file + ":" + c.expect.at("line") + ":";
    if (c.expect.count("col")) where += c.expect.at("col") + ":";
    EXPECT_THAT(m, HasSubstr(where));
    EXPECT_EQ(fs::path(e.location.file).filename().string(), file) << m;
    EXPECT_EQ(std::to_string(e.location.line), c.expect.at("line")) << m;
    const std::string key = c.expect.count("key") ? c.expect.at("key") : "";
    if (key.empty()) {
      EXPECT_THAT(m, HasSubstr("TOML syntax error")) << m;
    } else {
      EXPECT_THAT(m, HasSubstr("key '" + key));
      EXPECT_THAT(m, HasSubstr("found "));
      EXPECT_THAT(m, HasSubstr(", expected "));
    }
    if (c.expect.count("text")) {
      EXPECT_THAT(m, HasSubstr(c.expect.at("text")));
    }
    std::cout << "    " << m << "\n";
  }
}

INSTANTIATE_TEST_SUITE_P(Corpus, BadInput, ::testing::ValuesIn(BadCases()),
                         [](const ::testing::TestParamInfo<BadCase>& info) {
                           return lobecast::testing::CaseName(info.param);
                         });

TEST(BadInput, CorpusIsNotEmpty) { EXPECT_GE(BadCases().size(), 40u); }

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

TEST(ArrayReader, CouplingKeysAndTheThickWireWarning) {
  const std::string text =
      "frequency = 1e8\nreference_impedance = 75\n[[dipole]]\nposition = [0, 0, 1]\n"
      "orientation = [0, 0, 1]\nlength = 0.1\ndistribution = \"triangular\"\n"
      "radius = 0.005\nconductivity = 5.8e7\n"
      "drive = { voltage = 2, phase = 90, reactance = 10 }\n"
      "[[dipole]]\nposition = [1, 0, 1]\norientation = [0, 0, 1]\nlength = 0.1\n"
      "self_reactance = -900\nload = {}\n";
  const ArrayDescription d = ParseArrayDescription(text, "arr.toml", "");
  ASSERT_EQ(d.ports.size(), 2u);
  EXPECT_EQ(d.reference_impedance_ohm, 75.0);
  EXPECT_EQ(d.ports[0].kind, PortKind::kDrive);
  EXPECT_NEAR(std::abs(d.ports[0].voltage_v - Complex(0, 2)), 0.0, 1e-15);
  // The source resistance defaults to the reference impedance.
  EXPECT_EQ(d.ports[0].impedance_ohm, Complex(75, 10));
  EXPECT_EQ(d.ports[1].kind, PortKind::kLoad);
  EXPECT_EQ(d.ports[1].impedance_ohm, Complex(0.0));  // {} is a short circuit
  EXPECT_EQ(d.wires[0].radius_m, 0.005);
  EXPECT_EQ(d.wires[0].conductivity_s_m, 5.8e7);
  EXPECT_EQ(d.wires[1].reactance_ohm, -900);
  // l / a = 20 < 30: the thin-wire self reactance is rough there (common practice).
  ASSERT_EQ(d.warnings.size(), 1u);
  EXPECT_NE(d.warnings[0].find("arr.toml:8:10: warning: key 'dipole[0].radius'"), std::string::npos)
      << d.warnings[0];
}

// The parasitic beacon sample written as a CSV table with a port column reads to
// the same ports and wires as its [[dipole]] tables, and its circuit solves to the
// same currents bit for bit (the same numbers reach the same solver).
TEST(ArrayReader, CsvPortRowsEqualTheirTomlTables) {
  const ArrayDescription toml =
      ReadArrayDescription(std::string(LOBECAST_SAMPLES) + "/parasitic-beacon.toml");
  const fs::path dir = fs::temp_directory_path() / "lobecast_csv_ports_test";
  fs::create_directories(dir);
  {
    std::ofstream csv(dir / "beacon.csv");
    csv << "x, y, z, ux, uy, uz, length, distribution, radius, conductivity, port, magnitude, "
           "phase, voltage, resistance, reactance\n"
           "0, 0, 0, 0, 0, 1, 0.05, triangular, 0.0015, 5.8e7, drive, , 0, 1.0, 0.5, 1436\n"
           "-0.15, 0, 0, 0, 0, 1, 0.05, triangular, 0.0015, 5.8e7, load, , , , , 1435.5\n"
           "0.15, 0, 0, 0, 0, 1, 0.05, triangular, 0.0015, 5.8e7, load, , , , , 1436\n";
    std::ofstream t(dir / "beacon.toml");
    t << "frequency = \"433.92 MHz\"\nlength_unit = \"wavelength\"\nreference_impedance = 50\n"
         "dipoles_csv = \"beacon.csv\"\n[grid]\ntheta = { start = 0, stop = 180, step = 1 }\n"
         "phi = { start = 0, stop = 360, step = 1 }\n";
  }
  ArrayDescription from_csv = ReadArrayDescription((dir / "beacon.toml").string());
  ASSERT_EQ(from_csv.ports.size(), toml.ports.size());
  for (std::size_t m = 0; m < toml.ports.size(); ++m) {
    EXPECT_EQ(from_csv.ports[m].kind, toml.ports[m].kind) << m;
    EXPECT_EQ(from_csv.ports[m].voltage_v, toml.ports[m].voltage_v) << m;
    EXPECT_EQ(from_csv.ports[m].impedance_ohm, toml.ports[m].impedance_ohm) << m;
    EXPECT_EQ(from_csv.wires[m].radius_m, toml.wires[m].radius_m) << m;
    EXPECT_EQ(from_csv.wires[m].conductivity_s_m, toml.wires[m].conductivity_s_m) << m;
  }
  ArrayDescription from_toml = toml;
  ASSERT_TRUE(SolveArrayCircuit(from_csv, 1).has_value());
  ASSERT_TRUE(SolveArrayCircuit(from_toml, 1).has_value());
  for (Eigen::Index m = 0; m < from_toml.currents.size(); ++m) {
    EXPECT_EQ(from_csv.currents[m], from_toml.currents[m]) << m;
    EXPECT_NE(from_csv.currents[m], Complex(0.0)) << m;  // solved, not left at 0
  }
  fs::remove_all(dir);
}

}  // namespace
}  // namespace lobecast
