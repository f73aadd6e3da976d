#!/usr/bin/env python3
"""Runs every worked study the way its README says and checks the numbers the README states.

A README in inputs/ (name.md beside name.toml) holds one command in an HTML comment,
    <!-- check: strewn run inputs/ridge-drop.toml -->   (or: strewn sweep inputs/sweeps/x.toml -n 2000)
and a table whose rows name a figure by its path in the run's JSON summary (`footprint.all.
containment.2.radius`) or, for a sweep, in its CSV summary (`case.4.all.radius_0.99`), with the
value as the README prints it. A number must match to the digits printed (half a unit in its last
place); a word (a rule's status) must match exactly.

Usage: check_readmes.py STREWN_BINARY SOURCE_DIR
"""
import csv, glob, json, os, re, shlex, subprocess, sys, tempfile

strewn, source = os.path.realpath(sys.argv[1]), os.path.realpath(sys.argv[2])
failures, checked = 0, 0
row = re.compile(r"^\|[^|]*\|\s*`([^`]+)`\s*\|\s*([^|]+?)\s*\|")


def resolve(tree, path):
    for part in path.split("."):
        tree = tree[int(part)] if isinstance(tree, list) else tree[part]
    return tree


def sweep_value(rows, path):
    # case.<index>.<column>: the column name may hold dots itself
    _, index, column = path.split(".", 2)
    value = rows[int(index)][column]
    try:
        return float(value)
    except ValueError:
        return value


for readme in sorted(glob.glob(f"{source}/inputs/**/*.md", recursive=True)):
    text = open(readme).read()
    command = re.search(r"<!-- check: strewn (.+?) -->", text)
    if not command:
        continue
    args = shlex.split(command.group(1))
    with tempfile.TemporaryDirectory() as work:
        output = os.path.join(work, "study.h5")
        if args[0] == "run":
            run = subprocess.run([strewn, *args, "-o", output, "--quiet", "--json"], cwd=source,
                                 capture_output=True, text=True, timeout=1200)
            if run.returncode != 0:
                print(f"FAIL: {readme}: strewn {' '.join(args)} ended with {run.returncode}: {run.stderr[:300]}")
                failures += 1
                continue
            summary = json.loads(run.stdout)
            lookup = lambda p: resolve(summary, p)
        else:
            run = subprocess.run([strewn, *args, "-o", output, "--quiet"], cwd=source,
                                 capture_output=True, text=True, timeout=1200)
            if run.returncode != 0:
                print(f"FAIL: {readme}: strewn {' '.join(args)} ended with {run.returncode}: {run.stderr[:300]}")
                failures += 1
                continue
            rows = list(csv.DictReader(open(os.path.join(work, "study-summary.csv"))))
            lookup = lambda p: sweep_value(rows, p)
        for line in text.splitlines():
            m = row.match(line)
            if not m or m.group(1) in ("path",):
                continue
            path, stated = m.group(1), m.group(2)
            try:
                actual = lookup(path)
            except (KeyError, IndexError, ValueError) as e:
                print(f"FAIL: {os.path.basename(readme)}: {path} is not in the output ({e})")
                failures += 1
                continue
            checked += 1
            number = re.match(r"[-+]?\d+(\.\d+)?([eE][-+]?\d+)?", stated)
            if number and not isinstance(actual, str):
                digits = number.group(0)
                decimals = len(number.group(1)) - 1 if number.group(1) else 0
                exponent = int(number.group(2)[1:]) if number.group(2) else 0
                half_unit = 0.5 * 10 ** (exponent - decimals)
                if actual is None or abs(float(actual) - float(digits)) > half_unit * (1 + 1e-9):
                    print(f"FAIL: {os.path.basename(readme)}: {path} is {actual}, the README says {digits}")
                    failures += 1
            elif str(actual) != stated.split()[0]:
                print(f"FAIL: {os.path.basename(readme)}: {path} is {actual}, the README says {stated}")
                failures += 1
    print(f"ok: {os.path.relpath(readme, source)} ({' '.join(args)})")

print(f"worked studies: {checked} figures checked, {failures} failed")
sys.exit(1 if failures or checked == 0 else 0)
