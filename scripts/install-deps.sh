#!/usr/bin/env bash
# Installs the Debian packages gapwise needs. Idempotent: silent when all are present.
#
#   bash scripts/install-deps.sh           what a user needs to build, run and test gapwise:
#                                          compiler, CMake, the libraries, MPI, PLplot, HDF5 tools,
#                                          Python 3 with numpy, scipy, h5py, matplotlib, pytest and
#                                          pybind11 (the Python module and its tests)
#   bash scripts/install-deps.sh --dev     also the developer tools: clang 14 with its sanitizer
#                                          and libFuzzer runtimes (libclang-rt-14-dev), ccache;
#                                          scripts/run-tests.sh (CI) needs them
#   bash scripts/install-deps.sh --bench   also the benchmarks' peers (python3-qutip for
#                                          bench/qutip_sesolve_anneal.py)
#   bash scripts/install-deps.sh --list [--dev] [--bench]
#                                          print the packages of that set, install nothing
# Options combine (--dev --bench).
set -euo pipefail
usage() { sed -n '2,15p' "$0" | sed 's/^# \{0,1\}//'; }
user_pkgs=(cmake g++ make pkg-config
           libeigen3-dev libboost-dev libhdf5-dev libcli11-dev doctest-dev
           libspectra-dev libtomlplusplus-dev libfmt-dev
           libopenmpi-dev openmpi-bin libplplot-dev plplot-driver-cairo hdf5-tools
           python3 python3-dev python3-numpy python3-scipy python3-h5py python3-matplotlib
           python3-pytest pybind11-dev python3-pybind11)
dev_pkgs=(clang libclang-rt-14-dev ccache)
bench_pkgs=(python3-qutip)
pkgs=("${user_pkgs[@]}")
list=0
for a in "$@"; do
  case "$a" in
    --dev) pkgs+=("${dev_pkgs[@]}") ;;
    --bench) pkgs+=("${bench_pkgs[@]}") ;;
    --list) list=1 ;;
    -h|--help) usage; exit 0 ;;
    *) echo "install-deps.sh: unknown option '$a' (choose from --dev, --bench, --list, --help)" >&2; exit 2 ;;
  esac
done
if [ "$list" = 1 ]; then printf '%s\n' "${pkgs[@]}"; exit 0; fi
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
