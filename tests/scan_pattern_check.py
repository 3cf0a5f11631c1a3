"""`lobecast scan --pattern` from the outside: the pattern figures per steering angle
without wire data, the grating-lobe onset of a lattice against the textbook condition,
the scan loss at broadside, the peak against a design steered to the same angle, and
the scan impedance kept beside the figures when the file has wire data."""
import csv
import io
import json
import math
import os
import subprocess
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from check_common import arguments, check, summary  # noqa: E402

a = arguments()
exe, samples, work = a.lobecast, a.samples, a.workdir


def run(*args):
    return subprocess.run([exe, *args], capture_output=True, text=True)


# A 4 x 4 panel of y-directed short dipoles in the xy plane, pitch 0.7 wavelength, uniform.
PITCH = 0.7
DESIGN = f"""name = "Check panel"
frequency = "5 GHz"
length_unit = "wavelength"
[grid]
theta = {{ start = 0, stop = 180, step = 1 }}
phi = {{ start = 0, stop = 360, step = 2 }}
[element]
orientation = [0, 1, 0]
length = 0.05
[lattice]
kind = "rectangular"
count = [4, 4]
spacing = [{PITCH}, {PITCH}]
"""
design = os.path.join(work, "scan-panel.toml")
open(design, "w").write(DESIGN)
out_csv = os.path.join(work, "scan-panel.csv")
png = os.path.join(work, "scan-panel.png")
r = run("scan", design, "--phi", "0", "--theta-stop", "60", "--step", "5",
        "--pattern-csv", out_csv, "--pattern-plot", png)
check(r.returncode == 0, f"scan --pattern on a design without wires: {r.returncode} {r.stderr}")
check("no scan impedance" in r.stdout and "Scan pattern" in r.stdout, "scan prints the pattern table")
rows = list(csv.DictReader(open(out_csv))) if os.path.exists(out_csv) else []
check(len(rows) == 13, f"scan CSV rows {len(rows)}")
check(os.path.exists(png) and os.path.getsize(png) > 1000, "scan --pattern-plot written")
if rows:
    # Grating lobes of a panel of pitch d steered theta0 in a lattice plane: a lobe at
    # sin(theta) = sin(theta0) - lambda/d enters visible space once
    # sin(theta0) >= lambda/d - 1 (Mailloux, Phased Array Antenna Handbook, 2nd ed.,
    # ch. 1, from memory). With d = 0.7 lambda: theta0 >= 25.38 deg, so steering 30 deg
    # of the 5 deg steps is the first with one.
    onset = math.degrees(math.asin(1 / PITCH - 1))
    for row in rows:
        t0 = float(row["steer_theta_deg"])
        want = int(row["grating_lobes"]) > 0
        check(want == (t0 >= onset), f"grating lobes at steering {t0}: {row['grating_lobes']}")
    check("grating-lobe onset" in r.stdout and "30.000" in r.stdout.split("grating-lobe onset")[1],
          "the onset is printed at 30 deg")
    # Steering to broadside is the reference itself: no scan loss.
    check(float(rows[0]["scan_loss_db"]) == 0.0, f"scan loss at broadside {rows[0]['scan_loss_db']}")
    # Scanning costs: the loss at 20 deg is below 0 dB.
    check(float(rows[4]["scan_loss_db"]) < 0, f"scan loss at 20 deg {rows[4]['scan_loss_db']}")
    # The same panel steered to 20 deg by its design file: the same refined peak
    # (one excitation, two paths through the readers).
    steered = os.path.join(work, "scan-panel-20.toml")
    open(steered, "w").write(DESIGN + '[steer]\ntheta = 20\nphi = 0\nmode = "phase"\n')
    h5 = os.path.join(work, "scan-panel-20.h5")
    run("compute", steered, "-o", h5, "-q")
    rep = json.loads(run("report", h5, "--json").stdout)
    peak = rep["peak"]["directivity_dbi"] if "peak" in rep else None
    check(peak is not None and abs(peak - float(rows[4]["peak_directivity_dbi"])) < 1e-9,
          f"scan peak at 20 deg {rows[4]['peak_directivity_dbi']} vs design {peak}")

# With wire data the scan impedance stays and the figures follow it; an explicit array
# has no lattice, so no grating-lobe count.
r = run("scan", os.path.join(samples, "steered-line-scan.toml"), "--theta-stop", "30",
        "--step", "10", "--pattern")
check(r.returncode == 0, f"scan --pattern with wires: {r.returncode} {r.stderr}")
check("active reflection" in r.stdout and "Scan pattern" in r.stdout, "both tables printed")
check("grating lobes: n/a" in r.stdout, "explicit array: grating lobes n/a")
# Without --pattern an array without wire data is still refused (exit 2).
r = run("scan", design)
check(r.returncode == 2 and "no self reactance" in r.stderr, f"scan without wires: {r.returncode}")
# -o belongs to the impedance: refused with --pattern on an array without wires.
r = run("scan", design, "--pattern", "-o", os.path.join(work, "x.csv"))
check(r.returncode == 2, f"scan --pattern -o without wires: {r.returncode}")
# '-' sends the pattern CSV alone to standard output.
r = run("scan", design, "--theta-stop", "10", "--pattern-csv", "-")
check(r.returncode == 0 and r.stdout.startswith("steer_theta_deg,"), "pattern CSV on stdout")

sys.exit(summary("scan_pattern_check"))
