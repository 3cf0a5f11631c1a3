// Pattern synthesis to a side-lobe envelope by linear programming.
//
// Given side-lobe sample directions (outside the main beam) with mask levels m_i
// (dB re the beam), find the currents that minimize t subject to
//
//   |E(r_i)| <= 10^(m_i / 20) t   at every sample (total field, both components),
//   p^H E(beam) = 1               (the beam's field in its polarization fixed),
//   E(null_j) = 0                 (optional nulls, both components),
//
// a convex (second-order cone) problem. It is solved as a linear program in which
// each |E(r_i)| <= 10^(m_i / 20) t is replaced by tangent planes of the cone,
// Re(conj(u_theta) E_theta + conj(u_phi) E_phi) <= 10^(m_i / 20) t for unit complex
// 2-vectors u (valid for every u by Cauchy-Schwarz, tight at E parallel to u). Each
// sample starts with 4 planes per component (u along one component, phases 0, 90,
// 180, 270 deg: a square around the disc) and gains the plane at its own E/|E|
// wherever the solution leaves its bound (Kelley's cutting planes, J. SIAM 8, 1960,
// from memory), the LP re-solved warm, until every sample's exact |E| is within
// max_approximation_db of its bound. The planes lie outside the cone, so the LP's
// t is a lower bound of the exact optimum and the currents' exact level an upper
// one; they differ by at most max_approximation_db. With all m_i = 0 the result
// minimizes the highest side lobe; with a mask, margin_db < 0 means the mask is met.
// No column per sample: the LP has 2N + 1 columns whatever the number of samples
// (an earlier form with bounds per component took 8.5 s for 10 tilted dipoles,
// this one 0.8 s; measured 2026-12-03).
// The LP is solved by Clp (COIN-OR, Debian's coinor-libclp-dev), dual simplex.
#pragma once

#include <vector>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/synthesis/field_map.h"
#include "engine/types.h"

namespace lobecast {

struct EnvelopeProblem {
  Direction beam;
  PolarizationVector polarization;  // of the beam's fixed field
  Directions samples;               // side-lobe directions, outside the main beam
  std::vector<double> mask_db;      // per sample, dB re the beam; empty: all 0
  Directions nulls;                 // optional
  // Largest error of the polygonal |.| (dB), > 0; sets the number of polygon sides.
  double max_approximation_db = 0.01;
  int num_threads = 0;
};

struct EnvelopeResult {
  // Scaled so that max |I_n| = 1 A, p^H E at the beam real and > 0.
  Eigen::VectorXcd currents_a;
  // Exact max over the samples of |E_i| / (10^(m_i/20) |p^H E(beam)|), dB: the
  // highest side lobe re the beam (no mask), or the margin to the mask (< 0: met).
  double margin_db = 0;
  // The LP's t, dB: a lower bound of the optimum (margin_db - lp_bound_db <=
  // approximation_db <= max_approximation_db).
  double lp_bound_db = 0;
  double approximation_db = 0;  // max over samples of exact |E| over its LP bound, dB
  int rounds = 0;               // LP solves (cutting-plane rounds)
  int lp_rows = 0, lp_columns = 0;
  // Per null: |E| re the beam's p^H E, dB (-inf below the numerical floor).
  std::vector<double> null_depth_db;
};

// Throws InvalidArgument for an invalid array, no samples, a mask of the wrong
// length or with non-finite levels, a beam where the polarization gets no field,
// nulls that leave no solution, or an LP the solver reports infeasible.
EnvelopeResult SynthesizeEnvelope(const Array& array, const EnvelopeProblem& problem);

// The directions of `candidates` farther than half_angle_rad from `beam`: a helper to
// take the main beam out of a sampling grid.
Directions DirectionsOutside(const Directions& candidates, const Direction& beam,
                             double half_angle_rad);

}  // namespace lobecast
