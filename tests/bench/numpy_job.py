#!/usr/bin/env python3
"""The `lobecast compute` job without the analysis, as a plain vectorized NumPy script:
the comparison point of the whole-job benchmark (tests/bench/run_whole_job.sh) and an
outside check of the field, power, directivity and polarization (numpy_job_check.py).

  numpy_job.py ARRAY.toml -o RESULT.h5 [--chunk DIRECTIONS]

Reads the subset of array descriptions the benchmarks use (CONVENTIONS §3): frequency
(Hz or a string with a unit), ground "none", length_unit (m, cm, mm, wavelength),
[[dipole]] tables with current = {magnitude, phase} and/or dipoles_csv, distribution
uniform or triangular, [grid]. Computes on the grid (theta-major):
  * rE = (j w mu0 / 4 pi) sum_n I_n Le_n [r x (r x u_n)] exp(+j k r . r_n)
    (CONVENTIONS §1), as E_theta = -(j w mu0 / 4 pi) theta_hat . M and likewise
    E_phi, M = sum_n I_n Le_n u_n exp(+j k r . r_n): a (directions x dipoles) matrix of
    phases times the (dipoles x 3) moments, in chunks of directions;
  * P = 1/2 I^H R I with the closed-form mutual radiation resistance (CONVENTIONS §1:
    R_mn = (k^2 eta0 Le_m Le_n / 4 pi) [(u_m . u_n)(j0 - j1/x) + (u_m . d)(u_n . d) j2],
    spherical Bessel functions from scipy.special.spherical_jn);
  * U = |rE|^2 / (2 eta0), D = 4 pi U / P;
  * axial ratio, tilt and sense (IEEE Std 145-2013, CONVENTIONS §2) from Stokes
    parameters;
and writes them with h5py under lobecast's dataset names (complex as {r, i}). No
numerical floor, no analysis: what a script written for the job would do.
"""
import argparse
import csv
import math
import os
import re
import time
import tomllib

import h5py
import numpy as np
from scipy.special import spherical_jn

C0 = 299792458.0
MU0 = 1.25663706212e-6  # CODATA 2018 (CONVENTIONS §1)
ETA0 = MU0 * C0


def frequency_hz(v):
    if isinstance(v, (int, float)):
        return float(v)
    m = re.fullmatch(r"\s*([0-9.eE+-]+)\s*(Hz|kHz|MHz|GHz|THz)\s*", v)
    return float(m.group(1)) * {"Hz": 1, "kHz": 1e3, "MHz": 1e6, "GHz": 1e9, "THz": 1e12}[m.group(2)]


def read_array(path):
    with open(path, "rb") as f:
        d = tomllib.load(f)
    if d.get("ground", "none") != "none":
        raise SystemExit("numpy_job.py: only ground = \"none\"")
    f_hz = frequency_hz(d["frequency"])
    lam = C0 / f_hz
    unit = {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "wavelength": lam}[d.get("length_unit", "m")]
    rows = []
    for t in d.get("dipole", []):
        c = t["current"]
        rows.append((*t["position"], *t["orientation"], t["length"], c["magnitude"], c["phase"],
                     t.get("distribution", "uniform")))
    if "dipoles_csv" in d:
        name = os.path.join(os.path.dirname(os.path.abspath(path)), d["dipoles_csv"])
        with open(name) as f:
            lines = [l for l in f if not l.lstrip().startswith("#") and l.strip()]
        for r in csv.DictReader(lines, skipinitialspace=True):
            rows.append((*(float(r[k]) for k in ("x", "y", "z", "ux", "uy", "uz", "length",
                                                  "magnitude", "phase")),
                         r.get("distribution") or "uniform"))
    pos = np.array([r[0:3] for r in rows], float) * unit
    u = np.array([r[3:6] for r in rows], float)
    u /= np.linalg.norm(u, axis=1)[:, None]
    le = np.array([r[6] for r in rows], float) * unit
    le *= np.array([0.5 if r[9] == "triangular" else 1.0 for r in rows])
    cur = np.array([r[7] for r in rows]) * np.exp(1j * np.radians([r[8] for r in rows]))
    g = d.get("grid", {})

    def axis(key, default):
        a = g.get(key, default)
        n = int(round((a["stop"] - a["start"]) / a["step"]))
        return a["start"] + a["step"] * np.arange(n + 1)

    theta = axis("theta", {"start": 0, "stop": 180, "step": 1})
    phi = axis("phi", {"start": 0, "stop": 360, "step": 1})
    return f_hz, pos, u, le, cur, theta, phi


def field(f_hz, pos, u, le, cur, theta_deg, phi_deg, chunk):
    k = 2 * math.pi * f_hz / C0
    w = 2 * math.pi * f_hz
    th, ph = np.meshgrid(np.radians(theta_deg), np.radians(phi_deg), indexing="ij")
    th, ph = th.ravel(), ph.ravel()
    r_hat = np.stack([np.sin(th) * np.cos(ph), np.sin(th) * np.sin(ph), np.cos(th)], axis=1)
    t_hat = np.stack([np.cos(th) * np.cos(ph), np.cos(th) * np.sin(ph), -np.sin(th)], axis=1)
    p_hat = np.stack([-np.sin(ph), np.cos(ph), np.zeros_like(ph)], axis=1)
    moments = (cur * le)[:, None] * u  # (N, 3)
    pref = -1j * w * MU0 / (4 * math.pi)
    e_t = np.empty(len(th), complex)
    e_p = np.empty(len(th), complex)
    for a in range(0, len(th), chunk):
        b = min(len(th), a + chunk)
        m = np.exp(1j * k * (r_hat[a:b] @ pos.T)) @ moments  # (chunk, 3)
        e_t[a:b] = pref * np.einsum("ij,ij->i", t_hat[a:b], m)
        e_p[a:b] = pref * np.einsum("ij,ij->i", p_hat[a:b], m)
    return e_t, e_p


def resistance(f_hz, pos, u, le):
    k = 2 * math.pi * f_hz / C0
    d = pos[:, None, :] - pos[None, :, :]
    dist = np.linalg.norm(d, axis=2)
    x = k * dist
    same = x == 0
    xs = np.where(same, 1.0, x)
    d_hat = d / np.where(same, 1.0, dist)[:, :, None]
    uu = u @ u.T
    ud_m = np.einsum("mk,mnk->mn", u, d_hat)
    ud_n = np.einsum("nk,mnk->mn", u, d_hat)
    j0, j1, j2 = (spherical_jn(n, xs) for n in (0, 1, 2))
    bracket = np.where(same, (2.0 / 3.0) * uu, uu * (j0 - j1 / xs) + ud_m * ud_n * j2)
    return (k * k * ETA0 / (4 * math.pi)) * np.outer(le, le) * bracket


def polarization(e_t, e_p):
    s0 = np.abs(e_t) ** 2 + np.abs(e_p) ** 2
    s1 = np.abs(e_t) ** 2 - np.abs(e_p) ** 2
    s2 = 2 * (e_t * np.conj(e_p)).real
    s3 = 2 * (e_t * np.conj(e_p)).imag
    e_r = np.abs(e_t + 1j * e_p) / math.sqrt(2)
    e_l = np.abs(e_t - 1j * e_p) / math.sqrt(2)
    with np.errstate(divide="ignore", invalid="ignore"):
        ar_db = 20 * np.log10((e_r + e_l) / np.abs(e_r - e_l))
    tilt = np.degrees(0.5 * np.arctan2(s2, s1))
    tilt = np.where(tilt <= -90, tilt + 180, tilt)
    sense = np.sign(s3).astype(np.int8)
    return ar_db, tilt, sense, s0


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("array")
    ap.add_argument("-o", "--output", required=True)
    ap.add_argument("--chunk", type=int, default=2048, help="directions per matrix product")
    a = ap.parse_args()
    t0 = time.perf_counter()
    f_hz, pos, u, le, cur, theta, phi = read_array(a.array)
    t1 = time.perf_counter()
    e_t, e_p = field(f_hz, pos, u, le, cur, theta, phi, a.chunk)
    t2 = time.perf_counter()
    r = resistance(f_hz, pos, u, le)
    p_w = 0.5 * np.real(np.conj(cur) @ r @ cur)
    t3 = time.perf_counter()
    shape = (len(theta), len(phi))
    intensity = (np.abs(e_t) ** 2 + np.abs(e_p) ** 2) / (2 * ETA0)
    directivity = 4 * math.pi * intensity / p_w
    ar_db, tilt, sense, _ = polarization(e_t, e_p)
    t4 = time.perf_counter()
    with h5py.File(a.output, "w") as f:
        f.attrs["format"] = "numpy_job"
        f.create_dataset("array/position", data=pos)
        f.create_dataset("array/orientation", data=u)
        f.create_dataset("array/effective_length", data=le)
        f.create_dataset("array/current", data=cur)
        f["array"].attrs["frequency_hz"] = f_hz
        f.create_dataset("grid/theta_deg", data=theta)
        f.create_dataset("grid/phi_deg", data=phi)
        f.create_dataset("field/rE_theta", data=e_t.reshape(shape))
        f.create_dataset("field/rE_phi", data=e_p.reshape(shape))
        f.create_dataset("pattern/intensity", data=intensity.reshape(shape))
        f.create_dataset("pattern/directivity", data=directivity.reshape(shape))
        f.create_dataset("polarization/axial_ratio_db", data=ar_db.reshape(shape))
        f.create_dataset("polarization/tilt_deg", data=tilt.reshape(shape))
        f.create_dataset("polarization/sense", data=sense.reshape(shape))
        f.create_dataset("power/radiated_w", data=p_w)
        f.create_dataset("power/resistance_ohm", data=r)
    t5 = time.perf_counter()
    print(f"numpy_job: {len(cur)} dipoles, {len(e_t)} directions; read {t1 - t0:.3f} s, "
          f"field {t2 - t1:.3f} s, power {t3 - t2:.3f} s, pattern {t4 - t3:.3f} s, "
          f"write {t5 - t4:.3f} s, total {t5 - t0:.3f} s")


if __name__ == "__main__":
    main()
