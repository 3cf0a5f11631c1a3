// Polarization map: two panels over the grid in the chosen projection.
//  left   axial ratio, dB (IEEE Std 145-2013; 0 dB circular), on the lobecast
//         ramp with circular light and "near linear" (>= axial_ratio_max_db) dark;
//  right  sense: right-hand, left-hand, or near linear (AR >= the same limit).
// Both show the AR = 3 dB contour (a black line). Where the field is more than floor_db below
// the directivity peak the polarization means little; those directions are left
// white ("weak field").
#pragma once

#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"
#include "io/plot/map.h"
#include "io/plot/options.h"

namespace lobecast::plot {

// panels[0] axial ratio, panels[1] sense; bar: the axial-ratio scale
// (value_top = 0 dB at the light end).
MapGeometry DrawPolarizationMap(const Canvas& c, const StoredResult& r, const PlotOptions& o);

}  // namespace lobecast::plot
