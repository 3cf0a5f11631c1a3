#include "io/text/link_station.h"

#include <cmath>
#include <string>

#include "engine/constants.h"
#include "io/hdf5/coupling_writer.h"

namespace lobecast {

std::string GainBasis::name() const {
  switch (kind) {
    case Kind::kDirectivity:
      return "directivity";
    case Kind::kGain:
      return "gain";
    case Kind::kRealizedGain:
      return "realized gain";
  }
  return "?";
}

std::string GainBasis::power_meaning() const {
  switch (kind) {
    case Kind::kDirectivity:
      return "radiated (the result has no loss or drive data: lossless, gain = directivity)";
    case Kind::kGain:
      return "accepted by the antenna (gain = radiation efficiency x directivity)";
    case Kind::kRealizedGain:
      return "available from the source (realized gain: mismatch and losses included)";
  }
  return "?";
}

GainBasis GainBasisOf(const std::optional<StoredCoupling>& coupling) {
  GainBasis b;
  if (!coupling) return b;
  const CouplingResult& c = coupling->result;
  b.kind = c.available_w > 0 ? GainBasis::Kind::kRealizedGain : GainBasis::Kind::kGain;
  // The same factor `compute` stored its /pattern/gain or /pattern/realized_gain with.
  b.factor = c.radiated_w / RealizedGainReferenceOf(c).power_w;
  return b;
}

Station::Station(const StoredResult& stored, const std::optional<StoredCoupling>& coupling,
                 const Eigen::Matrix3d& rotation)
    : stored_(stored),
      basis_(GainBasisOf(coupling)),
      rotation_(rotation),
      probe_(stored.array, stored.currents, stored.result.radiated_power_w) {}

StationToward Station::Toward(const Vec3& r_hat_common) const {
  const Vec3 own = rotation_.transpose() * r_hat_common;
  const ProbeSample s = probe_.At(own);
  StationToward t;
  t.direction.theta_deg = s.theta_rad / kDegree;
  t.direction.phi_deg = s.phi_rad / kDegree;
  t.below_ground = s.no_field;
  t.directivity = s.directivity;
  t.gain = s.directivity * basis_.factor;
  t.e_theta = s.e_theta;
  t.e_phi = s.e_phi;
  t.field_v = rotation_.cast<Complex>() * s.FieldVector_v();
  t.floor_v = s.floor_v;
  t.polarization = PolarizationOf(s.e_theta, s.e_phi, s.floor_v);
  return t;
}

}  // namespace lobecast
