// A free-space link between two antennas in each other's far field: the Friis
// transmission equation with the polarization loss factor (C. A. Balanis, Antenna
// Theory: Analysis and Design, 4th ed., 2016, sec. 2.17, the Friis transmission
// equation, and sec. 2.12.2, polarization loss factor; section numbers from memory):
//
//   P_r = P_t G_t G_r PLF (lambda / (4 pi R))^2,    EIRP = P_t G_t,
//   free-space path loss L = (4 pi R / lambda)^2 (isotropic antennas, matched).
//
// Which power P_t is and which gain G goes with it is the caller's to say: power
// radiated with directivity, accepted with gain (efficiency), available from the
// source with realized gain (mismatch too). P_t G_t is the same EIRP each way.
#pragma once

#include "engine/types.h"

namespace lobecast {

// (4 pi R / lambda)^2, linear (>= 1 in the far field). Throws InvalidArgument for a
// distance or wavelength that is not finite and > 0.
double FreeSpacePathLoss(double distance_m, double wavelength_m);

struct LinkInputs {
  double power_w = 0;                   // the transmitter's P_t (> 0)
  double tx_gain = 0;                   // linear, toward the receiver (>= 0)
  double rx_gain = 0;                   // linear, toward the transmitter (>= 0)
  double polarization_loss_factor = 1;  // [0, 1]
  double distance_m = 0;                // > 0
  double wavelength_m = 0;              // > 0
};

struct LinkBudget {
  double eirp_w = 0;      // P_t G_t
  double path_loss = 0;   // (4 pi R / lambda)^2, linear
  double received_w = 0;  // EIRP G_r PLF / L
};

// Throws InvalidArgument naming the input that is out of range. A PLF that is NaN
// (a polarization undefined because a field is zero) gives a NaN received power,
// except where a gain is 0 (that zero field): then nothing is received, exactly 0.
LinkBudget Friis(const LinkInputs& in);

// Polarization loss factor between a wave and a receiving antenna, both given as
// Cartesian complex vectors in one common frame, transverse to the direction of
// travel r_hat (transmitter -> receiver):
//
//   incident_v:  the transmitter's far field rE toward the receiver (along +r_hat);
//   rx_transmit_v: the receiving antenna's own far field rE when it transmits, in
//                  its direction toward the transmitter (along -r_hat).
//
//   PLF = |e_w . h_r|^2 / (|e_w|^2 |h_r|^2)     (a plain dot product, no conjugate)
//
// Why no conjugate: by reciprocity the open-circuit voltage of a receiving antenna is
// V = h . E_inc with h its vector effective length, proportional to its own transmit
// far field toward the source (Balanis sec. 2.15, eq. for V_oc = l_e . E_i; from
// memory). Equivalently, the antenna's receiving polarization (IEEE Std 145-2013:
// the polarization of the incident plane wave that delivers the most power) is
// p_r = conj(h_r) / |h_r|, and PLF = |e_w . conj(p_r)|^2 = |<e_w, p_r>|^2, 1 for a
// wave of that polarization and 0 for the orthogonal one.
// Hand reversal: h_r travels along -r_hat. An antenna radiating RHCP toward -r_hat
// (rotating counter-clockwise about -r_hat) has h_r ~ (a - j b) with (a, b, -r_hat)
// right-handed; the wave arriving along +r_hat with the same sense about +r_hat is
// e_w ~ (b - j a) up to phase (the frame (b, a, +r_hat) is right-handed), and
// e_w . h_r = (b - j a) . (a - j b) = -j - j = -2j: matched. Two identical antennas of
// one hand facing each other are therefore matched, the same hand about their own
// directions of travel; a turnstile and its untouched copy placed on its beam axis
// are not (the copy radiates the opposite hand backward), one turned 180 deg about a
// transverse axis is.
//
// floor_v for each field: the numerical floor of the sum that made it
// (engine/rounding_floor.h). When a field is below its floor the PLF is NaN
// (undefined); when |e_w . h_r| is within the rounding the floors allow
// (|e_w| floor_h + |h_r| floor_w), the PLF is exactly 0.
double PolarizationLossFactor(const Eigen::Vector3cd& incident_v, double incident_floor_v,
                              const Eigen::Vector3cd& rx_transmit_v, double rx_floor_v);

// PLF against a receiver named by the wave polarization it is matched to (co), given
// the incident wave's co and cross parts for that reference (engine/polarization.h,
// CoCrossOf): |co|^2 / (|co|^2 + |cross|^2), NaN for a zero field. Every reference of
// CoCrossOf is a unitary change of basis, so the denominator is |E|^2.
double PolarizationLossFactor(Complex co_v, Complex cross_v);

}  // namespace lobecast
