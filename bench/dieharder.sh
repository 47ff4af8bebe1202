#!/usr/bin/env bash
# Runs the simulator's raw generator output through Debian's dieharder.
#
#   bash bench/dieharder.sh            # the default subset (below): 8–10 min on 2 idle cores
#   DIEHARDER_TESTS=all bash bench/dieharder.sh    # dieharder -a (several hours with lagged sums)
#   DIEHARDER_TESTS="0 2 100" SEED=7 STREAMS=16 bash bench/dieharder.sh
#
# The words come from bench/dieharder-source.ts: xoshiro128** seeded and jumped exactly as a run
# seeds the stream of seeding block 0 of point 0 (STREAMS=K interleaves blocks 0 … K-1 word by
# word, so the tests also see neighbouring streams side by side). They are piped raw into
# `dieharder -g 200` (stdin_input_raw). Each test is a separate dieharder call on a fresh
# generator start, so test ids can be added or dropped freely.
#
# Default subset: every "Good" test of `dieharder -l` except the ones that take most of the time
# of `-a` on this kind of machine — diehard_dna (7, also rated "Suspect"), diehard_sums (14,
# "Do Not Use") and the long lagged-sum and bit-distribution series; rgb_lagged_sum runs at
# lags 1 and 8 only (-a runs lags 0 … 32, about 11 s × (lag + 1) each), rgb_bitdist at
# ntuples 1, 2, 4 and 8 (-a: 1 … 12), rgb_minimum_distance at 2 (-a: 2 … 5) and
# rgb_permutations at 3 (-a: 2 … 5). A test "ID:N" runs `-d ID -n N`.
# Install: apt-get install -y dieharder. RESULTS=FILE writes elsewhere.
# Results go to bench/results/dieharder-<seed>-<streams>.txt; the last line counts
# PASSED / WEAK / FAILED. WEAK is expected now and then: at p < 0.005 about 1 in 200 results.
set -euo pipefail
cd "$(dirname "$0")/.."
command -v dieharder >/dev/null || { echo "dieharder not found: apt-get install -y dieharder" >&2; exit 2; }
SEED="${SEED:-1}"
STREAMS="${STREAMS:-1}"
TESTS="${DIEHARDER_TESTS:-0 1 2 3 4 5 6 8 9 10 11 12 13 15 16 17 100 101 102 200:1 200:2 200:4 200:8 201:2 202:3 203:1 203:8 204 205 206 207 208 209}"
mkdir -p bench/results
out="${RESULTS:-bench/results/dieharder-${SEED}-${STREAMS}.txt}"
: > "$out"
source_cmd=(node bin/run-ts.js bench/dieharder-source.ts --seed "$SEED" --streams "$STREAMS")
start=$(date +%s)
if [ "$TESTS" = all ]; then
  "${source_cmd[@]}" | dieharder -g 200 -a | tee -a "$out"
else
  for t in $TESTS; do
    id="${t%%:*}"; args=(-d "$id")
    if [ "$t" != "$id" ]; then args+=(-n "${t#*:}"); fi
    t0=$(date +%s)
    if "${source_cmd[@]}" | dieharder -g 200 "${args[@]}" > "$out.one" 2>&1; then
      grep '|' "$out.one" | grep -v 'rands/second\|test_name\|stdin_input_raw' | tee -a "$out"
      echo "# test $t: $(( $(date +%s) - t0 )) s" >> "$out"
    else
      echo "# test $t: dieharder failed: $(head -c 200 "$out.one" | tr '\n' ' ')" | tee -a "$out"
    fi
    rm -f "$out.one"
  done
fi
passed=$(grep -c 'PASSED' "$out" || true); weak=$(grep -c 'WEAK' "$out" || true); failed=$(grep -c 'FAILED' "$out" || true)
echo "# seed $SEED, streams $STREAMS, tests: $TESTS; $(( $(date +%s) - start )) s" | tee -a "$out"
echo "PASSED $passed  WEAK $weak  FAILED $failed" | tee -a "$out"
