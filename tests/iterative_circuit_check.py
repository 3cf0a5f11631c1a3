#!/usr/bin/env python3
"""Outside check of the iterative port-circuit solve (engine/coupling/iterative_circuit.h)
with Debian's numpy and scipy: `lobecast compute` on an array above the 4096-dipole
matrix limit (4160 dipoles over PEC: 390 driven and loaded ones, the rest
current-forced), then, from the result file and independently of the C++ code:
  * the rows of Z for the driven and loaded ports, images included, from CONVENTIONS
    §1 written with scipy.special.spherical_jn / spherical_yn (the self reactance
    and loss resistance read from /coupling; coupling_check.py checks those against
    scipy dblquad and the skin-effect formula);
  * the residual of the port equations for the file's currents, against the
    1e-12 the solve stops at and the residual compute printed;
  * the currents against numpy.linalg.solve of the same equations, within the
    residual times the condition number (numpy.linalg.cond);
(The power balance of the iterative route is checked by iterative_circuit_test.cpp:
here the current sources' terminal voltages would need all of Z.)
Exit status 0 when every check passes; failures print both values.
"""
import os
import re
import subprocess
import sys

import h5py
import numpy as np
from scipy.special import spherical_jn, spherical_yn

from check_common import arguments, check, summary

C0 = 299792458.0
MU0 = 1.25663706212e-6  # CODATA 2018
ETA0 = MU0 * C0
COLS, ROWS, SOLVED_ROWS = 65, 32, 3


def write_array(folder):
    """65 x 32 x 2 x-directed short dipoles, 0.3 and 0.18 wavelength over PEC; the
    first three rows driven (upper) and loaded (lower), the rest current-forced."""
    lines = ["x, y, z, ux, uy, uz, length, distribution, radius, port, magnitude, phase, "
             "voltage, resistance, reactance"]
    for r in range(ROWS):
        for c in range(COLS):
            for z in (0.3, 0.18):
                head = f"{0.5 * c}, {0.5 * r}, {z}, 1, 0, 0, 0.05, triangular, 0.0015"
                if r >= SOLVED_ROWS:
                    lines.append(head + f", current, 0.01, {(37 * c + 11 * r) % 360}, , , ")
                elif z == 0.3:
                    lines.append(head + f", drive, , {(23 * c) % 360}, 1, 50, 1436")
                else:
                    lines.append(head + ", load, , , , 0.5, 1434")
    with open(os.path.join(folder, "ported-4160.csv"), "w") as f:
        f.write("\n".join(lines) + "\n")
    toml = os.path.join(folder, "ported-4160.toml")
    with open(toml, "w") as f:
        f.write('frequency = "300 MHz"\nlength_unit = "wavelength"\nground = "pec"\n'
                'dipoles_csv = "ported-4160.csv"\n[grid]\n'
                "theta = { start = 0, stop = 180, step = 10 }\n"
                "phi = { start = 0, stop = 360, step = 10 }\n")
    return toml


def kernel_rows(k, pos, u, le, rows, src_pos, src_u, src_le):
    """Z_ms for m in rows over the sources, CONVENTIONS §1 (pairs at one point: 0)."""
    d = pos[rows][:, None, :] - src_pos[None, :, :]
    r = np.linalg.norm(d, axis=2)
    safe = np.where(r > 0, r, 1.0)
    x = k * safe
    dh = d / safe[:, :, None]
    h = (spherical_jn(0, x) - spherical_jn(1, x) / x) - 1j * (
        spherical_yn(0, x) - spherical_yn(1, x) / x)
    h2 = spherical_jn(2, x) - 1j * spherical_yn(2, x)
    uu = u[rows] @ src_u.T
    ad = np.einsum("mj,msj->ms", u[rows], dh)
    bd = np.einsum("sj,msj->ms", src_u, dh)
    z = k * k * ETA0 / (4 * np.pi) * le[rows][:, None] * src_le[None, :] * (uu * h + ad * bd * h2)
    return np.where(r > 0, z, 0)


def main():
    a = arguments()
    toml = write_array(a.workdir)
    out = os.path.join(a.workdir, "ported-4160.h5")
    run = subprocess.run([a.lobecast, "compute", toml, "-o", out], capture_output=True,
                         text=True)
    check(run.returncode == 0, f"compute exit {run.returncode}: {run.stderr.strip()}")
    if run.returncode != 0:
        return summary("iterative_circuit_check")
    line = re.search(r"solve +iterative .*relative residual ([0-9.e+-]+)", run.stdout)
    check(line is not None, "compute printed the iterative route:\n" + run.stdout)
    printed = float(line.group(1)) if line else 1.0
    with h5py.File(out, "r") as f:
        k = 2 * np.pi * f["/array"].attrs["frequency_hz"] / C0
        pos = f["/array/position"][...]
        u = f["/array/orientation"][...]
        le = f["/array/effective_length"][...]
        cur = f["/array/current"][...]
        g = f["/coupling"]
        kinds = np.array([v.decode() if isinstance(v, bytes) else str(v)
                          for v in g["port_kind"][...]])
        vs = g["source_voltage_v"][...]
        zp = g["port_impedance_ohm"][...]
        xself = g["self_reactance_ohm"][...]
        rloss = g["loss_resistance_ohm"][...]
        p_rad = f["/power/radiated_w"][()]
    n = len(cur)
    solved = np.flatnonzero(kinds != "current")
    check(n > 4096 and len(solved) == 2 * COLS * SOLVED_ROWS,
          f"{n} dipoles, {len(solved)} solved ports")
    # Images: (x, y, -z), horizontal current components reversed (CONVENTIONS §1).
    img_pos = pos * np.array([1, 1, -1])
    img_u = u * np.array([-1, -1, 1])
    zrows = (kernel_rows(k, pos, u, le, solved, pos, u, le) +
             kernel_rows(k, pos, u, le, solved, img_pos, img_u, le))
    for i, m in enumerate(solved):  # the self term: R_mm + j X_self + R_loss
        zrows[i, m] = k * k * ETA0 / (4 * np.pi) * le[m] ** 2 * 2 / 3 + 1j * xself[m] + rloss[m]
        zrows[i, m] += kernel_rows(k, pos, u, le, [m], img_pos[m:m + 1], img_u[m:m + 1],
                                   le[m:m + 1])[0, 0]
    forced = cur.copy()
    forced[solved] = 0
    b = np.where(kinds[solved] == "drive", vs[solved], 0) - zrows @ forced
    a_mat = zrows[:, solved] + np.diag(zp[solved])
    residual = np.linalg.norm(b - a_mat @ cur[solved]) / np.linalg.norm(b)
    # numpy's Z and the engine's agree to ~1e-14 of a row's terms (coupling_check.py
    # checks 1e-10 per element): that much slack on the residual.
    check(residual <= 1e-12 + 5e-14,
          f"port equations' relative residual {residual:.3g} <= 1e-12")
    check(abs(residual - printed) <= 0.06 * printed + 5e-14,
          f"residual {residual:.3g} vs the {printed:.3g} compute printed")
    i_ref = np.linalg.solve(a_mat, b)
    cond = np.linalg.cond(a_mat)
    e = np.linalg.norm(cur[solved] - i_ref) / np.linalg.norm(i_ref)
    check(e <= 2e-12 * cond, f"currents vs numpy.linalg.solve: rel err {e:.2e} (cond {cond:.3g})")
    print(f"iterative_circuit_check: residual {residual:.3g}, cond {cond:.3g}, "
          f"currents rel err {e:.2e}, P_rad {p_rad:.6g} W")
    return summary("iterative_circuit_check")


if __name__ == "__main__":
    sys.exit(main())
