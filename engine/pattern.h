// The whole pattern job on a theta-phi grid: field, intensity, directivity,
// polarization, power and resistances. This is what `lobecast compute` runs.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "engine/far_field.h"
#include "engine/grid.h"
#include "engine/types.h"

namespace lobecast {

struct PatternOptions {
  int num_threads = 0;  // 0: OpenMP default
  // Called with the fraction done (0..1) between chunks of directions; may be empty.
  // The engine never prints; the CLI draws its progress bar from this.
  std::function<void(double)> progress;
};

// What was asked, what was used, and how long each stage took.
struct ComputeSummary {
  std::string method = "direct";
  int threads_used = 0;
  std::size_t num_dipoles = 0;
  std::size_t num_sources = 0;       // dipoles plus images
  std::size_t num_directions = 0;
  double pairs = 0;                  // source-direction pairs evaluated
  double seconds_plan = 0;
  double seconds_field = 0;
  double seconds_power = 0;
  double seconds_polarization = 0;
  double radiated_power_w = 0;
  double peak_directivity = 0;       // linear, grid maximum
  double peak_theta_deg = 0;
  double peak_phi_deg = 0;
};

struct PatternResult {
  AngularGrid grid;
  FarField field;                              // (Nt*Np), theta-major
  Eigen::VectorXd intensity_w_sr;              // U = |rE|^2 / (2 eta0)
  Eigen::VectorXd directivity;                 // linear, 4 pi U / P
  Eigen::VectorXd axial_ratio_db;
  Eigen::VectorXd tilt_deg;
  std::vector<std::int8_t> sense;
  Eigen::MatrixXd resistance_ohm;              // (N, N)
  Eigen::VectorXd active_resistance_ohm;       // (N)
  double radiated_power_w = 0;
  ComputeSummary summary;
};

// Throws InvalidArgument for an invalid array or grid, or when the currents
// radiate no power (directivity undefined).
PatternResult ComputePattern(const Array& array, const AngularGrid& grid,
                             const PatternOptions& options = {});

}  // namespace lobecast
