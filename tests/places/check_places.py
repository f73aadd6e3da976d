#!/usr/bin/env python3
"""Every site in the shipped examples and the test scenarios sits at an invented place of
tests/places/invented-places.tsv (open sea, never a real range, base or town), and the docs say
that the energy thresholds are generic screening values. Usage: check_places.py SOURCE_DIR"""
import pathlib, re, sys, tomllib

root = pathlib.Path(sys.argv[1])
allowed = set()
for line in (root / "tests/places/invented-places.tsv").read_text().splitlines():
    if line.startswith("#") or line.startswith("latitude") or not line.strip():
        continue
    lat, lon = line.split("\t")[:2]
    allowed.add((float(lat), float(lon)))
failures = 0
checked = 0
# Scenarios and benchmark inputs; the bad-input catalogue holds deliberately invalid values.
files = [p for folder in ("inputs", "tests") for p in (root / folder).rglob("*.toml")
         if "bad-inputs" not in p.parts]
for path in sorted(files):
    try:
        site = tomllib.loads(path.read_text()).get("site", {})
    except tomllib.TOMLDecodeError:
        continue
    if "latitude" in site or "longitude" in site:
        checked += 1
        place = (float(site.get("latitude")), float(site.get("longitude")))
        if place not in allowed:
            print(f"FAIL: {path.relative_to(root)}: site {place} is not an invented place of "
                  "tests/places/invented-places.tsv")
            failures += 1
# Coordinates written into the C++ tests.
for path in sorted((root / "tests").rglob("*.cpp")):
    text = path.read_text()
    lats = re.findall(r"\.latitude = (-?[0-9.]+);", text)
    lons = re.findall(r"\.longitude = (-?[0-9.]+);", text)
    for lat, lon in zip(lats, lons):
        checked += 1
        if (float(lat), float(lon)) not in allowed:
            print(f"FAIL: {path.relative_to(root)}: site ({lat}, {lon}) is not an invented place")
            failures += 1
docs = (root / "docs/scenario.md").read_text()
if not re.search(r"energy_threshold.*generic screening", docs):
    print("FAIL: docs/scenario.md does not say that the energy threshold is a generic screening value")
    failures += 1
if checked < 4:
    print(f"FAIL: only {checked} sites found: the check is not reading the examples")
    failures += 1
print(f"invented places: {checked} sites checked, {failures} failed")
sys.exit(1 if failures else 0)
