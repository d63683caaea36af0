#!/usr/bin/env bash
# Installs what is missing, builds in Release and runs the bundled demo: the
# size table of the candidate encodings, the picks, the solve with the embedded
# CaDiCaL, and the decoded optimum.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root"
bash scripts/install-deps.sh
cmake -S . -B build/release -DCMAKE_BUILD_TYPE=Release -DCLAUSEWRIGHT_BUILD_TESTS=OFF \
  -DCLAUSEWRIGHT_BUILD_BENCHMARKS=OFF >/dev/null
cmake --build build/release -j "$(nproc)" --target clausewright_tool
build/release/src/clausewright solve examples/models/demo.json --stats
