#!/usr/bin/env bash
# Times `tangle forecast` on bench/forecast-1000.toml (1,000 participants × 2 fitted
# learners × 3 runs of 80 trials): the median wall time of several runs, and the peak
# memory of one run. Usage: bench/forecast.sh [repeats]   (default 5). Not a test.
set -euo pipefail
cd "$(dirname "$0")/.."
repeats="${1:-5}"
cargo build --release --quiet
binary=target/release/tangle
spec=bench/forecast-1000.toml
times=()
for _ in $(seq "$repeats"); do
    start=$(date +%s.%N)
    "$binary" forecast "$spec" --quiet --format json >/dev/null
    end=$(date +%s.%N)
    times+=("$(echo "$end - $start" | bc -l)")
done
median=$(printf '%s\n' "${times[@]}" | sort -g | awk '{a[NR]=$1} END {print (NR%2) ? a[(NR+1)/2] : (a[NR/2]+a[NR/2+1])/2}')
peak="n/a"
if [ -x /usr/bin/time ]; then
    peak=$(/usr/bin/time -f '%M' "$binary" forecast "$spec" --quiet --format json 2>&1 >/dev/null | tail -1)
    peak="$((peak / 1024)) MB"
fi
echo "forecast, 1000 participants x 2 learners x 3 runs x 80 trials: median ${median} s over ${repeats} runs (${times[*]}); peak memory ${peak}; $(nproc) cores"
