#!/usr/bin/env bash
# Times two tangle binaries against each other, alternating runs (A B A B ...) so that a
# drift in the machine's speed affects both alike: the check of the 1,000-participant
# benchmark cohort, the 1,000-participant forecast and the demo forecast. Prints each
# binary's median wall time and the median of the paired ratios B/A. Not a test.
# Usage: bench/compare.sh BINARY_A BINARY_B [runs]   (default 7 runs each)
# E.g. a binary of an earlier commit:
#   git worktree add ../tangle-before <commit> && (cd ../tangle-before && cargo build --release)
#   bench/compare.sh ../tangle-before/target/release/tangle target/release/tangle
set -euo pipefail
cd "$(dirname "$0")/.."
a="${1:?usage: bench/compare.sh BINARY_A BINARY_B [runs]}"
b="${2:?usage: bench/compare.sh BINARY_A BINARY_B [runs]}"
runs="${3:-7}"
bench/make-cohorts.sh 1000 >/dev/null
seconds() { local s e; s=$(date +%s.%N); "$@" >/dev/null; e=$(date +%s.%N); echo "$e - $s" | bc -l; }
median() { sort -g | awk '{v[NR]=$1} END {print (NR%2) ? v[(NR+1)/2] : (v[NR/2]+v[NR/2+1])/2}'; }
while IFS='|' read -r name args; do
    ta=(); tb=(); ratios=()
    read -ra words <<<"$args"
    for _ in $(seq "$runs"); do
        x=$(seconds "$a" "${words[@]}"); y=$(seconds "$b" "${words[@]}")
        ta+=("$x"); tb+=("$y"); ratios+=("$(echo "$y / $x" | bc -l)")
    done
    printf '%-34s A %.2f s   B %.2f s   B/A %.3f (medians of %s)\n' "$name" \
        "$(printf '%s\n' "${ta[@]}" | median)" "$(printf '%s\n' "${tb[@]}" | median)" \
        "$(printf '%s\n' "${ratios[@]}" | median)" "$runs"
done <<'CASES'
check, 1,000 participants x 4 runs|check target/bench/cohort-1000/1-as-planned/study.toml --format json
forecast, 1,000 participants|forecast bench/forecast-1000.toml --quiet --format json
forecast, demo spec|forecast demo-data/forecast.toml --quiet --format json
CASES
echo "$(nproc) cores; $(uname -sr)"
