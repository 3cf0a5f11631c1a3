#!/usr/bin/env bash
# Runs every libFuzzer target of a LOBECAST_FUZZ=ON build for a bounded time.
#   bash tests/fuzz/run_fuzzers.sh BUILD_DIR [SECONDS_PER_TARGET (default 60)] [TARGET...]
# Seeds: sample-arrays/ and the bad-input corpus (tests/data/bad/) for the text
# readers, tests/fuzz/seeds/result/ (small results) for the result reader, and each
# target's regressions/ folder. The corpus grows in BUILD_DIR/fuzz-corpus/<target>;
# a finding is written to BUILD_DIR/fuzz-findings/ and makes the script fail: copy
# it into tests/fuzz/regressions/<target>/ with the fix (DEVELOPERS.md).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
repo="$(cd "$here/../.." && pwd)"
build="$(cd "${1:?usage: run_fuzzers.sh BUILD_DIR [SECONDS] [TARGET...]}" && pwd)"
seconds="${2:-60}"
shift $(( $# >= 2 ? 2 : $# ))
targets=("$@")
[ ${#targets[@]} -gt 0 ] || targets=(array csv design result)

# The fontconfig leak (tests/lsan.supp) and stop at the first finding.
# An allocation larger than the machine could ever give (a damaged size HDF5 passes
# to malloc: 759 GB, 3e16 bytes) returns null, as the C library's malloc does and as
# HDF5 expects (it then fails cleanly; the plain build refuses such files with exit
# 2), instead of aborting. One that could succeed is still a finding: libFuzzer's
# malloc limit (-rss_limit_mb, 2 GB) stops any single allocation above it.
export ASAN_OPTIONS="${ASAN_OPTIONS:-detect_leaks=1}:allocator_may_return_null=1"
export LSAN_OPTIONS="${LSAN_OPTIONS:-suppressions=$repo/tests/lsan.supp:print_suppressions=0}"
export UBSAN_OPTIONS="${UBSAN_OPTIONS:-print_stacktrace=1:halt_on_error=1}"

seeds() {
  local target=$1 dir=$2
  mkdir -p "$dir"
  case "$target" in
    array) cp "$repo"/sample-arrays/*.toml "$repo"/tests/data/bad/*.toml "$dir"/ ;;
    csv) cp "$repo"/sample-arrays/*.csv "$repo"/tests/data/bad/*.csv "$dir"/ ;;
    design) cp "$repo"/sample-arrays/design-*.toml "$dir"/ ;;
    result) cp "$repo"/tests/fuzz/seeds/result/*.h5 "$dir"/ ;;
  esac
  cp "$here/regressions/$target"/* "$dir"/ 2>/dev/null || true
}

status=0
mkdir -p "$build/fuzz-findings"
for target in "${targets[@]}"; do
  exe="$build/tests/fuzz/${target}_fuzz"
  [ -x "$exe" ] || { echo "run_fuzzers: $exe not built (configure with -DLOBECAST_FUZZ=ON)" >&2; exit 2; }
  corpus="$build/fuzz-corpus/$target"
  seed_dir="$build/fuzz-seeds/$target"
  rm -rf "$seed_dir"
  seeds "$target" "$seed_dir"
  mkdir -p "$corpus"
  log="$build/fuzz-findings/$target.log"
  echo "== $target: ${seconds} s"
  # -timeout: one input taking 60 s is a finding (a hang). A valid design can take
  # seconds: a side-lobe envelope over 50 dipoles solves a linear program of 10^4
  # rows (4 s in a release build, several times that under the sanitizers; a 10 s
  # limit reported it as a hang). -rss_limit_mb: 2 GB of memory in use is a finding.
  # -malloc_limit_mb: one allocation is a finding only above 4200 MB. HDF5 1.10.8
  # allocates a chunk's buffer by the size its index claims (32 bits) before it
  # reads the file: a damaged size asked for 2 GB it never touched (`report`: exit 2,
  # 22 MB peak; regression oom-chunk-size-2gb.h5), which the default, equal to the
  # RSS limit, reported as out of memory.
  if ! "$exe" -max_total_time="$seconds" -timeout=60 -rss_limit_mb=2048 \
      -malloc_limit_mb=4200 -max_len=65536 \
      -print_final_stats=1 -artifact_prefix="$build/fuzz-findings/$target-" \
      "$corpus" "$seed_dir" > "$log" 2>&1; then
    echo "run_fuzzers: $target found a problem (see $log and $build/fuzz-findings/)" >&2
    tail -40 "$log" >&2
    status=1
  fi
  grep -E "stat::number_of_executed_units|stat::peak_rss_mb" "$log" | sed "s/^/  $target /" || true
done
exit $status
