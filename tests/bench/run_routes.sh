#!/usr/bin/env bash
# Route benchmark (figures, not a test): does `--method auto` / `--power-method auto`
# take the faster route on the whole-job benchmark cases? Each case is computed with
# every field method (direct, fast, auto) and every power method (closed, quadrature,
# auto), without the analysis (it does not depend on the route), one run each, side by
# side in one session; prints a markdown table of the field and power seconds the job
# itself reports and the route auto took. A route whose run estimate is above
# --max-hours (default 0.05 h = 3 min) is refused by lobecast before it starts: its
# row shows the estimate instead of a time.
#
#   tests/bench/run_routes.sh LOBECAST_EXE [cases]     (cases: default "1 2 3 4")
#
#   1. random-1024.toml (1024 dipoles at random positions, 65 160 directions);
#   2. panel-4096.toml (64 x 64 dipoles over PEC, 65 341 directions);
#   3. lattice-1000x1000.toml (10^6 dipoles on a lattice, 1 001 000 directions);
#   4. 10^6 dipoles at random positions on the same square and grid
#      (make_random_array.py, 150 MB of CSV in a temporary folder).
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
exe="$1"
cases="${2:-1 2 3 4}"
hours="${MAX_HOURS:-0.05}"
py=/usr/bin/python3
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT

# row CASE FIELD POWER ARRAY: one table row from one run.
row() {
  local label="$1" field="$2" power="$3" array="$4"
  if "$exe" compute "$array" -o "$work/out.h5" --no-analysis --method "$field" \
    --power-method "$power" --max-hours "$hours" >"$work/out" 2>"$work/err"; then
    local times route
    times="$(sed -n 's/^time .*(field \([0-9.]*\) s, power \([0-9.]*\) s).*/\1 | \2/p' "$work/out")"
    route="$(sed -n 's/^method *//p' "$work/out")"
    echo "| $label | $field | $power | $times | $route |"
  else
    local why
    why="$(sed -n 's/^lobecast: //p' "$work/err" | head -1 | cut -c1-160)"
    echo "| $label | $field | $power | refused | refused | $why |"
  fi
  rm -f "$work/out.h5"
}

echo "Load average before: $(cut -d' ' -f1-3 /proc/loadavg); $(nproc) CPUs; $(date -u +%Y-%m-%d)"
echo
echo "| case | --method | --power-method | field s | power s | route taken (auto's choice) |"
echo "|---|---|---|---:|---:|---|"
run_case() {
  local label="$1" array="$2"
  for f in direct fast auto; do row "$label" "$f" auto "$array"; done
  for p in closed quadrature; do row "$label" auto "$p" "$array"; done
}
[[ " $cases " == *" 1 "* ]] && run_case "random 1024" "$here/random-1024.toml"
[[ " $cases " == *" 2 "* ]] && run_case "panel 4096 over PEC" "$here/panel-4096.toml"
[[ " $cases " == *" 3 "* ]] && run_case "lattice 1000 x 1000" "$here/lattice-1000x1000.toml"
if [[ " $cases " == *" 4 "* ]]; then
  "$py" "$here/make_random_array.py" --count 1000000 --edge 500 --layout plane \
    --step 0.18 --phi-step 0.36 -o "$work/random-1e6.toml"
  run_case "random 10^6" "$work/random-1e6.toml"
fi
echo
echo "Load average after: $(cut -d' ' -f1-3 /proc/loadavg)"
