#include "io/plot/sweep_plot.h"

#include <algorithm>

#include "engine/decibels.h"
#include "io/plot/frame.h"

namespace lobecast::plot {

SeriesPlotSpec SweepPlotSpec(const StoredResult& result, const StoredSweep& sweep) {
  double f_max = 0;
  for (const FrequencyPoint& p : sweep.points) f_max = std::max(f_max, p.frequency_hz);
  const double unit = f_max >= 1e9 ? 1e9 : (f_max >= 1e6 ? 1e6 : (f_max >= 1e3 ? 1e3 : 1.0));
  const char* unit_name =
      f_max >= 1e9 ? "GHz" : (f_max >= 1e6 ? "MHz" : (f_max >= 1e3 ? "kHz" : "Hz"));

  SeriesPlotSpec s;
  const std::string steering =
      sweep.steering == "phase"   ? "phase steering (phases fixed at the design frequency)"
      : sweep.steering == "delay" ? "true-time-delay steering (delays kept)"
                                  : "currents fixed at every frequency";
  s.title_lines = {ArrayLine(result),
                   Format("Frequency sweep, %zu frequencies, design %s: %s", sweep.points.size(),
                          FormatFrequency(sweep.design_frequency_hz).c_str(), steering.c_str())};
  s.x_title = Format("frequency (%s)", unit_name);
  s.marked_x = sweep.design_frequency_hz / unit;
  const FrequencyPoint& design = sweep.points.front();
  Series d{"peak directivity", {}},
      gain{design.gain_is_realized ? "realized gain at the peak" : "gain at the peak", {}};
  Series theta{"peak theta", {}}, phi{"peak phi", {}};
  Series squint{"angle of the peak from the design frequency's", {}};
  Series hp1{"HPBW " + std::string(ToString(design.first_plane)) + " plane", {}};
  Series hp2{"HPBW " + std::string(ToString(design.second_plane)) + " plane", {}};
  Series sll{"highest side lobe", {}};
  for (const FrequencyPoint& p : sweep.points) {
    s.x.push_back(p.frequency_hz / unit);
    d.y.push_back(p.peak_directivity_dbi);
    gain.y.push_back(p.gain_dbi);
    theta.y.push_back(p.peak_theta_deg);
    phi.y.push_back(p.peak_phi_deg);
    squint.y.push_back(SquintDeg(p, design));
    hp1.y.push_back(p.half_power_first_deg);
    hp2.y.push_back(p.half_power_second_deg);
    sll.y.push_back(p.sidelobe_db);
  }
  SeriesPanel directivity{"directivity (dBi)", {d}};
  if (sweep.coupled) {
    directivity.y_title = "directivity, gain (dBi)";
    directivity.series.push_back(gain);
  }
  s.panels = {directivity, SeriesPanel{"beam direction (deg)", {theta, phi}},
              SeriesPanel{"beam squint (deg)", {squint}},
              SeriesPanel{"half-power beamwidth (deg)", {hp1, hp2}},
              SeriesPanel{"side-lobe level (dB re peak)", {sll}}};
  s.caption =
      "Refined peak and principal planes of each frequency's pattern analysis (the numbers of "
      "'lobecast report'); dashed vertical line: the design frequency. A beamwidth that never "
      "falls to half power, an undefined phi (peak on the z axis) and a pattern without side "
      "lobes are left out.";
  return s;
}

std::vector<SeriesPanelGeometry> WriteSweepPlot(const StoredResult& result,
                                                const StoredSweep& sweep, const std::string& path,
                                                const ImageSize& size) {
  return WriteSeriesPlot(SweepPlotSpec(result, sweep), path, size);
}

SeriesPlotSpec ScanPatternPlotSpec(const ScanSweep& sweep, const std::string& array_line,
                                   const std::string& broadside) {
  SeriesPlotSpec s;
  const double phi = sweep.points.front().steer_phi_deg;
  s.title_lines = {array_line, Format("Pattern against steering angle, scan plane phi = %s°",
                                      Tick(phi).c_str())};
  s.x_title = "steering angle theta (deg), from +z";
  Series d{"peak directivity", {}}, loss{"scan loss (re broadside)", {}};
  Series steer{"steering theta", {}}, beam{"beam (peak) theta", {}};
  Series hp1{"HPBW first plane", {}}, hp2{"HPBW second plane", {}};
  Series sll{"highest side lobe", {}};
  for (const ScanPoint& p : sweep.points) {
    s.x.push_back(p.steer_theta_deg);
    d.y.push_back(p.peak_directivity_dbi);
    loss.y.push_back(p.scan_loss_db);
    steer.y.push_back(p.steer_theta_deg);
    beam.y.push_back(p.peak_theta_deg);
    hp1.y.push_back(p.half_power_first_deg);
    hp2.y.push_back(p.half_power_second_deg);
    sll.y.push_back(p.sidelobe_db);
  }
  s.panels = {SeriesPanel{"peak directivity (dBi)", {d}}, SeriesPanel{"scan loss (dB)", {loss}},
              SeriesPanel{"theta (deg)", {beam, steer}},
              SeriesPanel{"half-power beamwidth (deg)", {hp1, hp2}},
              SeriesPanel{"side-lobe level (dB re peak)", {sll}}};
  s.caption =
      "Each steering angle's refined peak and principal planes (first: elevation, "
      "second: orthogonal); scan loss re the beam steered to broadside (" +
      broadside + ").";
  if (sweep.grating_onset) {
    s.marked_x = sweep.points[*sweep.grating_onset].steer_theta_deg;
    s.caption += Format(" Dashed line: a grating lobe enters visible space (steering theta %s°).",
                        Tick(*s.marked_x).c_str());
  } else if (sweep.points.front().grating_lobes >= 0) {
    s.caption += " No grating lobe enters visible space over the scan.";
  }
  return s;
}

std::vector<SeriesPanelGeometry> WriteScanPatternPlot(const ScanSweep& sweep,
                                                      const std::string& array_line,
                                                      const std::string& broadside,
                                                      const std::string& path,
                                                      const ImageSize& size) {
  return WriteSeriesPlot(ScanPatternPlotSpec(sweep, array_line, broadside), path, size);
}

}  // namespace lobecast::plot
