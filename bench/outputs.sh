#!/usr/bin/env bash
# Writes the outputs of `check` (every format), `merge` and `forecast` on the demo, the
# BIDS demo and the benchmark cohorts into one folder, so that a change meant to keep
# behaviour can be proven byte for byte:
#
#   git stash; bench/outputs.sh target/outputs-before; git stash pop
#   bench/outputs.sh target/outputs-after
#   diff -rq target/outputs-before target/outputs-after && echo identical
#
# Usage: bench/outputs.sh DIR [cohort sizes...]   (default sizes: 100 1000). Not a test.
set -euo pipefail
cd "$(dirname "$0")/.."
out="${1:?usage: bench/outputs.sh DIR [sizes...]}"
shift
sizes=("$@")
[ ${#sizes[@]} -eq 0 ] && sizes=(100 1000)
cargo build --release --quiet
bench/make-cohorts.sh "${sizes[@]}" >/dev/null
tangle=target/release/tangle
rm -rf "$out"
mkdir -p "$out"

# Measured signals for the demo: two invented regions per run, a fixed seed.
signals=target/bench/demo-signal
if [ ! -f "$signals/sub-01_run-1.tsv" ]; then
    mkdir -p "$signals"
    python3 - "$signals" <<'PY'
import math, random, sys
folder = sys.argv[1]
rng = random.Random(7)
for s in range(1, 21):
    for r in range(1, 4):
        with open(f"{folder}/sub-{s:02d}_run-{r}.tsv", "w") as f:
            f.write("harbour_left\tharbour_right\n")
            for t in range(330):
                a = math.sin(t / 9.0) + rng.gauss(0, 1)
                b = math.cos(t / 13.0) + rng.gauss(0, 1)
                f.write(f"{a:.6f}\t{b:.6f}\n")
PY
fi

for format in table tsv json html methods; do
    "$tangle" demo --format "$format" > "$out/demo.$format"
    "$tangle" check demo-data/study.toml --format "$format" > "$out/study.$format"
    "$tangle" check demo-data/bids-study.toml --format "$format" > "$out/bids.$format"
done
"$tangle" check demo-data/study.toml --format tsv --out "$out/tables/study.tsv"
"$tangle" check demo-data/study.toml --format json --orthogonalise serial > "$out/study.serial.json"
"$tangle" check demo-data/study.toml --format table --orthogonalise serial > "$out/study.serial.table"
"$tangle" check demo-data/study.toml --format json --no-centring > "$out/study.uncentred.json"
"$tangle" check demo-data/study.toml --format json --subjects 03,07 > "$out/study.subjects.json"
for format in table json html methods; do
    "$tangle" check demo-data/study.toml --format "$format" --resamples 200 \
        --signal "$signals/sub-{subject}_run-{run}.tsv" > "$out/study.signal.$format"
done

# Shards and their merge.
for k in 1 2 3; do
    "$tangle" check demo-data/study.toml --format json --shard "$k/3" > "$out/shard-$k.json"
done
for format in table tsv json html methods; do
    "$tangle" merge "$out"/shard-{1,2,3}.json --format "$format" > "$out/merged.$format"
done

# Benchmark cohorts.
for n in "${sizes[@]}"; do
    "$tangle" check "target/bench/cohort-$n/1-as-planned/study.toml" --format json > "$out/cohort-$n.json"
done
first="${sizes[0]}"
for format in table tsv html methods; do
    "$tangle" check "target/bench/cohort-$first/1-as-planned/study.toml" --format "$format" \
        > "$out/cohort-$first.$format"
done

# Forecasts.
for format in table tsv json html; do
    "$tangle" forecast demo-data/forecast.toml --quiet --format "$format" > "$out/forecast.$format"
done
"$tangle" forecast demo-data/forecast.toml --quiet --format tsv --out "$out/tables/forecast.tsv"
"$tangle" forecast bench/cohort.toml --quiet --participants 100 --format json \
    --write-trials "$out/forecast-trials" > "$out/forecast-cohort.json"
echo "outputs in $out: $(find "$out" -type f | wc -l) files"
