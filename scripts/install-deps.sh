#!/usr/bin/env bash
# Installs the Debian packages gapwise needs. Idempotent: silent when all are present.
# --bench: also the benchmark-only peers (python3-qutip for bench/qutip_sesolve_anneal.py).
set -euo pipefail
pkgs=(cmake g++ make pkg-config
      libeigen3-dev libboost-dev libhdf5-dev libcli11-dev doctest-dev
      libspectra-dev libtomlplusplus-dev libfmt-dev
      libopenmpi-dev openmpi-bin libplplot-dev plplot-driver-cairo hdf5-tools
      clang libclang-rt-14-dev ccache
      python3 python3-numpy python3-scipy python3-h5py python3-matplotlib
      pybind11-dev python3-pybind11 python3-pytest python3-dev)
[ "${1:-}" = "--bench" ] && pkgs+=(python3-qutip)
missing=()
for p in "${pkgs[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
[ ${#missing[@]} -eq 0 ] && exit 0
echo "gapwise: installing missing packages: ${missing[*]}" >&2
SUDO=""
[ "$(id -u)" -eq 0 ] || SUDO="sudo"
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
