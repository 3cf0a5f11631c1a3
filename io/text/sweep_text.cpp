#include "io/text/sweep_text.h"

#include <algorithm>
#include <cmath>
#include <vector>

#include "io/hdf5/schema.h"
#include "io/text/number_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

struct FrequencyUnit {
  const char* name;
  double hz;
};

// The unit of the largest frequency, so every row reads in one unit.
FrequencyUnit UnitFor(const StoredSweep& s) {
  double f_max = 0;
  for (const FrequencyPoint& p : s.points) f_max = std::max(f_max, p.frequency_hz);
  if (f_max >= 1e9) return {"GHz", 1e9};
  if (f_max >= 1e6) return {"MHz", 1e6};
  if (f_max >= 1e3) return {"kHz", 1e3};
  return {"Hz", 1.0};
}

// A fixed-width cell: the number, or a word where it is not a number.
std::string Cell(double v, const char* fmt, const char* if_nan, const char* if_inf) {
  if (std::isnan(v)) return Printf("%*s", 10, if_nan);
  if (std::isinf(v)) return Printf("%*s", 10, v > 0 ? if_inf : "-inf");
  return Printf(fmt, v);
}

}  // namespace

std::string SweepTable(const StoredSweep& s) {
  const FrequencyUnit unit = UnitFor(s);
  const FrequencyPoint& design = s.points.front();
  std::string out =
      Printf("Frequency sweep: %zu frequencies, design %s %s (first); ", s.points.size(),
             Printf("%.6g", design.frequency_hz / unit.hz).c_str(), unit.name);
  if (s.steering == "phase")
    out += "phase steering (phases fixed at the design frequency: the beam squints)\n";
  else if (s.steering == "delay")
    out += "true-time-delay steering (delays kept: no squint)\n";
  else
    out += "currents fixed at every frequency\n";
  const std::string first(ToString(design.first_plane)), second(ToString(design.second_plane));
  out += Printf("  %12s %10s %10s %10s %10s %10s %10s %10s", "frequency", "peak", "theta", "phi",
                "squint", "HPBW", "HPBW", "SLL");
  if (s.coupled)
    out += Printf(" %10s %10s %10s", s.points.front().gain_is_realized ? "realized" : "gain",
                  "|Gamma|", "VSWR");
  out += "\n";
  out += Printf("  %12s %10s %10s %10s %10s %10s %10s %10s", unit.name, "dBi", "deg", "deg", "deg",
                first.substr(0, 10).c_str(), second.substr(0, 10).c_str(), "dB");
  if (s.coupled) out += Printf(" %10s %10s %10s", "dBi", "worst", "worst");
  out += "\n";
  bool planes_vary = false;
  for (const FrequencyPoint& p : s.points) {
    planes_vary =
        planes_vary || p.first_plane != design.first_plane || p.second_plane != design.second_plane;
    out += Printf("%c %12s", &p == &design ? '*' : ' ',
                  Printf("%.6g", p.frequency_hz / unit.hz).c_str());
    (out += ' ') += Cell(p.peak_directivity_dbi, "%10.3f", "n/a", "inf");
    (out += ' ') += Cell(p.peak_theta_deg, "%10.3f", "n/a", "inf");
    (out += ' ') += Cell(p.peak_phi_deg, "%10.3f", "undefined", "inf");
    (out += ' ') += Cell(SquintDeg(p, design), "%10.3f", "n/a", "inf");
    (out += ' ') += Cell(p.half_power_first_deg, "%10.3f", "n/a", "none");
    (out += ' ') += Cell(p.half_power_second_deg, "%10.3f", "n/a", "none");
    (out += ' ') += Cell(p.sidelobe_db, "%10.2f", "n/a", "inf");
    if (s.coupled) {
      (out += ' ') += Cell(p.gain_dbi, "%10.3f", "n/a", "inf");
      (out += ' ') += Cell(p.worst_reflection, "%10.4f", "n/a", "inf");
      (out += ' ') += Cell(p.worst_vswr, "%10.3f", "n/a", "inf");
    }
    out += "\n";
  }
  out +=
      "  (* design frequency; squint: angle of the peak from the design frequency's; HPBW "
      "none: the beam does not fall to half power in that plane; SLL -inf: no side lobe";
  if (s.coupled) out += "; |Gamma| and VSWR: the worst fed port against the reference impedance";
  out += ")\n";
  if (planes_vary)
    out +=
        "  note: the principal planes differ between frequencies (/sweep/first_plane, "
        "second_plane)\n";
  return out;
}

void WriteSweepJson(JsonWriter& j, const StoredSweep& s) {
  j.Key(schema::kSweepJsonKey);
  j.BeginObject();
  j.Member("design_frequency_hz", s.design_frequency_hz);
  j.Member("steering", s.steering);
  if (s.coupled) {
    j.MemberBool("gain_is_realized", s.points.front().gain_is_realized);
    j.Member("gain_definition", s.gain_definition);
  }
  j.Key("points");
  j.BeginArray();
  for (const FrequencyPoint& p : s.points) {
    j.BeginObject();
    schema::VisitSweepColumns(p, s.coupled,
                              [&](const schema::Dataset& d, double v) { j.Member(d.name(), v); });
    j.Member("first_plane", ToString(p.first_plane));
    j.Member("second_plane", ToString(p.second_plane));
    j.Member("squint_deg", SquintDeg(p, s.points.front()));
    j.EndObject();
  }
  j.EndArray();
  j.EndObject();
}

std::string SweepCsv(const StoredSweep& s) {
  std::vector<std::string> header;
  schema::VisitSweepColumns(s.points.front(), s.coupled, [&](const schema::Dataset& d, double) {
    header.emplace_back(d.name());
  });
  // The squint right after the direction it is derived from.
  header.insert(header.begin() + 4, "squint_deg");
  header.insert(header.begin() + 8, "first_plane");
  header.insert(header.begin() + 9, "second_plane");
  std::string out;
  for (std::size_t k = 0; k < header.size(); ++k) out += (k ? "," : "") + header[k];
  out += "\n";
  for (const FrequencyPoint& p : s.points) {
    std::vector<std::string> cells;
    schema::VisitSweepColumns(p, s.coupled, [&](const schema::Dataset&, double v) {
      std::string c;
      if (!std::isnan(v)) AppendShortest(c, v);
      cells.push_back(c);
    });
    std::string squint;
    if (const double q = SquintDeg(p, s.points.front()); !std::isnan(q)) AppendShortest(squint, q);
    cells.insert(cells.begin() + 4, squint);
    cells.insert(cells.begin() + 8, std::string(ToString(p.first_plane)));
    cells.insert(cells.begin() + 9, std::string(ToString(p.second_plane)));
    for (std::size_t k = 0; k < cells.size(); ++k) out += (k ? "," : "") + cells[k];
    out += "\n";
  }
  return out;
}

}  // namespace lobecast::text
