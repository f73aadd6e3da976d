#!/usr/bin/env bash
# Names and titles crafted to break outputs, on the real binary: a title holding terminal escape
# sequences, a bell, a right-to-left override and markup, and a body named like a spreadsheet
# formula. Every output stays what it is: the terminal receives no raw control character, the
# SVG map and the GeoJSON parse, the HTML page shows the markup as text, the CSV cell is defused.
# A write to a full standard output ends with status 3, not 0.
# Usage: hostile_names.sh STREWN_BINARY SOURCE_DIR
set -uo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"

# The demo scenario with a hostile title and body name (TOML escapes: \u001b is ESC), beside its
# terrain.
cp -r "$source_dir/inputs/terrain" "$work/terrain"
sed -e 's|^title = .*|title = "\\u001b[2J\\u001b]0;owned\\u0007 \\u202Eexe.fdp <script>alert(1)</script> \\u0085 \\u009b31m"|' \
    -e 's|^name = .*|name = "=HYPERLINK(\\"x\\",\\"y\\")"|' \
    "$source_dir/inputs/ridge-drop.toml" >"$work/hostile.toml"
printf '\n[output]\nfile = "hostile.h5"\n' >>"$work/hostile.toml"

# No raw control character (but line feed and tab), DEL, C1 control or bidirectional mark.
inert() {  # inert FILE WHAT
  python3 - "$1" "$2" <<'PY' || fail "$2: raw control characters reach the terminal"
import sys
data = open(sys.argv[1], "rb").read()
text = data.decode("utf-8", errors="strict")
bad = [c for c in text if (ord(c) < 0x20 and c not in "\n\t") or 0x7F <= ord(c) <= 0x9F
       or c in "\u200e\u200f\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069"]
if bad:
    print(f"{sys.argv[2]}: {len(bad)} raw characters, e.g. {[hex(ord(c)) for c in bad[:5]]}")
    sys.exit(1)
PY
}

"$strewn" check "$work/hostile.toml" >"$work/check.out" 2>"$work/check.err" || fail "check refused the hostile title: $(cat "$work/check.err")"
inert "$work/check.out" "check"
"$strewn" check "$work/hostile.toml" --json >"$work/check.json" 2>&1 || fail "check --json failed"
python3 -c 'import json,sys; j=json.load(open(sys.argv[1])); assert j["title"].startswith("\x1b[2J"), j["title"]' "$work/check.json" ||
  fail "check --json: the title does not read back as given"
inert "$work/check.json" "check --json"
"$strewn" run "$work/hostile.toml" -n 300 -o "$work/hostile.h5" >"$work/run.out" 2>"$work/run.err" || fail "run failed: $(cat "$work/run.err")"
inert "$work/run.out" "run"
inert "$work/run.err" "run (errors)"
"$strewn" report "$work/hostile.h5" --svg "$work/map.svg" --html "$work/page.html" --csv "$work/figures.csv" \
  --geojson "$work/zones.geojson" >"$work/report.out" 2>"$work/report.err" || fail "report failed: $(cat "$work/report.err")"
inert "$work/report.out" "report"
python3 -c 'import sys, xml.etree.ElementTree as ET; ET.parse(sys.argv[1])' "$work/map.svg" || fail "the SVG map is not well-formed XML"
# The page and the map show the title's controls and right-to-left override as escapes, inert.
inert "$work/page.html" "the HTML page"
inert "$work/map.svg" "the SVG map"
grep -q 'u202Eexe.fdp' "$work/page.html" || fail "the HTML page does not show the right-to-left override as an escape"
python3 -c 'import json,sys; json.load(open(sys.argv[1]))' "$work/zones.geojson" || fail "the GeoJSON does not parse"
grep -q "<script>alert" "$work/page.html" && fail "the HTML page holds the title's markup as markup"
grep -q "&lt;script&gt;alert(1)&lt;/script&gt;" "$work/page.html" || fail "the HTML page does not show the title's markup as text"
python3 - "$work/figures.csv" <<'PY' || fail "a CSV cell would be evaluated as a formula"
import csv, sys
rows = list(csv.reader(open(sys.argv[1], newline="")))
cells = [c for r in rows[1:] for c in r]
assert any(c.startswith("'=HYPERLINK") for c in cells), "the body's name is not there, defused"
assert not any(c and c[0] in "=+@" for c in cells), [c for c in cells if c and c[0] in "=+@"][:3]
PY
# An error message quoting a hostile key stays inert too.
printf '%s\n' '"\u001b[31mkey" = 1' >>"$work/hostile.toml"
"$strewn" check "$work/hostile.toml" >/dev/null 2>"$work/bad.err" && fail "an unknown key was accepted"
inert "$work/bad.err" "an error message"
grep -q 'unknown key' "$work/bad.err" || fail "the unknown key is not reported: $(cat "$work/bad.err")"
echo "ok: hostile title and names reach every output inert"

# The longest title a scenario may have (4096 bytes) is written and reported whole.
long_title="$(head -c 4096 /dev/zero | tr '\0' 'x')"
sed -e "s|^title = .*|title = \"$long_title\"|" "$source_dir/inputs/ridge-drop.toml" >"$work/long.toml"
printf '\n[output]\nfile = "long.h5"\n' >>"$work/long.toml"
"$strewn" run "$work/long.toml" -n 100 --quiet >/dev/null 2>"$work/long.err" || fail "a 4096-byte title: $(cat "$work/long.err")"
"$strewn" report "$work/long.h5" --json >"$work/long.json" || fail "a 4096-byte title: report failed"
python3 -c 'import json,sys; assert len(json.load(open(sys.argv[1]))["title"]) == 4096' "$work/long.json" ||
  fail "a 4096-byte title does not read back whole"
echo "ok: the longest title is written and reported whole"

# A full standard output (/dev/full: every write fails with ENOSPC) is a failure, status 3.
"$strewn" check "$source_dir/inputs/ridge-drop.toml" >/dev/full 2>"$work/full.err"
status=$?
[[ $status == 3 ]] || fail "a full standard output: exit status $status, not 3"
grep -q "writing to standard output failed: No space left on device" "$work/full.err" || fail "no message for the full standard output: $(cat "$work/full.err")"
echo "ok: a full standard output ends with status 3: $(head -1 "$work/full.err")"

finish "hostile names"
