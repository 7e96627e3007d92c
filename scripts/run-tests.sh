#!/usr/bin/env bash
# The whole test suite, exactly as CI runs it (.ci/run calls this script):
# install what is missing, build (Release), run every test under CTest.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
jobs=$(nproc)
echo "== build (Release)"
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build -j"$jobs"
echo "== tests"
ctest --test-dir build --output-on-failure -j"$jobs" --timeout 900
