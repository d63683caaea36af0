#!/usr/bin/env bash
# Builds the libFuzzer targets of the model readers with clang 14 (ASan and
# UBSan on) in BUILD_DIR and runs each for SECONDS seconds on a copy of its
# seed corpus. Fails on any crash, leak or sanitizer report.
#   usage: tests/fuzz/run.sh BUILD_DIR [SECONDS]
set -euo pipefail
if [[ $# -lt 1 ]]; then
  echo "usage: $0 BUILD_DIR [SECONDS]" >&2
  exit 2
fi
root=$(cd "$(dirname "$0")/../.." && pwd)
build=$1
seconds=${2:-60}
jobs=${CLAUSEWRIGHT_JOBS:-2}
cxx=${CLAUSEWRIGHT_FUZZ_CXX:-clang++-14}
command -v "$cxx" >/dev/null || cxx=clang++

# The library code is instrumented for coverage and the sanitizers; the
# targets add the fuzzer's main.
cmake -S "$root" -B "$build" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_CXX_COMPILER="$cxx" \
  -DCMAKE_CXX_FLAGS="-fsanitize=fuzzer-no-link,address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer" \
  -DCLAUSEWRIGHT_BUILD_FUZZERS=ON -DCLAUSEWRIGHT_BUILD_TESTS=OFF -DCLAUSEWRIGHT_BUILD_BENCHMARKS=OFF \
  -DCLAUSEWRIGHT_BUILD_EXAMPLES=OFF -DCLAUSEWRIGHT_INSTALL=OFF -DCLAUSEWRIGHT_WERROR=ON >/dev/null
cmake --build "$build" -j "$jobs" --target fuzz_opb fuzz_json

status=0
for target in opb json; do
  binary=$(find "$build" -type f -name "fuzz_$target" -perm -u+x | head -n 1)
  corpus="$build/fuzz-corpus-$target"
  mkdir -p "$corpus"
  cp -n "$root/tests/fuzz/corpus-$target"/* "$corpus"/ 2>/dev/null || true
  log="$build/fuzz_$target.log"
  echo "fuzz_$target: ${seconds}s"
  if ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
    "$binary" -max_total_time="$seconds" -max_len=65536 -rss_limit_mb=2048 -timeout=20 \
    -artifact_prefix="$build/fuzz_$target-" "$corpus" >"$log" 2>&1; then
    grep -E "^(#[0-9]+ *DONE|Done)" "$log" | tail -n 1 || tail -n 1 "$log"
  else
    echo "fuzz_$target FAILED (log: $log)"
    grep -E "ERROR|SUMMARY|==[0-9]+==" "$log" | head -n 20 || tail -n 40 "$log"
    status=1
  fi
done
exit $status
