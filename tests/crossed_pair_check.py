#!/usr/bin/env python3
"""Outside check of crossed pairs (design files, [element] crossed_pair) with numpy and h5py.

For rhcp and lhcp, in free space and over PEC ground, unsteered and steered to
(theta, phi) = (25, 40) deg, a 4 x 3 panel of crossed x and y short dipoles is
written as a design file and computed with `lobecast compute`. Independently, numpy
builds the same array by hand: positions centred on the lattice, the x dipole's current
exp(-j k r_hat0 . r_n) (CONVENTIONS §3, design files) and the y dipole's a quarter
period behind it (rhcp toward +z) or ahead (lhcp), the far field
rE = (j w mu0 / 4 pi) sum I Le r x (r x u) exp(j k r . r_n) (CONVENTIONS §1) with the
PEC images (horizontal currents reversed at (x, y, -z)). Checked:
  * lobecast's /field/rE_theta and rE_phi at the beam direction against numpy's
    (1e-10 of |rE|);
  * the sense from the real field vector's rotation, not from any formula of
    lobecast's: E(t) = Re(E exp(j w t)); (E(0) x E(T/4)) . r_hat > 0 is a rotation
    counter-clockwise about the propagation direction, right-hand in IEEE Std
    145-2013 (with exp(+jwt)); this sign is that of the Stokes parameter
    V = |E_R|^2 - |E_L|^2 (CONVENTIONS §2); it must be the asked hand at the beam
    and equal lobecast's /polarization/sense there;
  * the axial ratio from the singular values of [Re E, Im E] (the ellipse's
    semi-axes) against lobecast's /polarization/axial_ratio_db (1e-6 dB), and below
    1e-6 dB at broadside for the unsteered panels;
  * in free space the mirror direction below the panel has the other hand; over
    ground the sense above the plane is that of free space (the images of a
    horizontal pair reverse both currents alike).
Exit status 0 when every check passes; failures print both values.
"""
import os
import subprocess
import sys

import h5py
import numpy as np

from check_common import arguments, check, summary

C0 = 299792458.0
MU0 = 1.25663706212e-6
F = 2.0e9
NX, NY, D = 4, 3, 0.5  # sites, spacing in wavelengths
LENGTH = 0.05  # wavelengths
HEIGHT = 0.25  # wavelengths over PEC
STEER = (25.0, 40.0)


def design(sense, ground, steer):
    centre = f"center = [0, 0, {HEIGHT}]" if ground == "pec" else ""
    stop = 90 if ground == "pec" else 180
    steer_table = f"[steer]\ntheta = {steer[0]}\nphi = {steer[1]}\n" if steer else ""
    return f"""frequency = {F}
ground = "{ground}"
length_unit = "wavelength"
[grid]
theta = {{ start = 0, stop = {stop}, step = 5 }}
phi = {{ start = 0, stop = 355, step = 5 }}
[element]
orientation = [1, 0, 0]
length = {LENGTH}
crossed_pair = "{sense}"
[lattice]
kind = "rectangular"
count = [{NX}, {NY}]
spacing = {D}
{centre}
{steer_table}"""


def unit(theta_deg, phi_deg):
    t, p = np.radians(theta_deg), np.radians(phi_deg)
    return (np.array([np.sin(t) * np.cos(p), np.sin(t) * np.sin(p), np.cos(t)]),
            np.array([np.cos(t) * np.cos(p), np.cos(t) * np.sin(p), -np.sin(t)]),
            np.array([-np.sin(p), np.cos(p), 0.0]))


def hand_field(sense, ground, steer, theta_deg, phi_deg):
    """(E_theta, E_phi) of the panel by hand."""
    lam = C0 / F
    k = 2 * np.pi / lam
    z = HEIGHT * lam if ground == "pec" else 0.0
    r0 = unit(*steer)[0] if steer else np.array([0.0, 0.0, 1.0])
    quarter = -1j if sense == "rhcp" else 1j  # y behind x (rhcp toward +z) or ahead
    sources = []  # (position, direction, current)
    for j in range(NY):
        for i in range(NX):
            pos = np.array([(i - (NX - 1) / 2) * D * lam, (j - (NY - 1) / 2) * D * lam, z])
            a = np.exp(-1j * k * r0.dot(pos)) if steer else 1.0
            for u, c in ((np.array([1.0, 0, 0]), a), (np.array([0, 1.0, 0]), a * quarter)):
                sources.append((pos, u, c))
                if ground == "pec":
                    img = np.array([pos[0], pos[1], -pos[2]])
                    sources.append((img, np.array([-u[0], -u[1], u[2]]), c))
    r, th, ph = unit(theta_deg, phi_deg)
    w = 2 * np.pi * F
    e = np.zeros(3, complex)
    for pos, u, c in sources:
        e += c * LENGTH * lam * np.cross(r, np.cross(r, u)) * np.exp(1j * k * r.dot(pos))
    e *= 1j * w * MU0 / (4 * np.pi)
    return e.dot(th), e.dot(ph), r, th, ph


def sense_and_ar(et, ep, r, th, ph):
    """Sense from the rotation of the real field vector; AR from the ellipse's axes."""
    e = et * th + ep * ph
    e0, e1 = e.real, (1j * e).real  # E(t) at w t = 0 and pi/2
    turn = np.cross(e0, e1).dot(r)
    s = np.linalg.svd(np.stack([e.real, e.imag], axis=1), compute_uv=False)
    ar_db = 20 * np.log10(s[0] / s[1]) if s[1] > 0 else np.inf
    return int(np.sign(turn)), ar_db


def main():
    a = arguments()
    for sense in ("rhcp", "lhcp"):
        hand = 1 if sense == "rhcp" else -1
        for ground in ("none", "pec"):
            for steer in (None, STEER):
                name = f"crossed-{sense}-{ground}-{'steered' if steer else 'broadside'}"
                path = os.path.join(a.workdir, name + ".toml")
                out = os.path.join(a.workdir, name + ".h5")
                with open(path, "w") as f:
                    f.write(design(sense, ground, steer))
                if os.path.exists(out):
                    os.remove(out)
                subprocess.run([a.lobecast, "compute", path, "-o", out, "-q"], check=True)
                with h5py.File(out, "r") as h:
                    tg = h["/grid/theta_deg"][()]
                    pg = h["/grid/phi_deg"][()]
                    et_all = h["/field/rE_theta"][()]
                    ep_all = h["/field/rE_phi"][()]
                    ar_all = h["/polarization/axial_ratio_db"][()]
                    sense_all = h["/polarization/sense"][()]

                def at(theta, phi):
                    i = int(np.argmin(abs(tg - theta)))
                    j = int(np.argmin(abs(pg - phi)))
                    return et_all[i, j], ep_all[i, j], ar_all[i, j], int(sense_all[i, j])

                beam = steer if steer else (0.0, 0.0)
                et, ep, r, th, ph = hand_field(sense, ground, steer, *beam)
                let, lep, lar, lsense = at(*beam)
                scale = np.hypot(abs(et), abs(ep))
                err = max(abs(let - et), abs(lep - ep)) / scale
                check(err < 1e-10, f"{name}: field at the beam re numpy: relative error {err:.3g}")
                s, ar = sense_and_ar(et, ep, r, th, ph)
                check(s == hand, f"{name}: rotation sense at the beam {s}, asked {hand}")
                check(lsense == s, f"{name}: lobecast sense {lsense}, numpy {s}")
                check(abs(lar - ar) < 1e-6,
                      f"{name}: axial ratio lobecast {lar:.9g} dB, numpy {ar:.9g} dB")
                if not steer:
                    check(ar < 1e-6 and lar < 1e-6,
                          f"{name}: broadside axial ratio {lar:.3g} dB (numpy {ar:.3g}), expected 0")
                else:
                    # At a steered beam the pair is elliptical; 1 / cos theta in its
                    # principal planes, between 1 and that off them.
                    check(0 < ar < -20 * np.log10(np.cos(np.radians(beam[0]))) + 1e-9,
                          f"{name}: steered axial ratio {ar:.4g} dB")
                if ground == "none":
                    mirror = (180.0 - beam[0], beam[1])
                    et, ep, r, th, ph = hand_field(sense, ground, steer, *mirror)
                    s, _ = sense_and_ar(et, ep, r, th, ph)
                    check(s == -hand, f"{name}: sense below the panel {s}, expected {-hand}")
                    check(at(*mirror)[3] == s,
                          f"{name}: lobecast sense below the panel {at(*mirror)[3]}, numpy {s}")
    return summary("crossed_pair_check")


if __name__ == "__main__":
    sys.exit(main())
