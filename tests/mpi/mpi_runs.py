"""MPI runs of lobecast (cli/mpi, -DLOBECAST_MPI=ON) against the single process, on
1, 2 and 3 ranks of this machine (3 ranks oversubscribe a 2-core machine):

- tolerance (the tapered, steered sample, split by trials): every dataset of the file
  byte for byte the single process's (NaN where it has NaN), attributes too except
  timings and the thread count; one run with position errors (a plan per trial) and
  one with the fast field method;
- compute (split by theta rows): the direct sums byte for byte; the fast path within
  the sum of the two runs' reported error bounds (relative to the peak |rE|, the
  bound each run states); sweeps (split by frequency) byte for byte;
- failure: a rank that fails (LOBECAST_TEST_FAIL_RANK, an exception; or its process
  exiting) makes the run exit non-zero, with "lobecast: rank R failed: ..." for the
  exception, and leaves an existing output untouched and no temporary behind.

Run as root it passes mpirun's --allow-run-as-root. Usage: mpi_runs.py --lobecast EXE
--samples DIR --workdir DIR --mpirun MPIRUN."""
import argparse
import glob
import os
import subprocess
import sys

import h5py
import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))
from check_common import check, summary  # noqa: E402

ap = argparse.ArgumentParser()
ap.add_argument("--lobecast", required=True)
ap.add_argument("--samples", required=True)
ap.add_argument("--workdir", required=True)
ap.add_argument("--mpirun", default="mpirun")
a = ap.parse_args()
os.makedirs(a.workdir, exist_ok=True)
work = a.workdir

# Attributes that say how a run went, not what it computed.
HOW_IT_RAN = {"created", "threads_used", "seconds_plan", "seconds_field", "seconds_power",
              "seconds_polarization", "seconds", "seconds_baseline", "seconds_trials"}


def launcher(ranks):
    cmd = [a.mpirun, "-n", str(ranks), "--oversubscribe"]
    if os.geteuid() == 0:
        cmd.append("--allow-run-as-root")  # containers run as root; OpenMPI refuses without it
    return cmd


def run(ranks, *args, env=None):
    """ranks 0: the executable alone (no launcher)."""
    cmd = ([] if ranks == 0 else launcher(ranks)) + [a.lobecast, *args]
    full_env = dict(os.environ, **(env or {}))
    return subprocess.run(cmd, capture_output=True, text=True, env=full_env, timeout=600)


def fresh(name):
    path = os.path.join(work, name)
    if os.path.exists(path):
        os.remove(path)
    return path


def contents(path):
    """Every dataset's bytes and every attribute (less HOW_IT_RAN), by path."""
    out = {}
    with h5py.File(path, "r") as f:
        def visit(name, obj):
            if isinstance(obj, h5py.Dataset):
                v = np.asarray(obj[()])
                # Strings (object arrays) by value, numbers by their bytes (NaN included).
                out[name] = (obj.dtype.str, obj.shape,
                             repr(v.tolist()) if v.dtype.kind == "O" else v.tobytes())
            for k, v in obj.attrs.items():
                if k not in HOW_IT_RAN:
                    out[name + "@" + k] = np.asarray(v).tobytes() if not isinstance(v, str) else v
        visit("/", f)
        f.visititems(visit)
    return out


def same_bits(ref, other, what):
    x, y = contents(ref), contents(other)
    differ = sorted(k for k in set(x) | set(y) if x.get(k) != y.get(k))
    check(not differ, f"{what}: byte-identical to the single process (differ: {differ[:6]})")


sample = os.path.join(a.samples, "design-tolerance-panel-12x8.toml")
study = ["--trials", "23", "--seed", "11", "--amplitude-db", "0.5", "--phase-deg", "5",
         "--failed-count", "2", "-q"]

# Tolerance: 1, 2, 3 ranks (23 trials: ranges of 12+11 and 8+8+7).
single = fresh("tol-single.h5")
r = run(0, "tolerance", sample, *study, "-o", single)
check(r.returncode == 0, f"tolerance alone exits 0 ({r.returncode}: {r.stderr.strip()})")
for ranks in (1, 2, 3):
    out = fresh(f"tol-{ranks}.h5")
    r = run(ranks, "tolerance", sample, *study, "-o", out)
    check(r.returncode == 0, f"tolerance on {ranks} ranks exits 0 ({r.returncode}: {r.stderr.strip()})")
    if r.returncode == 0:
        same_bits(single, out, f"tolerance on {ranks} ranks")
        with h5py.File(out, "r") as f:  # the study is there, not zeros from a missed gather
            check(f["/tolerance/beam_directivity"].shape == (23,)
                  and np.all(f["/tolerance/beam_directivity"][...] > 0),
                  f"tolerance on {ranks} ranks: every trial's beam directivity > 0")
for name, extra in (("position", ["--position", "0.1 mm"]), ("fast", ["--method", "fast"])):
    ref = fresh(f"tol-{name}-single.h5")
    out = fresh(f"tol-{name}-2.h5")
    r1 = run(0, "tolerance", sample, *study, *extra, "-o", ref)
    r2 = run(2, "tolerance", sample, *study, *extra, "-o", out)
    check(r1.returncode == 0 and r2.returncode == 0,
          f"tolerance {name}: both exit 0 ({r1.stderr.strip()} {r2.stderr.strip()})")
    if r1.returncode == 0 and r2.returncode == 0:
        same_bits(ref, out, f"tolerance with {name} on 2 ranks")


# Compute: direct sums bit for bit, the fast path within its bounds.
def peak_field(f):
    return np.sqrt(np.abs(f["/field/rE_theta"][...]) ** 2 + np.abs(f["/field/rE_phi"][...]) ** 2).max()


panel = os.path.join(a.samples, "design-panel-16x8-taylor.toml")
for method in ("direct", "fast"):
    ref = fresh(f"compute-{method}-single.h5")
    r = run(0, "compute", panel, "--method", method, "-q", "-o", ref)
    check(r.returncode == 0, f"compute {method} alone exits 0 ({r.stderr.strip()})")
    for ranks in (2, 3):
        out = fresh(f"compute-{method}-{ranks}.h5")
        r = run(ranks, "compute", panel, "--method", method, "-q", "-o", out)
        check(r.returncode == 0, f"compute {method} on {ranks} ranks exits 0 ({r.stderr.strip()})")
        if r.returncode != 0:
            continue
        if method == "direct":
            same_bits(ref, out, f"compute direct on {ranks} ranks")
            continue
        with h5py.File(ref, "r") as f, h5py.File(out, "r") as g:
            bound = (f["/summary"].attrs["field_error_bound_relative"]
                     + g["/summary"].attrs["field_error_bound_relative"])
            peak = peak_field(f)
            for c in ("rE_theta", "rE_phi"):
                err = np.abs(f["/field/" + c][...] - g["/field/" + c][...]).max() / peak
                check(0 < bound < 1e-6 and err <= bound,
                      f"compute fast on {ranks} ranks: {c} within the bounds ({err:.3g} <= {bound:.3g})")
            check(np.array_equal(f["/power/radiated_w"][()], g["/power/radiated_w"][()]),
                  f"compute fast on {ranks} ranks: the power is the same bits")

# Sweeps (split by frequency): each frequency is one rank's whole computation.
for name in ("design-line-sweep-phase", "design-line-sweep-delay"):
    sweep = os.path.join(a.samples, name + ".toml")
    ref = fresh(f"{name}-single.h5")
    r = run(0, "compute", sweep, "--method", "direct", "-q", "-o", ref)
    check(r.returncode == 0, f"{name} alone exits 0 ({r.stderr.strip()})")
    for ranks in (2, 3):
        out = fresh(f"{name}-{ranks}.h5")
        r = run(ranks, "compute", sweep, "--method", "direct", "-q", "-o", out)
        check(r.returncode == 0, f"{name} on {ranks} ranks exits 0 ({r.stderr.strip()})")
        if r.returncode == 0:
            same_bits(ref, out, f"{name} (direct) on {ranks} ranks")

# Failure: a failing rank fails the run; the old output stays, no temporary is left.
for command, args in (("tolerance", [sample, *study]), ("compute", [panel, "-q"])):
    for how in ("throw", "exit"):
        out = os.path.join(work, f"fail-{command}-{how}.h5")
        with open(out, "wb") as old:
            old.write(b"an older output")
        env = {"LOBECAST_TEST_FAIL_RANK": "1"}
        if how == "exit":
            env["LOBECAST_TEST_FAIL_HOW"] = "exit"
        r = run(2, command, *args, "-o", out, env=env)
        check(r.returncode != 0, f"{command}, rank 1 fails ({how}): the run exits non-zero")
        if how == "throw":
            check("lobecast: rank 1 failed: " in r.stderr,
                  f"{command}, rank 1 fails: the message names the rank ({r.stderr.strip()[:300]})")
        with open(out, "rb") as f:
            check(f.read() == b"an older output", f"{command}, rank 1 fails ({how}): the old output is untouched")
        left = glob.glob(os.path.join(work, ".lobecast-*"))
        check(not left, f"{command}, rank 1 fails ({how}): no temporary left ({left})")

# Commands that are not split run once (rank 0), and a bad option is said once.
r = run(2, "report", single)
check(r.returncode == 0 and r.stdout.count("lobecast report:") == 1,
      f"report on 2 ranks runs once ({r.stdout.count('lobecast report:')} reports)")
r = run(2, "tolerance", sample, "--trials", "0", "-o", fresh("bad.h5"))
check(r.returncode != 0 and r.stderr.count("lobecast: --trials") == 1,
      f"a bad option on 2 ranks: non-zero, said once ({r.stderr.strip()[:200]})")

sys.exit(summary("mpi_runs"))
