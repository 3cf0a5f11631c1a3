#include "io/text/link_text.h"

#include <cmath>
#include <sstream>

#include "engine/decibels.h"
#include "io/safety_note.h"
#include "io/text/json_writer.h"
#include "io/text/number_text.h"
#include "io/text/pattern_export.h"
#include "io/text/summary_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

std::string Db(double db) {
  return std::isinf(db) ? (db < 0 ? "-inf" : "inf") : std::isnan(db) ? "undefined" : Fixed2(db);
}

std::string EndName(const LinkEnd& e) {
  if (e.result_path.empty()) return "a receiver given by its gain and polarization";
  return (e.name.empty() ? "" : "\"" + e.name + "\" ") + "(" + e.result_path + ")";
}

std::string PolarizationWords(const Polarization& p) {
  if (std::isnan(p.axial_ratio_db)) return "zero (below rounding)";
  if (p.sense == 0) return Printf("linear, tilt %.2f deg from theta_hat", p.tilt_deg);
  return SenseName(p.sense) + (p.axial_ratio_db == 0 ? " circular" : " elliptical") +
         ", axial ratio " + Db(p.axial_ratio_db) + " dB";
}

std::string Xyz(const Vec3& v) { return Printf("(%g, %g, %g)", v.x(), v.y(), v.z()); }

std::string PlfWords(const LinkReport& r) {
  if (std::isnan(r.polarization_loss_factor)) return "undefined (a field is zero)";
  return Printf("%.6g", r.polarization_loss_factor) + " (" + Db(ToDb(r.polarization_loss_factor)) +
         " dB)";
}

void JsonDirection(JsonWriter& j, std::string_view key, const DirectionDeg& d) {
  j.Key(key);
  j.BeginObject();
  j.Member("theta_deg", d.theta_deg);
  j.Member("phi_deg", d.phi_deg);
  j.EndObject();
}

void JsonEnd(JsonWriter& j, const LinkEnd& e) {
  j.Member("result", e.result_path);
  j.Member("name", e.name);
  JsonDirection(j, "direction_own_coordinates", e.toward.direction);
  j.Member("gain_definition", e.basis.name());
  j.Member("directivity_dbi", ToDb(e.toward.directivity));
  j.Member("gain_dbi", ToDb(e.toward.gain));
  j.Member("axial_ratio_db", e.toward.polarization.axial_ratio_db);
  j.Member("tilt_deg", e.toward.polarization.tilt_deg);
  j.MemberInt("sense", e.toward.polarization.sense);
  j.Member("largest_dimension_m", e.region.region.largest_dimension_m);
  j.MemberBool("largest_dimension_is_bound", e.region.largest_dimension_is_bound);
  j.Member("fraunhofer_distance_m", e.region.region.fraunhofer_m);
  j.Member("far_field_from_m", e.region.region.start_m());
  j.Member("ground", e.ground_pec ? "pec" : "none");
}

// ", directivity D dBi" when the gain is not the directivity itself.
std::string DirectivityAside(const LinkEnd& e) {
  if (e.basis.kind == GainBasis::Kind::kDirectivity) return "";
  return ", directivity " + Db(ToDb(e.toward.directivity)) + " dBi";
}

double RxGain(const LinkReport& r) {
  return r.rx.result_path.empty() ? r.given_rx_gain : r.rx.toward.gain;
}

}  // namespace

double ToDbm(double watts) { return ToDb(watts * 1e3); }

std::vector<std::string> LinkCautions(const LinkReport& r) {
  std::vector<std::string> out;
  for (const LinkEnd* e : {&r.tx, &r.rx}) {
    if (e->result_path.empty()) continue;
    const FarFieldRegion& g = e->region.region;
    if (r.distance_m < g.start_m()) {
      out.push_back(Printf("the distance %.6g m is inside the far field of the ", r.distance_m) +
                    (e == &r.tx ? "transmitter" : "receiver") +
                    Printf(" (from %.6g m: 2 D^2 / lambda = %.6g m with D = %.6g m%s, and %g "
                           "wavelengths = %.6g m, common practice): gain, path loss and "
                           "polarization there are not far-field values",
                           g.start_m(), g.fraunhofer_m, g.largest_dimension_m,
                           e->region.largest_dimension_is_bound ? " (bounding box)" : "",
                           kFarFieldMinWavelengths, g.few_wavelengths_m));
    }
  }
  if (!r.rx.result_path.empty() && r.tx.ground_pec && r.rx.ground_pec) {
    out.push_back(
        "both ends stand over PEC ground and each pattern already holds its own ground "
        "reflection: between two antennas over one ground the direct and reflected paths "
        "are not those of either pattern alone, so treat these figures as a rough estimate");
  }
  if (!r.rx.result_path.empty() &&
      r.tx.toward.polarization.sense * r.rx.toward.polarization.sense < 0) {
    out.push_back(
        "the receiver radiates the other hand toward the transmitter than the transmitter "
        "toward it: circular antennas of one hand must face each other to match (turn the "
        "receiver with --rx-rotate, e.g. 1,0,0,180 for a copy on the transmitter's z axis)");
  }
  if (std::isnan(r.polarization_loss_factor)) {
    out.push_back(
        "the polarization loss factor is undefined: the field of one end is zero "
        "toward the other (below rounding)");
  }
  return out;
}

std::string LinkText(const LinkReport& r) {
  std::ostringstream s;
  s << "link         from " << EndName(r.tx) << " to " << EndName(r.rx) << "\n";
  s << "frequency    " << FormatFrequency(r.frequency_hz)
    << Printf(" (wavelength %.6g m)\n", r.wavelength_m);
  if (r.tx_position_m && r.rx_position_m) {
    s << "positions    transmitter origin " << Xyz(*r.tx_position_m) << " m, receiver origin "
      << Xyz(*r.rx_position_m) << " m (common frame: the transmitter's axes)\n";
  }
  s << "distance     " << Printf("%.6g m", r.distance_m) << ", receiver toward "
    << FormatDirection(r.toward.theta_deg, r.toward.phi_deg)
    << " in the transmitter's coordinates\n";
  s << "power        " << Printf("%.6g W (%s dBm), ", r.power_w, Db(ToDbm(r.power_w)).c_str())
    << r.tx.basis.power_meaning() << "\n";
  s << "tx gain      " << Db(ToDb(r.tx.toward.gain)) << " dBi " << r.tx.basis.name()
    << " toward the receiver" << DirectivityAside(r.tx) << " (exact, off the grid); field "
    << PolarizationWords(r.tx.toward.polarization) << "\n";
  s << "EIRP         "
    << Printf("%.6g W (%s dBm)\n", r.budget.eirp_w, Db(ToDbm(r.budget.eirp_w)).c_str());
  s << "path loss    " << Db(ToDb(r.budget.path_loss))
    << " dB free space, (4 pi R / lambda)^2 (Friis)\n";
  if (r.rx.result_path.empty()) {
    s << "rx gain      " << Db(ToDb(r.given_rx_gain)) << " dBi "
      << (r.rx_gain_given ? "(given)" : "(not given: isotropic, 0 dBi)") << "\n";
    s << "polarization "
      << "receiver matched to "
      << (r.rx_polarization
              ? ReferenceName(*r.rx_polarization) + " waves arriving from the transmitter"
              : std::string("the incoming wave (not given: assumed)"))
      << "; loss factor " << PlfWords(r) << "\n";
  } else {
    s << "rx gain      " << Db(ToDb(r.rx.toward.gain)) << " dBi " << r.rx.basis.name()
      << " toward the transmitter, "
      << FormatDirection(r.rx.toward.direction.theta_deg, r.rx.toward.direction.phi_deg)
      << " in its own coordinates" << DirectivityAside(r.rx) << "; its field "
      << PolarizationWords(r.rx.toward.polarization) << "\n";
    if (r.rx_rotation_axis) {
      s << "rx turned    " << Printf("%g deg about ", r.rx_rotation_deg) << Xyz(*r.rx_rotation_axis)
        << " (right-hand) in the common frame\n";
    }
    s << "polarization loss factor " << PlfWords(r)
      << " from both ends' fields (IEEE Std 145-2013)\n";
  }
  s << "received     "
    << Printf("%.6g W (%s dBm)", r.budget.received_w, Db(ToDbm(r.budget.received_w)).c_str())
    << "\n";
  if (r.sensitivity_dbm) {
    const double margin = ToDbm(r.budget.received_w) - *r.sensitivity_dbm;
    s << "margin       " << Db(margin) << " dB over the sensitivity "
      << Printf("%g dBm", *r.sensitivity_dbm) << (margin < 0 ? " (SHORT: the link fails)" : "")
      << "\n";
  }
  for (const LinkEnd* e : {&r.tx, &r.rx}) {
    if (e->result_path.empty()) continue;
    const FarFieldRegion& g = e->region.region;
    s << (e == &r.tx ? "far field    transmitter" : "far field    receiver")
      << Printf(
             ": D = %.6g m%s, 2 D^2 / lambda = %.6g m, %g wavelengths = %.6g m: far field from "
             "%.6g m\n",
             g.largest_dimension_m, e->region.largest_dimension_is_bound ? " (bound)" : "",
             g.fraunhofer_m, kFarFieldMinWavelengths, g.few_wavelengths_m, g.start_m());
    if (e->ground_pec) {
      s << "ground       " << (e == &r.tx ? "transmitter" : "receiver")
        << " over PEC ground: its pattern holds the ground reflection above it (theta < 90 "
           "deg)\n";
    }
  }
  for (const std::string& c : r.cautions) s << WrappedNote("caution:", c);
  s << SafetyNote();
  return s.str();
}

std::string CsvWithNotes(const std::string& header, const std::vector<std::string>& rows,
                         const std::vector<std::string>& notes) {
  std::string out = header + ",notes\n";
  for (std::size_t row = 0; row < rows.size(); ++row) {
    std::string note;
    if (row + 1 < rows.size()) {
      if (row < notes.size()) note = notes[row];
    } else {
      for (std::size_t k = row; k < notes.size(); ++k) note += (k > row ? " | " : "") + notes[k];
    }
    out += rows[row] + ",";
    AppendText(out, note, ',');
    out += '\n';
  }
  return out;
}

std::string LinkCsv(const LinkReport& r) {
  const double rx_gain = RxGain(r);
  const double margin =
      r.sensitivity_dbm ? ToDbm(r.budget.received_w) - *r.sensitivity_dbm : std::nan("");
  std::string row;
  auto num = [&row](double v) {
    if (!row.empty()) row += ',';
    if (!std::isnan(v)) AppendShortest(row, v);  // undefined: an empty cell
  };
  auto text = [&row](const std::string& t) {
    if (!row.empty()) row += ',';
    AppendText(row, t, ',');
  };
  num(r.frequency_hz);
  num(r.distance_m);
  num(r.toward.theta_deg);
  num(r.toward.phi_deg);
  num(r.power_w);
  text(r.tx.basis.name());
  num(ToDb(r.tx.toward.gain));
  num(r.budget.eirp_w);
  num(ToDbm(r.budget.eirp_w));
  num(ToDb(r.budget.path_loss));
  num(ToDb(rx_gain));
  num(r.polarization_loss_factor);
  num(r.budget.received_w);
  num(ToDbm(r.budget.received_w));
  num(r.sensitivity_dbm.value_or(std::nan("")));
  num(margin);
  std::vector<std::string> notes = r.cautions;
  notes.emplace_back(kSafetyNote);
  return CsvWithNotes(
      "frequency_Hz,distance_m,tx_theta_deg,tx_phi_deg,power_W,tx_gain_definition,tx_gain_dBi,"
      "eirp_W,eirp_dBm,path_loss_dB,rx_gain_dBi,polarization_loss_factor,received_W,"
      "received_dBm,sensitivity_dBm,margin_dB",
      {row}, notes);
}

std::string LinkJson(const LinkReport& r) {
  JsonWriter j;
  j.BeginObject();
  j.Member("frequency_hz", r.frequency_hz);
  j.Member("wavelength_m", r.wavelength_m);
  j.Member("distance_m", r.distance_m);
  JsonDirection(j, "toward", r.toward);
  if (r.tx_position_m && r.rx_position_m) {
    for (const auto& [key, p] : {std::pair{"tx_position_m", *r.tx_position_m},
                                 std::pair{"rx_position_m", *r.rx_position_m}}) {
      j.Key(key);
      j.BeginArray();
      for (int k = 0; k < 3; ++k) j.Number(p[k]);
      j.EndArray();
    }
  }
  j.Member("power_w", r.power_w);
  j.Member("power_meaning", r.tx.basis.power_meaning());
  j.Key("transmitter");
  j.BeginObject();
  JsonEnd(j, r.tx);
  j.EndObject();
  j.Key("receiver");
  j.BeginObject();
  if (r.rx.result_path.empty()) {
    j.Member("gain_dbi", ToDb(r.given_rx_gain));
    j.MemberBool("gain_given", r.rx_gain_given);
    if (r.rx_polarization) {
      j.Member("polarization", ToString(*r.rx_polarization));
    } else {
      j.Key("polarization");
      j.Null();  // not given: assumed matched
    }
  } else {
    JsonEnd(j, r.rx);
    if (r.rx_rotation_axis) {
      j.Key("rotation_axis");
      j.BeginArray();
      for (int k = 0; k < 3; ++k) j.Number((*r.rx_rotation_axis)[k]);
      j.EndArray();
      j.Member("rotation_deg", r.rx_rotation_deg);
    }
  }
  j.EndObject();
  j.Member("eirp_w", r.budget.eirp_w);
  j.Member("eirp_dbm", ToDbm(r.budget.eirp_w));
  j.Member("path_loss_db", ToDb(r.budget.path_loss));
  j.Member("polarization_loss_factor", r.polarization_loss_factor);
  j.Member("polarization_loss_db", ToDb(r.polarization_loss_factor));
  j.Member("received_w", r.budget.received_w);
  j.Member("received_dbm", ToDbm(r.budget.received_w));
  if (r.sensitivity_dbm) {
    j.Member("sensitivity_dbm", *r.sensitivity_dbm);
    j.Member("margin_db", ToDbm(r.budget.received_w) - *r.sensitivity_dbm);
  }
  j.Key("cautions");
  j.BeginArray();
  for (const std::string& c : r.cautions) j.String(c);
  j.EndArray();
  j.Member("safety_note", kSafetyNote);
  j.EndObject();
  return j.text();
}

}  // namespace lobecast::text
