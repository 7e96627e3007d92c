#!/usr/bin/env bash
# From a fresh clone: install what is missing, build, and run the main job on
# bundled samples (how likely one anneal of the frustrated triangle ends in its
# ground state; which duration the meeting-slots QUBO needs for 99 %).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build -j"$(nproc)" --target gapwise
echo
echo "== gapwise inspect data-samples/triangle.toml"
build/gapwise inspect data-samples/triangle.toml
echo
echo "== gapwise anneal data-samples/triangle.toml schedules/linear.toml -d 20"
build/gapwise anneal data-samples/triangle.toml schedules/linear.toml -d 20
echo
echo "== gapwise durations data-samples/meeting-slots-qubo.toml schedules/linear.toml"
build/gapwise durations data-samples/meeting-slots-qubo.toml schedules/linear.toml
