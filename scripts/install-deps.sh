#!/usr/bin/env bash
# Installs the Debian packages that scripts/demo.sh and scripts/test.sh use,
# where they are missing. .ci/run proves the list complete: it runs both in a
# minimal Debian 12 root that has nothing else.
set -euo pipefail
packages=(
  # build: compilers, CMake, make (the generator CMake uses by default)
  cmake make g++ clang
  # test.sh: static analysis
  clang-tidy
  # libraries found with find_package
  libcadical-dev nlohmann-json3-dev libcli11-dev libboost-dev libgtest-dev libgmock-dev libbenchmark-dev
  # test_report: the report page in a headless browser, its screenshot decoded with zlib
  chromium zlib1g-dev
  # the linear relaxation bound (COIN-OR CLP, found through pkg-config) and GLPK, the
  # independent oracle of optimum values in tests and benchmarks
  coinor-libclp-dev pkg-config libglpk-dev
)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if ((${#missing[@]})); then
  echo "installing: ${missing[*]}"
  sudo_cmd=()
  [[ $(id -u) -ne 0 ]] && sudo_cmd=(sudo)
  "${sudo_cmd[@]}" apt-get update -q
  DEBIAN_FRONTEND=noninteractive "${sudo_cmd[@]}" apt-get install -y -q "${missing[@]}"
fi
