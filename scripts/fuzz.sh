#!/usr/bin/env bash
# Runs every libFuzzer target for SECONDS each (default 45), niced, and fails
# when a target finds a crash. Needs the fuzz build (see scripts/run-tests.sh):
#   cmake -S . -B build-fuzz -DCMAKE_C_COMPILER=clang -DCMAKE_CXX_COMPILER=clang++ \
#         -DGAPWISE_FUZZ=ON -DGAPWISE_BUILD_TESTS=OFF && cmake --build build-fuzz --target fuzz_all -j2
#   bash scripts/fuzz.sh 1800            # a long session: 30 minutes per target
#   bash scripts/fuzz.sh 60 schedule     # one target only (problem, schedule, embedding)
# The growing corpus is kept in build-fuzz/corpus/<target>/; crashing inputs
# land in build-fuzz/artifacts/ and must become regression inputs under
# tests/fuzz-regressions/<parser>/ (checked by tests/test_fuzz_regressions.cpp).
set -euo pipefail
cd "$(dirname "$0")/.."
seconds=${1:-45}
only=${2:-}
# Seeds: the shipped samples (the embedding seeds are the *-embedding.toml
# samples; the other samples still teach the fuzzer TOML).
declare -A seeds=([problem]="data-samples" [schedule]="schedules" [embedding]="data-samples")
status=0
for parser in problem schedule embedding; do
  [ -n "$only" ] && [ "$only" != "$parser" ] && continue
  exe=build-fuzz/fuzz/fuzz_${parser}_file
  [ -x "$exe" ] || { echo "fuzz.sh: $exe is not built" >&2; exit 1; }
  corpus=build-fuzz/corpus/$parser
  mkdir -p "$corpus" build-fuzz/artifacts
  regress=tests/fuzz-regressions/$parser
  dirs=("$corpus" "${seeds[$parser]}")
  [ -d "$regress" ] && dirs+=("$regress")
  echo "== fuzz $parser parser for ${seconds} s (seeds: ${dirs[*]:1})"
  if ! ASAN_OPTIONS="detect_leaks=1:abort_on_error=1" UBSAN_OPTIONS="print_stacktrace=1:halt_on_error=1" \
       nice -n 19 "$exe" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -max_len=4096 \
       -dict=fuzz/dicts/$parser.dict -artifact_prefix=build-fuzz/artifacts/$parser- \
       -print_final_stats=1 "${dirs[@]}" > build-fuzz/fuzz-$parser.log 2>&1; then
    echo "fuzz.sh: the $parser parser failed; see build-fuzz/fuzz-$parser.log and build-fuzz/artifacts/" >&2
    tail -40 build-fuzz/fuzz-$parser.log >&2
    status=1
  fi
  grep -E "^stat::number_of_executed_units|^stat::peak_rss_mb|cov:" build-fuzz/fuzz-$parser.log | tail -3
done
exit $status
