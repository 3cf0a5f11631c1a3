#!/usr/bin/env python3
"""Writes a benchmark array of N short dipoles at random positions (a TOML file and
its CSV element table), free space, length 0.05 wavelength, magnitudes uniform in
[0.5, 1] A. --layout plane (default): positions uniform on a square of EDGE
wavelengths in the xy plane, x-directed dipoles in phase (a broadside beam with the
side lobes of a random aperture); --layout cube: positions uniform in a cube of EDGE
wavelengths, orientations uniform on the sphere, phases uniform in [0, 360) deg (no
beam: a speckle of lobes and nulls). Deterministic (numpy's default_rng with --seed).
Invented benchmark input.

  make_random_array.py --count 1024 --edge 16 --step 1 -o DIR/random-1024.toml
"""
import argparse
import os

import numpy as np


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--count", type=int, default=1024)
    ap.add_argument("--edge", type=float, default=16.0, help="square or cube edge, wavelengths")
    ap.add_argument("--layout", choices=["plane", "cube"], default="plane")
    ap.add_argument("--step", type=float, default=1.0, help="grid step, deg (full sphere)")
    ap.add_argument("--phi-step", type=float, help="phi step, deg (default --step)")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("-o", "--output", required=True, help="the TOML file; the CSV goes beside it")
    a = ap.parse_args()
    rng = np.random.default_rng(a.seed)
    n = a.count
    pos = (rng.random((n, 3)) - 0.5) * a.edge
    mag = 0.5 + 0.5 * rng.random(n)
    if a.layout == "plane":
        pos[:, 2] = 0.0
        u = np.zeros((n, 3))
        u[:, 0] = 1.0
        ph = np.zeros(n)
    else:
        u = rng.normal(size=(n, 3))
        u /= np.linalg.norm(u, axis=1)[:, None]
        ph = 360.0 * rng.random(n)
    base = os.path.splitext(a.output)[0]
    csv = base + ".csv"
    with open(csv, "w") as f:
        f.write("x, y, z, ux, uy, uz, length, magnitude, phase\n")
        rows = np.column_stack([pos, u, np.full(n, 0.05), mag, ph])
        np.savetxt(f, rows, fmt="%.17g", delimiter=", ")
    phi_step = a.phi_step or a.step
    stop_phi = 360.0 - phi_step
    with open(a.output, "w") as f:
        what = ("on a {e:g}-wavelength square, x-directed, in phase" if a.layout == "plane" else
                "in a {e:g}-wavelength cube, random orientations and phases").format(e=a.edge)
        f.write(f"# Benchmark input (tests/bench): {n} short dipoles at random positions\n"
                f"# {what}, written by make_random_array.py --count {n}\n"
                f"# --edge {a.edge:g} --layout {a.layout} --step {a.step:g} --seed {a.seed}.\n"
                "# Invented scenario; not used by the tests.\n")
        f.write(f'name = "benchmark random array, {n}"\n')
        f.write('frequency = "1 GHz"\nground = "none"\nlength_unit = "wavelength"\n')
        f.write(f'dipoles_csv = "{os.path.basename(csv)}"\n\n[grid]\n')
        f.write(f"theta = {{ start = 0, stop = 180, step = {a.step:g} }}\n")
        f.write(f"phi = {{ start = 0, stop = {stop_phi:.10g}, step = {phi_step:g} }}\n")


if __name__ == "__main__":
    main()
