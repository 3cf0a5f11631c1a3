#!/usr/bin/env python3
"""Outside check of `lobecast synth` with Debian's numpy, scipy and h5py.

Writes design files of lines into the work folder, runs `lobecast synth` and reads
the written array description (tomllib; the CSV table for large arrays) back:
  * Dolph-Chebyshev amplitudes against scipy.signal.windows.chebwin and Taylor
    amplitudes against scipy.signal.windows.taylor (both normalized to a largest
    value of 1), to 1e-9;
  * binomial amplitudes against scipy.special.comb;
  * steering phases against numpy: -k r_hat0 . r_n at the design frequency
    (CONVENTIONS §3, design files), for phase and delay mode alike;
  * every design sample (sample-arrays/design-*.toml): the written array file,
    computed, gives the same /field datasets as the design file itself (h5py; to
    rounding, 1e-12 of the peak |rE|).
Exit status 0 when every check passes; failures print both values.
"""
import os
import subprocess
import sys
import tomllib
import warnings

import h5py
import numpy as np
from scipy.signal.windows import chebwin, taylor
from scipy.special import comb

from check_common import arguments, check, summary

C0 = 299792458.0


def design_text(n, taper, steer=""):
    return f"""frequency = "3 GHz"
length_unit = "wavelength"
[grid]
theta = 90
phi = {{ start = 0, stop = 180, step = 1 }}
[element]
orientation = [0, 0, 1]
length = 0.02
[lattice]
kind = "line"
count = {n}
spacing = 0.5
[taper]
{taper}
{steer}
"""


def synth(lobecast, workdir, name, text):
    path = os.path.join(workdir, name + ".toml")
    out = os.path.join(workdir, name + "-array.toml")
    with open(path, "w") as f:
        f.write(text)
    subprocess.run([lobecast, "synth", path, "-o", out, "-q"], check=True)
    with open(out, "rb") as f:
        arr = tomllib.load(f)
    if "dipoles_csv" in arr:
        with open(os.path.join(workdir, arr["dipoles_csv"])) as f:
            lines = [ln for ln in f if ln.strip() and not ln.startswith("#")]
        head = [h.strip() for h in lines[0].split(",")]
        cols = {h: i for i, h in enumerate(head)}
        rows = [[c.strip() for c in ln.split(",")] for ln in lines[1:]]
        col = lambda h: np.array([float(r[cols[h]]) for r in rows])
        pos = np.stack([col("x"), col("y"), col("z")], axis=1)
        return arr, pos, col("magnitude"), col("phase")
    d = arr["dipole"]
    pos = np.array([x["position"] for x in d], float)
    mag = np.array([x["current"]["magnitude"] for x in d], float)
    ph = np.array([x["current"]["phase"] for x in d], float)
    return arr, pos, mag, ph


def tapers(a):
    for n in (7, 16, 41, 300):  # 300: the CSV table
        for sll in (20.0, 30.0, 50.0):
            _, _, mag, _ = synth(a.lobecast, a.workdir, f"cheb-{n}-{int(sll)}",
                                 design_text(n, f'kind = "chebyshev"\nsidelobe_db = {-sll}'))
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")  # scipy's note about attenuations < 45 dB
                ref = chebwin(n, sll)
            ref = ref / ref.max()
            err = np.max(np.abs(mag - ref))
            check(err < 1e-9, f"chebyshev N={n} {-sll} dB vs scipy chebwin: max diff {err:.2e}")
        for nbar, sll in ((4, 30.0), (6, 40.0), (2, 25.0)):
            _, _, mag, _ = synth(a.lobecast, a.workdir, f"taylor-{n}-{nbar}",
                                 design_text(n, f'kind = "taylor"\nsidelobe_db = {-sll}\nnbar = {nbar}'))
            ref = taylor(n, nbar=nbar, sll=sll, norm=False)
            ref = ref / ref.max()
            err = np.max(np.abs(mag - ref))
            check(err < 1e-9, f"taylor N={n} nbar={nbar} {-sll} dB vs scipy taylor: max diff {err:.2e}")
    _, _, mag, _ = synth(a.lobecast, a.workdir, "binomial-12", design_text(12, 'kind = "binomial"'))
    ref = comb(11, np.arange(12))
    check(np.max(np.abs(mag - ref / ref.max())) < 1e-12, "binomial N=12 vs scipy.special.comb")


def steering(a):
    for mode in ("phase", "delay"):
        arr, pos, _, ph = synth(a.lobecast, a.workdir, f"steer-{mode}",
                                design_text(9, 'kind = "uniform"',
                                            f'[steer]\ntheta = 90\nphi = 35\nmode = "{mode}"'))
        k = 2 * np.pi * arr["frequency"] / C0
        r0 = np.array([np.cos(np.radians(35)), np.sin(np.radians(35)), 0.0])
        want = -k * pos @ r0
        diff = np.angle(np.exp(1j * np.radians(ph - np.degrees(want))))
        check(np.max(np.abs(diff)) < 1e-9, f"steering phases ({mode}) vs numpy -k r0.r_n: "
              f"max diff {np.max(np.abs(diff)):.2e} rad")


def reproduction(a):
    designs = sorted(f for f in os.listdir(a.samples) if f.startswith("design-") and f.endswith(".toml"))
    check(len(designs) >= 2, f"design samples found: {designs}")
    for f in designs:
        src = os.path.join(a.samples, f)
        stem = os.path.join(a.workdir, "repro-" + f[:-5])
        subprocess.run([a.lobecast, "synth", src, "-o", stem + "-array.toml", "-q"], check=True)
        subprocess.run([a.lobecast, "compute", src, "-o", stem + "-design.h5", "-q"], check=True)
        subprocess.run([a.lobecast, "compute", stem + "-array.toml", "-o", stem + "-array.h5", "-q"],
                       check=True)
        with h5py.File(stem + "-design.h5") as d, h5py.File(stem + "-array.h5") as e:
            for name in ("rE_theta", "rE_phi"):
                x = d["field/" + name][...]
                y = e["field/" + name][...]
                scale = max(np.max(np.abs(x)), 1e-300)
                err = np.max(np.abs(x - y)) / scale
                check(x.shape == y.shape and err <= 1e-12,
                      f"{f}: written array reproduces /field/{name} (max diff {err:.1e} of the peak)")
            same = np.array_equal(d["array/current"][...], e["array/current"][...])
            check(same, f"{f}: /array/current identical")


def main():
    a = arguments()
    tapers(a)
    steering(a)
    reproduction(a)
    return summary("design check")


if __name__ == "__main__":
    sys.exit(main())
