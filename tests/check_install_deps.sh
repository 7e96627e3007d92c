#!/usr/bin/env bash
# scripts/install-deps.sh: the user set builds, runs and tests gapwise (and its
# Python module) without developer tools; --dev adds clang, its sanitizer
# runtimes and ccache (what scripts/run-tests.sh needs); --bench the peers; a
# wrong option is refused with exit code 2 and the choices. Only --list is run
# (nothing is installed).
set -euo pipefail
script="$1/scripts/install-deps.sh"
fail() { echo "check_install_deps: $*" >&2; exit 1; }
user=$(bash "$script" --list)
dev=$(bash "$script" --list --dev)
bench=$(bash "$script" --list --bench)
for p in g++ cmake libeigen3-dev libhdf5-dev python3-numpy python3-h5py python3-scipy python3-matplotlib \
         python3-pytest pybind11-dev python3-pybind11; do
  grep -qx "$p" <<<"$user" || fail "the user set lacks $p"
done
for p in clang libclang-rt-14-dev ccache python3-qutip; do
  ! grep -qx "$p" <<<"$user" || fail "the user set holds the developer/benchmark package $p"
done
for p in clang libclang-rt-14-dev ccache; do grep -qx "$p" <<<"$dev" || fail "--dev lacks $p"; done
grep -qx python3-qutip <<<"$bench" || fail "--bench lacks python3-qutip"
grep -q '^bash scripts/install-deps.sh --dev$' "$1/scripts/run-tests.sh" || fail "run-tests.sh does not install with --dev"
rc=0; err=$(bash "$script" --devel 2>&1) || rc=$?
[ "$rc" = 2 ] || fail "an unknown option gave exit code $rc, not 2"
grep -q -- "--dev" <<<"$err" || fail "the refusal does not name the options: $err"
echo "install-deps sets ok"
