"""Outside check of `lobecast tolerance`: the file read with h5py, its statistics
recomputed with numpy (numpy.mean, numpy.std with ddof=1, numpy.percentile with its
default "linear" method, the reference for the percentiles), the error-free pattern
against `lobecast compute`, reproducibility across thread counts, plots, and the
refusals of bad options (exit 2, nothing written)."""
import os
import subprocess
import sys

import h5py
import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from check_common import arguments, check, summary  # noqa: E402

a = arguments()
sample = os.path.join(a.samples, "design-tolerance-panel-12x8.toml")
work = a.workdir


def run(*args):
    return subprocess.run([a.lobecast, *args], capture_output=True, text=True)


def study(name, *extra, seed="7"):
    out = os.path.join(work, name)
    if os.path.exists(out):
        os.remove(out)
    r = run("tolerance", sample, "--trials", "40", "--seed", seed, "--amplitude-db", "0.5",
            "--phase-deg", "5", "--position", "0.1 mm", "--failed-count", "2", "-q", "-o", out,
            *extra)
    check(r.returncode == 0, f"tolerance {name} exits 0 (got {r.returncode}: {r.stderr.strip()})")
    return out


plots = os.path.join(work, "plots")
os.makedirs(plots, exist_ok=True)
for old in os.listdir(plots):  # a fresh folder: what is there was written by this run
    os.remove(os.path.join(plots, old))
one = study("one.h5", "--threads", "1", "--plots", plots)
two = study("two.h5", "--threads", "2")
other = study("other.h5", "--threads", "2", seed="8")
computed = os.path.join(work, "compute.h5")
r = run("compute", sample, "-q", "--method", "direct", "-o", computed)
check(r.returncode == 0, "compute of the sample")

with h5py.File(one) as f, h5py.File(two) as g, h5py.File(other) as h, h5py.File(computed) as c:
    t = f["/tolerance"]
    k = int(t.attrs["trials"])
    check(k == 40, f"trials attribute 40 (got {k})")
    for name in ["amplitude", "phase", "position", "failures"]:
        check(name + ":" in t.attrs["distributions"], f"distributions state the {name} model")
    check(t.attrs["beam_source"] == "design", "the design's steering is the beam")
    check(abs(t.attrs["beam_theta_deg"] - 25) < 1e-9 and abs(t.attrs["beam_phi_deg"] - 45) < 1e-9,
          "beam direction is the design's (25, 45)")
    # Every dataset the same bits with 1 and 2 threads; another seed differs.
    for key in t:
        check(np.array_equal(t[key][...], g["/tolerance"][key][...], equal_nan=True)
              if t[key].dtype.kind == "f" else (t[key][...] == g["/tolerance"][key][...]).all(),
              f"/tolerance/{key} identical with 1 and 2 threads")
    check(not np.array_equal(t["beam_directivity"][...], h["/tolerance/beam_directivity"][...]),
          "another seed gives other trials")
    check((t["failed_elements"][...] == 2).all(), "exactly 2 failed elements per trial")
    # The error-free pattern is the compute job's (direct sums on both sides).
    check(np.array_equal(f["/pattern/directivity"][...], c["/pattern/directivity"][...]),
          "/pattern/directivity equals compute's")
    # Shapes.
    nt, np_ = f["/pattern/directivity"].shape
    pct = t["percentile"][...]
    check(list(pct) == [5, 50, 95], f"percentiles 5, 50, 95 (got {pct})")
    check(t["directivity_percentile"].shape == (3, nt, np_), "directivity_percentile (P, Nt, Np)")
    check(t["directivity_mean"].shape == (nt, np_), "directivity_mean (Nt, Np)")
    check(t["null_depth_db"].shape == (k, 1), "null_depth_db (K, J)")
    lo, mid, hi = t["directivity_percentile"][...]
    mean = t["directivity_mean"][...]
    check((lo <= mid).all() and (mid <= hi).all(), "percentiles ascend per direction")
    # The summary table against numpy.
    rows = [s.decode() if isinstance(s, bytes) else s for s in t["summary_rows"][...]]
    table = t["summary"][...]
    for i, row in enumerate(rows):
        v = t[row][...]
        finite = v[~np.isnan(v)]
        want = [finite.mean(), finite.std(ddof=1), finite.min(), finite.max(),
                t.attrs["baseline_" + row]] + list(np.percentile(finite, [5, 50, 95]))
        ok = np.allclose(table[i], want, rtol=1e-12, atol=1e-12, equal_nan=True)
        check(ok, f"summary row {row} equals numpy ({table[i]} vs {want})")
    # The baseline figures: the error-free beam directivity is the pattern's at the
    # beam direction (a grid direction here: theta 25, phi 46 is not, so compare with
    # the refined peak's neighbourhood loosely: within 0.5 dB of the grid maximum).
    d0 = t.attrs["baseline_beam_directivity"]
    check(abs(10 * np.log10(d0) - 10 * np.log10(c["/pattern/directivity"][...].max())) < 0.5,
          "baseline beam directivity near the grid peak")

for png in ["one-envelope.png", "one-beam_directivity.png", "one-peak_sidelobe_db.png",
            "one-pointing_error_deg.png"]:
    p = os.path.join(plots, png)
    check(os.path.exists(p) and os.path.getsize(p) > 1000, f"plot {png} written")

check(not os.path.exists(os.path.join(plots, "one-failed_elements.png")),
      "no histogram of a failure count that is the same in every trial")

# Bad options: exit 2, one line, nothing written.
bad = os.path.join(work, "bad.h5")
for args, what in [
    (["--trials", "0"], "--trials"),
    (["--phase-deg", "-1"], "--phase-deg"),
    (["--position", "1 furlong"], "--position"),
    (["--position", "-3 mm"], "--position"),
    (["--failures", "1.5"], "--failures"),
    (["--failures", "0.1", "--failed-count", "2"], "--failed-count"),
    (["--failed-count", "96"], "--failed-count"),
    (["-o", "-"], "--output"),
]:
    if os.path.exists(bad):
        os.remove(bad)
    extra = [] if "-o" in args else ["-o", bad]
    r = run("tolerance", sample, *args, *extra)
    check(r.returncode == 2, f"{args}: exit 2 (got {r.returncode})")
    check(r.stderr.startswith("lobecast: ") and r.stderr.count("\n") == 1,
          f"{args}: one message line (got {r.stderr!r})")
    check(what in r.stderr, f"{args}: the message names {what} ({r.stderr.strip()})")
    check(not os.path.exists(bad), f"{args}: nothing written")

sys.exit(summary("tolerance_check"))
