// The circuit of a coupled array as text for people: per-element port, current,
// input impedance, reflection and VSWR; the power budget, efficiency and realized
// gain at the peak (engine/coupling/coupling.h, io/hdf5/coupling_writer.h).
#pragma once

#include <string>
#include <vector>

#include "engine/coupling/coupling.h"

namespace lobecast::text {

// peak_directivity: linear, at the pattern's peak; 0 leaves out the gain line.
std::string DescribeCoupling(const CouplingResult& coupling, const std::vector<Port>& ports,
                             double peak_directivity);

}  // namespace lobecast::text
