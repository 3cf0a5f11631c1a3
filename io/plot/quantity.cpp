#include "io/plot/quantity.h"

#include <cmath>
#include <limits>

#include "engine/analysis/pattern_analysis.h"
#include "engine/text_case.h"

namespace lobecast::plot {

std::string_view ToString(Quantity q) {
  switch (q) {
    case Quantity::kDirectivity:
      return "directivity";
    case Quantity::kCo:
      return "co";
    case Quantity::kCross:
      return "cross";
    case Quantity::kTheta:
      return "theta";
    case Quantity::kPhi:
      return "phi";
    case Quantity::kRealizedGain:
      return "realized-gain";
  }
  return "?";
}

std::optional<Quantity> QuantityFromString(std::string_view s) {
  const std::string l = Lower(s);
  for (Quantity q : {Quantity::kDirectivity, Quantity::kCo, Quantity::kCross, Quantity::kTheta,
                     Quantity::kPhi, Quantity::kRealizedGain})
    if (l == ToString(q)) return q;
  return std::nullopt;
}

std::optional<Quantity> CompanionOf(Quantity q) {
  switch (q) {
    case Quantity::kCo:
      return Quantity::kCross;
    case Quantity::kCross:
      return Quantity::kCo;
    case Quantity::kTheta:
      return Quantity::kPhi;
    case Quantity::kPhi:
      return Quantity::kTheta;
    case Quantity::kDirectivity:
    case Quantity::kRealizedGain:
      break;
  }
  return std::nullopt;
}

std::optional<ReferenceChoice> ReferenceChoiceFromString(std::string_view s) {
  if (Lower(s) == "auto") return ReferenceChoice{};
  const auto ref = PolarizationReferenceFromString(s);
  if (!ref) return std::nullopt;
  return ReferenceChoice{false, *ref};
}

double QuantityAt(const StoredResult& r, std::size_t k, Quantity q, PolarizationReference ref) {
  const PatternResult& p = r.result;
  const std::size_t np = p.grid.phi_deg.size();
  return QuantityOf(p.directivity[static_cast<Eigen::Index>(k)],
                    p.field.e_theta[static_cast<Eigen::Index>(k)],
                    p.field.e_phi[static_cast<Eigen::Index>(k)],
                    p.grid.phi_deg[k % np] * kPi / 180.0, q, ref, p.field_floor_v);
}

double QuantityOf(double d, Complex et, Complex ep, double phi_rad, Quantity q,
                  PolarizationReference ref, double floor_v) {
  if (q == Quantity::kDirectivity || q == Quantity::kRealizedGain) return d;  // see quantity.h
  const double total = std::norm(et) + std::norm(ep);
  if (!(total > 0)) return 0.0;
  double part = 0;
  if (q == Quantity::kTheta) {
    part = std::norm(et);
  } else if (q == Quantity::kPhi) {
    part = std::norm(ep);
  } else {
    const CoCross cc = CoCrossOf(et, ep, phi_rad, ref, floor_v);  // floored parts
    part = std::norm(q == Quantity::kCo ? cc.co : cc.cross);
  }
  return d * part / total;
}

std::vector<double> QuantityOnGrid(const StoredResult& r, Quantity q, PolarizationReference ref) {
  std::vector<double> v(r.result.grid.size());
  for (std::size_t k = 0; k < v.size(); ++k) v[k] = QuantityAt(r, k, q, ref);
  return v;
}

PolarizationReference ResolveReference(const StoredResult& r, const ReferenceChoice& choice) {
  return choice.automatic ? AutoReference(r.result) : choice.fixed;
}

std::string QuantityLabel(Quantity q, PolarizationReference ref) {
  std::string ref_text;
  switch (ref) {
    case PolarizationReference::kLinearX:
      ref_text = "Ludwig-3, x reference";
      break;
    case PolarizationReference::kLinearY:
      ref_text = "Ludwig-3, y reference";
      break;
    case PolarizationReference::kRightCircular:
      ref_text = "RHCP reference";
      break;
    case PolarizationReference::kLeftCircular:
      ref_text = "LHCP reference";
      break;
    case PolarizationReference::kTheta:
      ref_text = "theta_hat reference";
      break;
    case PolarizationReference::kPhi:
      ref_text = "phi_hat reference";
      break;
  }
  switch (q) {
    case Quantity::kDirectivity:
      return "directivity";
    case Quantity::kRealizedGain:
      return "realized gain";
    case Quantity::kCo:
      return "co-pol (" + ref_text + ")";
    case Quantity::kCross:
      return "cross-pol (" + ref_text + ")";
    case Quantity::kTheta:
      return "E_theta part";
    case Quantity::kPhi:
      return "E_phi part";
  }
  return "?";
}

}  // namespace lobecast::plot
