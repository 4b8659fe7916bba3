#!/usr/bin/env bash
# Writes the simulated benchmark cohorts (bench/cohort.toml, fixed seed) to
# target/bench/cohort-N/1-as-planned/ for each N given (default: 100 200 1000 2000 5000).
# Generated once and reused by bench/check.sh. Usage: bench/make-cohorts.sh [N...]
set -euo pipefail
cd "$(dirname "$0")/.."
sizes=("$@")
[ ${#sizes[@]} -eq 0 ] && sizes=(100 200 1000 2000 5000)
cargo build --release --quiet
mkdir -p target/bench
for n in "${sizes[@]}"; do
    dir=target/bench/cohort-$n
    if [ -f "$dir/1-as-planned/trials.csv" ]; then
        echo "cohort $n: already in $dir"
        continue
    fi
    target/release/tangle forecast bench/cohort.toml --participants "$n" --quiet \
        --format json --out "target/bench/forecast-$n.json" --write-trials "$dir"
    echo "cohort $n: $(wc -l < "$dir/1-as-planned/trials.csv") trial rows in $dir"
done
