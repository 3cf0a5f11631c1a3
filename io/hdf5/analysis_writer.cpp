#include "io/hdf5/analysis_writer.h"

#include <algorithm>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

namespace lobecast {
namespace {

using schema::Field;

// The schema's visitor that writes: scalars are attributes of the current group,
// list elements rows of a table. The file is written in the order it always was:
// the root group's scalars, its list counts and column lists (Finish), then the
// subgroups (kept until Finish), then the tables.
class FileVisitor {
 public:
  FileVisitor(PatternFileWriter& w, std::string root)
      : w_(w), root_(root), path_(std::move(root)) {}

  void Value(const Field& f, const double& v) {
    if (row_) return row_->push_back(v);
    Emit([this, path = path_, name = std::string(f.name), v] { w_.WriteAttribute(path, name, v); });
  }
  void Value(const Field& f, const bool& v) {
    if (row_) return row_->push_back(v ? 1.0 : 0.0);
    Int(f, v ? 1 : 0);
  }
  void Value(const Field& f, const int& v) { Int(f, v); }
  void Value(const Field& f, const std::size_t& v) { Int(f, static_cast<std::int64_t>(v)); }
  void Value(const Field& f, const DirectionDeg& d) {
    Value(Field{schema::ThetaName(f.name), f.unit}, d.theta_deg);
    Value(Field{schema::PhiName(f.name), f.unit}, d.phi_deg);
  }
  void Value(const Field& f, const PolarizationReference& v) { Text(f, ToString(v)); }
  void Value(const Field& f, const NullField& v) { Text(f, ToString(v)); }
  void Value(const Field& f, const CutPlane& v) { Text(f, ToString(v)); }

  template <typename Body>
  void Object(const schema::ObjectSpec& o, Body&& body) {
    const std::string parent = path_;
    if (!o.file_name.empty()) path_.append("/").append(o.file_name);
    body();
    if (!o.definition.empty()) Text(Field{schema::kDefinitionAttribute, "1"}, o.definition);
    path_ = parent;
  }
  template <typename T, typename Body>
  void Optional(const schema::ObjectSpec& o, const std::optional<T>& v, Body&& body) {
    if (v) Object(o, [&] { body(*v, *this); });
  }
  template <typename T, typename Body>
  void List(const schema::ListSpec& l, const std::vector<T>& items, const bool* truncated,
            Body&& body) {
    Table t;
    t.spec = l;
    t.rows = items.size();
    if (truncated) t.truncated = *truncated;
    t.columns = schema::ColumnsOf<T>(body);
    row_ = &t.data;
    for (const T& e : items) body(e, *this);
    row_ = nullptr;
    tables_.push_back(std::move(t));
  }

  // The lists' counts and flags, the column lists, the subgroups, then the tables.
  void Finish() {
    for (const Table& t : tables_) {
      Int(Field{schema::CountAttribute(t.spec.name), "1"}, static_cast<std::int64_t>(t.rows));
      if (!t.spec.truncated.empty()) Value(Field{t.spec.truncated, "1"}, t.truncated);
    }
    std::vector<std::string_view> layouts;
    for (const Table& t : tables_) {
      if (std::find(layouts.begin(), layouts.end(), t.spec.layout) != layouts.end()) continue;
      layouts.push_back(t.spec.layout);
      w_.WriteStringAttribute(path_, schema::ColumnsAttribute(t.spec.layout),
                              schema::Columns::Joined(t.columns.names));
    }
    for (const auto& op : group_writes_) op();
    for (const Table& t : tables_) {
      if (t.rows == 0) continue;
      w_.WriteTable(schema::Concat(path_ + "/", t.spec.name), {t.rows, t.columns.size()},
                    t.data.data(), schema::Columns::Joined(t.columns.units));
    }
  }

 private:
  struct Table {
    schema::ListSpec spec;
    std::size_t rows = 0;
    bool truncated = false;
    schema::Columns columns;
    std::vector<double> data;
  };
  void Int(const Field& f, std::int64_t v) {
    Emit([this, path = path_, name = std::string(f.name), v] {
      w_.WriteIntAttribute(path, name, v);
    });
  }
  void Text(const Field& f, std::string_view v) {
    Emit([this, path = path_, name = std::string(f.name), text = std::string(v)] {
      w_.WriteStringAttribute(path, name, text);
    });
  }
  // Now in the root group, at Finish in a subgroup.
  void Emit(std::function<void()> write) {
    if (path_ == root_) return write();
    group_writes_.push_back(std::move(write));
  }

  PatternFileWriter& w_;
  const std::string root_;
  std::string path_;
  std::vector<std::function<void()>> group_writes_;
  std::vector<double>* row_ = nullptr;  // inside a list element: its table's data
  std::vector<Table> tables_;
};

}  // namespace

void WriteAnalysis(PatternFileWriter& w, const PatternAnalysis& a, const AnalysisOptions& o) {
  FileVisitor v(w, std::string(schema::kAnalysisGroup));
  v.Value(Field{schema::kAnalysisVersionAttribute, "1"}, schema::kAnalysisVersion);
  v.Object(schema::kRecordedOptions, [&] { schema::VisitRecordedOptions(o, v); });
  schema::VisitAnalysis(a, v);
  v.Finish();
}

}  // namespace lobecast
