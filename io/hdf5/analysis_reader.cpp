#include "io/hdf5/analysis_reader.h"

#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "io/echo_text.h"
#include "io/hdf5/analysis_writer.h"
#include "io/hdf5/hdf5_file.h"
#include "io/hdf5/schema.h"
#include "io/hdf5/untrusted_file.h"

namespace lobecast {
namespace {

using hdf5::Handle;
using hdf5::kMaxStoredCount;
using schema::Field;

// A (count, columns) table, or no rows when count is 0 (such tables are not written).
std::vector<double> ReadTable(const std::string& path, hid_t file, const std::string& name,
                              std::int64_t count, std::size_t columns) {
  if (count < 0) throw IoError(path, "negative row count for '" + name + "'");
  if (count == 0) return {};
  if (!hdf5::Exists(file, name)) {
    throw IoError(path,
                  "'" + name + "' is missing but " + std::to_string(count) + " rows are recorded");
  }
  std::vector<hsize_t> dims;
  std::vector<double> t = hdf5::ReadDoubles(file, name, &dims);
  if (dims != std::vector<hsize_t>{static_cast<hsize_t>(count), columns}) {
    throw IoError(path, "'" + name + "' does not have shape (" + std::to_string(count) + ", " +
                            std::to_string(columns) + ")");
  }
  return t;
}

// The schema's visitor that reads: scalars from the attributes of the current
// group (every one required), list elements from the rows of their table.
class FileVisitor {
 public:
  FileVisitor(const std::string& file_path, hid_t file, std::string root)
      : file_path_(file_path),
        file_(file),
        name_(std::move(root)),
        g_(hdf5::OpenGroup(file, name_)) {}

  void Value(const Field& f, double& v) {
    v = row_ ? row_[column_++] : hdf5::ReadDoubleAttribute(g_, Require(f));
  }
  void Value(const Field& f, bool& v) { v = row_ ? row_[column_++] != 0.0 : Int(f) != 0; }
  void Value(const Field& f, int& v) {
    v = static_cast<int>(
        Bounded(f, std::numeric_limits<int>::min(), std::numeric_limits<int>::max()));
  }
  // Counts (max_nulls, field_evaluations): a damaged -1 would become 2^64 - 1.
  void Value(const Field& f, std::size_t& v) {
    v = static_cast<std::size_t>(Bounded(f, 0, kMaxStoredCount));
  }
  void Value(const Field& f, DirectionDeg& d) {
    Value(Field{schema::ThetaName(f.name), f.unit}, d.theta_deg);
    Value(Field{schema::PhiName(f.name), f.unit}, d.phi_deg);
  }
  void Value(const Field& f, PolarizationReference& v) {
    const std::string s = Text(f);
    const auto r = PolarizationReferenceFromString(s);
    if (!r)
      throw IoError(file_path_,
                    "unknown polarization reference \"" + EchoText(s) + "\" in the analysis");
    v = *r;
  }
  void Value(const Field& f, CutPlane& v) {
    const std::string s = Text(f);
    const auto r = CutPlaneFromString(s);
    if (!r) throw IoError(file_path_, "unknown cut plane \"" + EchoText(s) + "\" in the analysis");
    v = *r;
  }
  void Value(const Field& f, NullField& v) {
    const std::string s = Text(f);
    const auto r = NullFieldFromString(s);
    if (!r) {
      throw IoError(file_path_,
                    "unknown " + std::string(f.name) + " \"" + EchoText(s) + "\" in the analysis");
    }
    v = *r;
  }

  template <typename Body>
  void Object(const schema::ObjectSpec& o, Body&& body) {
    if (o.file_name.empty()) return body();
    FileVisitor inner(file_path_, file_, schema::Concat(name_ + "/", o.file_name));
    Swap(inner);
    body();
    Swap(inner);
  }
  template <typename T, typename Body>
  void Optional(const schema::ObjectSpec& o, std::optional<T>& v, Body&& body) {
    v.reset();
    if (!hdf5::Exists(file_, schema::Concat(name_ + "/", o.file_name))) return;
    T value;
    Object(o, [&] { body(value, *this); });
    v = value;
  }
  template <typename T, typename Body>
  void List(const schema::ListSpec& l, std::vector<T>& items, bool* truncated, Body&& body) {
    const std::int64_t count =
        Bounded(Field{schema::CountAttribute(l.name), "1"}, 0, kMaxStoredCount);
    if (truncated) Value(Field{l.truncated, "1"}, *truncated);
    const std::size_t columns = schema::ColumnsOf<T>(body).size();
    const std::vector<double> t =
        ReadTable(file_path_, file_, schema::Concat(name_ + "/", l.name), count, columns);
    items.clear();
    for (std::size_t i = 0; i < t.size(); i += columns) {
      T e;
      row_ = &t[i];
      column_ = 0;
      body(e, *this);
      items.push_back(e);
    }
    row_ = nullptr;
  }

  std::int64_t Int(const Field& f) { return hdf5::ReadIntAttribute(g_, Require(f)); }
  std::int64_t Bounded(const Field& f, std::int64_t low, std::int64_t high) {
    const std::int64_t v = Int(f);
    if (v < low || v > high) {
      hdf5::Invalid(file_path_, "attribute " + std::string(f.name) + " of '" + name_ + "' is " +
                                    std::to_string(v) + ", expected a whole number in [" +
                                    std::to_string(low) + ", " + std::to_string(high) + "]");
    }
    return v;
  }
  std::string Text(const Field& f) { return hdf5::ReadStringAttribute(g_, Require(f)); }

 private:
  std::string Require(const Field& f) const {
    std::string name(f.name);
    if (!hdf5::HasAttribute(g_, name)) {
      throw IoError(file_path_, "group '" + name_ + "' lacks the attribute '" + name + "'");
    }
    return name;
  }
  void Swap(FileVisitor& other) {
    std::swap(name_, other.name_);
    std::swap(g_, other.g_);
  }

  std::string file_path_;
  hid_t file_;
  std::string name_;  // the current group
  Handle g_;
  const double* row_ = nullptr;  // inside a list element: its row
  std::size_t column_ = 0;
};

}  // namespace

std::optional<StoredAnalysis> ReadAnalysis(const std::string& path) {
  hdf5::ErrorSilencer silencer;
  Handle file = hdf5::OpenFileReadOnly(path);
  const std::string root(schema::kAnalysisGroup);
  if (!hdf5::Exists(file, root)) return std::nullopt;
  try {
    FileVisitor v(path, file, root);
    // Another layout (a newer one, or version 1's point nulls): the caller recomputes.
    if (v.Int(Field{schema::kAnalysisVersionAttribute, "1"}) != schema::kAnalysisVersion) {
      return std::nullopt;
    }
    StoredAnalysis out;
    v.Object(schema::kRecordedOptions, [&] { schema::VisitRecordedOptions(out.options, v); });
    schema::VisitAnalysis(out.analysis, v);
    for (const ProtectedDirectionField& f : out.analysis.protected_directions) {
      out.options.protected_directions_deg.emplace_back(f.direction.theta_deg, f.direction.phi_deg);
    }
    return out;
  } catch (const NotAResultError&) {
    throw;  // says what it is already
  } catch (const IoError& e) {
    throw NotAResultError(path, std::string(kIncompleteResult) + e.detail());
  }
}

}  // namespace lobecast
