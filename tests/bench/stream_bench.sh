#!/usr/bin/env bash
# Benchmark (4), streaming: `lobecast compute --stream` on stream-1e8.toml (four
# dipoles, 10000 x 10000 = 1e8 directions), written block by block to an HDF5
# file that is never whole in memory. Prints wall and CPU time, peak memory
# (/usr/bin/time -v) and the file's size, then deletes the file. Not a test (ctest
# does not run it): `cmake --build BUILD --target stream_bench`, or
#
#   tests/bench/stream_bench.sh [lobecast] [output-folder]
#
# (defaults: build/cli/lobecast, a temporary folder under the current one). Needs
# about 7 GB free in the output folder (the estimate's upper bound; the file itself
# is smaller) and a few minutes; run it once, on an idle machine.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
exe="${1:-$here/../../build/cli/lobecast}"
parent="${2:-$PWD}"
work="$(mktemp -d "$parent/stream-bench.XXXXXX")"
trap 'rm -rf "$work"' EXIT
out="$work/stream-1e8.h5"

/usr/bin/time -v "$exe" compute --stream "$here/stream-1e8.toml" -o "$out" \
  >"$work/stdout" 2>"$work/stderr"
bytes="$(stat -c %s "$out")"
field() { sed -n "s/^[[:space:]]*$1: //p" "$work/stderr"; }
wall="$(field 'Elapsed (wall clock) time (h:mm:ss or m:ss)')"
user="$(field 'User time (seconds)')"
system="$(field 'System time (seconds)')"
rss_kb="$(field 'Maximum resident set size (kbytes)')"
grep -E '^(grid|time|streamed|analysis on|beam) ' "$work/stdout"
echo "load $(cut -d' ' -f1-3 /proc/loadavg), $(nproc) cores, $(date -u +%Y-%m-%d)"
awk -v wall="$wall" -v user="$user" -v sys="$system" -v rss="$rss_kb" -v bytes="$bytes" 'BEGIN {
  printf "| 1e8 directions, 4 dipoles, --stream | %s wall | %s s user + %s s system | %.0f MiB peak | %.2f GB file (%.0f bytes) |\n",
    wall, user, sys, rss / 1024, bytes / 1e9, bytes }'
