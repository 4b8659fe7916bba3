#!/usr/bin/env python3
"""Reference values that the Rust tests of `tangle` compare against.

    python3 tests/reference/make_references.py           # (re)write the reference files
    python3 tests/reference/make_references.py --check   # regenerate in a temporary folder and compare

Every file is written next to this script. Each value is computed by a route that is
independent of the Rust code (statsmodels, scipy, or a dense numpy build), and each file
names its source in a "source" entry. Library versions are pinned in requirements.txt.

Files
  longley.csv                  Longley (1967) data as shipped with statsmodels
  longley_vif.json             VIFs (statsmodels variance_inflation_factor) and the
                               Belsley-Kuh-Welsch table (numpy SVD) of the Longley design
  hrf.json                     double-gamma response and its derivative (scipy gamma pdf)
  design_fixture/study.toml    a tiny study file the Rust tool reads
  design_fixture/trials.csv    its trial table (input; drawn once, then the source of truth)
  design_fixture/expected.json the design those files imply, built densely with numpy
  commonality.json             commonality components from statsmodels OLS R2 of every subset
                               (Longley data; the fixture design's a:a_pe)
  demo_vif.json                VIFs of every run of the bundled demo study (demo-data/),
                               design built densely with numpy, VIFs by statsmodels
  choice_likelihood.json       softmax choice probabilities (scipy.special), the choice
                               log-likelihood of a delta-rule learner on a fixed sequence
                               (plain Python loop) and its ML inverse temperature
                               (scipy.optimize.minimize_scalar)
  computed.json                check values computed rather than printed: exact Longley GVIFs
                               and a hand-checkable efficiency example (Python fractions)
"""

from __future__ import annotations

import argparse
import csv
import io
import json
import math
import shutil
import sys
import tempfile
import warnings
from fractions import Fraction
from pathlib import Path

import numpy as np
import pandas as pd
import scipy
import scipy.linalg
import scipy.optimize
import scipy.special
import scipy.stats
import statsmodels
import statsmodels.api as sm
from statsmodels.stats.outliers_influence import variance_inflation_factor

HERE = Path(__file__).resolve().parent
TOLERANCE = 1e-10  # relative and absolute, used by --check on every number

LONGLEY_COLUMNS = ["TOTEMP", "GNPDEFL", "GNP", "UNEMP", "ARMED", "POP", "YEAR"]
LONGLEY_PREDICTORS = LONGLEY_COLUMNS[1:]

# Longley VIFs of the model TOTEMP ~ six predictors + intercept, from exact rational
# arithmetic on the same data (shared research notes, stats-references.md section 1a).
# Faraway (2002), Practical Regression and Anova using R, ch. 9, prints the same
# numbers to 4 decimals (second list).
LONGLEY_VIF_EXACT = [135.53243828000, 1788.5134827182, 33.618890596050,
                     3.5889301934455, 399.15102231264, 758.98059740689]
LONGLEY_VIF_FARAWAY_2002 = [135.5324, 1788.5135, 33.6189, 3.5889, 399.1510, 758.9806]

# Belsley-Kuh-Welsch table of the Longley design with intercept, unit-length columns:
# 60-digit mpmath reference from the shared research notes (stats-references.md
# section 2a; stats-checks.json entry "bkw.longley").
BKW_LONGLEY_SINGULAR_VALUES = [
    2.6194260379240237, 0.2865353444387667, 0.21373063528161995, 0.10338503603611479,
    0.011367855135606036, 0.0024992608323174837, 6.0529714606688876e-05]
BKW_LONGLEY_CONDITION_INDICES = [
    1.0, 9.14172051987045, 12.2557350492715, 25.336607098623, 230.423946001874,
    1048.0802980036, 43275.043587184]
BKW_LONGLEY_PROPORTIONS = [  # rows: dimensions (largest singular value first); columns: const, predictors
    [1.54012660962e-10, 1.63666981515e-06, 6.74261783742e-07, 4.47150068756e-05, 0.000353694042903, 1.74076354037e-07, 1.54148018166e-10],
    [8.16629069686e-10, 7.09553519086e-09, 7.52614359463e-06, 0.0142802789424, 0.0919084984734, 4.02169263279e-08, 7.70534913795e-10],
    [3.34224711796e-08, 1.01227244429e-07, 0.000257174260274, 0.000836257571236, 0.0635650142637, 8.38927692717e-06, 3.19652023496e-08],
    [1.19104046981e-09, 0.000344839061241, 0.00106504448143, 0.064642383938, 0.426724318897, 1.82108035335e-05, 1.42670613116e-09],
    [5.26020429164e-07, 0.456765985566, 0.015656133, 0.00559481981202, 0.115402412264, 0.00968226779384, 5.27396867688e-07],
    [0.000149137536844, 0.504556019425, 0.328385494487, 0.225344775998, 6.86501656001e-07, 0.830563569214, 0.000160314904404],
    [0.999850300859, 0.0383314109551, 0.654627953365, 0.689256768732, 0.302045375558, 0.159727348618, 0.999839123382],
]

# h(t) at t = 0, 1, ..., 32 s computed with scipy.stats.gamma.pdf in the shared research
# notes (stats-references.md section 9; stats-checks.json entry "hrf.double_gamma").
HRF_UNIT_GRID_NOTES = [
    0.0, 0.0030656620097151326, 0.036089408297886365, 0.10081872239396784,
    0.15629094533107124, 0.17544116219546385, 0.1604745984542892, 0.12716489793477317,
    0.09009933169072562, 0.057488434962452144, 0.03204692986362342, 0.013523199918010312,
    0.0006754520447549636, -0.007752191666401691, -0.012760399940664956,
    -0.015136856322163364, -0.015552907908972386, -0.014613627731408627,
    -0.012856103472527447, -0.010725107747489995, -0.008553178158694663,
    -0.006557656993913513, -0.004854453095297392, -0.003481830327992515,
    -0.0024266218746080604, -0.0016473632276457306, -0.001091670643717331,
    -0.0007074840464010106, -0.0004491363825534643, -0.0002797123430378808,
    -0.00017111394776742753, -0.00010294635183715089, -6.097477004512873e-05]

HRF_LENGTH = 32.0  # seconds; the kernel covers 0 <= t < 32

STUDY_TOML = """\
[study]
name = "reference fixture (invented numbers)"
[acquisition]
tr = 2.0
scans = 90
microtime = 16
reference = 0.5
[filter]
high_pass = 100.0
[trials]
file = "trials.csv"
[[event]]
name = "cue"
onset = "cue_onset"
[[event]]
name = "outcome"
onset = "outcome_onset"
duration = "outcome_duration"
[[model]]
name = "a"
modulators = [ { event = "cue", column = "a_value" }, { event = "outcome", column = "a_pe" } ]
[[model]]
name = "b"
modulators = [ { event = "outcome", column = "b_pe" } ]
"""

# The same settings as STUDY_TOML, for the numpy build (the build does not parse TOML).
FIXTURE = {
    "tr": 2.0, "scans": 90, "microtime": 16, "reference": 0.5, "high_pass": 100.0,
    "events": {"cue": ("cue_onset", None), "outcome": ("outcome_onset", "outcome_duration")},
    # (regressor name, event, modulator column or None for the onset regressor)
    "regressors": [("cue", "cue", None), ("outcome", "outcome", None),
                   ("a:a_value", "cue", "a_value"), ("a:a_pe", "outcome", "a_pe"),
                   ("b:b_pe", "outcome", "b_pe")],
}
TRIAL_COLUMNS = ["subject", "run", "cue_onset", "outcome_onset", "outcome_duration",
                 "a_value", "a_pe", "b_pe"]
MISSING = {"", "n/a"}


# --------------------------------------------------------------------------- helpers

def check(condition: bool, message: str) -> None:
    """A self-check of the reference values; stops with a clear message when it fails."""
    if not condition:
        raise SystemExit(f"make_references.py: self-check failed: {message}")


def max_rel_err(a, b) -> float:
    a, b = np.asarray(a, float), np.asarray(b, float)
    return float(np.max(np.abs(a - b) / np.abs(b)))


def max_abs_err(a, b) -> float:
    a, b = np.asarray(a, float), np.asarray(b, float)
    return float(np.max(np.abs(a - b)))


def floats(values) -> list:
    out = [float(v) for v in np.asarray(values, float).ravel()]
    check(all(math.isfinite(v) for v in out), "a reference value is not finite")
    return out


def matrix(values) -> list:
    return [floats(row) for row in np.asarray(values, float)]


def format_json(obj, level: int = 0) -> str:
    """JSON with full float precision (repr); lists of scalars on one line."""
    pad, inner = " " * level, " " * (level + 1)
    if isinstance(obj, dict):
        if not obj:
            return "{}"
        items = [f"{inner}{json.dumps(k)}: {format_json(v, level + 1)}" for k, v in obj.items()]
        return "{\n" + ",\n".join(items) + "\n" + pad + "}"
    if isinstance(obj, list) and any(isinstance(v, (list, dict)) for v in obj):
        items = [inner + format_json(v, level + 1) for v in obj]
        return "[\n" + ",\n".join(items) + "\n" + pad + "]"
    return json.dumps(obj, allow_nan=False, ensure_ascii=False)


def write_text(path: Path, text: str) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    with open(path, "w", encoding="utf-8", newline="\n") as f:
        f.write(text)


def write_json(path: Path, obj) -> None:
    write_text(path, format_json(obj) + "\n")


def round_half_away(x: float) -> int:
    """r(x) = sign(x) * floor(|x| + 0.5)."""
    return int(math.copysign(math.floor(abs(x) + 0.5), x))


def versions() -> dict:
    return {"numpy": np.__version__, "scipy": scipy.__version__,
            "statsmodels": statsmodels.__version__, "pandas": pd.__version__}


def pinned_versions() -> dict:
    pins = {}
    for line in (HERE / "requirements.txt").read_text(encoding="utf-8").splitlines():
        line = line.split("#", 1)[0].strip()
        if "==" in line:
            name, version = line.split("==", 1)
            pins[name.strip()] = version.strip()
    return pins


# --------------------------------------------------------------------------- Longley

def longley_frame() -> pd.DataFrame:
    data = sm.datasets.longley.load_pandas().data
    check(list(data.columns) == LONGLEY_COLUMNS, f"unexpected Longley columns {list(data.columns)}")
    check(data.shape == (16, 7), f"unexpected Longley shape {data.shape}")
    return data.astype(float)


def longley_csv_text(data: pd.DataFrame) -> str:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(LONGLEY_COLUMNS)
    for row in data[LONGLEY_COLUMNS].itertuples(index=False):
        writer.writerow([repr(float(v)) for v in row])
    return buf.getvalue()


def longley_references(out: Path) -> list[str]:
    data = longley_frame()
    text = longley_csv_text(data)
    # the written file reproduces the data exactly
    back = pd.read_csv(io.StringIO(text))
    check(np.array_equal(back[LONGLEY_COLUMNS].to_numpy(), data[LONGLEY_COLUMNS].to_numpy()),
          "longley.csv does not round-trip")
    write_text(out / "longley.csv", text)

    # VIFs: statsmodels variance_inflation_factor on exog = add_constant(predictors),
    # standardize=False passed explicitly (its default changed in statsmodels 0.15.0).
    exog = sm.add_constant(data[LONGLEY_PREDICTORS], prepend=True)
    check(list(exog.columns) == ["const"] + LONGLEY_PREDICTORS, "add_constant did not prepend 'const'")
    exog_values = exog.to_numpy()
    with warnings.catch_warnings():
        # statsmodels warns that the raw design is poorly conditioned (cond ~ 4.9e9);
        # that is the point of this data set, and the values are checked below
        warnings.filterwarnings("ignore", message="The design matrix is poorly conditioned")
        vif = [variance_inflation_factor(exog_values, i, standardize=False)
               for i in range(1, exog_values.shape[1])]
    err = max_rel_err(vif, LONGLEY_VIF_EXACT)
    check(err < 1e-8, f"Longley VIFs differ from the exact values by {err:.3g} relative")
    err = max_abs_err(vif, LONGLEY_VIF_FARAWAY_2002)
    check(err <= 5e-5, f"Longley VIFs differ from Faraway (2002) by {err:.3g}")
    # independent route: diagonal of the inverse correlation matrix
    corr = np.corrcoef(data[LONGLEY_PREDICTORS].to_numpy(), rowvar=False)
    err = max_rel_err(np.diag(np.linalg.inv(corr)), vif)
    check(err < 1e-10, f"Longley VIFs: statsmodels vs inverse correlation matrix {err:.3g}")

    # Belsley-Kuh-Welsch (1980): intercept kept, columns scaled to unit Euclidean
    # length (not centred), numpy SVD.
    scaled = exog_values / np.linalg.norm(exog_values, axis=0)
    _, mu, vt = np.linalg.svd(scaled, full_matrices=False)
    v = vt.T                                   # v[j, k]: variable j, dimension k
    phi = v ** 2 / mu ** 2                     # phi[j, k] = v_jk^2 / mu_k^2
    proportions = (phi / phi.sum(axis=1, keepdims=True)).T   # [dimension k][variable j]
    condition_indices = mu[0] / mu
    check(np.all(np.diff(mu) <= 0), "singular values are not in decreasing order")
    err = max_rel_err(mu, BKW_LONGLEY_SINGULAR_VALUES)
    check(err < 1e-8, f"BKW singular values differ from the 60-digit values by {err:.3g}")
    err = max_rel_err(condition_indices, BKW_LONGLEY_CONDITION_INDICES)
    check(err < 1e-8, f"BKW condition indices differ from the 60-digit values by {err:.3g}")
    err = max_abs_err(proportions, BKW_LONGLEY_PROPORTIONS)
    check(err < 1e-9, f"BKW proportions differ from the 60-digit values by {err:.3g}")
    check(np.allclose(proportions.sum(axis=0), 1.0, rtol=0, atol=1e-12),
          "BKW proportions of a variable do not sum to 1")

    ver = versions()
    # Generalized VIF (Fox & Monette 1992) of predictor sets, from numpy determinants of
    # blocks of the correlation matrix: det(R_set) * det(R_rest) / det(R).
    gvif_sets = {"GNP,POP": [1, 4], "UNEMP,ARMED": [2, 3], "GNPDEFL,GNP,POP,YEAR": [0, 1, 4, 5], "GNP": [1]}
    gvif = {}
    for key, members in gvif_sets.items():
        rest = [j for j in range(len(LONGLEY_PREDICTORS)) if j not in members]
        value = (np.linalg.det(corr[np.ix_(members, members)]) * np.linalg.det(corr[np.ix_(rest, rest)])
                 / np.linalg.det(corr))
        gvif[key] = {"members": members, "gvif": float(value)}

    write_json(out / "longley_vif.json", {
        "source": (f"statsmodels {ver['statsmodels']} (numpy {ver['numpy']}, pandas {ver['pandas']}), "
                   "function statsmodels.stats.outliers_influence.variance_inflation_factor"
                   "(exog, i, standardize=False), standardize=False passed explicitly, "
                   "exog = statsmodels.api.add_constant(predictors) with the constant as column 0, "
                   "i = 1..6; data statsmodels.datasets.longley (Longley 1967), as in longley.csv. "
                   "Agrees with exact rational values to < 1e-8 relative and with the values printed "
                   "by Faraway (2002, ch. 9) to all 4 printed decimals."),
        "model": "TOTEMP ~ const + GNPDEFL + GNP + UNEMP + ARMED + POP + YEAR",
        "predictors": LONGLEY_PREDICTORS,
        "vif": floats(vif),
        "bkw": {
            "source": (f"numpy {ver['numpy']} numpy.linalg.svd; Belsley, Kuh & Welsch (1980) procedure: "
                       "design with the intercept column, not centred, every column scaled to unit "
                       "Euclidean length; condition index = mu_max / mu_k; "
                       "proportions[k][j] = (v_jk^2 / mu_k^2) / sum_k (v_jk^2 / mu_k^2). "
                       "Agrees with a 60-digit computation to < 1e-8 relative (singular values, "
                       "condition indices) and < 1e-9 absolute (proportions)."),
            "columns": ["const"] + LONGLEY_PREDICTORS,
            "singular_values": floats(mu),
            "eigenvalues": floats(mu ** 2),
            "condition_indices": floats(condition_indices),
            "proportions": matrix(proportions),
        },
        "gvif": {
            "source": (f"numpy {ver['numpy']} numpy.linalg.det on blocks of the predictors' correlation "
                       "matrix (numpy.corrcoef): GVIF = det(R_set) det(R_rest) / det(R) "
                       "(Fox & Monette 1992); members index the predictors list"),
            "sets": gvif,
        },
    })
    return ["longley.csv", "longley_vif.json"]


# --------------------------------------------------------------------------- response

def gamma_pdf(t, shape):
    return scipy.stats.gamma.pdf(t, shape)


def hrf(t):
    """h(t) = g(t; 6, 1) - g(t; 16, 1) / 6, g the gamma density (shape, scale 1)."""
    t = np.asarray(t, float)
    return gamma_pdf(t, 6) - gamma_pdf(t, 16) / 6.0


def gamma_pdf_derivative(t, shape):
    """g'(t; a) = g(t; a) * ((a - 1) / t - 1), and 0 at t = 0 (a > 2)."""
    t = np.asarray(t, float)
    safe = np.where(t > 0, t, 1.0)
    return np.where(t > 0, gamma_pdf(t, shape) * ((shape - 1.0) / safe - 1.0), 0.0)


def hrf_derivative(t):
    return gamma_pdf_derivative(t, 6) - gamma_pdf_derivative(t, 16) / 6.0


def hrf_references(out: Path) -> list[str]:
    unit_t = np.arange(0, 33, dtype=float)
    unit_h = hrf(unit_t)
    unit_dh = hrf_derivative(unit_t)

    err = max_abs_err(unit_h, HRF_UNIT_GRID_NOTES)
    check(err < 1e-14, f"h on the 1 s grid differs from the research notes by {err:.3g}")
    # closed form for unit scale: t^5 e^-t / 5! - t^15 e^-t / (6 * 15!)
    closed = unit_t ** 5 * np.exp(-unit_t) / 120.0 - unit_t ** 15 * np.exp(-unit_t) / (6.0 * math.factorial(15))
    err = max_abs_err(unit_h, closed)
    check(err < 1e-14, f"h differs from its closed form by {err:.3g}")
    # analytic derivative against a central finite difference
    step = 1e-5
    central = (hrf(unit_t + step) - hrf(unit_t - step)) / (2.0 * step)
    err = max_abs_err(unit_dh, central)
    check(err < 1e-8, f"dh/dt differs from the central finite difference by {err:.3g}")

    dt = 0.125
    micro_i = np.arange(0, 256)
    micro_t = micro_i * dt
    micro_h = hrf(micro_t)
    check(len(micro_t) == math.ceil(HRF_LENGTH / dt), "microtime grid length")

    ver = versions()
    write_json(out / "hrf.json", {
        "source": (f"scipy {ver['scipy']} scipy.stats.gamma.pdf (shape a, scale 1): "
                   "h(t) = gamma.pdf(t, 6) - gamma.pdf(t, 16) / 6, unnormalised; "
                   "dh_dt from g'(t; a) = g(t; a) * ((a - 1) / t - 1) (0 at t = 0), checked against a "
                   "central finite difference (step 1e-5 s) to < 1e-8 and h against the closed form "
                   "t^5 e^-t / 5! - t^15 e^-t / (6 * 15!) to < 1e-14."),
        "unit_grid": {
            "t": floats(unit_t),
            "h": floats(unit_h),
            "dh_dt": floats(unit_dh),
            "sum_h": float(unit_h.sum()),
        },
        "microtime_grid": {
            "dt": dt,
            "t": floats(micro_t),
            "h": floats(micro_h),
            "sum_h": float(micro_h.sum()),
            "h_over_sum": floats(micro_h / micro_h.sum()),
        },
    })
    return ["hrf.json"]


# --------------------------------------------------------------------------- design fixture

def draw_trials_text() -> str:
    """The fixture's trial table, drawn once from numpy default_rng(7) and written as
    literal decimals (4 decimals). The committed file is the source of truth afterwards."""
    rng = np.random.default_rng(7)
    n = 18
    gaps = rng.uniform(9.0, 10.0, n - 1)
    cue = np.round(-1.0 + np.concatenate([[0.0], np.cumsum(gaps)]), 4)
    outcome = np.round(cue + rng.uniform(2.0, 6.0, n), 4)
    duration = np.round(rng.uniform(0.5, 1.5, n), 4)
    a_value = np.round(rng.uniform(0.0, 1.0, n), 4)
    a_pe = rng.normal(0.0, 0.5, n)
    # b_pe = 0.8 a_pe + 0.6 noise, the noise made exactly uncorrelated with a_pe in this
    # sample and given the same spread, so the sample correlation is 0.8 before rounding
    centred = a_pe - a_pe.mean()
    noise = rng.normal(0.0, 0.5, n)
    noise = noise - noise.mean()
    noise = noise - (noise @ centred) / (centred @ centred) * centred
    noise = noise * np.linalg.norm(centred) / np.linalg.norm(noise)
    b_pe = np.round(0.8 * a_pe + 0.6 * noise, 4)
    a_pe = np.round(a_pe, 4)
    missing_a_value = 6  # one missing modulator value

    def dec(x: float) -> str:
        s = f"{x:.4f}"
        return "0.0000" if s == "-0.0000" else s

    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(TRIAL_COLUMNS)
    for i in range(n):
        writer.writerow(["01", "1", dec(cue[i]), dec(outcome[i]), dec(duration[i]),
                         "n/a" if i == missing_a_value else dec(a_value[i]),
                         dec(a_pe[i]), dec(b_pe[i])])
    return buf.getvalue()


def read_trials(path: Path) -> list[dict]:
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.DictReader(f)
        check(reader.fieldnames == TRIAL_COLUMNS, f"{path.name}: unexpected columns {reader.fieldnames}")
        rows = []
        for row in reader:
            parsed = {"subject": row["subject"], "run": row["run"]}
            for col in TRIAL_COLUMNS[2:]:
                cell = row[col].strip()
                parsed[col] = None if cell in MISSING else float(cell)
            rows.append(parsed)
    check(len({(r["subject"], r["run"]) for r in rows}) == 1, "the fixture holds one run")
    return rows


def build_design(trials: list[dict]) -> dict:
    """Dense numpy build of the design the study conventions imply."""
    tr, scans, microtime = FIXTURE["tr"], FIXTURE["scans"], FIXTURE["microtime"]
    reference, high_pass = FIXTURE["reference"], FIXTURE["high_pass"]
    dt = tr / microtime

    # kernel: h(i dt), i = 0 .. ceil(32/dt) - 1, divided by its sum
    kernel_len = math.ceil(HRF_LENGTH / dt)
    kernel = hrf(np.arange(kernel_len) * dt)
    kernel = kernel / kernel.sum()

    # dense neural grid covering bins [first_bin, end_bin)
    first_bin = -round_half_away(HRF_LENGTH / dt)
    end_bin = scans * microtime + 2 * kernel_len
    grid_len = end_bin - first_bin

    # microtime bins covered by each event of each trial
    event_bins = {}
    for event, (onset_col, duration_col) in FIXTURE["events"].items():
        bins = []
        for row in trials:
            onset = row[onset_col]
            duration = 0.0 if duration_col is None else row[duration_col]
            check(onset is not None and duration is not None, f"missing {event} timing")
            for edge in (onset / dt, (onset + duration) / dt):
                # no bin edge lies near a rounding tie, so the bins do not depend on how
                # (onset + duration) / dt is evaluated in floating point
                check(abs(abs(edge - math.trunc(edge)) - 0.5) > 1e-6, f"{event}: edge {edge} near a tie")
            b0 = round_half_away(onset / dt)
            b1 = max(round_half_away((onset + duration) / dt), b0 + 1)
            bins.append([b0, b1])
        event_bins[event] = bins

    names, heights, sampled = [], {}, []
    sample_bins = np.array([round_half_away(reference * microtime) + k * microtime for k in range(scans)])
    for name, event, column in FIXTURE["regressors"]:
        if column is None:
            h = [1.0] * len(trials)
        else:
            present = [row[column] for row in trials if row[column] is not None]
            mean = float(np.mean(present))
            h = [0.0 if row[column] is None else row[column] - mean for row in trials]
        neural = np.zeros(grid_len)
        for (b0, b1), height in zip(event_bins[event], h):
            lo, hi = max(b0, first_bin), min(b1, end_bin)
            if lo < hi:
                neural[lo - first_bin:hi - first_bin] += height
        response = np.convolve(neural, kernel)[:grid_len]     # truncated, causal
        sampled.append(response[sample_bins - first_bin])
        names.append(name)
        heights[name] = h
    x = np.column_stack(sampled)                               # scans x regressors

    # drift: constant + cos(pi k (2n+1) / (2N)), k = 1..K, projected out by least squares
    n_cos = math.floor(2 * scans * tr / high_pass) if high_pass > 0 else 0
    n = np.arange(scans)
    drift = np.column_stack([np.ones(scans)] +
                            [np.cos(np.pi * k * (2 * n + 1) / (2 * scans)) for k in range(1, n_cos + 1)])
    coef, *_ = np.linalg.lstsq(drift, x, rcond=None)
    filtered = x - drift @ coef
    scale = np.abs(x).max(axis=0)
    check(np.all(np.abs(filtered.mean(axis=0)) < 1e-12 * scale), "filtered columns are not centred")

    corr = np.corrcoef(filtered, rowvar=False)
    norms = np.linalg.norm(filtered, axis=0)
    cosine = (filtered.T @ filtered) / np.outer(norms, norms)
    check(max_abs_err(corr, cosine) < 1e-12, "corrcoef and cosine similarity disagree")

    p = filtered.shape[1]
    vif, vif_with_const = [], []
    for j in range(p):
        y = filtered[:, j]
        others = np.delete(filtered, j, axis=1)
        b, *_ = np.linalg.lstsq(others, y, rcond=None)
        resid = y - others @ b
        r2 = 1.0 - (resid @ resid) / (y @ y)
        vif.append(1.0 / (1.0 - r2))
        with_const = np.column_stack([np.ones(scans), others])
        b, *_ = np.linalg.lstsq(with_const, y, rcond=None)
        resid = y - with_const @ b
        yc = y - y.mean()
        vif_with_const.append(1.0 / ((resid @ resid) / (yc @ yc)))
    err = max_rel_err(vif_with_const, vif)
    check(err < 1e-10, f"adding a constant to the VIF regressions changed the VIFs by {err:.3g}")
    err = max_rel_err(np.diag(np.linalg.inv(corr)), vif)
    check(err < 1e-9, f"VIF: lstsq route vs inverse correlation matrix {err:.3g}")

    return {
        "names": names, "heights": heights, "event_bins": event_bins, "sampled": x.T,
        "filtered": filtered.T, "correlation": corr, "vif": vif,
        "settings": {
            "tr": tr, "scans": scans, "microtime": microtime, "reference": reference,
            "high_pass": high_pass, "dt": dt, "kernel_samples": kernel_len,
            "kernel_sum_before_normalising": float(hrf(np.arange(kernel_len) * dt).sum()),
            "grid_first_bin": first_bin, "grid_end_bin": end_bin,
            "first_sample_bin": int(sample_bins[0]), "sample_bin_step": microtime,
            "drift_cosines": n_cos,
        },
    }


def fixture_references(out: Path) -> list[str]:
    folder = out / "design_fixture"
    write_text(folder / "study.toml", STUDY_TOML)
    trials = read_trials(folder / "trials.csv")
    design = build_design(trials)
    ver = versions()
    write_json(folder / "expected.json", {
        "source": "numpy build following the README's numerical conventions",
        "computed_with": f"numpy {ver['numpy']}, scipy {ver['scipy']} (scipy.stats.gamma.pdf for the kernel)",
        "method": ("trials.csv read back; dense neural signal on the microtime grid "
                   "(bins grid_first_bin .. grid_end_bin - 1), bins [r(o/dt), max(r((o+d)/dt), r(o/dt)+1)) "
                   "with r = round half away from zero; onset height 1, modulator height = value minus the "
                   "mean of the values present (missing: height 0); numpy.convolve with h(i dt), "
                   "i = 0..255, divided by its sum, truncated; scan k sampled at bin 8 + 16 k; filtered = "
                   "residual of numpy.linalg.lstsq onto [1, cos(pi k (2n+1) / (2N)), k = 1..K]; correlation "
                   "= numpy.corrcoef of the filtered columns; vif_j = 1 / (1 - R2_j), R2_j from "
                   "numpy.linalg.lstsq of filtered column j on the other filtered columns."),
        "settings": design["settings"],
        "regressors": design["names"],
        "heights": {name: floats(h) for name, h in design["heights"].items()},
        "event_bins": design["event_bins"],
        "sampled": matrix(design["sampled"]),
        "filtered": matrix(design["filtered"]),
        "correlation": matrix(design["correlation"]),
        "vif": floats(design["vif"]),
    })
    return ["design_fixture/study.toml", "design_fixture/expected.json"]


# --------------------------------------------------------------------------- commonality

def ols_r2(target, predictors) -> float:
    """R2 of statsmodels OLS of target on a constant plus the predictor columns."""
    if predictors.shape[1] == 0:
        return 0.0
    return float(sm.OLS(target, sm.add_constant(predictors, has_constant="add")).fit().rsquared)


def commonality_table(target, groups: dict) -> dict:
    """Every subset R2 by a separate statsmodels OLS fit, and the commonality components
    C(S) = sum over B in S of (-1)^(|S|-|B|+1) R2(K minus B) (Mood 1969; Seibold & McPhee 1979)."""
    names = list(groups)
    k = len(names)
    r2 = {}
    for mask in range(1 << k):
        cols = [c for g, name in enumerate(names) if mask >> g & 1 for c in groups[name]]
        r2[mask] = ols_r2(target, np.column_stack(cols) if cols else np.empty((len(target), 0)))
    full = (1 << k) - 1
    components = []
    for mask in range(1, full + 1):
        share, sub = 0.0, mask
        while True:
            sign = 1.0 if (bin(mask).count("1") - bin(sub).count("1") + 1) % 2 == 0 else -1.0
            share += sign * r2[full & ~sub]
            if sub == 0:
                break
            sub = (sub - 1) & mask
        components.append({"groups": [n for g, n in enumerate(names) if mask >> g & 1], "share": share})
    check(abs(sum(c["share"] for c in components) - r2[full]) < 1e-12, "commonality components do not sum to R2")
    return {"groups": names, "subset_r2": {"+".join(n for g, n in enumerate(names) if m >> g & 1) or "(none)": v
                                           for m, v in r2.items()},
            "r2": r2[full], "components": components}


def commonality_references(out: Path) -> list[str]:
    data = longley_frame()
    longley = commonality_table(data["TOTEMP"].to_numpy(float), {
        "A": [data[c].to_numpy(float) for c in ("GNPDEFL", "GNP")],
        "B": [data[c].to_numpy(float) for c in ("UNEMP", "ARMED")],
        "C": [data[c].to_numpy(float) for c in ("POP", "YEAR")],
    })
    check(abs(longley["r2"] - 0.995479004577296) < 1e-12, "Longley R2 differs from the NIST certified value")
    design = build_design(read_trials(out / "design_fixture" / "trials.csv"))
    filtered = {name: np.asarray(col) for name, col in zip(design["names"], design["filtered"])}
    fixture = commonality_table(filtered["a:a_pe"], {
        "a": [filtered["a:a_value"]],
        "b": [filtered["b:b_pe"]],
        "task": [filtered["cue"], filtered["outcome"]],
    })
    # Model overlap: canonical correlations (numpy QR + SVD) between model a's set
    # {a:a_value, a:a_pe} and model b's {b:b_pe} after the task columns are projected out,
    # and the mean R2 (statsmodels OLS) of each set's columns on the other set.
    task = np.column_stack([filtered["cue"], filtered["outcome"]])
    def partial(cols):
        block = np.column_stack(cols)
        return block - task @ np.linalg.lstsq(task, block, rcond=None)[0]
    set_a, set_b = partial([filtered["a:a_value"], filtered["a:a_pe"]]), partial([filtered["b:b_pe"]])
    qa, qb = np.linalg.qr(set_a)[0], np.linalg.qr(set_b)[0]
    canonical = np.linalg.svd(qa.T @ qb, compute_uv=False)
    explained_a = np.mean([ols_r2(set_a[:, j], set_b) for j in range(set_a.shape[1])])
    explained_b = np.mean([ols_r2(set_b[:, j], set_a) for j in range(set_b.shape[1])])
    overlap = {"models": ["a", "b"], "canonical_correlations": floats(canonical),
               "explained": [float(explained_a), float(explained_b)]}
    vif = dict(zip(design["names"], design["vif"]))["a:a_pe"]
    check(abs((1 - fixture["r2"]) - 1 / vif) < 1e-10, "fixture: unique share differs from 1/VIF")
    ver = versions()
    write_json(out / "commonality.json", {
        "source": (f"statsmodels {ver['statsmodels']} OLS (with a constant) fitted separately for every "
                   "subset of groups; components by the commonality formula of Mood (1969) / Seibold & "
                   "McPhee (1979). longley: TOTEMP on A = {GNPDEFL, GNP}, B = {UNEMP, ARMED}, "
                   "C = {POP, YEAR} (full R2 = NIST certified 0.995479004577296). design_fixture: the "
                   "filtered a:a_pe column of design_fixture/expected.json on groups a = {a:a_value}, "
                   "b = {b:b_pe}, task = {cue, outcome}; design_fixture_overlap: numpy QR + SVD canonical "
                   "correlations of {a:a_value, a:a_pe} and {b:b_pe} after the task columns are projected "
                   "out (numpy lstsq), and statsmodels OLS R2 of each set's columns on the other set"),
        "longley": longley,
        "design_fixture": {"target": "a:a_pe", **fixture},
        "design_fixture_overlap": overlap,
    })
    return ["commonality.json"]


# --------------------------------------------------------------------------- demo study

AR1_COEFFICIENTS = [0.3, 0.6]


def glm_references(out: Path) -> list[str]:
    """The design fixture seen as its GLMs (one per model), under AR(1) noise, and the
    models' separation, each computed by a route of its own."""
    trials = read_trials(out / "design_fixture" / "trials.csv")
    design = build_design(trials)
    names = design["names"]
    x = np.asarray(design["sampled"]).T                      # scans x regressors
    filtered = np.asarray(design["filtered"]).T
    scans, tr, high_pass = FIXTURE["scans"], FIXTURE["tr"], FIXTURE["high_pass"]
    n_cos = math.floor(2 * scans * tr / high_pass)
    n = np.arange(scans)
    drift = np.column_stack([np.ones(scans)] +
                            [np.cos(np.pi * k * (2 * n + 1) / (2 * scans)) for k in range(1, n_cos + 1)])
    glms = []
    for model in ("a", "b"):
        keep = [j for j, name in enumerate(names) if ":" not in name or name.startswith(model + ":")]
        part = filtered[:, keep]
        glms.append({"glm": model, "regressors": [names[j] for j in keep],
                     "vif": floats([variance_inflation_factor(part, j, standardize=False)
                                    for j in range(part.shape[1])])})
    ar1 = []
    for rho in AR1_COEFFICIENTS:
        sigma = scipy.linalg.toeplitz(rho ** np.arange(scans))
        full = np.column_stack([x, drift])
        gls = sm.GLS(np.zeros(scans), full, sigma=sigma)
        w = gls.cholsigmainv
        xw, dw = w @ x, w @ drift
        fw = xw - dw @ np.linalg.lstsq(dw, xw, rcond=None)[0]
        vif = [variance_inflation_factor(fw, j, standardize=False) for j in range(fw.shape[1])]
        # Efficiency of each regressor's own contrast in the GLS metric, from the full
        # design (drift included) and the inverse of sigma directly: 1/[(X'S^-1X)^-1]_jj.
        information = full.T @ np.linalg.inv(sigma) @ full
        efficiency = 1.0 / np.diag(np.linalg.inv(information))[:x.shape[1]]
        check(max_rel_err(vif, [fw[:, j] @ fw[:, j] / e for j, e in enumerate(efficiency)]) < 1e-8,
              "AR(1): efficiency and VIF disagree through ||x||^2/VIF")
        ar1.append({"ar1": rho, "vif": floats(vif), "efficiency": floats(efficiency)})
    # Separation: partial R2 of each modulator of model A on model B's modulators, given
    # the task columns and A's other modulators (statsmodels OLS R2, with a constant).
    col = dict(zip(names, filtered.T))
    task = [col["cue"], col["outcome"]]
    def partial_r2(target, controls, others):
        r2_c = ols_r2(col[target], np.column_stack(controls))
        r2_cb = ols_r2(col[target], np.column_stack(controls + others))
        return (r2_cb - r2_c) / (1 - r2_c)
    separation = [
        {"models": ["a", "b"], "regressor": "a:a_value",
         "partial_r2": partial_r2("a:a_value", task + [col["a:a_pe"]], [col["b:b_pe"]])},
        {"models": ["a", "b"], "regressor": "a:a_pe",
         "partial_r2": partial_r2("a:a_pe", task + [col["a:a_value"]], [col["b:b_pe"]])},
        {"models": ["b", "a"], "regressor": "b:b_pe",
         "partial_r2": partial_r2("b:b_pe", task, [col["a:a_value"], col["a:a_pe"]])},
    ]
    ver = versions()
    write_json(out / "glms.json", {
        "source": (f"the design fixture's numpy build (design_fixture/expected.json). glms: each model's "
                   f"GLM (the events' columns and that model's), VIFs by statsmodels "
                   f"{ver['statsmodels']} variance_inflation_factor of the filtered columns. ar1: "
                   "statsmodels GLS with sigma = toeplitz(rho^k) (the AR(1) correlation matrix); its "
                   "whitening matrix cholsigmainv applied to the sampled regressors and to the constant "
                   "and cosines, the whitened drift projected out (numpy lstsq), VIFs by "
                   "variance_inflation_factor; efficiency 1/[(X'S^-1X)^-1]_jj of the full design "
                   "(regressors and drift) with numpy's inverse of sigma. separation: partial R2 = "
                   "(R2(j ~ C+B) - R2(j ~ C)) / (1 - R2(j ~ C)), statsmodels OLS R2 with a constant, "
                   "C = task columns and the modulator's own model's other modulators"),
        "regressors": names,
        "glms": glms,
        "ar1": ar1,
        "separation": separation,
    })
    return ["glms.json"]


def demo_references(out: Path) -> list[str]:
    """VIFs of every run of demo-data/, recomputed from its files with pandas, numpy and
    statsmodels: dense microtime grid, np.convolve, lstsq projection on the drift basis,
    variance_inflation_factor on the filtered (centred) columns."""
    import tomllib
    demo = HERE.parent.parent / "demo-data"
    study = tomllib.loads((demo / "study.toml").read_text(encoding="utf-8"))
    acq = study["acquisition"]
    tr, scans = float(acq["tr"]), int(acq["scans"])
    micro = int(acq.get("microtime", 16))
    reference = float(acq.get("reference", 0.5))
    cutoff = float(study.get("filter", {}).get("high_pass", 128.0))
    dt = tr / micro
    kernel = hrf(np.arange(int(math.ceil(32.0 / dt))) * dt)
    kernel = kernel / kernel.sum()
    start = round_half_away(32.0 / dt)
    first_sample = round_half_away(reference * micro)
    k = int(math.floor(2 * scans * tr / cutoff)) if cutoff > 0 else 0
    n = np.arange(scans)
    drift = np.column_stack([np.ones(scans)] + [np.cos(np.pi * j * (2 * n + 1) / (2 * scans))
                                                 for j in range(1, k + 1)])
    table = pd.read_csv(demo / study["trials"]["file"], dtype=str, keep_default_na=False)
    events = {e["name"]: e["onset"] for e in study["event"]}

    def regressor(onsets, heights):
        length = start + scans * micro + 2 * len(kernel)
        grid = np.zeros(length)
        for onset, height in zip(onsets, heights):
            grid[round_half_away(onset / dt) + start] += height   # sticks (duration 0)
        return np.convolve(grid, kernel)[:length][start + first_sample + micro * n]

    def number(cell):
        return float("nan") if cell in ("", "n/a") else float(cell)

    names, runs, ar1_first_run = [], [], []
    per_glm = {m["name"]: {"glm": m["name"], "models": [m["name"]], "regressors": [], "runs": []}
               for m in study["model"]}
    for (subject, run), rows in table.groupby(["subject", "run"], sort=False):
        columns, names = [], []
        for event, onset_column in events.items():
            columns.append(regressor(rows[onset_column].map(number), np.ones(len(rows))))
            names.append(event)
        for model in study["model"]:
            for modulator in model["modulators"]:
                values = rows[modulator["column"]].map(number).to_numpy(float)
                heights = np.where(np.isnan(values), 0.0, values - np.nanmean(values))
                columns.append(regressor(rows[events[modulator["event"]]].map(number), heights))
                names.append(f"{model['name']}:{modulator['column']}")
        design = np.column_stack(columns)
        filtered = design - drift @ np.linalg.lstsq(drift, design, rcond=None)[0]
        vifs = [variance_inflation_factor(filtered, j, standardize=False)
                for j in range(filtered.shape[1])]
        runs.append({"subject": subject, "run": run, "vif": floats(vifs)})
        # One GLM per model (the study's default): the events' columns and the model's.
        for model in study["model"]:
            keep = [j for j, name in enumerate(names)
                    if ":" not in name or name.startswith(model["name"] + ":")]
            part = filtered[:, keep]
            per_glm[model["name"]]["regressors"] = [names[j] for j in keep]
            per_glm[model["name"]]["runs"].append({
                "subject": subject, "run": run,
                "vif": floats([variance_inflation_factor(part, j, standardize=False)
                               for j in range(part.shape[1])]),
            })
        if (subject, run) == ("01", "1"):
            # AR(1) noise: statsmodels GLS with sigma the AR(1) correlation matrix; its
            # whitening (cholsigmainv, W'W = inverse of sigma) applied to the regressors and
            # to the constant and cosines, the whitened drift projected out, then VIFs.
            for rho in AR1_COEFFICIENTS:
                sigma = scipy.linalg.toeplitz(rho ** np.arange(scans))
                w = sm.GLS(np.zeros(scans), np.column_stack([design, drift]), sigma=sigma).cholsigmainv
                xw, dw = w @ design, w @ drift
                fw = xw - dw @ np.linalg.lstsq(dw, xw, rcond=None)[0]
                ar1_first_run.append({"ar1": rho, "vif": floats(
                    [variance_inflation_factor(fw, j, standardize=False) for j in range(fw.shape[1])])})
    write_json(out / "demo_vif.json", {
        "source": f"demo-data/ rebuilt with pandas {pd.__version__} and numpy {np.__version__} "
                  f"(dense convolution), VIFs by statsmodels {statsmodels.__version__} "
                  "variance_inflation_factor(filtered design, j, standardize=False); the filtered "
                  "columns are centred, so the uncentred R2 it uses equals the centred one",
        "regressors": names,
        "runs": runs,
        "glms_source": "the same filtered columns, those of each GLM taken (the events' and one "
                       "model's modulators: the study's default of one GLM per model), VIFs by "
                       "variance_inflation_factor again",
        "glms": list(per_glm.values()),
        "ar1_source": f"subject 01 run 1, every model in one design, AR(1) noise: statsmodels "
                      f"{statsmodels.__version__} GLS(sigma = toeplitz(rho^k)).cholsigmainv applied to "
                      "the regressors and to the constant and cosines, the whitened drift projected "
                      "out by numpy lstsq, VIFs by variance_inflation_factor",
        "ar1_first_run": ar1_first_run,
    })
    return ["demo_vif.json"]


# --------------------------------------------------------------------------- choice likelihood

# Softmax cases: (inverse temperature, option values). Invented numbers; the last case's
# beta * V spans ~100, so a naive exponential of it would overflow in float32 terms and
# tests the max-shift.
SOFTMAX_CASES = [
    (2.0, [0.25, 0.75]),
    (3.0, [0.1, 0.5, 0.9]),
    (0.0, [0.0, 1.0, 3.0]),
    (7.5, [0.2, -0.4, 0.7, 1.5]),
    (40.0, [0.0, 1.0, 2.5]),
]
# A fixed, invented sequence of 20 trials with 3 options: the option chosen (from 0) and
# the reward received. Written literally so that the Rust test reads the same trials.
CHOICE_SEQUENCE_OPTIONS = 3
CHOICE_SEQUENCE_INITIAL_VALUE = 0.5
CHOICE_SEQUENCE_CHOICES = [0, 1, 2, 0, 0, 1, 2, 2, 0, 0, 1, 0, 2, 0, 0, 1, 0, 0, 2, 0]
CHOICE_SEQUENCE_REWARDS = [1, 0, 1, 1, 0, 0, 0, 1, 1, 1, 0, 1, 0, 1, 1, 0, 1, 0, 0, 1]
# (learning rate, inverse temperature) at which the log-likelihood is tabulated.
CHOICE_LIKELIHOOD_POINTS = [(0.3, 4.0), (0.1, 1.0), (0.8, 12.0), (0.5, 0.0)]
# The learning rate held fixed while the inverse temperature is fitted.
CHOICE_FIT_LEARNING_RATE = 0.3
CHOICE_FIT_BOUNDS = (0.0, 50.0)


def delta_rule_log_likelihood(alpha: float, beta: float) -> float:
    """Sum over trials of log P(choice) with P = exp(beta V_c) / sum_j exp(beta V_j),
    a plain Python loop with the math module (no shift: the values stay in [0, 1]), and
    the delta rule V_c <- V_c + alpha (r - V_c) after each choice (Rescorla & Wagner 1972)."""
    values = [CHOICE_SEQUENCE_INITIAL_VALUE] * CHOICE_SEQUENCE_OPTIONS
    total = 0.0
    for choice, reward in zip(CHOICE_SEQUENCE_CHOICES, CHOICE_SEQUENCE_REWARDS):
        weights = [math.exp(beta * v) for v in values]
        total += math.log(weights[choice] / sum(weights))
        values[choice] += alpha * (reward - values[choice])
    return total


def choice_references(out: Path) -> list[str]:
    ver = versions()
    softmax = []
    for beta, values in SOFTMAX_CASES:
        z = beta * np.asarray(values, float)
        p = scipy.special.softmax(z)
        log_p = z - scipy.special.logsumexp(z)
        check(abs(p.sum() - 1.0) < 1e-14, "softmax probabilities do not sum to 1")
        check(max_abs_err(np.exp(log_p), p) < 1e-15, "logsumexp and softmax disagree")
        softmax.append({"inverse_temperature": beta, "values": floats(values),
                        "probabilities": floats(p), "log_probabilities": floats(log_p)})

    points = [{"learning_rate": a, "inverse_temperature": b,
               "log_likelihood": delta_rule_log_likelihood(a, b)} for a, b in CHOICE_LIKELIHOOD_POINTS]
    # beta = 0: every choice has probability 1/3, whatever the learning rate.
    check(abs(points[-1]["log_likelihood"] - 20 * math.log(1 / 3)) < 1e-12,
          "choice log-likelihood at beta = 0 is not 20 ln(1/3)")

    alpha = CHOICE_FIT_LEARNING_RATE
    result = scipy.optimize.minimize_scalar(lambda b: -delta_rule_log_likelihood(alpha, b),
                                            bounds=CHOICE_FIT_BOUNDS, method="bounded",
                                            options={"xatol": 1e-10})
    beta_hat = float(result.x)
    check(result.success and 0.5 < beta_hat < 45.0, f"the ML inverse temperature {beta_hat} is not interior")
    h = 1e-5
    slope = (delta_rule_log_likelihood(alpha, beta_hat + h) - delta_rule_log_likelihood(alpha, beta_hat - h)) / (2 * h)
    check(abs(slope) < 1e-6, f"d logL / d beta = {slope} at the ML estimate")

    write_json(out / "choice_likelihood.json", {
        "source": ("softmax: scipy " + ver["scipy"] + " scipy.special.softmax(beta * values); log_probabilities: "
                   "beta * values - scipy.special.logsumexp(beta * values). log_likelihood: a plain Python "
                   "loop (math.exp, math.log, no max-shift) over the sequence, delta rule V_c <- V_c + "
                   "alpha (r - V_c), every option starting at initial_value. fitted_inverse_temperature: "
                   "scipy.optimize.minimize_scalar(method='bounded', bounds=[0, 50], xatol=1e-10) of "
                   "minus that log-likelihood with the learning rate fixed; |d logL / d beta| < 1e-6 there "
                   "by a central difference"),
        "softmax": softmax,
        "sequence": {"options": CHOICE_SEQUENCE_OPTIONS, "initial_value": CHOICE_SEQUENCE_INITIAL_VALUE,
                     "choices": CHOICE_SEQUENCE_CHOICES, "rewards": floats(CHOICE_SEQUENCE_REWARDS)},
        "log_likelihood": points,
        "fitted_inverse_temperature": {
            "source": f"scipy {ver['scipy']} scipy.optimize.minimize_scalar, bounded method, xatol 1e-10",
            "learning_rate": alpha, "bounds": list(map(float, CHOICE_FIT_BOUNDS)),
            "inverse_temperature": beta_hat,
            "log_likelihood": delta_rule_log_likelihood(alpha, beta_hat),
        },
    })
    return ["choice_likelihood.json"]


# --------------------------------------------------------------------------- computed check values

# The hand-checkable design of the efficiency check: X = [1, x1, x2] with x1 = [1, 1, -1, -1],
# x2 = [1, 0, 0, -1] (invented so that every number can be checked by hand).
EFFICIENCY_TOY_X = [[1, 1, 1], [1, 1, 0], [1, -1, 0], [1, -1, -1]]
# Contrasts c (one row) whose efficiency 1 / (c (X'X)^-1 c') is tabulated, and one
# two-row contrast C whose efficiency is 1 / trace(C (X'X)^-1 C').
EFFICIENCY_TOY_CONTRASTS = {"c=[0,1,0]": [0, 1, 0], "c=[0,0,1]": [0, 0, 1],
                            "c=[0,1,-1]": [0, 1, -1], "c=[0,1,1]": [0, 1, 1]}
EFFICIENCY_TOY_TRACE_CONTRAST = ("C=[[0,1,0],[0,0,1]] (trace form)", [[0, 1, 0], [0, 0, 1]])
# Longley predictor sets whose generalized VIF is tabulated (indices into LONGLEY_PREDICTORS).
GVIF_EXACT_SETS = {"{GNP,POP}": [1, 4], "{GNPDEFL,GNP,POP,YEAR}": [0, 1, 4, 5],
                   "{UNEMP,ARMED}": [2, 3]}


def exact_determinant(rows) -> Fraction:
    """Determinant of a square matrix of Fractions by Gaussian elimination, exactly."""
    a = [list(row) for row in rows]
    n = len(a)
    det = Fraction(1)
    for k in range(n):
        pivot = next((i for i in range(k, n) if a[i][k] != 0), None)
        if pivot is None:
            return Fraction(0)
        if pivot != k:
            a[k], a[pivot] = a[pivot], a[k]
            det = -det
        det *= a[k][k]
        for i in range(k + 1, n):
            factor = a[i][k] / a[k][k]
            for j in range(k, n):
                a[i][j] -= factor * a[k][j]
    return det


def exact_inverse(rows) -> list:
    """Inverse of a square matrix of Fractions by Gauss-Jordan elimination, exactly."""
    n = len(rows)
    a = [list(row) + [Fraction(int(i == j)) for j in range(n)] for i, row in enumerate(rows)]
    for k in range(n):
        pivot = next(i for i in range(k, n) if a[i][k] != 0)
        a[k], a[pivot] = a[pivot], a[k]
        head = a[k][k]
        a[k] = [v / head for v in a[k]]
        for i in range(n):
            if i != k and a[i][k] != 0:
                factor = a[i][k]
                a[i] = [v - factor * w for v, w in zip(a[i], a[k])]
    return [row[n:] for row in a]


def quadratic(c, a, d) -> Fraction:
    """c A d' for row vectors c, d."""
    return sum(c[i] * a[i][j] * d[j] for i in range(len(c)) for j in range(len(d)))


def computed_references(out: Path) -> list[str]:
    # Generalized VIF of Longley predictor sets, exactly: the data's decimal values as
    # Fractions, the centred cross-product matrix S, and GVIF = det(S_set) det(S_rest) / det(S)
    # (Fox & Monette 1992 write it with the correlation matrix R; the column scalings of
    # R = D S D cancel between numerator and denominator, so S gives the same value).
    text = longley_csv_text(longley_frame())
    rows = list(csv.reader(io.StringIO(text)))
    check(rows[0] == LONGLEY_COLUMNS, "longley.csv header")
    columns = [[Fraction(row[1 + j]) for row in rows[1:]] for j in range(len(LONGLEY_PREDICTORS))]
    means = [sum(column) / len(column) for column in columns]
    centred = [[v - m for v in column] for column, m in zip(columns, means)]
    cross = [[sum(x * y for x, y in zip(a, b)) for b in centred] for a in centred]
    full = exact_determinant(cross)

    def block(members):
        return [[cross[i][j] for j in members] for i in members]

    numpy_corr = np.corrcoef(longley_frame()[LONGLEY_PREDICTORS].to_numpy(), rowvar=False)
    gvif_exact = {}
    for key, members in GVIF_EXACT_SETS.items():
        rest = [j for j in range(len(LONGLEY_PREDICTORS)) if j not in members]
        value = exact_determinant(block(members)) * exact_determinant(block(rest)) / full
        df = len(members)
        # independent route: numpy determinants of correlation blocks (longley_vif.json)
        by_numpy = (np.linalg.det(numpy_corr[np.ix_(members, members)])
                    * np.linalg.det(numpy_corr[np.ix_(rest, rest)]) / np.linalg.det(numpy_corr))
        err = abs(by_numpy - float(value)) / float(value)
        check(err < 1e-8, f"GVIF {key}: exact and numpy routes differ by {err:.3g} relative")
        gvif_exact[key] = {"gvif": float(value), "gvif_pow_1_over_2df": float(value) ** (1.0 / (2 * df)),
                           "df": df}
    check(gvif_exact["{UNEMP,ARMED}"]["gvif"] == gvif_exact["{GNPDEFL,GNP,POP,YEAR}"]["gvif"],
          "a set and its complement do not share their GVIF")

    # Efficiency of contrasts of the hand-checkable design, exactly.
    x = [[Fraction(v) for v in row] for row in EFFICIENCY_TOY_X]
    p = len(x[0])
    xtx = [[sum(row[i] * row[j] for row in x) for j in range(p)] for i in range(p)]
    inverse = exact_inverse(xtx)
    check(all(sum(xtx[i][k] * inverse[k][j] for k in range(p)) == int(i == j)
              for i in range(p) for j in range(p)), "the exact inverse of X'X")
    efficiency = {key: 1 / quadratic(c, inverse, c) for key, c in EFFICIENCY_TOY_CONTRASTS.items()}
    key, rows_c = EFFICIENCY_TOY_TRACE_CONTRAST
    efficiency[key] = 1 / sum(quadratic(c, inverse, c) for c in rows_c)
    # the modulators centred (the intercept column is the mean)
    predictors = [[row[j] for row in x] for j in range(1, p)]
    centred_toy = [[v - sum(col) / len(col) for v in col] for col in predictors]
    ss = [sum(v * v for v in col) for col in centred_toy]
    product = sum(a * b for a, b in zip(*centred_toy))
    r_squared = product * product / (ss[0] * ss[1])
    vif = 1 / (1 - r_squared)
    # the same columns without their correlation: Var(c b) = sum_j c_j^2 / ss_j
    uncorrelated = {key: 1 / sum(Fraction(c[j + 1]) ** 2 / ss[j] for j in range(p - 1))
                    for key, c in EFFICIENCY_TOY_CONTRASTS.items() if key != "c=[0,1,1]"}
    by_numpy = np.linalg.inv(np.asarray(EFFICIENCY_TOY_X, float).T @ np.asarray(EFFICIENCY_TOY_X, float))
    check(max_abs_err(by_numpy, [[float(v) for v in row] for row in inverse]) < 1e-14,
          "numpy and the exact inverse of X'X disagree")

    write_json(out / "computed.json", {
        "about": ("Check values computed for the tests, not printed by any source: each entry says "
                  "exactly how. Written by tests/reference/make_references.py (computed_references) "
                  "with Python's fractions module, so every value is exact rational arithmetic "
                  "rounded once to a float; --check recomputes them. Values a publication printed "
                  "are in published.json."),
        "gvif_longley": {
            "source": ("exact rational arithmetic (Python fractions) on the Longley (1967) data as in "
                       "longley.csv, each decimal read as a Fraction: S = centred cross-product matrix "
                       "of the six predictors, GVIF = det(S_set) det(S_rest) / det(S) by exact Gaussian "
                       "elimination (the Fox & Monette 1992 formula; the column scalings of the "
                       "correlation matrix cancel); gvif_pow_1_over_2df = float(GVIF) ** (1 / (2 df)). "
                       "Agrees with numpy determinants of correlation blocks to < 1e-8 relative."),
            "expected": gvif_exact,
        },
        "efficiency_toy": {
            "source": ("exact rational arithmetic (Python fractions): X'X, its inverse by Gauss-Jordan "
                       "elimination, efficiency 1 / (c (X'X)^-1 c') of each contrast c (and "
                       "1 / trace(C (X'X)^-1 C') for the two-row C), the definition of Dale (1999), "
                       "Hum Brain Mapp 8:109-114; vif = 1 / (1 - r^2) of the centred x1, x2; "
                       "centered_ss = sums of squares of the centred x1, x2; "
                       "efficiency_with_no_correlation_same_ss = 1 / (sum_j c_j^2 / centered_ss_j), the "
                       "efficiency the same contrasts would have if x1 and x2 were uncorrelated. "
                       "Every value can be checked by hand."),
            "input": {"X": matrix(EFFICIENCY_TOY_X)},
            "expected": {
                "XtX": [[float(v) for v in row] for row in xtx],
                "XtX_inverse": [[float(v) for v in row] for row in inverse],
                "vif": float(vif),
                "centered_ss": [float(v) for v in ss],
                "efficiency": {key: float(v) for key, v in efficiency.items()},
                "efficiency_with_no_correlation_same_ss": {key: float(v) for key, v in uncorrelated.items()},
            },
        },
    })
    return ["computed.json"]


# --------------------------------------------------------------------------- write / check

def generate(out: Path) -> list[str]:
    files = []
    files += longley_references(out)
    files += hrf_references(out)
    files += fixture_references(out)
    files += commonality_references(out)
    files += glm_references(out)
    files += demo_references(out)
    files += choice_references(out)
    files += computed_references(out)
    return files


def is_number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


def numbers_agree(a: float, b: float) -> bool:
    return abs(a - b) <= TOLERANCE + TOLERANCE * abs(b)


def compare_json(committed, fresh, where: str, diffs: list) -> None:
    if isinstance(committed, dict) and isinstance(fresh, dict):
        if list(committed) != list(fresh):
            diffs.append(f"{where or '(top)'}: keys {list(committed)} vs regenerated {list(fresh)}")
            return
        for key in committed:
            compare_json(committed[key], fresh[key], f"{where}.{key}" if where else key, diffs)
    elif isinstance(committed, list) and isinstance(fresh, list):
        if len(committed) != len(fresh):
            diffs.append(f"{where}: length {len(committed)} vs regenerated {len(fresh)}")
            return
        for i, (a, b) in enumerate(zip(committed, fresh)):
            compare_json(a, b, f"{where}[{i}]", diffs)
    elif is_number(committed) and is_number(fresh):
        if not numbers_agree(committed, fresh):
            diffs.append(f"{where}: committed {committed!r} vs regenerated {fresh!r}")
    elif type(committed) is not type(fresh) or committed != fresh:
        diffs.append(f"{where}: committed {committed!r} vs regenerated {fresh!r}")


def as_float(cell: str):
    try:
        return float(cell)
    except ValueError:
        return None


def compare_csv(committed: str, fresh: str, diffs: list) -> None:
    a = list(csv.reader(io.StringIO(committed)))
    b = list(csv.reader(io.StringIO(fresh)))
    if len(a) != len(b):
        diffs.append(f"{len(a)} rows vs regenerated {len(b)}")
        return
    for r, (ra, rb) in enumerate(zip(a, b), start=1):
        if len(ra) != len(rb):
            diffs.append(f"line {r}: {len(ra)} cells vs regenerated {len(rb)}")
            continue
        for c, (x, y) in enumerate(zip(ra, rb)):
            column = a[0][c] if c < len(a[0]) else str(c + 1)
            fx, fy = as_float(x), as_float(y)
            same = numbers_agree(fx, fy) if (fx is not None and fy is not None) else x == y
            if not same:
                diffs.append(f"line {r}, column {column}: committed {x!r} vs regenerated {y!r}")


def compare_file(name: str, committed_path: Path, fresh_path: Path) -> list[str]:
    if not committed_path.exists():
        return [f"{name}: missing (run make_references.py to write it)"]
    committed = committed_path.read_text(encoding="utf-8")
    fresh = fresh_path.read_text(encoding="utf-8")
    diffs: list[str] = []
    if name.endswith(".json"):
        try:
            compare_json(json.loads(committed), json.loads(fresh), "", diffs)
        except json.JSONDecodeError as e:
            diffs.append(f"not valid JSON ({e})")
    elif name.endswith(".csv"):
        compare_csv(committed, fresh, diffs)
    elif committed != fresh:
        a, b = committed.splitlines(), fresh.splitlines()
        line = next((i for i, (x, y) in enumerate(zip(a, b)) if x != y), min(len(a), len(b)))
        diffs.append(f"text differs from line {line + 1}")
    return [f"{name}: {d}" for d in diffs]


def warn_on_versions() -> None:
    pins, have = pinned_versions(), versions()
    for name, pinned in pins.items():
        if have.get(name) != pinned:
            print(f"warning: {name} {have.get(name)} installed, requirements.txt pins {pinned}",
                  file=sys.stderr)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--check", action="store_true",
                        help="regenerate into a temporary folder and compare with the committed files")
    parser.add_argument("--new-trials", action="store_true",
                        help="redraw design_fixture/trials.csv from default_rng(7) (it is otherwise kept)")
    args = parser.parse_args()
    warn_on_versions()
    trials_name = "design_fixture/trials.csv"
    committed_trials = HERE / trials_name

    if args.check:
        if not committed_trials.exists():
            print(f"make_references.py --check: {trials_name} is missing", file=sys.stderr)
            return 1
        with tempfile.TemporaryDirectory() as tmp:
            out = Path(tmp)
            (out / "design_fixture").mkdir()
            shutil.copyfile(committed_trials, out / trials_name)   # input, used as committed
            files = generate(out)
            diffs = []
            for name in files:
                diffs += compare_file(name, HERE / name, out / name)
        if committed_trials.read_text(encoding="utf-8") != draw_trials_text():
            print(f"note: {trials_name} is not what default_rng(7) draws with numpy {np.__version__}; "
                  "the committed file stays the source of truth", file=sys.stderr)
        if diffs:
            print(f"make_references.py --check: reference files differ from a fresh build "
                  f"(tolerance {TOLERANCE:g} relative and absolute):", file=sys.stderr)
            for d in diffs[:50]:
                print(f"  {d}", file=sys.stderr)
            if len(diffs) > 50:
                print(f"  ... and {len(diffs) - 50} more", file=sys.stderr)
            print("run `python3 tests/reference/make_references.py` to rewrite them", file=sys.stderr)
            return 1
        print(f"reference files up to date: {len(files)} files")
        return 0

    if args.new_trials or not committed_trials.exists():
        write_text(committed_trials, draw_trials_text())
        print(f"wrote {trials_name}")
    for name in generate(HERE):
        print(f"wrote {name}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
