// The scan impedance of `lobecast scan -o FILE.h5` (engine/coupling/scan.h), one
// HDF5 file readable by h5py (complex as {r, i}), written under a temporary name
// and renamed into place when complete:
//
//   /                  format = "lobecast.scan", format_version = 1, software_version,
//                      time_convention = "exp(+jwt)", created, input (array text)
//   /scan              attributes frequency_hz, name, reference (what Gamma is
//                      measured against)
//     theta_deg (S) deg, phi_deg (S) deg: the scan directions
//     active_impedance_ohm (S, N) complex ohm, reflection (S, N) complex 1
//     accepted_w (S) W: 1/2 I^H Re(Z) I for the steered currents
#pragma once

#include <string>

#include "engine/coupling/scan.h"

namespace lobecast {

inline constexpr std::string_view kScanFormat = "lobecast.scan";

struct ScanFileInfo {
  double frequency_hz = 0;
  std::string name;
  std::string reference;   // e.g. "50 ohm (reference_impedance)"
  std::string input_text;  // the array description
};

// Throws IoError naming the path; an existing file is replaced only on success.
void WriteScanFile(const std::string& path, const ScanImpedanceTable& table,
                   const ScanFileInfo& info);

}  // namespace lobecast
