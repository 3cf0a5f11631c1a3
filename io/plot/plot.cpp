#include "io/plot/plot.h"

#include <filesystem>
#include <system_error>

#include "io/input_error.h"
#include "io/io_error.h"
#include "io/plot/canvas.h"
#include "io/plot/polarization_map.h"

namespace lobecast::plot {

PlotGeometry WritePlot(const StoredResult& r, const PatternAnalysis* analysis, const PlotOptions& o,
                       const std::string& path) {
  std::string why;
  if (!o.IsValid(&why)) throw InputError(SourceLocation{"plot options"}, why);
  if (r.result.grid.size() == 0)
    throw InputError(SourceLocation{path}, "the result's grid is empty");
  Canvas canvas(path, o.size);
  PlotGeometry g;
  g.kind = o.kind;
  switch (o.kind) {
    case PlotKind::kPolar:
      g.polar = DrawPolar(canvas, r, analysis, o);
      if (analysis) g.labels = CutLabels(*analysis, o.cut);
      break;
    case PlotKind::kCartesian:
      g.cartesian = DrawCartesian(canvas, r, analysis, o);
      if (analysis) g.labels = CutLabels(*analysis, o.cut);
      break;
    case PlotKind::kMap:
      g.map = DrawMap(canvas, r, analysis, o);
      break;
    case PlotKind::kPolarization:
      g.map = DrawPolarizationMap(canvas, r, o);
      break;
  }
  canvas.Finish();
  return g;
}

std::vector<std::string> WriteStandardPlots(const StoredResult& r, const PatternAnalysis* analysis,
                                            const std::string& dir, const std::string& stem,
                                            std::vector<std::string>* skipped) {
  std::error_code ec;
  std::filesystem::create_directories(dir, ec);
  if (ec) throw IoError(dir, "cannot create the plot folder: " + ec.message());
  std::vector<std::string> written;
  std::vector<CutSpec> cuts(2);
  if (analysis) {
    cuts[0].plane = CutPlane::kElevation;
    cuts[1].plane = CutPlane::kOrthogonal;
  } else {
    cuts[1].value_deg = 90.0;  // phi = 0 and 90 deg grid cuts
  }
  for (const CutSpec& cut : cuts) {
    PlotOptions o;
    o.kind = PlotKind::kPolar;
    o.cut = cut;
    const std::string path =
        (std::filesystem::path(dir) / (stem + "-polar-" + o.cut.ShortName() + ".png")).string();
    try {
      WritePlot(r, analysis, o, path);
      written.push_back(path);
    } catch (const InputError& e) {
      if (!skipped) throw;
      skipped->push_back(path + ": " + e.what());
    }
  }
  PlotOptions o;
  o.kind = PlotKind::kMap;
  const std::string path = (std::filesystem::path(dir) / (stem + "-map.png")).string();
  WritePlot(r, analysis, o, path);
  written.push_back(path);
  return written;
}

}  // namespace lobecast::plot
