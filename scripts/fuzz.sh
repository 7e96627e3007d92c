#!/usr/bin/env bash
# Runs every libFuzzer target for SECONDS each (default 60), niced, and fails
# when a target finds a crash. Needs the fuzz build (see scripts/run-tests.sh):
#   cmake -S . -B build-fuzz -DCMAKE_C_COMPILER=clang -DCMAKE_CXX_COMPILER=clang++ \
#         -DGAPWISE_FUZZ=ON -DGAPWISE_BUILD_TESTS=OFF && cmake --build build-fuzz --target fuzz_all -j2
#   bash scripts/fuzz.sh 1800            # a long session: 30 minutes per target
#   bash scripts/fuzz.sh 60 schedule     # one target only (problem, schedule, embedding,
#                                        # instance-set, journal)
# GAPWISE_FUZZ_SEED picks libFuzzer's random seed: unset or 0, a new one each
# run (exploration: what a long session wants); any other number repeats the
# same mutations on the same build and starting corpus (CI sets 1, so a CI
# failure can be replayed, and a run here at least as long as CI's, from an
# empty build-fuzz/corpus/, has already tried what CI's will).
# The growing corpus is kept in build-fuzz/corpus/<target>/; crashing inputs
# land in build-fuzz/artifacts/ and must become regression inputs under
# tests/fuzz-regressions/<parser>/ (checked by tests/test_fuzz_regressions.cpp).
set -euo pipefail
cd "$(dirname "$0")/.."
seconds=${1:-60}
seed=${GAPWISE_FUZZ_SEED:-0}
only=${2:-}
# Seeds: the shipped samples (the embedding seeds are the *-embedding.toml
# samples; the other samples still teach the fuzzer TOML). The instance-set and
# journal targets are seeded from their regression folders only (generated sets
# and journals; their first byte picks the mode, see fuzz/parser_checks.hpp).
declare -A seeds=([problem]="data-samples" [schedule]="schedules" [embedding]="data-samples"
                  [instance-set]="" [journal]="")
# Longest input: HDF5 instance sets are a few tens of kB, the text formats far less.
declare -A max_len=([problem]=4096 [schedule]=4096 [embedding]=4096 [instance-set]=32768 [journal]=4096)
status=0
for parser in problem schedule embedding instance-set journal; do
  [ -n "$only" ] && [ "$only" != "$parser" ] && continue
  exe=build-fuzz/fuzz/fuzz_${parser//-/_}_file
  [ -x "$exe" ] || { echo "fuzz.sh: $exe is not built" >&2; exit 1; }
  corpus=build-fuzz/corpus/$parser
  mkdir -p "$corpus" build-fuzz/artifacts
  regress=tests/fuzz-regressions/$parser
  dirs=("$corpus")
  [ -n "${seeds[$parser]}" ] && dirs+=("${seeds[$parser]}")
  [ -d "$regress" ] && dirs+=("$regress")
  echo "== fuzz $parser parser for ${seconds} s (random seed ${seed/#0/new each run}; seed inputs: ${dirs[*]:1})"
  if ! ASAN_OPTIONS="detect_leaks=1:abort_on_error=1" UBSAN_OPTIONS="print_stacktrace=1:halt_on_error=1" \
       nice -n 19 "$exe" -max_total_time="$seconds" -seed="$seed" -timeout=10 -rss_limit_mb=2048 -max_len="${max_len[$parser]}" \
       -dict=fuzz/dicts/$parser.dict -artifact_prefix=build-fuzz/artifacts/$parser- \
       -print_final_stats=1 "${dirs[@]}" > build-fuzz/fuzz-$parser.log 2>&1; then
    echo "fuzz.sh: the $parser parser failed; see build-fuzz/fuzz-$parser.log and build-fuzz/artifacts/" >&2
    tail -40 build-fuzz/fuzz-$parser.log >&2
    status=1
  fi
  grep -E "^stat::number_of_executed_units|^stat::peak_rss_mb|cov:" build-fuzz/fuzz-$parser.log | tail -3
done
exit $status
