#!/usr/bin/env python3
"""Do two JSON reports of `tangle check` agree on every field the older one has?

Usage: bench/same-fields.py OLD.json NEW.json [--tolerance 1e-12] [--ignore key,key]

Fields the newer report adds (new sections, new keys) are allowed; every field of the
older report must exist in the newer one with the same value: strings and booleans
equal, numbers within the relative tolerance. Keys named in --ignore are skipped
wherever they occur (e.g. `file`, a study file's path). Prints the first differences
and exits 1 when there are any. Not a test: a tool for proving that a change kept what
a report already said."""
import argparse
import json
import sys


def compare(old, new, path, tolerance, ignore, diffs):
    if isinstance(old, dict):
        if not isinstance(new, dict):
            diffs.append(f"{path}: an object became {type(new).__name__}")
            return
        for key, value in old.items():
            if key in ignore:
                continue
            if key not in new:
                diffs.append(f"{path}.{key}: missing")
                continue
            compare(value, new[key], f"{path}.{key}", tolerance, ignore, diffs)
    elif isinstance(old, list):
        if not isinstance(new, list) or len(old) != len(new):
            diffs.append(f"{path}: a list of {len(old)} became {len(new) if isinstance(new, list) else new!r}")
            return
        for index, (a, b) in enumerate(zip(old, new)):
            compare(a, b, f"{path}[{index}]", tolerance, ignore, diffs)
    elif isinstance(old, bool) or old is None or isinstance(old, str):
        if old != new:
            diffs.append(f"{path}: {old!r} became {new!r}")
    elif isinstance(old, (int, float)):
        if not isinstance(new, (int, float)) or isinstance(new, bool):
            diffs.append(f"{path}: {old!r} became {new!r}")
        elif abs(old - new) > tolerance * max(1.0, abs(old)):
            diffs.append(f"{path}: {old!r} became {new!r}")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("old")
    parser.add_argument("new")
    parser.add_argument("--tolerance", type=float, default=1e-12)
    parser.add_argument("--ignore", default="", help="comma-separated keys to skip")
    args = parser.parse_args()
    with open(args.old) as f:
        old = json.load(f)
    with open(args.new) as f:
        new = json.load(f)
    diffs = []
    compare(old, new, "", args.tolerance, set(filter(None, args.ignore.split(","))), diffs)
    for diff in diffs[:20]:
        print(diff)
    print(f"{len(diffs)} difference(s)" if diffs else "every field of the older report kept its value")
    return 1 if diffs else 0


if __name__ == "__main__":
    sys.exit(main())
