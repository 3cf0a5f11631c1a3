#!/usr/bin/env python3
"""Outside check of the numerical floor (CONVENTIONS §1) in every output.

Every sample array and a few arrays of our own (a turnstile on its axis, a uniform
line, a ring of z dipoles, a horizontal dipole 1e-7 wavelength over PEC, an
anti-phase pair 1e-6 wavelength apart) go through `lobecast check`, `compute`,
`report`, `report --json`, `export` and `plot`; then, independently of the C++ code
(h5py, Python's json and csv modules):

  * the floor is computed again from /array: F = 1e-13 (w mu0 / 4 pi) sum |I Le|,
    images counted; the floor directivity D_F = 4 pi F^2 / (2 eta0 P);
  * no finite dB value anywhere lies beyond it: a directivity (dBi) is >= D_F in dBi;
    a level re the peak >= D_F / D_peak; a ratio (XPD, F/B, axial ratio) within
    (D_peak / D_F) * 4 of 0 dB (the axial ratio of a field whose hands differ by F is
    (|E_R| + |E_L|) / F <= 2 |E| / F). Checked in the report text (every number
    followed by dB or dBi), the JSON (every key ending in _db / _dbi, at any depth),
    the CSV export (the dBi and dB columns), the HDF5 analysis and /polarization;
  * the JSON keeps the sign of infinities: "inf" and "-inf" strings read back as
    float('inf') and float('-inf'); undefined is null;
  * the tilt in /polarization/tilt_deg is NaN wherever AR is exactly 0 dB (circular),
    and in (-90, 90] elsewhere; on the turnstile's axis the field is circular for
    every phi of the grid;
  * a horizontal dipole 1e-7 lambda over PEC has D = 7.5 toward the zenith to 9
    digits (image theory, Balanis, Antenna Theory, 4th ed., sec. 4.7, from memory;
    the limit is derived in tests/rounding_floor_test.cpp);
  * the digits-lost caution appears (check, compute, report, JSON, HDF5 attribute
    /summary power_significant_digits < 9) for the anti-phase pair and for none of
    the samples;
  * a peak on the z axis has no phi: null in the JSON, "phi undefined" in the text.
Exit status 0 when every check passes; failures print both values.
"""
import csv
import glob
import io
import json
import math
import os
import re
import subprocess
import sys

import h5py
import numpy as np

from check_common import arguments, check, summary

C0 = 299792458.0
MU0 = 1.25663706212e-6  # CODATA 2018
ETA0 = MU0 * C0
MARGIN_DB = 0.01  # printed values carry two decimals



def run(exe, args, expect=0):
    p = subprocess.run([exe] + args, capture_output=True, text=True)
    check(p.returncode == expect, f"lobecast {' '.join(args)}: exit {p.returncode}, "
          f"expected {expect}; stderr {p.stderr[-400:]}")
    return p.stdout + p.stderr


def toml(frequency, ground, theta_stop, step, dipoles):
    """An array description: dipoles as (position m, orientation, phase deg), 1 cm, 1 A."""
    out = (f"frequency = {frequency}\nground = \"{ground}\"\n[grid]\n"
           f"theta = {{ start = 0, stop = {theta_stop}, step = {step} }}\n"
           f"phi = {{ start = 0, stop = 360, step = {step} }}\n")
    for pos, u, phase in dipoles:
        out += (f"[[dipole]]\nposition = [{pos[0]:.17g}, {pos[1]:.17g}, {pos[2]:.17g}]\n"
                f"orientation = [{u[0]}, {u[1]}, {u[2]}]\nlength = 0.01\n"
                f"current = {{ magnitude = 1.0, phase = {phase} }}\n")
    return out


Z = (0, 0, 1)
OWN = {
    "own-turnstile-axis": toml(300e6, "none", 180, 3, [((0, 0, 0), (1, 0, 0), 0),
                                                       ((0, 0, 0), (0, 1, 0), -90)]),
    "own-uniform-line": toml(300e6, "none", 180, 2, [((0, 0, 0.5 * n), Z, 0) for n in range(6)]),
    "own-z-ring": toml(300e6, "none", 180, 2,
                       [((math.cos(2 * math.pi * n / 8), math.sin(2 * math.pi * n / 8), 0), Z, 0)
                        for n in range(8)]),
    # One wavelength = 1 m at this frequency: 1e-7 lambda up, 1e-6 lambda apart.
    "own-low-horizontal": toml(299792458, "pec", 90, 5, [((0, 0, 1e-7), (1, 0, 0), 0)]),
    "own-antiphase-pair": toml(299792458, "none", 180, 5, [((0, 0, 0), Z, 0),
                                                           ((1e-6, 0, 0), Z, 180)]),
}


def floor_of(h5):
    with h5py.File(h5, "r") as f:
        freq = f["/array"].attrs["frequency_hz"]
        g = f["/array"].attrs["ground"]
        ground = g.decode() if isinstance(g, bytes) else g
        s = float(np.sum(np.abs(f["/array/current"][...]) * f["/array/effective_length"][...]))
        if ground == "pec":
            s *= 2
        floor_v = 1e-13 * 2 * math.pi * freq * MU0 / (4 * math.pi) * s
        p = float(f["/power/radiated_w"][()])
        d = f["/pattern/directivity"][...]
    d_floor = 4 * math.pi * floor_v ** 2 / (2 * ETA0 * p)
    return 10 * math.log10(d_floor), 10 * math.log10(float(np.max(d)))


class Bounds:
    def __init__(self, name, floor_dbi, peak_dbi):
        self.name, self.floor_dbi, self.peak_dbi = name, floor_dbi, peak_dbi
        self.ratio = peak_dbi - floor_dbi + 10 * math.log10(4) + MARGIN_DB

    def dbi(self, v, where):
        if math.isfinite(v):
            check(v >= self.floor_dbi - MARGIN_DB,
                  f"{self.name}: {where} = {v} dBi is below the floor {self.floor_dbi:.2f} dBi")

    def db(self, v, where):
        # A level re the peak or a ratio: within the span the floor allows.
        if math.isfinite(v):
            check(abs(v) <= self.ratio,
                  f"{self.name}: {where} = {v} dB is beyond the floor's span {self.ratio:.2f} dB")


def scan_json(b, node, path=""):
    if isinstance(node, dict):
        for k, v in node.items():
            scan_json(b, v, f"{path}.{k}")
            if isinstance(v, str) and (k.endswith("_db") or k.endswith("_dbi")):
                check(v in ("inf", "-inf"), f"{b.name}: JSON {path}.{k} is the string {v!r}")
            if isinstance(v, (int, float)) and not isinstance(v, bool):
                if k.endswith("_dbi"):
                    b.dbi(float(v), f"JSON {path}.{k}")
                elif k.endswith("_db"):
                    b.db(float(v), f"JSON {path}.{k}")
    elif isinstance(node, list):
        for i, v in enumerate(node):
            scan_json(b, v, f"{path}[{i}]")


def check_loci_and_planes(b, d):
    """The null loci, their plane crossings and the principal planes in the JSON: a
    depth is exact exactly when the null field is below the floor, written as
    directivity 0 and level "-inf"; any other depth is a finite level above the floor
    (scan_json bounds it); the elevation plane of an off-axis peak is the peak's phi."""
    for key in ("null_loci", "null_crossings"):
        check(isinstance(d.get(key), list), f"{b.name}: JSON has no {key} list")
        for i, n in enumerate(d.get(key) or []):
            where = f"{b.name}: JSON {key}[{i}]"
            if n["exact"]:
                check(n["directivity"] == 0 and n["level_db"] == "-inf",
                      f"{where} exact with directivity {n['directivity']}, level {n['level_db']}")
            else:
                check(isinstance(n["level_db"], (int, float)) and n["directivity"] > 0,
                      f"{where} not exact with level {n['level_db']!r}")
    pk = d["peak"]["direction"]
    for key in ("elevation_plane", "orthogonal_plane"):
        check(key in d, f"{b.name}: JSON has no {key}")
    ep = d.get("elevation_plane", {})
    if ep.get("plane") == "elevation":
        check(ep["plane_phi_deg"] == pk["phi_deg"],
              f"{b.name}: elevation plane phi {ep['plane_phi_deg']} is not the peak's "
              f"{pk['phi_deg']}")


def infinities(node, out):
    if isinstance(node, dict):
        for v in node.values():
            infinities(v, out)
    elif isinstance(node, list):
        for v in node:
            infinities(v, out)
    elif isinstance(node, str) and node in ("inf", "-inf"):
        out.append(float(node))


NUMBER_DB = re.compile(r"(-?\d+\.\d+|-?inf)\s*(dBi|dB)\b")


def scan_text(b, text, what):
    for m in NUMBER_DB.finditer(text):
        if m.group(1).endswith("inf"):
            continue
        v = float(m.group(1))
        (b.dbi if m.group(2) == "dBi" else b.db)(v, f"{what} '{m.group(0)}'")


def scan_h5(b, h5):
    with h5py.File(h5, "r") as f:
        ar = f["/polarization/axial_ratio_db"][...]
        tilt = f["/polarization/tilt_deg"][...]
        for v in ar[np.isfinite(ar)].ravel()[::max(1, ar.size // 20000)]:
            b.db(float(v), "/polarization/axial_ratio_db")
        finite_ar = ar[np.isfinite(ar)]
        if finite_ar.size:
            b.db(float(np.max(finite_ar)), "/polarization/axial_ratio_db max")
        circ = ar == 0.0
        check(bool(np.all(np.isnan(tilt[circ]))), f"{b.name}: a circular field has a tilt")
        t = tilt[np.isfinite(tilt)]
        check(bool(np.all((t > -90.0) & (t <= 90.0))), f"{b.name}: a tilt outside (-90, 90]")
        d = f["/pattern/directivity"][...]
        pos = d[d > 0]
        if pos.size:
            b.dbi(10 * math.log10(float(np.min(pos))), "/pattern/directivity min")

        def visit(name, obj):
            keys = list(obj.attrs.keys())
            for k in keys:
                if k.endswith("_dbi") or k.endswith("_db"):
                    v = obj.attrs[k]
                    if np.ndim(v) == 0 and np.issubdtype(np.asarray(v).dtype, np.floating):
                        (b.dbi if k.endswith("_dbi") else b.db)(float(v), f"HDF5 {name}@{k}")
            if isinstance(obj, h5py.Dataset) and obj.dtype.names:
                for col in obj.dtype.names:
                    if col.endswith("_dbi") or col.endswith("_db"):
                        for v in obj[col].ravel():
                            (b.dbi if col.endswith("_dbi") else b.db)(float(v),
                                                                        f"HDF5 {name}[{col}]")
            elif isinstance(obj, h5py.Dataset) and (name.endswith("_db") or name.endswith("_dbi")):
                for v in np.asarray(obj[...]).ravel():
                    (b.dbi if name.endswith("_dbi") else b.db)(float(v), f"HDF5 {name}")

        if "/summary/analysis" in f:
            g = f["/summary/analysis"]
            visit("/summary/analysis", g)
            g.visititems(visit)
        digits = f["/summary"].attrs.get("power_significant_digits")
    return digits


def scan_csv(b, text, what):
    rows = [l for l in text.splitlines() if l and not l.startswith("#")]
    table = list(csv.reader(io.StringIO("\n".join(rows))))
    header = table[0]
    for row in table[1:]:
        for name, cell in zip(header, row):
            low = name.lower()
            if cell == "":
                continue  # an undefined number (README: an empty cell)
            if "dbi" in low:
                b.dbi(float(cell), f"{what} {name}")
            elif low.endswith("_db") or "(db)" in low:
                b.db(float(cell), f"{what} {name}")


def main():
    a = arguments()
    inputs = sorted(p for p in glob.glob(os.path.join(a.samples, "*.toml"))
                   if not os.path.basename(p).startswith("requirements-"))  # not arrays
    for name, text in OWN.items():
        path = os.path.join(a.workdir, name + ".toml")
        with open(path, "w") as f:
            f.write(text)
        inputs.append(path)

    # The design samples (a [lattice] table: dipoles generated) go through every output too.
    designs = [p for p in inputs if os.path.basename(p).startswith("design-")]
    check(len(designs) >= 4, f"expected the design samples among the inputs, found {designs}")
    for src in inputs:
        name = os.path.splitext(os.path.basename(src))[0]
        h5 = os.path.join(a.workdir, name + ".h5")
        if os.path.exists(h5):
            os.remove(h5)
        checked = run(a.lobecast, ["check", src])
        computed = run(a.lobecast, ["compute", src, "-o", h5])
        floor_dbi, peak_dbi = floor_of(h5)
        b = Bounds(name, floor_dbi, peak_dbi)
        scan_text(b, computed, "compute text")
        report = run(a.lobecast, ["report", h5])
        scan_text(b, report, "report text")
        jtext = run(a.lobecast, ["report", "--json", h5, "--toward", "0,0", "--toward",
                                 "180,0", "--toward", "90,45"])
        d = json.loads(jtext[:jtext.rindex("}") + 1])
        scan_json(b, d)
        check_loci_and_planes(b, d)
        # Round trip: every "inf"/"-inf" string is an infinity with its sign.
        infs = []
        infinities(d, infs)
        check(all(math.isinf(v) for v in infs), f"{name}: JSON infinities do not read back")
        for ref in ("x", "y", "rhcp", "lhcp"):
            exported = run(a.lobecast, ["export", h5, "--reference", ref])
            scan_csv(b, exported, f"export --reference {ref}")
        exported = run(a.lobecast, ["export", h5, "--cut", "great-circle:0,0,0", "--step", "7.5"])
        scan_csv(b, exported, "export great circle")
        for kind in ("polar", "map"):
            png = os.path.join(a.workdir, f"{name}-{kind}.png")
            run(a.lobecast, ["plot", h5, "--kind", kind, "-o", png])
        digits = scan_h5(b, h5)

        lossy = name == "own-antiphase-pair"
        check(digits is not None and (digits < 9) == lossy,
              f"{name}: /summary power_significant_digits {digits}, lossy expected {lossy}")
        for what, text in (("check", checked), ("compute", computed), ("report", report)):
            check(("significant digits" in text) == lossy,
                  f"{name}: {what} caution about the power's digits: expected {lossy}")
        check(bool(d.get("power_caution")) == lossy, f"{name}: JSON power_caution")

        if name == "own-low-horizontal":
            with h5py.File(h5, "r") as f:
                dz = float(f["/pattern/directivity"][0, 0])
            check(abs(dz - 7.5) <= 7.5e-9, f"{name}: D(zenith) = {dz!r}, expected 7.5 to 9 digits")
        if name in ("own-turnstile-axis", "turnstile", "own-low-horizontal"):
            pk = d["peak"]
            check(pk["direction"]["theta_deg"] == 0.0 and pk["direction"]["phi_deg"] is None,
                  f"{name}: peak direction {pk['direction']}, expected theta 0, phi null")
            check("phi undefined" in report, f"{name}: report does not say phi is undefined")
        if name in ("own-turnstile-axis", "turnstile"):
            with h5py.File(h5, "r") as f:
                ar = f["/polarization/axial_ratio_db"][...]
                tilt = f["/polarization/tilt_deg"][...]
            check(bool(np.all(ar[0, :] == 0.0)) and bool(np.all(np.isnan(tilt[0, :]))),
                  f"{name}: on the axis AR {ar[0, :5]}, tilt {tilt[0, :5]}; expected 0 dB, NaN")
            check(d["polarization"]["tilt_at_peak_deg"] is None,
                  f"{name}: JSON tilt at peak {d['polarization']['tilt_at_peak_deg']}")

    return summary("floor check")


if __name__ == "__main__":
    sys.exit(main())
