#!/usr/bin/env python3
"""Renders the demo study's HTML report in headless Chromium, checks that the page the
browser built has the expected sections and plots, and saves a screenshot.

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

SECTIONS = ["overview", "shared", "correlations", "participants", "settings", "methods", "cautions"]
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
    page = out / "demo-report.html"
    subprocess.run(["target/release/tangle", "demo", "--format", "html", "--out", str(page)], check=True)

    problems = []
    with tempfile.TemporaryDirectory() as profile:
        dom = chromium(args.chromium, profile, "--dump-dom", page.as_uri()).stdout
        for name in SECTIONS:
            if f'<section id="{name}">' not in dom:
                problems.append(f"section '{name}' is missing from the rendered page")
        plots = len(re.findall(r"<svg\b", dom))
        if plots < 3:
            problems.append(f"only {plots} SVG plots in the rendered page (expected at least 3)")
        if "<script" in dom:
            problems.append("the page holds a script")
        for text in ("NaN", ">inf<"):
            if text in dom:
                problems.append(f"the page shows '{text}'")
        screenshot = out / "demo-report.png"
        chromium(args.chromium, profile, f"--screenshot={screenshot}", "--window-size=1280,2400",
                 page.as_uri())
        if not screenshot.exists() or screenshot.stat().st_size < 10_000:
            problems.append("no screenshot was written")

    if problems:
        for problem in problems:
            print(f"browser check: {problem}", file=sys.stderr)
        return 1
    print(f"browser check: {len(SECTIONS)} sections and {plots} plots rendered; "
          f"screenshot {screenshot.relative_to(Path.cwd()) if screenshot.is_relative_to(Path.cwd()) else screenshot}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
