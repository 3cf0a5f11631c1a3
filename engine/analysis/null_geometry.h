// Geometry of null loci (engine/analysis/nulls.cpp): the axes a cone of nulls is
// tried about, points on a cone, and the theta/phi extent of a set of directions.
// Pure geometry, no field evaluations.
#pragma once

#include <utility>
#include <vector>

#include "engine/analysis/analysis_types.h"
#include "engine/types.h"

namespace lobecast {

// Candidate cone axes: x, y, z and the principal axes of the sources' positions (with
// their images over a ground), one of each +-pair, the largest component positive.
std::vector<Vec3> CandidateAxes(const Array& array);

// Two orthonormal vectors perpendicular to the unit vector a.
std::pair<Vec3, Vec3> PerpendicularPair(const Vec3& a);

// The direction at half-angle alpha from the axis a and angle psi about it, measured
// from uv.first toward uv.second (uv = PerpendicularPair(a)).
Vec3 OnCone(const Vec3& a, const std::pair<Vec3, Vec3>& uv, double alpha, double psi);

// Extent of a set of directions into l: theta range and the smallest phi arc holding
// the phis (directions on a pole have no phi; phi_min > phi_max when the arc wraps).
void SetExtent(const std::vector<Vec3>& dirs, NullLocus* l);

// The groups of directions linked by chains of steps shorter than link_rad (< pi): the
// connected components of "AngleBetween(a, b) < link_rad". Returns each direction's
// group, numbered in the order of their first members (the numbering a pairwise scan
// from the first direction gives). O(n) for directions spread over the sphere: they
// are binned into cubes of the link's chord, and only neighbouring cubes compared.
std::vector<int> GroupByProximity(const std::vector<Vec3>& dirs, double link_rad, int* groups);

}  // namespace lobecast
