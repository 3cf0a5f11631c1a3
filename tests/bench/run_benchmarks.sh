#!/usr/bin/env bash
# Runs the far-field benchmark (field_bench.cpp), one process per case so that each
# case's peak memory is its own, and writes tests/bench/RESULTS.md.
#
#   tests/bench/run_benchmarks.sh [build-dir]      (default: build-bench)
#
# Set FIELD_BENCH=/path/to/field_bench to use an existing binary instead of
# building one. Takes a few minutes on a 2-core machine; run it on an idle one.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
root="$(cd "$here/../.." && pwd)"
build="${1:-$root/build-bench}"
out="$here/RESULTS.md"

if [[ -z "${FIELD_BENCH:-}" ]]; then
  cmake -S "$root" -B "$build" -DCMAKE_BUILD_TYPE=Release -DLOBECAST_BUILD_BENCHMARKS=ON >/dev/null
  cmake --build "$build" --target field_bench lobecast -j"$(nproc)" >/dev/null
  FIELD_BENCH="$build/tests/bench/field_bench"
fi
LOBECAST="${LOBECAST:-$build/cli/lobecast}"

work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
# Everything from the line "## Measurements kept across runs" on (hand-written
# before/after figures of past changes) is kept at the end of the new file.
kept="$work/kept.md"
if [[ -f "$out" ]]; then sed -n '/^## Measurements kept across runs/,$p' "$out" >"$kept"; fi
load_before="$(cut -d' ' -f1-3 /proc/loadavg)"

# N/step/layout (field_bench.cpp): 0 jittered lattice, 1 general, 2 exact lattice,
# 3 sparse (2-wavelength) lattice; each with the methods that apply to it.
runs=()
for step in 100 25; do
  for n in 16 256 1024 4096 65536; do
    for m in ScalarLoop Direct Fast; do runs+=("$m/$n/$step/0"); done
  done
  for m in ScalarLoop Direct Fast; do runs+=("$m/1024/$step/1"); done
  for layout in 2 3; do
    for n in 256 4096 65536; do
      for m in Fast FastType3; do runs+=("$m/$n/$step/$layout"); done
    done
  done
done
i=0
for r in "${runs[@]}"; do
  i=$((i + 1))
  echo "[$i/${#runs[@]}] $r" >&2
  "$FIELD_BENCH" --benchmark_filter="^BM_$r/" --benchmark_format=json \
    >"$work/$(printf '%03d' $i).json" 2>/dev/null
done
load_after="$(cut -d' ' -f1-3 /proc/loadavg)"

python3 - "$work" "$out" "$load_before" "$load_after" <<'PY'
import glob, json, os, platform, subprocess, sys
work, out, load_before, load_after = sys.argv[1:5]
rows, scalar = [], {}
for f in sorted(glob.glob(os.path.join(work, "*.json"))):
    data = json.load(open(f))
    for b in data["benchmarks"]:
        name = b["name"].split("/")
        method, n, step, layout = name[0][3:], int(name[1]), int(name[2]) / 100, int(name[3])
        if method.startswith("Fast"):
            method = "Fast (lattice)" if b.get("lattice") else "Fast (type-3)"
        key = (n, step, layout)
        r = dict(method=method, n=n, step=step, layout=layout, ms=b["real_time"],
                 cpu_pairs=b["pairs_per_s"] * b["real_time"] / b["cpu_time"],
                 pairs=b["pairs_per_s"], dirs=int(b["directions"]), mib=b["peak_MiB"],
                 threads=int(b["threads"]), err=b.get("error_rel_peak"), bound=b.get("error_bound"))
        if method == "ScalarLoop":
            scalar[key] = r["cpu_pairs"]
        rows.append(r)
ctx = data["context"]

def lscpu(field):
    try:
        for line in subprocess.run(["lscpu"], capture_output=True, text=True).stdout.splitlines():
            if line.startswith(field + ":"):
                return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return "?"

full = {1.0: 181 * 361, 0.25: 721 * 1441}
with open(out, "w") as o:
    o.write("# Far-field benchmark\n\n")
    o.write("Written by `tests/bench/run_benchmarks.sh` from `tests/bench/field_bench.cpp`.\n\n")
    o.write(f"- Machine: {lscpu('Model name')}, {os.cpu_count()} logical CPUs "
            f"({lscpu('Core(s) per socket')} cores per socket), {ctx.get('mhz_per_cpu', '?')} MHz\n")
    o.write(f"- Threads: {rows[0]['threads'] if rows else '?'}; build: portable (no -march=native), "
            "direct kernels dispatched at run time (x86-64-v4 / v3 / baseline)\n")
    o.write(f"- {platform.system()} {platform.release()}, {ctx.get('date', '')}\n")
    o.write(f"- Load average before / after: {load_before} / {load_after} "
            "(the machine is shared; wall times under load are pessimistic)\n\n")
    o.write("Arrays: z-directed short dipoles on a planar half-wavelength lattice with a "
            "small jitter (random currents; the type-3 fast path); *general*: random "
            "orientations and a 3-D jitter; *lattice*: the same lattice exactly (the lattice "
            "fast path, and type 3 alone for comparison); *sparse lattice*: pitch 2 "
            "wavelengths. *vs scalar* for lattice rows uses the jittered array's scalar loop "
            "(the same work per pair). Grids cover the "
            "full sphere (1 deg: 65 341 directions, 0.25 deg: 1 038 961). Scalar and direct "
            "cases with many pairs run on an evenly strided subset of the grid (column "
            "*directions*); pairs/s is comparable across rows. The fast path always runs "
            "the full grid, plan included; its error is measured against the direct sum on "
            "about 4000 directions, relative to the pattern peak (requested tolerance 1e-9).\n\n")
    o.write("*pairs/s* is wall-clock; *pairs/CPU-s* divides by the process CPU time "
            "(all threads), i.e. the rate per core, which is what a loaded shared machine "
            "still measures fairly; *vs scalar* compares pairs/CPU-s with the scalar loop's.\n\n")
    o.write("| method | N | grid | directions | wall ms | pairs/s | pairs/CPU-s | vs scalar | peak MiB | fast error (measured / bound) |\n")
    o.write("|---|---:|---:|---:|---:|---:|---:|---:|---:|---|\n")
    names = {0: "", 1: " general", 2: " lattice", 3: " sparse lattice"}
    for r in rows:
        key = (r["n"], r["step"], r["layout"])
        ref = scalar.get(key, scalar.get((r["n"], r["step"], 0)))
        ratio = r["cpu_pairs"] / ref if ref else float("nan")
        err = f"{r['err']:.1e} / {r['bound']:.1e}" if r["err"] is not None else ""
        label = f"{r['n']}{names[r['layout']]}"
        o.write(f"| {r['method']} | {label} | {r['step']:g} deg | {r['dirs']} | {r['ms']:.1f} | "
                f"{r['pairs']:.3g} | {r['cpu_pairs']:.3g} | {ratio:.1f}x | {r['mib']:.0f} | {err} |\n")
print(f"wrote {out}", file=sys.stderr)
PY

# The whole job: `lobecast compute` on a 4096-dipole panel (1 deg grid), reading the
# CSV, computing field, power and analysis, and writing the HDF5 file.
{
  echo
  echo "## Whole job: lobecast compute, 4096 dipoles, 1 deg grid"
  echo
  echo "Input \`tests/bench/panel-4096.toml\` (64 x 64 x-directed dipoles over PEC, so 8192 sources; 65 341 directions), HDF5 output including the 4096 x 4096 resistance matrix (128 MiB)."
  echo
  echo "| --method | wall s | peak RSS MiB | field s | power s |"
  echo "|---|---:|---:|---:|---:|"
  for m in direct fast; do
    res="$work/panel-$m.h5"
    summary="$( { /usr/bin/time -f 'TIME %e %M' "$LOBECAST" compute "$here/panel-4096.toml" -o "$res" --method "$m"; } 2>&1 )"
    wall="$(sed -n 's/^TIME \([0-9.]*\) \([0-9]*\)$/\1/p' <<<"$summary")"
    rss="$(sed -n 's/^TIME \([0-9.]*\) \([0-9]*\)$/\2/p' <<<"$summary")"
    field="$(sed -n 's/.*(field \([0-9.]*\) s, power \([0-9.]*\) s).*/\1/p' <<<"$summary")"
    power="$(sed -n 's/.*(field \([0-9.]*\) s, power \([0-9.]*\) s).*/\2/p' <<<"$summary")"
    echo "| $m | $wall | $((rss / 1024)) | $field | $power |"
  done
} >>"$out"
echo "appended the whole-job timing to $out" >&2
if [[ -s "$kept" ]]; then
  { echo; cat "$kept"; } >>"$out"
fi
