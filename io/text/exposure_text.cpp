#include "io/text/exposure_text.h"

#include <cmath>
#include <sstream>

#include "engine/decibels.h"
#include "io/safety_note.h"
#include "io/text/json_writer.h"
#include "io/text/link_text.h"
#include "io/text/number_text.h"
#include "io/text/pattern_export.h"
#include "io/text/summary_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

std::string DbCell(double linear) {
  const double db = ToDb(linear);
  return std::isinf(db) ? "-inf" : Printf("%.2f", db);
}

// The limit is reached closer than the far-field distance: the row's distance is
// outside the model's validity (0, a limit never reached, is not).
bool LimitInsideFarField(const ExposureReport& r, const ExposureRow& row) {
  return row.distance_to_limit_m > 0 && row.distance_to_limit_m < r.region.region.start_m();
}

std::vector<std::string> Notes(const ExposureReport& r) {
  std::vector<std::string> notes = {
      "lobecast exposure of " + r.result_path + ": " + (r.name.empty() ? "(unnamed)" : r.name) +
          ", " + FormatFrequency(r.frequency_hz) + ", ground " + std::string(ToString(r.ground)),
      Printf("power %.6g W, ", r.power_w) + r.basis.power_meaning(),
      Printf("limit %.6g W/m^2 as given; distance_to_limit_m = sqrt(EIRP / (4 pi limit))",
             r.limit_w_m2),
      Printf("far field from %.6g m (2 D^2 / lambda with D = %.6g m; %g wavelengths)",
             r.region.region.start_m(), r.region.region.largest_dimension_m,
             kFarFieldMinWavelengths),
      "rows: " + r.rows_what};
  for (const std::string& c : r.cautions) notes.push_back("caution: " + c);
  notes.push_back("note: " + std::string(kExposureNote));
  return notes;
}

}  // namespace

std::vector<std::string> ExposureCautions(const ExposureReport& r) {
  std::vector<std::string> out;
  double worst = 0;
  std::size_t inside = 0;
  for (const ExposureRow& row : r.rows) {
    worst = std::max(worst, row.distance_to_limit_m);
    if (LimitInsideFarField(r, row)) ++inside;
  }
  const double start = r.region.region.start_m();
  if (worst > 0 && worst < start) {
    out.push_back(
        Printf("the limit is reached at %.6g m, inside the far-field distance %.6g m: "
               "there the far-field estimate does not hold and the near field can be "
               "stronger; assess the near field by other means",
               worst, start));
  } else if (inside > 0) {
    out.push_back(
        Printf("%zu of %zu rows reach the limit inside the far-field distance %.6g m (marked): "
               "their distances are not valid, and the near field there can be stronger than "
               "the far-field estimate; the largest distance (%.6g m, the worst direction) is "
               "outside it",
               inside, r.rows.size(), start, worst));
  }
  if (r.distance_m && *r.distance_m < start) {
    out.push_back(
        Printf("the density is asked at %.6g m, inside the far-field distance %.6g m: "
               "the far-field figure there is not the real density",
               *r.distance_m, start));
  }
  return out;
}

std::string ExposureGroundNote(Ground ground) {
  if (ground == Ground::kPec) {
    return "over the result's perfect (PEC) ground the reflected field is already in the "
           "pattern above the ground (theta < 90 deg) and there is none below; a real ground "
           "reflects differently, and people stand on it, where reflections meet";
  }
  return "the result is in free space: a ground, walls or vehicles near the array add "
         "reflected waves that can raise the density above these figures";
}

std::string ExposureText(const ExposureReport& r) {
  std::ostringstream s;
  s << "exposure     " << (r.name.empty() ? "" : "\"" + r.name + "\" ") << "(" << r.result_path
    << "), " << FormatFrequency(r.frequency_hz) << ", ground " << ToString(r.ground) << "\n";
  s << "power        " << Printf("%.6g W, ", r.power_w) << r.basis.power_meaning() << "\n";
  s << "limit        " << Printf("%.6g W/m^2", r.limit_w_m2)
    << " as given (lobecast holds no exposure limits)\n";
  const FarFieldRegion& g = r.region.region;
  s << "far field    "
    << Printf("from %.6g m: D = %.6g m%s, 2 D^2 / lambda = %.6g m, %g wavelengths = %.6g m\n",
              g.start_m(), g.largest_dimension_m,
              r.region.largest_dimension_is_bound ? " (bound)" : "", g.fraunhofer_m,
              kFarFieldMinWavelengths, g.few_wavelengths_m);
  s << "rows         " << r.rows_what << "\n";
  if (!r.map_path.empty()) s << "map          " << r.map_path << "\n";
  s << "\n";
  const bool cut = [&] {
    for (const ExposureRow& row : r.rows)
      if (!std::isnan(row.cut_angle_deg)) return true;
    return false;
  }();
  s << Printf("%-7s %9s %9s", "", "theta_deg", "phi_deg");
  if (cut) s << Printf(" %9s", "cut_deg");
  s << Printf(" %9s %9s %12s %12s", "D_dBi", "gain_dBi", "EIRP_W", "to_limit_m");
  if (r.distance_m) s << Printf(" %14s", Printf("S@%gm_W/m^2", *r.distance_m).c_str());
  s << "\n";
  for (const ExposureRow& row : r.rows) {
    // phi undefined on the z axis.
    s << Printf("%-7s %9.3f", row.kind.c_str(), row.theta_deg)
      << (std::isnan(row.phi_deg) ? Printf(" %9s", "-") : Printf(" %9.3f", row.phi_deg));
    if (cut) {
      s << (std::isnan(row.cut_angle_deg) ? Printf(" %9s", "")
                                          : Printf(" %9.3f", row.cut_angle_deg));
    }
    // A distance inside the far-field distance is marked: not valid there.
    const bool inside = LimitInsideFarField(r, row);
    s << Printf(" %9s %9s %12.6g %11.6g%s", DbCell(row.directivity).c_str(),
                DbCell(row.gain).c_str(), row.eirp_w, row.distance_to_limit_m, inside ? "*" : " ");
    if (r.distance_m) s << Printf(" %14.6g", row.density_w_m2);
    s << "\n";
  }
  for (const ExposureRow& row : r.rows) {
    if (LimitInsideFarField(r, row)) {
      s << Printf("* inside the far-field distance %.6g m: not valid there\n",
                  r.region.region.start_m());
      break;
    }
  }
  s << "\n";
  for (const std::string& c : r.cautions) s << WrappedNote("caution:", c);
  s << WrappedNote("note:", kExposureNote);
  return s.str();
}

std::string ExposureCsv(const ExposureReport& r) {
  std::string header =
      "kind,theta_deg,phi_deg,cut_angle_deg,directivity_dBi,gain_dBi,eirp_W,limit_W_m2,"
      "distance_to_limit_m,limit_in_far_field";
  if (r.distance_m) header += ",distance_m,density_W_m2";
  std::vector<std::string> rows;
  for (const ExposureRow& row : r.rows) {
    std::string line = row.kind;
    auto num = [&line](double v) {
      line += ',';
      if (!std::isnan(v)) AppendShortest(line, v);  // undefined: an empty cell
    };
    num(row.theta_deg);
    num(row.phi_deg);
    num(row.cut_angle_deg);
    num(ToDb(row.directivity));
    num(ToDb(row.gain));
    num(row.eirp_w);
    num(r.limit_w_m2);
    num(row.distance_to_limit_m);
    line += LimitInsideFarField(r, row) ? ",false" : ",true";
    if (r.distance_m) {
      num(*r.distance_m);
      num(row.density_w_m2);
    }
    rows.push_back(line);
  }
  return CsvWithNotes(header, rows, Notes(r));
}

std::string ExposureJson(const ExposureReport& r) {
  JsonWriter j;
  j.BeginObject();
  j.Member("result", r.result_path);
  j.Member("name", r.name);
  j.Member("frequency_hz", r.frequency_hz);
  j.Member("ground", ToString(r.ground));
  j.Member("power_w", r.power_w);
  j.Member("power_meaning", r.basis.power_meaning());
  j.Member("gain_definition", r.basis.name());
  j.Member("limit_w_m2", r.limit_w_m2);
  if (r.distance_m) j.Member("distance_m", *r.distance_m);
  j.Member("largest_dimension_m", r.region.region.largest_dimension_m);
  j.Member("far_field_from_m", r.region.region.start_m());
  j.Member("rows_description", r.rows_what);
  if (!r.map_path.empty()) j.Member("map", r.map_path);
  j.Key("rows");
  j.BeginArray();
  for (const ExposureRow& row : r.rows) {
    j.BeginObject();
    j.Member("kind", row.kind);
    j.Member("theta_deg", row.theta_deg);
    j.Member("phi_deg", row.phi_deg);
    if (!std::isnan(row.cut_angle_deg)) j.Member("cut_angle_deg", row.cut_angle_deg);
    j.Member("directivity_dbi", ToDb(row.directivity));
    j.Member("gain_dbi", ToDb(row.gain));
    j.Member("eirp_w", row.eirp_w);
    j.Member("distance_to_limit_m", row.distance_to_limit_m);
    // false: the limit is reached inside the far-field distance, where the
    // far-field estimate does not hold.
    j.MemberBool("limit_in_far_field", !LimitInsideFarField(r, row));
    if (r.distance_m) j.Member("density_w_m2", row.density_w_m2);
    j.MemberBool("exact", row.exact);
    j.EndObject();
  }
  j.EndArray();
  j.Key("cautions");
  j.BeginArray();
  for (const std::string& c : r.cautions) j.String(c);
  j.EndArray();
  j.Member("exposure_note", kExposureNote);
  j.EndObject();
  return j.text();
}

}  // namespace lobecast::text
