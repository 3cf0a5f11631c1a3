#include "io/hdf5/sweep_writer.h"

#include <string>
#include <vector>

#include "io/hdf5/schema.h"

namespace lobecast {

void WriteSweep(PatternFileWriter& w, const FrequencySweep& sweep, const AngularGrid& grid,
                const SweepFileInfo& info) {
  namespace s = schema;
  const std::string group(s::kSweepGroup);
  const std::size_t f = sweep.points.size();
  w.WriteAttribute(group, std::string(s::kSweepDesignFrequencyAttribute),
                   sweep.points.front().frequency_hz);
  w.WriteStringAttribute(group, std::string(s::kSweepSteeringAttribute), info.steering);
  if (info.coupled) {
    w.WriteIntAttribute(group, std::string(s::kSweepGainRealizedAttribute),
                        sweep.points.front().gain_is_realized ? 1 : 0);
    w.WriteStringAttribute(group, std::string(s::kSweepGainDefinitionAttribute),
                           info.gain_definition);
  }
  // Each point's walk appends to its columns; the walk names them.
  std::vector<s::Dataset> names;
  std::vector<std::vector<double>> columns;
  for (const FrequencyPoint& p : sweep.points) {
    std::size_t k = 0;
    s::VisitSweepColumns(p, info.coupled, [&](const s::Dataset& d, double value) {
      if (k == columns.size()) {
        names.push_back(d);
        columns.emplace_back();
      }
      columns[k++].push_back(value);
    });
  }
  for (std::size_t k = 0; k < columns.size(); ++k)
    w.WriteTable(std::string(names[k].path), {f}, columns[k].data(), names[k].units);
  std::vector<std::string> first, second;
  for (const FrequencyPoint& p : sweep.points) {
    first.emplace_back(ToString(p.first_plane));
    second.emplace_back(ToString(p.second_plane));
  }
  w.WriteStrings(std::string(s::kSweepFirstPlane.path), first, s::kSweepFirstPlane.units);
  w.WriteStrings(std::string(s::kSweepSecondPlane.path), second, s::kSweepSecondPlane.units);
  w.WriteTable(std::string(s::kSweepDirectivity.path),
               {f, grid.theta_deg.size(), grid.phi_deg.size()}, sweep.directivity.data(),
               s::kSweepDirectivity.units);
}

}  // namespace lobecast
