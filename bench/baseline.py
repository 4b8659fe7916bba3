#!/usr/bin/env python3
"""The same check written the way a competent analyst would in a notebook: pandas to read,
numpy to build and filter the design (dense convolution on the microtime grid, cosine
high-pass by least squares, mean-centred modulators), statsmodels' variance_inflation_factor,
numpy SVD for condition indices, generalized VIF of each model's set from determinants, and
an OLS R2 (statsmodels) for every subset of groups for each modulator's commonality partition.
A benchmark baseline, not a reference. Usage: bench/baseline.py STUDY.toml [--vif-out FILE]"""
import argparse
import itertools
import json
import math
import tomllib
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import scipy.stats
import statsmodels.api as sm
from statsmodels.stats.outliers_influence import variance_inflation_factor


def half_away(x):
    return int(math.floor(abs(x) + 0.5)) * (1 if x >= 0 else -1)


def hrf(t):
    return scipy.stats.gamma.pdf(t, 6) - scipy.stats.gamma.pdf(t, 16) / 6.0


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("study")
    parser.add_argument("--vif-out")
    args = parser.parse_args()
    warnings.filterwarnings("ignore")   # statsmodels warns on every badly conditioned run
    path = Path(args.study)
    study = tomllib.loads(path.read_text(encoding="utf-8"))
    acq = study["acquisition"]
    tr = float(acq["tr"])
    micro = int(acq.get("microtime", 16))
    reference = float(acq.get("reference", 0.5))
    cutoff = float(study.get("filter", {}).get("high_pass", 128.0))
    dt = tr / micro
    kernel = hrf(np.arange(int(math.ceil(32.0 / dt))) * dt)
    kernel = kernel / kernel.sum()
    start = half_away(32.0 / dt)
    first_sample = half_away(reference * micro)
    trials = pd.read_csv(path.parent / study["trials"]["file"], dtype={"subject": str, "run": str})
    if "scans_file" in acq:
        scans_of = pd.read_csv(path.parent / acq["scans_file"], dtype={"subject": str, "run": str})
        scans_of = {(s, r): int(n) for s, r, n in scans_of[["subject", "run", "scans"]].itertuples(index=False)}
    else:
        scans_of = None
    events = {e["name"]: e["onset"] for e in study["event"]}
    models = study["model"]

    out = []
    for (subject, run), rows in trials.groupby(["subject", "run"], sort=False):
        scans = scans_of[(subject, run)] if scans_of else int(acq["scans"])
        n = np.arange(scans)
        k = int(math.floor(2 * scans * tr / cutoff)) if cutoff > 0 else 0
        drift = np.column_stack([np.ones(scans)] + [np.cos(np.pi * j * (2 * n + 1) / (2 * scans))
                                                     for j in range(1, k + 1)])
        length = start + scans * micro + 2 * len(kernel)

        def regressor(onsets, heights):
            grid = np.zeros(length)
            for onset, height in zip(onsets, heights):
                if not np.isnan(onset):
                    grid[half_away(onset / dt) + start] += height
            return np.convolve(grid, kernel)[:length][start + first_sample + micro * n]

        columns, names, group_of = [], [], []
        for event, onset_column in events.items():
            columns.append(regressor(rows[onset_column].to_numpy(float), np.ones(len(rows))))
            names.append(event)
            group_of.append("task")
        for model in models:
            for mod in model["modulators"]:
                values = rows[mod["column"]].to_numpy(float)
                heights = np.where(np.isnan(values), 0.0, values - np.nanmean(values))
                columns.append(regressor(rows[events[mod["event"]]].to_numpy(float), heights))
                names.append(f"{model['name']}:{mod['column']}")
                group_of.append(model["name"])
        x = np.column_stack(columns)
        filtered = x - drift @ np.linalg.lstsq(drift, x, rcond=None)[0]
        p = filtered.shape[1]
        vif = [float(variance_inflation_factor(filtered, j)) for j in range(p)]
        unit = filtered / np.linalg.norm(filtered, axis=0)
        s = np.linalg.svd(unit, compute_uv=False)
        condition_indices = (s[0] / s)[::-1]
        corr = np.corrcoef(filtered, rowvar=False)
        gvif = {}
        for model in models:
            inside = [j for j in range(p) if group_of[j] == model["name"]]
            rest = [j for j in range(p) if j not in inside]
            gvif[model["name"]] = float(np.linalg.det(corr[np.ix_(inside, inside)])
                                        * np.linalg.det(corr[np.ix_(rest, rest)]) / np.linalg.det(corr))
        partition = {}
        groups = [m["name"] for m in models] + ["task"]
        for j in range(p):
            if group_of[j] == "task":
                continue
            target = filtered[:, j]
            members = {g: [c for c in range(p) if group_of[c] == g and c != j] for g in groups}
            present = [g for g in groups if members[g]]
            r2 = {}
            for size in range(len(present) + 1):
                for subset in itertools.combinations(present, size):
                    cols = [c for g in subset for c in members[g]]
                    r2[subset] = (float(sm.OLS(target, sm.add_constant(filtered[:, cols])).fit().rsquared)
                                  if cols else 0.0)
            full = tuple(present)
            components = {}
            for size in range(1, len(present) + 1):
                for subset in itertools.combinations(present, size):
                    share = 0.0
                    for m in range(len(subset) + 1):
                        for b in itertools.combinations(subset, m):
                            keep = tuple(g for g in present if g not in b)
                            sign = 1.0 if (len(subset) - len(b) + 1) % 2 == 0 else -1.0
                            share += sign * r2[keep]
                    components[subset] = share
            partition[names[j]] = {"unique": 1.0 - r2[full],
                                   "components": {"+".join(k): v for k, v in components.items()}}
        out.append({"subject": subject, "run": run, "regressors": names, "vif": vif,
                    "condition_indices": condition_indices.tolist(), "gvif": gvif,
                    "partition": partition})
    print(json.dumps({"runs": len(out)}))
    if args.vif_out:
        Path(args.vif_out).write_text(json.dumps(out))


if __name__ == "__main__":
    main()
