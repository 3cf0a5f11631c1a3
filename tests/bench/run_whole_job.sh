#!/usr/bin/env bash
# Whole-job benchmarks (figures, not tests), measured side by side in one run; prints a
# markdown table (README "Speed", tests/bench/RESULTS.md "Whole job with the analysis"):
#
#   1. random-1024.toml (1024 dipoles at random positions, 1 deg grid): `lobecast
#      compute` with the analysis against numpy_job.py (the same field, power,
#      directivity, polarization and HDF5 in plain vectorized NumPy, no analysis);
#   2. lattice-1000x1000.toml (10^6 dipoles, 1 001 000 directions): compute with the
#      power and the analysis;
#   3. 10^6 dipoles at random positions on the same 500-wavelength square and grid
#      (written by make_random_array.py into a temporary folder, 150 MB of CSV).
#
#   tests/bench/run_whole_job.sh LOBECAST_EXE [cases]     (cases: default "1 2 3")
#
# Each run is timed by /usr/bin/time -v (wall, peak resident memory); route tables
# (--method, --power-method) are in run_routes.sh. Takes minutes: run it once, on a
# machine as idle as you can get.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
exe="$1"
cases="${2:-1 2 3}"
py=/usr/bin/python3
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT

# run LABEL CMD...: one table row (wall s, peak MiB) and the job's own timing line.
run() {
  local label="$1"
  shift
  /usr/bin/time -v "$@" >"$work/out" 2>"$work/err" || { echo "| $label | failed |"; cat "$work/err" >&2; return 1; }
  local wall rss cpu
  wall="$(sed -n 's/.*Elapsed (wall clock) time (h:mm:ss or m:ss): //p' "$work/err" |
    awk -F: '{ if (NF == 3) print $1 * 3600 + $2 * 60 + $3; else print $1 * 60 + $2 }')"
  cpu="$(sed -n 's/.*\(User\|System\) time (seconds): //p' "$work/err" | awk '{ s += $1 } END { print s }')"
  rss="$(sed -n 's/.*Maximum resident set size (kbytes): //p' "$work/err")"
  echo "$wall $cpu $((rss / 1024))" >"$work/last"
  echo "| $label | $wall | $cpu | $((rss / 1024)) |"
  grep -h "^time\|numpy_job:\|analysis\|exact field" "$work/out" "$work/err" | sed 's/^/    /' >&2 || true
}

echo "Load average before: $(cut -d' ' -f1-3 /proc/loadavg); $(nproc) CPUs"
echo
echo "| job | wall s | CPU s (user + system) | peak MiB |"
echo "|---|---:|---:|---:|"
if [[ " $cases " == *" 1 "* ]]; then
  run "numpy_job.py, random 1024, 1 deg (no analysis)" \
    "$py" "$here/numpy_job.py" "$here/random-1024.toml" -o "$work/np.h5"
  read -r np_wall np_cpu _ <"$work/last"
  run "lobecast compute, random 1024, 1 deg, with analysis" \
    "$exe" compute "$here/random-1024.toml" -o "$work/lc.h5"
  read -r lc_wall lc_cpu _ <"$work/last"
  run "lobecast compute --no-analysis, random 1024, 1 deg" \
    "$exe" compute "$here/random-1024.toml" -o "$work/lc.h5" --no-analysis
  read -r lf_wall lf_cpu _ <"$work/last"
  echo
  awk -v a="$np_wall" -v b="$lc_wall" -v c="$lf_wall" -v d="$np_cpu" -v e="$lc_cpu" -v f="$lf_cpu" \
    'BEGIN { printf "Ratio to numpy_job.py: wall %.1fx with the analysis, %.1fx without; CPU %.1fx with, %.1fx without\n\n", a / b, a / c, d / e, d / f }'
fi
if [[ " $cases " == *" 2 "* ]]; then
  # --max-hours 10: the analysis is not priced by the run estimate (which prices the
  # lattice transform and the quadrature auto takes: about 6.5 s).
  run "lobecast compute, 1000 x 1000 lattice, 1 001 000 directions, power and analysis" \
    "$exe" compute "$here/lattice-1000x1000.toml" -o "$work/lat.h5" --max-hours 10
  rm -f "$work/lat.h5"
fi
if [[ " $cases " == *" 3 "* ]]; then
  "$py" "$here/make_random_array.py" --count 1000000 --edge 500 --layout plane \
    --step 0.18 --phi-step 0.36 -o "$work/random-1e6.toml"
  run "lobecast compute, 10^6 random positions, 1 001 000 directions, power and analysis" \
    "$exe" compute "$work/random-1e6.toml" -o "$work/rnd.h5" --max-hours 1
fi
echo
echo "Load average after: $(cut -d' ' -f1-3 /proc/loadavg)"
