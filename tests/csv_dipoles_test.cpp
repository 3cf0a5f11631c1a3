// Dipoles from a CSV table (io/input/csv_dipoles.h): the format described in the
// header, located errors, and the RFC 4180 traits it keeps or leaves out.
#include "io/input/csv_dipoles.h"

#include <cmath>
#include <complex>
#include <string>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "io/input_error.h"

namespace lobecast {
namespace {

const char* kHeader = "x, y, z, ux, uy, uz, length, magnitude, phase, distribution\n";

// The InputError a table raises (fails the test when it parses).
InputError ErrorOf(const std::string& text, std::size_t first_index = 0) {
  try {
    ParseCsvDipoles(text, "t.csv", 1.0, first_index);
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << "parsed: " << text;
  return InputError(SourceLocation{}, "");
}

TEST(CsvDipoles, ReadsRowsInAnyColumnOrder) {
  const std::string text =
      "# element table\n"
      "\n"
      "Phase, magnitude, x, y, z, ux, uy, uz, length\n"
      "90, 2, 0.1, 0.2, 0.3, 0, 0, 2, 0.01\n"
      "  # a comment between rows\n"
      "0,1,1,2,3,3,4,0,0.5\n";
  const std::vector<CsvDipole> d = ParseCsvDipoles(text, "t.csv", 0.01, 5);  // centimetres
  ASSERT_EQ(d.size(), 2u);
  EXPECT_EQ(d[0].dipole.position_m, Vec3(0.1, 0.2, 0.3) * 0.01);
  EXPECT_EQ(d[0].dipole.orientation, Vec3(0, 0, 1));  // normalized on read
  EXPECT_DOUBLE_EQ(d[0].dipole.length_m, 1e-4);
  EXPECT_NEAR(std::abs(d[0].current_a - std::polar(2.0, 90 * kDegree)), 0.0, 1e-15);
  EXPECT_EQ(d[0].dipole.distribution, Distribution::kUniform);  // no column: uniform
  EXPECT_EQ(d[0].row.line, 4);
  EXPECT_EQ(d[1].row.line, 6);
  // (3, 4, 0) / 5, a 3-4-5 triangle.
  EXPECT_DOUBLE_EQ(d[1].dipole.orientation.x(), 0.6);
  EXPECT_DOUBLE_EQ(d[1].dipole.orientation.y(), 0.8);
  EXPECT_EQ(d[1].z_cell.column, 9);  // "0,1,1,2,3": the fifth cell
}

TEST(CsvDipoles, Rfc4180LineEndingsAndByteOrderMark) {
  // RFC 4180 sec. 2 ends records with CRLF; LF alone and a last record without a
  // line break are accepted too, as is a UTF-8 byte order mark before the header.
  const std::string rows =
      "0,0,1,0,0,1,0.01,1,0,triangular\r\n"
      "0,0,2,1,0,0,0.01,1,0,\r\n"
      "0,0,3,0,1,0,0.01,1,0,UNIFORM";
  const std::vector<CsvDipole> d =
      ParseCsvDipoles("\xEF\xBB\xBF" + std::string(kHeader) + rows, "t.csv", 1.0, 0);
  ASSERT_EQ(d.size(), 3u);
  EXPECT_EQ(d[0].dipole.distribution, Distribution::kTriangular);
  EXPECT_EQ(d[1].dipole.distribution, Distribution::kUniform);  // empty cell
  EXPECT_EQ(d[2].dipole.distribution, Distribution::kUniform);  // case-insensitive
  EXPECT_EQ(d[2].dipole.position_m.z(), 3.0);
}

TEST(CsvDipoles, QuotedFieldsAreNotPartOfTheFormat) {
  // RFC 4180 allows "quoted" fields; this format has none (no cell needs a comma),
  // so a quoted number is rejected rather than read.
  const InputError e = ErrorOf(std::string(kHeader) + "\"0\",0,1,0,0,1,0.01,1,0,\n");
  EXPECT_EQ(e.key, "dipole[0].x");
  EXPECT_NE(std::string(e.what()).find("a number"), std::string::npos) << e.what();
}

TEST(CsvDipoles, HeaderErrorsAreLocated) {
  InputError e = ErrorOf("x, y, z, ux, uy, uz, length, magnitude, phase, colour\n");
  EXPECT_EQ(e.location.line, 1);
  EXPECT_EQ(e.location.column, 48);  // where "colour" starts
  EXPECT_NE(std::string(e.what()).find("unknown column"), std::string::npos) << e.what();
  e = ErrorOf("x, y, z, ux, uy, uz, length, magnitude, phase, X\n");
  EXPECT_NE(std::string(e.what()).find("a second 'x' column"), std::string::npos) << e.what();
  e = ErrorOf("x, y, z, ux, uy, uz, length, magnitude\n");
  EXPECT_EQ(e.key, "phase");
  e = ErrorOf("# only a comment\n\n");
  EXPECT_EQ(e.key, "header");
}

TEST(CsvDipoles, RowErrorsNameTheDipoleAndCell) {
  const std::string h = kHeader;
  InputError e = ErrorOf(h + "0,0,1,0,0,1,0.01,1\n", 7);
  EXPECT_EQ(e.key, "dipole[7]");
  EXPECT_NE(std::string(e.what()).find("8 cells"), std::string::npos) << e.what();
  e = ErrorOf(h + "0,0,1,0,0,1,0.01,1,0,\n0,0,abc,0,0,1,0.01,1,0,\n", 3);
  EXPECT_EQ(e.key, "dipole[4].z");
  EXPECT_EQ(e.location.line, 3);
  EXPECT_EQ(e.location.column, 5);
  e = ErrorOf(h + "0,0,1,0,0,1,,1,0,\n");
  EXPECT_NE(std::string(e.what()).find("an empty cell"), std::string::npos) << e.what();
  e = ErrorOf(h + "0,0,inf,0,0,1,0.01,1,0,\n");
  EXPECT_NE(std::string(e.what()).find("a finite number"), std::string::npos) << e.what();
  e = ErrorOf(h + "0,0,1,0,0,0,0.01,1,0,\n");
  EXPECT_EQ(e.key, "dipole[0].ux/uy/uz");
  e = ErrorOf(h + "0,0,1,0,0,1,0,1,0,\n");
  EXPECT_EQ(e.key, "dipole[0].length");
  e = ErrorOf(h + "0,0,1,0,0,1,0.01,-1,0,\n");
  EXPECT_EQ(e.key, "dipole[0].magnitude");
  e = ErrorOf(h + "0,0,1,0,0,1,0.01,1,0,cosine\n");
  EXPECT_EQ(e.key, "dipole[0].distribution");
}

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

TEST(CsvDipoles, WireColumnsAreOptionalPerCell) {
  const std::string text =
      "x,y,z,ux,uy,uz,length,magnitude,phase,distribution,radius,self_reactance,conductivity\n"
      "0,0,1,0,0,1,10,1,0,triangular,0.1,,5.8e7\n"
      "0,0,2,0,0,1,10,1,0,,,-900,\n";
  const std::vector<CsvDipole> d = ParseCsvDipoles(text, "w.csv", 0.01, 0);  // centimetres
  ASSERT_EQ(d.size(), 2u);
  EXPECT_DOUBLE_EQ(d[0].wire.radius_m, 0.001);
  EXPECT_TRUE(std::isnan(d[0].wire.reactance_ohm));
  EXPECT_EQ(d[0].wire.conductivity_s_m, 5.8e7);
  EXPECT_EQ(d[1].wire.radius_m, 0.0);
  EXPECT_EQ(d[1].wire.reactance_ohm, -900.0);
  EXPECT_EQ(d[1].wire.conductivity_s_m, 0.0);
  // A conductivity needs a radius; a radius must be thin.
  const std::string header = "x,y,z,ux,uy,uz,length,magnitude,phase,radius,conductivity\n";
  try {
    ParseCsvDipoles(header + "0,0,1,0,0,1,10,1,0,,5.8e7\n", "w.csv", 0.01, 3);
    ADD_FAILURE() << "expected a refusal";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("w.csv:2:21: key 'dipole[3].conductivity'"),
              std::string::npos)
        << e.what();
  }
  EXPECT_THROW(ParseCsvDipoles(header + "0,0,1,0,0,1,10,1,0,5,\n", "w.csv", 0.01, 0), InputError);
}

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

// The port column (csv_dipoles.h): rows driven or loaded as [[dipole]] tables'
// drive and load keys (CONVENTIONS §3), with their defaults.
TEST(CsvDipoles, PortColumnGivesDriveAndLoadRows) {
  const std::string text =
      "x,y,z,ux,uy,uz,length,distribution,radius,port,magnitude,phase,voltage,resistance,"
      "reactance\n"
      "0,0,0,0,0,1,10,triangular,0.1,drive,,30,2,,\n"        // R default: the reference
      "25,0,0,0,0,1,10,triangular,0.1,DRIVE,,,1,0.5,1436\n"  // phase default 0
      "-25,0,0,0,0,1,10,triangular,0.1,load,,,,,-300\n"      // R default 0
      "50,0,0,0,0,1,10,triangular,0.1,load,,,,,\n"           // both empty: a short
      "75,0,0,0,0,1,10,uniform,,current,0.5,90,,,\n"
      "99,0,0,0,0,1,10,uniform,,,2,,,,\n";  // empty port: current, phase 0
  const std::vector<CsvDipole> d = ParseCsvDipoles(text, "p.csv", 0.01, 0, 75.0);
  ASSERT_EQ(d.size(), 6u);
  EXPECT_EQ(d[0].port.kind, PortKind::kDrive);
  EXPECT_NEAR(std::abs(d[0].port.voltage_v - std::polar(2.0, 30 * kDegree)), 0.0, 1e-15);
  EXPECT_EQ(d[0].port.impedance_ohm, Complex(75.0, 0.0));
  EXPECT_EQ(d[0].current_a, Complex(0.0));
  EXPECT_EQ(d[1].port.kind, PortKind::kDrive);
  EXPECT_EQ(d[1].port.voltage_v, Complex(1.0, 0.0));
  EXPECT_EQ(d[1].port.impedance_ohm, Complex(0.5, 1436.0));
  EXPECT_EQ(d[2].port.kind, PortKind::kLoad);
  EXPECT_EQ(d[2].port.impedance_ohm, Complex(0.0, -300.0));
  EXPECT_EQ(d[3].port.kind, PortKind::kLoad);
  EXPECT_EQ(d[3].port.impedance_ohm, Complex(0.0, 0.0));
  EXPECT_EQ(d[4].port.kind, PortKind::kCurrent);
  EXPECT_NEAR(std::abs(d[4].port.current_a - std::polar(0.5, 90 * kDegree)), 0.0, 1e-15);
  EXPECT_EQ(d[4].current_a, d[4].port.current_a);
  EXPECT_EQ(d[5].port.kind, PortKind::kCurrent);
  EXPECT_EQ(d[5].port.current_a, Complex(2.0, 0.0));
}

TEST(CsvDipoles, InconsistentPortRowsAreLocated) {
  const std::string h =
      "x,y,z,ux,uy,uz,length,distribution,self_reactance,port,magnitude,phase,voltage,"
      "resistance,reactance\n";
  auto expect = [&](const std::string& row, const std::string& where, const std::string& found) {
    try {
      ParseCsvDipoles(h + row, "p.csv", 1.0, 4);
      ADD_FAILURE() << "parsed: " << row;
    } catch (const InputError& e) {
      const std::string what = e.what();
      EXPECT_NE(what.find(where), std::string::npos) << what;
      EXPECT_NE(what.find(found), std::string::npos) << what;
    }
  };
  expect("0,0,0,0,0,1,1,,-900,drive,1,,1,,\n", "p.csv:2:27: key 'dipole[4].magnitude'",
         "a magnitude cell in a drive row");
  expect("0,0,0,0,0,1,1,,-900,load,,,1,,\n", "p.csv:2:28: key 'dipole[4].voltage'",
         "a voltage cell in a load row");
  expect("0,0,0,0,0,1,1,,-900,load,,5,,,\n", "p.csv:2:27: key 'dipole[4].phase'",
         "a phase cell in a load row");
  expect("0,0,0,0,0,1,1,,,current,1,0,,,7\n", "key 'dipole[4].reactance'",
         "a reactance cell in a current row");
  expect("0,0,0,0,0,1,1,,-900,drive,,,,50,\n", "key 'dipole[4].voltage'",
         "a drive row without a voltage");
  expect("0,0,0,0,0,1,1,,-900,load,,,,-1,\n", "key 'dipole[4].resistance'", "-1");
  expect("0,0,0,0,0,1,1,,-900,drive,,,-1,,\n", "key 'dipole[4].voltage'", "-1");
  expect("0,0,0,0,0,1,1,,-900,source,,,1,,\n", "p.csv:2:21: key 'dipole[4].port'", "'source'");
  expect("0,0,0,0,0,1,1,,,current,,,,,\n", "key 'dipole[4].magnitude'", "an empty cell");
  // A driven row needs its self reactance, as a [[dipole]] table does.
  expect("0,0,0,0,0,1,1,,,drive,,,1,,\n", "p.csv:2:17: key 'dipole[4].port'",
         "a drive row without a self reactance");
  // A port column without a magnitude column: current rows have nothing to read.
  try {
    ParseCsvDipoles("x,y,z,ux,uy,uz,length,port\n0,0,0,0,0,1,1,current\n", "p.csv", 1.0, 0);
    ADD_FAILURE() << "parsed";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("no 'magnitude' column"), std::string::npos) << e.what();
  }
  // Without a port column, magnitude and phase stay required, as before.
  try {
    ParseCsvDipoles("x,y,z,ux,uy,uz,length,magnitude\n", "p.csv", 1.0, 0);
    ADD_FAILURE() << "parsed";
  } catch (const InputError& e) {
    EXPECT_EQ(e.key, "phase");
  }
}

}  // namespace
}  // namespace lobecast
