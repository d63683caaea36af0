#!/usr/bin/env bash
# Installs the Debian packages clausewright builds with, where they are missing.
set -euo pipefail
packages=(cmake g++ clang libcadical-dev nlohmann-json3-dev libcli11-dev libboost-dev libgtest-dev libgmock-dev
          libbenchmark-dev coinor-libclp-dev libglpk-dev pkg-config)
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
