#!/usr/bin/env python3
"""Outside check of lobecast result files with Debian's numpy, scipy and h5py.

For every sample array: run `lobecast compute`, open the HDF5 file with h5py and
check, independently of the C++ code,
  * the complex datasets read as complex128 and every dataset has a `units` attribute;
  * directivity recomputed from rE_theta/rE_phi and the stored power,
    D = 4 pi |rE|^2 / (2 eta0 P)  (CONVENTIONS §1, U = |rE|^2 / (2 eta0));
  * rE recomputed by numpy superposition from /array (CONVENTIONS §1 far-field
    formula, written out again here with numpy, images for a PEC ground);
  * the resistance matrix recomputed with scipy.special.spherical_jn
    (reference library) from the closed form of CONVENTIONS §1;
  * the active resistances Re Z_act,m = Re(sum_n Z_mn I_n / I_m) with the mutual
    reactances from scipy.special.spherical_yn (the spherical Hankel function
    h2 = j - j y of the mutual impedance, CONVENTIONS §1), self reactance left out
    as it cancels from the real part;
  * the stored power against a quadrature of the stored intensity over the grid
    (trapezoid in theta and phi; loose tolerance: the grid is coarse).
Exit status 0 when every check passes; failures print both values.
"""
import glob
import os
import subprocess
import sys

import h5py
import numpy as np
from scipy.special import spherical_jn, spherical_yn

from check_common import arguments, check, summary

C0 = 299792458.0
MU0 = 1.25663706212e-6  # CODATA 2018
ETA0 = MU0 * C0



def rel(a, b):
    scale = max(np.max(np.abs(b)), 1e-300)
    return float(np.max(np.abs(a - b)) / scale)


def ground_of(f):
    g = f["/array"].attrs["ground"]
    return g.decode() if isinstance(g, bytes) else g


def array_of(f):
    """(frequency Hz, ground, k rad/m, positions, orientations, effective lengths, currents)."""
    freq = f["/array"].attrs["frequency_hz"]
    return (freq, ground_of(f), 2 * np.pi * freq / C0, f["/array/position"][...],
            f["/array/orientation"][...], f["/array/effective_length"][...],
            f["/array/current"][...])


def images(pos, u):
    """PEC images (CONVENTIONS §1): z mirrored, horizontal current components reversed."""
    return pos * [1, 1, -1], u * [-1, -1, 1]


def field_numpy(f):
    """rE by direct superposition, vectorized over directions (numpy)."""
    freq, ground, k, pos, u, le, cur = array_of(f)
    if ground == "pec":
        ipos, iu = images(pos, u)
        pos, u = np.vstack([pos, ipos]), np.vstack([u, iu])
        le = np.concatenate([le, le])
        cur = np.concatenate([cur, cur])
    th = np.radians(f["/grid/theta_deg"][...])[:, None]
    ph = np.radians(f["/grid/phi_deg"][...])[None, :]
    r = np.stack(np.broadcast_arrays(np.sin(th) * np.cos(ph), np.sin(th) * np.sin(ph),
                                     np.cos(th)), axis=-1)
    t_hat = np.stack(np.broadcast_arrays(np.cos(th) * np.cos(ph), np.cos(th) * np.sin(ph),
                                         -np.sin(th)), axis=-1)
    p_hat = np.stack(np.broadcast_arrays(-np.sin(ph) + 0 * th, np.cos(ph) + 0 * th,
                                         0 * th + 0 * ph), axis=-1)
    phase = np.exp(1j * k * (r @ pos.T))          # (Nt, Np, Ns)
    m = phase @ ((cur * le)[:, None] * u)         # (Nt, Np, 3): sum_n I Le u e^{jk r.r_n}
    pref = 2 * np.pi * freq * MU0 / (4 * np.pi)
    # r x (r x m) = -m_perp
    et = -1j * pref * np.sum(t_hat * m, axis=-1)
    ep = -1j * pref * np.sum(p_hat * m, axis=-1)
    if ground == "pec":
        below = (th > np.pi / 2) & np.ones_like(ph, dtype=bool)
        et[below] = 0
        ep[below] = 0
    return et, ep


def resistance_scipy(f):
    _, ground, k, pos, u, le, _ = array_of(f)

    def block(pa, ua, pb, ub):
        d = pa[:, None, :] - pb[None, :, :]
        dist = np.linalg.norm(d, axis=-1)
        x = k * dist
        with np.errstate(invalid="ignore", divide="ignore"):
            fx = np.where(x > 0, spherical_jn(0, x) - spherical_jn(1, x) / x, 2.0 / 3.0)
            dh = np.where(dist[..., None] > 0, d / dist[..., None], 0.0)
        j2 = spherical_jn(2, x)
        uu = ua @ ub.T
        ud = np.einsum("ik,ijk->ij", ua, dh) * np.einsum("jk,ijk->ij", ub, dh)
        return uu * fx + ud * j2

    r = block(pos, u, pos, u)
    if ground == "pec":
        r = r + block(pos, u, *images(pos, u))
    return k * k * ETA0 / (4 * np.pi) * np.outer(le, le) * r


def mutual_reactance_scipy(f):
    """X'_mn = Im Z_mn for n != m, with the image terms; 0 for dipoles at one point
    that are orthogonal, NaN for others there, and 0 on the diagonal of the direct
    block (the self reactance is not needed for the active resistance)."""
    _, ground, k, pos, u, le, _ = array_of(f)

    def block(pa, ua, pb, ub, skip_diagonal):
        d = pa[:, None, :] - pb[None, :, :]
        dist = np.linalg.norm(d, axis=-1)
        x = k * dist
        uu = ua @ ub.T
        with np.errstate(invalid="ignore", divide="ignore"):
            dh = np.where(dist[..., None] > 0, d / dist[..., None], 0.0)
            gy = np.where(x > 0, -(spherical_yn(0, x) - spherical_yn(1, x) / x), 0.0)
            y2 = np.where(x > 0, -spherical_yn(2, x), 0.0)
        ud = np.einsum("ik,ijk->ij", ua, dh) * np.einsum("jk,ijk->ij", ub, dh)
        out = uu * gy + ud * y2
        out[(x == 0) & (np.abs(uu) > 1e-12)] = np.nan
        if skip_diagonal:
            np.fill_diagonal(out, 0.0)
        return out

    x = block(pos, u, pos, u, True)
    if ground == "pec":
        x = x + block(pos, u, *images(pos, u), False)
    return k * k * ETA0 / (4 * np.pi) * np.outer(le, le) * x


def trapezoid_power(f):
    th = np.radians(f["/grid/theta_deg"][...])
    ph = np.radians(f["/grid/phi_deg"][...])
    u = f["/pattern/intensity"][...]
    inner = np.trapz(u, ph, axis=1)
    return float(np.trapz(inner * np.sin(th), th)), th, ph


def check_file(path, name):
    with h5py.File(path, "r") as f:
        check(f.attrs["format"] in ("lobecast.pattern", b"lobecast.pattern"), f"{name}: format")
        check(int(f.attrs["format_version"]) == 1, f"{name}: format_version")
        for ds in ("/field/rE_theta", "/field/rE_phi", "/array/current"):
            check(f[ds].dtype == np.complex128, f"{name}: {ds} dtype {f[ds].dtype}")

        def visit(n, obj):
            if isinstance(obj, h5py.Dataset):
                check("units" in obj.attrs, f"{name}: {n} has no units attribute")
        f.visititems(visit)

        et = f["/field/rE_theta"][...]
        ep = f["/field/rE_phi"][...]
        p = f["/power/radiated_w"][()]
        d = f["/pattern/directivity"][...]
        d_py = 4 * np.pi * (np.abs(et) ** 2 + np.abs(ep) ** 2) / (2 * ETA0) / p
        e = rel(d, d_py)
        check(e < 1e-12, f"{name}: directivity vs 4 pi U / P: rel err {e:.3e}")

        et_py, ep_py = field_numpy(f)
        scale = max(np.max(np.abs(et_py)), np.max(np.abs(ep_py)))
        e1 = float(np.max(np.abs(et - et_py)) / scale)
        e2 = float(np.max(np.abs(ep - ep_py)) / scale)
        check(e1 < 1e-10 and e2 < 1e-10, f"{name}: rE vs numpy superposition: {e1:.3e} {e2:.3e}")

        r = f["/power/resistance_ohm"][...]
        r_py = resistance_scipy(f)
        e = rel(r, r_py)
        # scipy's j0 - j1/x cancels at small x: 1e-9 is what the reference can reach.
        check(e < 1e-9, f"{name}: resistance vs scipy.special.spherical_jn: rel err {e:.3e}")
        cur = f["/array/current"][...]
        p_py = 0.5 * np.real(np.conj(cur) @ r_py @ cur)
        check(abs(p - p_py) < 1e-9 * p, f"{name}: power {p} vs numpy {p_py}")

        # Active resistance (CONVENTIONS §1): needs the mutual reactances; rounding
        # is relative to sum_n |Z_mn I_n| / |I_m|.
        z_py = r_py + 1j * mutual_reactance_scipy(f)
        live = cur != 0
        zi = (z_py[:, live] @ cur[live]) / np.where(live, cur, 1)
        ract_py = np.where(live, zi.real, np.nan)
        ract = f["/power/active_resistance_ohm"][...]
        scale = (np.abs(z_py) @ np.abs(cur)) / np.where(live, np.abs(cur), 1)
        same_nan = np.array_equal(np.isnan(ract), np.isnan(ract_py))
        ok = np.isfinite(ract_py)
        e_act = float(np.max(np.abs(ract - ract_py)[ok] / scale[ok], initial=0.0))
        check(same_nan and e_act < 1e-9,
              f"{name}: active resistance vs scipy: rel err {e_act:.3e}, NaN where "
              f"{np.isnan(ract)} vs {np.isnan(ract_py)}")

        p_quad, th, ph = trapezoid_power(f)
        theta_top = np.pi / 2 if ground_of(f) == "pec" else np.pi
        full = (abs(th[0]) < 1e-12 and abs(th[-1] - theta_top) < 1e-12
                and abs(ph[-1] - ph[0] - 2 * np.pi) < 1e-12)
        if full:
            check(abs(p_quad - p) < 2e-2 * p, f"{name}: trapezoid power {p_quad} vs closed form {p}")
        print(f"ok  {name}: D err ok, rE vs numpy {max(e1, e2):.1e}, R vs scipy {e:.1e}, "
              f"R_active vs scipy {e_act:.1e}, "
              f"P closed {p:.6g} W, trapezoid {p_quad:.6g} W")


def main():
    a = arguments()
    samples = sorted(p for p in glob.glob(os.path.join(a.samples, "*.toml"))
                   if not os.path.basename(p).startswith("requirements-"))  # not arrays
    check(len(samples) >= 5, f"only {len(samples)} sample arrays")
    for s in samples:
        name = os.path.splitext(os.path.basename(s))[0]
        out = os.path.join(a.workdir, name + ".h5")
        run = subprocess.run([a.lobecast, "compute", "--quiet", s, "-o", out],
                             capture_output=True, text=True)
        check(run.returncode == 0, f"{name}: compute exit {run.returncode}: {run.stderr}")
        if run.returncode == 0:
            check_file(out, name)
    return summary("result file check")


if __name__ == "__main__":
    sys.exit(main())
