#include "io/hdf5/sweep_reader.h"

#include <cmath>

#include "io/hdf5/hdf5_file.h"
#include "io/hdf5/schema.h"
#include "io/io_error.h"

namespace lobecast {
namespace {

std::string S(std::string_view v) { return std::string(v); }

std::optional<StoredSweep> ReadOpenSweep(const std::string& path) {
  namespace s = schema;
  hdf5::Handle file = hdf5::OpenFileReadOnly(path);
  if (!hdf5::Exists(file, S(s::kSweepGroup))) return std::nullopt;
  hdf5::Handle g = hdf5::OpenGroup(file, S(s::kSweepGroup));
  StoredSweep out;
  out.design_frequency_hz = hdf5::ReadDoubleAttribute(g, S(s::kSweepDesignFrequencyAttribute));
  out.steering = hdf5::ReadStringAttribute(g, S(s::kSweepSteeringAttribute));
  out.coupled = hdf5::HasAttribute(g, S(s::kSweepGainRealizedAttribute));
  bool realized = false;
  if (out.coupled) {
    realized = hdf5::ReadIntAttribute(g, S(s::kSweepGainRealizedAttribute)) != 0;
    out.gain_definition = hdf5::ReadStringAttribute(g, S(s::kSweepGainDefinitionAttribute));
  }
  const std::vector<std::string> first = hdf5::ReadStrings(file, S(s::kSweepFirstPlane.path));
  const std::vector<std::string> second = hdf5::ReadStrings(file, S(s::kSweepSecondPlane.path));
  const std::size_t n = first.size();
  if (n == 0 || second.size() != n)
    throw IoError(path, "/sweep: the plane lists differ in length or are empty");
  out.points.resize(n);
  // The columns in walk order, then each point's walk takes its row of them.
  std::vector<std::vector<double>> columns;
  FrequencyPoint names;
  s::VisitSweepColumns(names, out.coupled, [&](const s::Dataset& d, double) {
    columns.push_back(hdf5::ReadDoubles(file, S(d.path)));
    if (columns.back().size() != n) {
      throw IoError(path, S(d.path) + " has " + std::to_string(columns.back().size()) +
                              " values for " + std::to_string(n) + " frequencies");
    }
  });
  for (std::size_t i = 0; i < n; ++i) {
    std::size_t k = 0;
    s::VisitSweepColumns(out.points[i], out.coupled,
                         [&](const s::Dataset&, double& member) { member = columns[k++][i]; });
  }
  for (std::size_t i = 0; i < n; ++i) {
    FrequencyPoint& p = out.points[i];
    const auto a = CutPlaneFromString(first[i]);
    const auto b = CutPlaneFromString(second[i]);
    if (!a || !b) throw IoError(path, "/sweep: unknown plane '" + first[i] + "'");
    p.first_plane = *a;
    p.second_plane = *b;
    p.analysed = !std::isnan(p.peak_directivity_dbi);
    p.gain_is_realized = realized;
  }
  return out;
}

}  // namespace

std::optional<StoredSweep> ReadSweep(const std::string& path) {
  hdf5::ErrorSilencer silencer;
  try {
    return ReadOpenSweep(path);
  } catch (const NotAResultError&) {
    throw;
  } catch (const IoError& e) {
    throw NotAResultError(path, std::string(kIncompleteResult) + e.detail());
  }
}

}  // namespace lobecast
