"""Frequency sweeps from the outside (CONVENTIONS §3 "Frequency sweeps"): the /sweep
datasets read with h5py (shapes, units, the first frequency equal to the usual
datasets), the squint of the phase-steered sample against the array factor and none
with true-time delay, a one-frequency sweep equal to the plain computation dataset for
dataset, located errors for broken frequency lists, and report/export/plot on a sweep."""
import csv
import io
import json
import math
import os
import re
import subprocess
import sys

import h5py
import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from check_common import arguments, check, summary  # noqa: E402

a = arguments()
exe, samples, work = a.lobecast, a.samples, a.workdir


def run(*args):
    return subprocess.run([exe, *args], capture_output=True, text=True)


def compute(toml, h5):
    if os.path.exists(h5):
        os.remove(h5)
    r = run("compute", toml, "-o", h5, "-q")
    check(r.returncode == 0, f"compute {toml}: exit {r.returncode}: {r.stderr.strip()}")
    return r


# ---- the two samples: shapes, squint, report, export, plot -------------------------
F0 = 10e9
PHI0 = 60.0
for mode in ("phase", "delay"):
    toml = os.path.join(samples, f"design-line-sweep-{mode}.toml")
    h5 = os.path.join(work, f"sweep-{mode}.h5")
    compute(toml, h5)
    with h5py.File(h5, "r") as f:
        nt, np_ = f["/grid/theta_deg"].shape[0], f["/grid/phi_deg"].shape[0]
        freq = f["/sweep/frequency_hz"][...]
        nf = freq.shape[0]
        check(nf == 5, f"{mode}: {nf} frequencies")
        check(freq[0] == F0 and f["/sweep"].attrs["design_frequency_hz"] == F0,
              f"{mode}: the design frequency first")
        check(f["/sweep"].attrs["steering"] == mode, f"{mode}: steering attribute")
        # The list in the file's order; the band (delay sample) evenly spaced, stop exact,
        # the design frequency moved first.
        check(list(freq) == [10e9, 9e9, 9.5e9, 10.5e9, 11e9], f"{mode}: frequencies {list(freq)}")
        for name, unit in [("peak_directivity_dbi", "dBi"), ("peak_theta_deg", "deg"),
                           ("peak_phi_deg", "deg"), ("radiated_w", "W"),
                           ("half_power_first_deg", "deg"), ("half_power_second_deg", "deg"),
                           ("sidelobe_db", "dB"), ("frequency_hz", "Hz")]:
            d = f["/sweep/" + name]
            check(d.shape == (nf,), f"{mode}: /sweep/{name} shape {d.shape}")
            check(d.attrs["units"] == unit, f"{mode}: /sweep/{name} units {d.attrs['units']}")
        D = f["/sweep/directivity"]
        check(D.shape == (nf, nt, np_), f"{mode}: /sweep/directivity shape {D.shape}")
        check(np.array_equal(D[0], f["/pattern/directivity"][...]),
              f"{mode}: /sweep/directivity[0] is /pattern/directivity")
        check(f["/sweep/radiated_w"][0] == f["/power/radiated_w"][()],
              f"{mode}: the first radiated power is /power/radiated_w")
        # Phase steering: cos(phi) = (f0/f) cos(phi0) in the plane theta = 90 deg (the
        # array factor's in-phase condition; derivation in tests/frequency_sweep_test.cpp);
        # delay steering: phi0 at every frequency (Mailloux, Phased Array Antenna
        # Handbook, 2nd ed., ch. 1, from memory). To the report's 0.001 deg.
        for k in range(nf):
            fk = freq[k]
            want = (math.degrees(math.acos(F0 / fk * math.cos(math.radians(PHI0))))
                    if mode == "phase" else PHI0)
            got = f["/sweep/peak_phi_deg"][k]
            check(abs(got - want) < 5e-4,
                  f"{mode}: peak phi at {fk / 1e9} GHz {got} vs {want} (array factor)")
            check(abs(f["/sweep/peak_theta_deg"][k] - 90) < 5e-4, f"{mode}: peak theta at {fk}")
        # The peak directivity of the stored grid never exceeds the refined one.
        for k in range(nf):
            grid_max = 10 * np.log10(D[k].max())
            check(grid_max <= f["/sweep/peak_directivity_dbi"][k] + 1e-9,
                  f"{mode}: grid max {grid_max} above the refined peak at {freq[k]}")
    r = run("report", h5)
    check(r.returncode == 0 and "Frequency sweep" in r.stdout, f"{mode}: report has the table")
    table_text = r.stdout.split("Frequency sweep:")[-1].split("(* design frequency")[0]
    rows = [l for l in table_text.splitlines() if re.match(r"^[* ] +\d", l)]
    check(len(rows) == nf, f"{mode}: report has {len(rows)} rows for {nf} frequencies")
    r = run("report", h5, "--json")
    j = json.loads(r.stdout)
    pts = j.get("sweep", {}).get("points", [])
    check(len(pts) == nf, f"{mode}: JSON sweep has {len(pts)} points")
    if pts:
        check(pts[0]["squint_deg"] == 0, f"{mode}: no squint at the design frequency")
        squints = [p["squint_deg"] for p in pts]
        check((max(squints) > 3) if mode == "phase" else (max(squints) < 5e-4),
              f"{mode}: squints {squints}")
    r = run("export", h5, "--sweep")
    table = list(csv.DictReader(io.StringIO(r.stdout)))
    check(r.returncode == 0 and len(table) == nf, f"{mode}: export --sweep rows {len(table)}")
    if table:
        check(float(table[0]["frequency_hz"]) == F0, f"{mode}: CSV design frequency first")
    png = os.path.join(work, f"sweep-{mode}.png")
    r = run("plot", h5, "--kind", "sweep", "-o", png)
    check(r.returncode == 0 and os.path.getsize(png) > 1000, f"{mode}: plot --kind sweep {r.stderr}")

# ---- one frequency equals the plain computation, dataset for dataset -----------------
text = open(os.path.join(samples, "design-line-sweep-phase.toml")).read()
one = os.path.join(work, "one-frequency.toml")
plain = os.path.join(work, "plain-frequency.toml")
open(one, "w").write(re.sub(r"^frequencies = .*$", 'frequencies = ["10 GHz"]', text, flags=re.M))
open(plain, "w").write(re.sub(r"^frequencies = .*$", 'frequency = "10 GHz"', text, flags=re.M))
compute(one, os.path.join(work, "one.h5"))
compute(plain, os.path.join(work, "plain.h5"))
skip_attrs = {"created", "input", "input_path"}
with h5py.File(os.path.join(work, "one.h5"), "r") as f1, h5py.File(os.path.join(work, "plain.h5"), "r") as f2:
    def compare(name, obj):
        if name.startswith("sweep"):
            return
        other = f2.get(name)
        if not check(other is not None, f"one-frequency: /{name} missing in the plain result"):
            return
        for k, v in obj.attrs.items():
            if k in skip_attrs or k.startswith("seconds"):
                continue  # the input text, the time of writing, timings
            check(k in other.attrs and np.asarray(v).tobytes() == np.asarray(other.attrs[k]).tobytes(),
                  f"one-frequency: /{name} attribute {k}")
        if isinstance(obj, h5py.Dataset):
            x, y = obj[()], other[()]
            same = (np.asarray(x).tobytes() == np.asarray(y).tobytes()
                    if np.asarray(x).dtype != object else list(x) == list(y))
            check(same, f"one-frequency: /{name} differs from the plain computation")
    f1.visititems(compare)
    names2 = set()
    f2.visit(names2.add)
    names1 = set()
    f1.visit(names1.add)
    check(names2 <= names1, f"one-frequency: plain has more objects {names2 - names1}")
    check(f1["/sweep/directivity"].shape[0] == 1, "one-frequency: /sweep has one frequency")

# ---- broken frequency lists: located errors, exit 2, nothing written ------------------
bad = {
    "both": 'frequency = "10 GHz"\nfrequencies = ["10 GHz", "11 GHz"]',
    "empty": "frequencies = []",
    "duplicate": 'frequencies = ["10 GHz", "9.5 GHz", "9500 MHz"]',
    "negative": 'frequencies = ["10 GHz", -1e9]',
    "zero": 'frequencies = [0, "10 GHz"]',
    "unit": 'frequencies = ["10 GHz", "11 Ghz"]',
    "count": 'frequencies = { start = "9 GHz", stop = "11 GHz", count = 0 }',
    "reversed": 'frequencies = { start = "11 GHz", stop = "9 GHz", count = 3 }',
    "key": 'frequencies = { start = "9 GHz", stop = "11 GHz", number = 3 }',
    "string": 'frequencies = "10 GHz"',
}
for what, line in bad.items():
    path = os.path.join(work, f"bad-{what}.toml")
    open(path, "w").write(re.sub(r"^frequencies = .*$", line, text, flags=re.M))
    out = os.path.join(work, f"bad-{what}.h5")
    r = run("compute", path, "-o", out)
    check(r.returncode == 2, f"bad list {what}: exit {r.returncode}")
    check(re.search(re.escape(path) + r":\d+:\d+: ", r.stderr) is not None,
          f"bad list {what}: not located: {r.stderr.strip()}")
    check(not os.path.exists(out), f"bad list {what}: an output was written")

# A plain result has no sweep: export --sweep and plot --kind sweep refuse it (exit 2).
r = run("export", os.path.join(work, "plain.h5"), "--sweep")
check(r.returncode == 2, f"export --sweep of a plain result: exit {r.returncode}")
r = run("plot", os.path.join(work, "plain.h5"), "--kind", "sweep", "-o", os.path.join(work, "x.png"))
check(r.returncode == 2, f"plot --kind sweep of a plain result: exit {r.returncode}")

sys.exit(summary("sweep_check"))
