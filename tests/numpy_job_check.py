#!/usr/bin/env python3
"""Outside check of `lobecast compute` against the NumPy script of the whole-job
benchmark (tests/bench/numpy_job.py: numpy matrix products of the phases, the
closed-form power with scipy's spherical Bessel functions, Stokes parameters), on
small random arrays written by tests/bench/make_random_array.py: 64 dipoles in a
3-wavelength cube with random orientations and phases (elliptical fields everywhere)
and 64 in phase on a 4-wavelength square, 5 deg grids.

Checked (both sides double precision, the same formulas summed in a different order):
the field components to 1e-12 of the peak |rE|, P to 1e-12 relative, the directivity
to 1e-11 of the peak, the resistance matrix to 1e-12 of its largest entry, and
where the field is above 1e-6 of the peak and the axial ratio below 40 dB (where it
is well conditioned) the axial ratio to 1e-8 dB, the tilt to 1e-8 deg (mod 180) and
the sense exactly. The NumPy script also serves as the benchmark's comparison point;
the benchmark itself is not a test.
"""
import os
import subprocess
import sys

import h5py
import numpy as np

from check_common import arguments, check, summary

HERE = os.path.dirname(os.path.abspath(__file__))
BENCH = os.path.join(HERE, "bench")


def complex_of(ds):
    v = ds[()]
    if v.dtype.names:
        return v["r"] + 1j * v["i"]
    return v


def main():
    a = arguments()
    for layout, edge in (("cube", 3), ("plane", 4)):
        toml = os.path.join(a.workdir, f"numpy-{layout}.toml")
        subprocess.run([sys.executable, os.path.join(BENCH, "make_random_array.py"), "--count",
                        "64", "--edge", str(edge), "--layout", layout, "--step", "5", "--seed",
                        "7", "-o", toml], check=True)
        ours = os.path.join(a.workdir, f"numpy-{layout}-lobecast.h5")
        theirs = os.path.join(a.workdir, f"numpy-{layout}-numpy.h5")
        subprocess.run([a.lobecast, "compute", toml, "-o", ours, "-q", "--no-analysis",
                        "--resistance-matrix"], check=True)
        subprocess.run([sys.executable, os.path.join(BENCH, "numpy_job.py"), toml, "-o", theirs],
                       check=True, stdout=subprocess.DEVNULL)
        with h5py.File(ours) as f, h5py.File(theirs) as g:
            et, ep = complex_of(f["field/rE_theta"]), complex_of(f["field/rE_phi"])
            nt, np_ = complex_of(g["field/rE_theta"]), complex_of(g["field/rE_phi"])
            peak = np.sqrt(np.max(np.abs(et) ** 2 + np.abs(ep) ** 2))
            for name, x, y in (("E_theta", et, nt), ("E_phi", ep, np_)):
                err = np.max(np.abs(x - y)) / peak
                check(err < 1e-12, f"{layout}: {name} differs by {err:.2e} of the peak")
            p, q = f["power/radiated_w"][()], g["power/radiated_w"][()]
            check(abs(p - q) <= 1e-12 * q, f"{layout}: P {p!r} against numpy {q!r}")
            r, s = f["power/resistance_ohm"][()], g["power/resistance_ohm"][()]
            err = np.max(np.abs(r - s)) / np.max(np.abs(s))
            check(err < 1e-12, f"{layout}: resistance matrix differs by {err:.2e} of its largest")
            d, e = f["pattern/directivity"][()], g["pattern/directivity"][()]
            err = np.max(np.abs(d - e)) / np.max(e)
            check(err < 1e-11, f"{layout}: directivity differs by {err:.2e} of the peak")
            ar, br = f["polarization/axial_ratio_db"][()], g["polarization/axial_ratio_db"][()]
            strong = np.sqrt(np.abs(et) ** 2 + np.abs(ep) ** 2) > 1e-6 * peak
            m = strong & (ar < 40) & (br < 40)
            if layout == "cube":
                check(m.sum() > 100, f"{layout}: {m.sum()} elliptical directions compared")
            if m.any():
                err = np.max(np.abs(ar[m] - br[m]))
                check(err < 1e-8, f"{layout}: axial ratio differs by {err:.2e} dB")
                dt = f["polarization/tilt_deg"][()][m] - g["polarization/tilt_deg"][()][m]
                dt = np.abs((dt + 90) % 180 - 90)
                check(np.max(dt) < 1e-8, f"{layout}: tilt differs by {np.max(dt):.2e} deg")
                sa, sb = f["polarization/sense"][()][m], g["polarization/sense"][()][m]
                check(np.array_equal(sa, sb), f"{layout}: sense differs in "
                      f"{np.count_nonzero(sa != sb)} directions")
    return summary("numpy_job_check")


if __name__ == "__main__":
    sys.exit(main())
