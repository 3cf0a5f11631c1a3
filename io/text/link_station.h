// One end of a link, from a result file: its gain toward a direction and its far
// field there, evaluated exactly through the engine (PatternProbe on the stored array
// and currents, never read off the grid), and which gain that is:
//
//   directivity    the file has no loss or drive data: a lossless antenna, and the
//                  power that goes with it is the radiated power;
//   gain           the file has a circuit (/coupling) with losses but no voltage
//                  source with a resistance: G = e D, e the radiation efficiency, for
//                  the power the antenna accepts (IEEE Std 145-2013 gain);
//   realized gain  every source is a voltage source behind a resistance: G = 4 pi U /
//                  P_available, mismatch included, for the power available from the
//                  sources (io/hdf5/coupling_writer.h, RealizedGainReferenceOf).
//
// A station may stand turned in the common frame of the link (its axes rotated by
// `rotation`, a proper rotation taking its own coordinates to the common ones, e.g.
// AxisAngleRotation of engine/synthesis/lattice_generator.h):
// directions come in common coordinates and are turned into its own before the
// probe, and its field is turned back out.
#pragma once

#include <memory>
#include <optional>
#include <string>

#include "engine/analysis/analysis_types.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/polarization.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"

namespace lobecast {

struct GainBasis {
  enum class Kind { kDirectivity, kGain, kRealizedGain };
  Kind kind = Kind::kDirectivity;
  double factor = 1;  // gain / directivity: 1, the efficiency, or P_rad / P_available
  // "directivity", "gain", "realized gain".
  std::string name() const;
  // What the transmit power means with this gain, for people: "radiated", ...
  std::string power_meaning() const;
};
GainBasis GainBasisOf(const std::optional<StoredCoupling>& coupling);

struct StationToward {
  DirectionDeg direction;          // in the station's own coordinates (deg)
  bool below_ground = false;       // over PEC ground, theta > 90 deg: no field
  double directivity = 0;          // linear
  double gain = 0;                 // linear, directivity times the basis' factor
  Complex e_theta = 0, e_phi = 0;  // rE in the station's own theta_hat, phi_hat (V)
  Eigen::Vector3cd field_v;        // rE as a Cartesian vector in the common frame (V)
  double floor_v = 0;              // the numerical floor of the station's sum (V)
  Polarization polarization;       // axial ratio, tilt, sense (own frame)
};

class Station {
 public:
  // `stored` and `coupling` must outlive the station.
  Station(const StoredResult& stored, const std::optional<StoredCoupling>& coupling,
          const Eigen::Matrix3d& rotation = Eigen::Matrix3d::Identity());
  // Toward the unit vector r_hat (common coordinates).
  StationToward Toward(const Vec3& r_hat_common) const;
  const GainBasis& basis() const { return basis_; }
  const StoredResult& stored() const { return stored_; }
  const Eigen::Matrix3d& rotation() const { return rotation_; }
  const PatternProbe& probe() const { return probe_; }

 private:
  const StoredResult& stored_;
  GainBasis basis_;
  Eigen::Matrix3d rotation_;
  PatternProbe probe_;
};

}  // namespace lobecast
