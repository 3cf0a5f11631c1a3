#!/usr/bin/env bash
# Fails when any C++ file of the repository differs from clang-format's output
# (.clang-format at the root). Run by ctest as format_check; fix with
#   git ls-files '*.cpp' '*.h' | xargs clang-format -i
set -euo pipefail
cd "$1"
clang_format=${2:-clang-format}
mapfile -t files < <(git ls-files '*.cpp' '*.h' 2>/dev/null || find engine io cli tests -name '*.cpp' -o -name '*.h')
bad=()
for f in "${files[@]}"; do
  "$clang_format" --dry-run -Werror "$f" >/dev/null 2>&1 || bad+=("$f")
done
if [ ${#bad[@]} -gt 0 ]; then
  echo "lobecast: ${#bad[@]} file(s) not clang-formatted: ${bad[*]}" >&2
  echo "fix with: git ls-files '*.cpp' '*.h' | xargs $clang_format -i" >&2
  exit 1
fi
echo "format_check: ${#files[@]} files clang-formatted"
