#!/usr/bin/env bash
# Builds and runs every test: the Release build with warnings as errors under
# g++, clang-tidy, the AddressSanitizer + UBSan build under clang++ (also with
# warnings as errors), the
# packaging consumers (find_package and add_subdirectory), and the fuzzers for
# a bounded time. Set CLAUSEWRIGHT_FUZZ_SECONDS=0 to skip the fuzz step.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root"
bash scripts/install-deps.sh
jobs=${CLAUSEWRIGHT_JOBS:-$(nproc)}
started=$SECONDS
step() { printf '\n=== %s (%ds)\n' "$*" $((SECONDS - started)); }

step "g++ Release build, -Werror"
cmake -S . -B build/gcc -DCMAKE_BUILD_TYPE=Release -DCMAKE_CXX_COMPILER=g++ -DCLAUSEWRIGHT_WERROR=ON >/dev/null
cmake --build build/gcc -j "$jobs"
step "g++ Release tests"
ctest --test-dir build/gcc -j "$jobs" --output-on-failure

# clang-tidy reads the library headers through the tool's sources, the
# examples and the benchmarks; the tests are left to the two compilers'
# warnings (running it over them too doubles this step, and the whole run
# must stay well under 30 minutes on two cores). Run it over tests/ by hand:
#   find tests -name '*.cpp' | xargs clang-tidy -p build/gcc --quiet
step "clang-tidy (the repository's .clang-tidy) over the tool, the examples and the benchmarks"
dirs=()
for d in src examples benchmarks; do [[ -d $d ]] && dirs+=("$d"); done
if ! find "${dirs[@]}" -name '*.cpp' |
  xargs -r -P "$jobs" -n 4 clang-tidy -p build/gcc --quiet >build/clang-tidy.log 2>&1; then
  grep -E "(error|warning):" build/clang-tidy.log || tail -20 build/clang-tidy.log
  echo "clang-tidy found problems (build/clang-tidy.log)"
  exit 1
fi

step "AddressSanitizer + UBSan build and tests"
# -O1 -g1: sanitizer reports keep file and line, and the build is much
# faster than at -O2 -g.
cmake -S . -B build/sanitize -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_CXX_FLAGS_RELWITHDEBINFO="-O1 -g1 -DNDEBUG" \
  -DCMAKE_CXX_COMPILER=clang++ \
  -DCLAUSEWRIGHT_WERROR=ON -DCLAUSEWRIGHT_SANITIZE=ON -DCLAUSEWRIGHT_BUILD_BENCHMARKS=OFF >/dev/null
cmake --build build/sanitize -j "$jobs"
ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
  ctest --test-dir build/sanitize -j "$jobs" --output-on-failure

step "packaging: install + find_package consumer, add_subdirectory consumer"
rm -rf build/install build/consumer-*
cmake --install build/gcc --prefix build/install >/dev/null
cmake -S tests/consumers/find_package -B build/consumer-find -DCMAKE_PREFIX_PATH="$root/build/install" \
  -DCMAKE_CXX_FLAGS="-Wall -Wextra -Wpedantic -Werror" >/dev/null
cmake --build build/consumer-find -j "$jobs"
build/consumer-find/consumer
build/consumer-find/consumer_solve
build/consumer-find/consumer_lp
cmake -S tests/consumers/subdirectory -B build/consumer-sub -DCLAUSEWRIGHT_SOURCE_DIR="$root" \
  -DCMAKE_CXX_FLAGS="-Wall -Wextra -Wpedantic -Werror" >/dev/null
cmake --build build/consumer-sub -j "$jobs"
build/consumer-sub/consumer
build/consumer-sub/consumer_solve
build/consumer-sub/consumer_lp

fuzz_seconds=${CLAUSEWRIGHT_FUZZ_SECONDS:-20}
if [[ -x tests/fuzz/run.sh && $fuzz_seconds != 0 ]]; then
  step "fuzzing the readers, ${fuzz_seconds}s each"
  bash tests/fuzz/run.sh build/fuzz "$fuzz_seconds"
fi
step "all tests passed"
