#!/usr/bin/env python3
"""Outside check: the active resistance of every sample array, with numpy and h5py.

For each array description in sample-arrays/ (not designs, which have a [lattice]
table, nor requirements files) `lobecast compute` writes a result; from its /array
(positions, orientations, effective lengths, the terminal currents, solved or
given) this script evaluates CONVENTIONS §1 literally, independently of the C++:

    Z_mn = j w mu0 Le_m Le_n u_m . G(R) . u_n,
    G(R) = exp(-j x) / (4 pi |R|) [ (1 - j/x - 1/x^2) I + (-1 + 3j/x + 3/x^2) R_hat R_hat ]

for m != n (with the image of every dipole over PEC: at (x, y, -z), horizontal
components reversed, the image of m itself included), the self resistance
R_mm = (2 pi / 3) eta0 (Le / lambda)^2 (CONVENTIONS §1; Balanis, Antenna Theory,
4th ed., secs. 4.2-4.3, from memory), and the active resistance
Re Z_act,m = Re(sum_n Z_mn I_n / I_m), NaN where I_m = 0 (the self reactance does
not enter it). Crossed dipoles at one point (a turnstile) have Z_mn = R_mn =
k^2 eta0 Le Le (2/3)(u_m . u_n) / 4 pi = 0. The stored /power/active_resistance_ohm
(and Re /power/active_impedance_ohm where the circuit was solved) must agree to
1e-10 relative to the element's self resistance.
"""
import glob
import os
import subprocess
import sys

import h5py
import numpy as np

from check_common import arguments, check, summary

C0 = 299792458.0  # exact
MU0 = 1.25663706212e-6  # CODATA 2018 (CONVENTIONS §1)
ETA0 = MU0 * C0


def mutual(k, w, pa, ua, la, pb, ub, lb):
    """CONVENTIONS §1's Z_mn of two point dipoles apart, the dyadic form as written."""
    d = pa - pb
    r = np.linalg.norm(d)
    if r == 0:
        # Same point: R_mn = (k^2 eta0 Le Le / 4 pi)(2/3)(u.u); X_mn = 0 only crossed.
        dot = ua @ ub
        return k * k * ETA0 * la * lb / (4 * np.pi) * (2 / 3) * dot + (0 if abs(dot) < 1e-12
                                                                        else 1j * np.nan)
    x = k * r
    rh = d / r
    g = np.exp(-1j * x) / (4 * np.pi * r) * (
        (1 - 1j / x - 1 / x ** 2) * np.eye(3) + (-1 + 3j / x + 3 / x ** 2) * np.outer(rh, rh))
    return 1j * w * MU0 * la * lb * (ua @ g @ ub)


def reference_active_resistance(f):
    freq = f["/array"].attrs["frequency_hz"]
    ground = f["/array"].attrs["ground"]
    ground = ground.decode() if isinstance(ground, bytes) else str(ground)
    k = 2 * np.pi * freq / C0
    w = 2 * np.pi * freq
    lam = C0 / freq
    pos = f["/array/position"][...]
    u = f["/array/orientation"][...]
    le = f["/array/effective_length"][...]
    cur = f["/array/current"][...]
    n = len(cur)
    sources = [(pos[q], u[q], le[q], cur[q]) for q in range(n)]
    images = []
    if ground == "pec":
        flip = np.array([-1.0, -1.0, 1.0])
        images = [(pos[q] * np.array([1, 1, -1]), u[q] * flip, le[q], cur[q]) for q in range(n)]
    out = np.full(n, np.nan)
    self_r = 2 * np.pi / 3 * ETA0 * (le / lam) ** 2
    for m in range(n):
        if cur[m] == 0:
            continue
        v = self_r[m] * cur[m]
        for q, (p, uq, lq, iq) in enumerate(sources):
            if q != m and iq != 0:
                v += mutual(k, w, pos[m], u[m], le[m], p, uq, lq) * iq
        for p, uq, lq, iq in images:
            if iq != 0:
                v += mutual(k, w, pos[m], u[m], le[m], p, uq, lq) * iq
        out[m] = (v / cur[m]).real
    return out, self_r


def is_array(path):
    if os.path.basename(path).startswith("requirements-"):
        return False
    with open(path) as t:
        return not any(line.strip().startswith("[lattice]") for line in t)


def main():
    a = arguments()
    samples = sorted(p for p in glob.glob(os.path.join(a.samples, "*.toml")) if is_array(p))
    check(len(samples) >= 8, f"found {len(samples)} sample arrays, expected at least 8")
    for sample in samples:
        name = os.path.splitext(os.path.basename(sample))[0]
        out = os.path.join(a.workdir, name + ".h5")
        subprocess.run([a.lobecast, "compute", sample, "-o", out, "-q"], check=True)
        with h5py.File(out, "r") as f:
            ref, self_r = reference_active_resistance(f)
            stored = {"/power/active_resistance_ohm": f["/power/active_resistance_ohm"][...]}
            if "/power/active_impedance_ohm" in f:
                stored["Re /power/active_impedance_ohm"] = f["/power/active_impedance_ohm"][...].real
        for what, got in stored.items():
            same_nan = np.array_equal(np.isnan(got), np.isnan(ref))
            ok = np.isfinite(ref)
            err = float(np.max(np.abs(got[ok] - ref[ok]) / self_r[ok])) if ok.any() else 0.0
            check(same_nan and err < 1e-10,
                  f"{name}: {what} vs CONVENTIONS §1 in numpy: rel err {err:.1e} "
                  f"(stored {got}, numpy {ref})")
        print(f"{name}: {len(ref)} elements, active resistance {np.round(ref, 6)} ohm")
        if name == "endfire-pair":
            # The check can tell: with currents in quadrature the share of the radiated
            # power, Re(sum_n R_mn I_n / I_m), is not the active resistance (§1).
            with h5py.File(out, "r") as f:
                cur = f["/array/current"][...]
                r = f["/power/resistance_ohm"][...]
            share = ((r @ cur) / cur).real
            check(float(np.max(np.abs(share - ref) / self_r)) > 1e-3,
                  f"endfire-pair: the power shares {share} differ from the active resistances")
    return summary("active_resistance_check")


if __name__ == "__main__":
    sys.exit(main())
