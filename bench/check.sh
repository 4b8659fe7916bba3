#!/usr/bin/env bash
# Times `tangle check --format json` on the simulated cohorts of bench/make-cohorts.sh
# (median of several runs; peak memory of one run via /usr/bin/time), the time to read the
# trial table alone (a check of one participant: the input-bound limit), and the Python
# baseline (bench/baseline.py) on the 200-participant cohort in the same session, with the
# ratio and the largest relative VIF difference. Not a test.
# Usage: bench/check.sh [repeats] [sizes...]   (default 3; 100 200 1000 2000 5000)
set -euo pipefail
cd "$(dirname "$0")/.."
repeats="${1:-3}"
shift || true
sizes=("$@")
[ ${#sizes[@]} -eq 0 ] && sizes=(100 200 1000 2000 5000)
[ "${sizes[0]}" = "baseline" ] && sizes=()   # bench/check.sh 3 baseline: the baseline only
bench/make-cohorts.sh "${sizes[@]}" 200 >/dev/null
binary=target/release/tangle
median() { sort -g | awk '{a[NR]=$1} END {print (NR%2) ? a[(NR+1)/2] : (a[NR/2]+a[NR/2+1])/2}'; }
seconds() { local s e; s=$(date +%s.%N); "$@" >/dev/null; e=$(date +%s.%N); echo "$e - $s" | bc -l; }
echo "| participants | runs | trial table | check: median of $repeats (runs) | read table only | peak memory |"
echo "|---|---|---|---|---|---|"
for n in "${sizes[@]+"${sizes[@]}"}"; do
    study=target/bench/cohort-$n/1-as-planned/study.toml
    trials=target/bench/cohort-$n/1-as-planned/trials.csv
    first=$(sed -n 2p "$trials" | cut -d, -f1)
    times=(); for _ in $(seq "$repeats"); do times+=("$(seconds "$binary" check "$study" --format json)"); done
    read_only=(); for _ in $(seq "$repeats"); do read_only+=("$(seconds "$binary" check "$study" --format json --subjects "$first")"); done
    peak=$(/usr/bin/time -f '%M' "$binary" check "$study" --format json 2>&1 >/dev/null | tail -1)
    runs=$(( $(cut -d, -f1,2 "$trials" | sort -u | wc -l) - 1 ))
    printf '| %s | %s | %s MB | %.2f s (%s) | %.2f s | %s MB |\n' "$n" "$runs" \
        "$(( $(stat -c %s "$trials") / 1000000 ))" "$(printf '%s\n' "${times[@]}" | median)" \
        "$(printf '%.2f ' "${times[@]}" | sed 's/ $//')" "$(printf '%s\n' "${read_only[@]}" | median)" "$((peak / 1024))"
done
python3 -c "import numpy, pandas, statsmodels" 2>/dev/null || {
    echo "the baseline needs numpy, pandas and statsmodels: python3 -m pip install -r tests/reference/requirements.txt" >&2
    exit 1
}
study=target/bench/cohort-200/1-as-planned/study.toml
"$binary" check "$study" --format json --out target/bench/tangle-200.json
tangle_times=(); for _ in $(seq "$repeats"); do tangle_times+=("$(seconds "$binary" check "$study" --format json)"); done
tangle_time=$(printf '%s\n' "${tangle_times[@]}" | median)   # median of the repeats
python_time=$(seconds python3 bench/baseline.py "$study" --vif-out target/bench/baseline-200.json)
python3 - "$tangle_time" "$python_time" <<'PY'
import json, sys
t, p = float(sys.argv[1]), float(sys.argv[2])
ours = json.load(open("target/bench/tangle-200.json"))["runs"]
theirs = json.load(open("target/bench/baseline-200.json"))
worst, worst_moderate, undefined, compared, skipped_runs = 0.0, 0.0, 0, 0, []
for a, b in zip(ours, theirs):
    assert (a["subject"], a["run"]) == (b["subject"], b["run"])
    names = [r["name"] for r in a["regressors"]]
    assert names == b["regressors"], (names, b["regressors"])
    if any(f["code"] == "exact_dependency" for f in a["flags"]):
        # tangle leaves the dependent column out (its VIF null); statsmodels keeps it
        undefined += sum(v is None for v in a["vif"])
        skipped_runs.append(a["subject"] + "/" + a["run"])
        continue
    for x, y in zip(a["vif"], b["vif"]):
        if x is None:          # tangle: an exact dependency (flagged); statsmodels: a huge number
            undefined += 1
            continue
        compared += 1
        rel = abs(x - y) / abs(y)
        worst = max(worst, rel)
        if x < 1000:
            worst_moderate = max(worst_moderate, rel)
# Commonality components: tangle's against one statsmodels OLS per subset of groups.
parts, worst_part = 0, 0.0
for a, b in zip(ours, theirs):
    if any(f["code"] == "exact_dependency" for f in a["flags"]):
        continue
    for part in a["partition"]:
        theirs_part = b["partition"].get(part["regressor"])
        if theirs_part is None or part["r2"] is None:
            continue
        for c in part["components"]:
            key = "+".join(c["groups"])
            if key in theirs_part["components"]:
                parts += 1
                worst_part = max(worst_part, abs(c["share"] - theirs_part["components"][key]))
print(f"200 participants, {len(ours)} runs: tangle {t:.2f} s (median), Python baseline {p:.1f} s, "
      f"ratio {p / t:.0f}x")
print(f"VIFs compared: {compared}; largest relative difference {worst:.2e} overall, "
      f"{worst_moderate:.2e} where VIF < 1000; {undefined} VIFs null in tangle (exact dependency); "
      f"runs with an exact dependency not compared: {', '.join(skipped_runs) or 'none'}")
print(f"commonality components compared: {parts}; largest absolute difference {worst_part:.1e}")
PY
echo "$(nproc) cores; $(uname -sr)"
