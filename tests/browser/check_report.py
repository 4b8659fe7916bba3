#!/usr/bin/env python3
"""Renders the demo study's HTML report and the demo forecast's HTML page in headless
Chromium, checks that each page the browser built has the expected sections and plots, and
saves a screenshot of each.

    python3 tests/browser/check_report.py [--chromium /usr/bin/chromium] [--out target/browser]

Run from the repository root after `cargo build --release`. Exits 1 if a check fails.
"""

from __future__ import annotations

import argparse
import re
import subprocess
import sys
import tempfile
from pathlib import Path

PAGES = {
    "demo-report": (["demo", "--format", "html"],
                    ["overview", "shared", "separation", "correlations", "participants", "settings",
                     "methods", "cautions"], 4),
    "demo-forecast": (["forecast", "demo-data/forecast.toml", "--participants", "40", "--quiet",
                       "--format", "html"],
                      ["setup", "ranking", "variant-1", "variant-5", "cautions"], 2),
}
FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
         "--disable-component-update", "--disable-sync", "--no-first-run", "--disable-quic"]


def chromium(binary: str, profile: str, *args: str) -> subprocess.CompletedProcess:
    return subprocess.run([binary, *FLAGS, f"--user-data-dir={profile}", *args],
                          capture_output=True, text=True, timeout=120)


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--chromium", default="chromium")
    parser.add_argument("--out", default="target/browser")
    args = parser.parse_args()
    out = Path(args.out).resolve()
    out.mkdir(parents=True, exist_ok=True)
    problems = []
    summaries = []
    for name, (command, sections, min_plots) in PAGES.items():
        page = out / f"{name}.html"
        subprocess.run(["target/release/tangle", *command, "--out", str(page)], check=True)
        with tempfile.TemporaryDirectory() as profile:
            dom = chromium(args.chromium, profile, "--dump-dom", page.as_uri()).stdout
            for section in sections:
                if f'<section id="{section}"' not in dom:
                    problems.append(f"{name}: section '{section}' is missing from the rendered page")
            plots = len(re.findall(r"<svg\b", dom))
            if plots < min_plots:
                problems.append(f"{name}: only {plots} SVG plots (expected at least {min_plots})")
            if "<script" in dom:
                problems.append(f"{name}: the page holds a script")
            for text in ("NaN", ">inf<"):
                if text in dom:
                    problems.append(f"{name}: the page shows '{text}'")
            screenshot = out / f"{name}.png"
            chromium(args.chromium, profile, f"--screenshot={screenshot}", "--window-size=1280,2400",
                     page.as_uri())
            if not screenshot.exists() or screenshot.stat().st_size < 10_000:
                problems.append(f"{name}: no screenshot was written")
        shown = screenshot.relative_to(Path.cwd()) if screenshot.is_relative_to(Path.cwd()) else screenshot
        summaries.append(f"{name}: {len(sections)} sections and {plots} plots rendered; screenshot {shown}")

    if problems:
        for problem in problems:
            print(f"browser check: {problem}", file=sys.stderr)
        return 1
    for summary in summaries:
        print(f"browser check: {summary}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
