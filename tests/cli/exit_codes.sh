#!/usr/bin/env bash
# The strewn binary's exit statuses as the shell sees them (interface: 0 done, 2 bad usage or an
# invalid scenario with nothing on standard output). Usage: exit_codes.sh STREWN SOURCE_DIR
set -u
source "$(dirname "$0")/../lib.sh" "$1" "$2"
expect() {  # expect STATUS DESCRIPTION -- COMMAND...
  local want="$1" what="$2"
  shift 3
  "$@" >"$work/out" 2>"$work/err"
  local got=$?
  if [[ $got -ne $want ]]; then
    fail "$what: exit $got, expected $want"
    cat "$work/err"
  else
    echo "ok: $what (exit $got)"
  fi
}
expect 0 "trace of the demo scenario" -- "$strewn" trace "$source_dir/inputs/ridge-drop.toml" --json
expect 0 "--version" -- "$strewn" --version
expect 0 "atmosphere table" -- "$strewn" atmosphere --csv
printf '[release]\naltitude = 50.0\n[[body]]\nmass = 1.0\n[body.drag]\nmodel = "area"\ncd = 1.0\narea = 0.1\nsped = 3\n' >"$work/typo.toml"
expect 2 "unknown key" -- "$strewn" trace "$work/typo.toml"
grep -q 'typo.toml:9: body\[0\].drag.sped: unknown key "sped"' "$work/err" || {
  fail "message lacks file, line and key path:"; cat "$work/err"; }
[[ -s "$work/out" ]] && fail "standard output not empty on error"
printf '[release\n' >"$work/syntax.toml"
expect 2 "TOML syntax error" -- "$strewn" trace "$work/syntax.toml"
head -c 300 /dev/urandom >"$work/binary.toml"
expect 2 "binary file" -- "$strewn" trace "$work/binary.toml"
expect 2 "missing file" -- "$strewn" trace "$work/missing.toml"
expect 2 "a device, not a file (read for ever if taken as one)" -- timeout 20 "$strewn" check /dev/zero
expect 2 "no command" -- "$strewn"
expect 2 "unknown option" -- "$strewn" trace "$source_dir/inputs/ridge-drop.toml" --speed 3
# report: results files that are not what they must be are refused with status 2.
expect 2 "report of a missing results file" -- "$strewn" report "$work/missing.h5"
head -c 300 /dev/urandom >"$work/binary.h5"
expect 2 "report of a file that is not HDF5" -- "$strewn" report "$work/binary.h5"
expect 0 "a small study" -- "$strewn" run "$source_dir/tests/data/canopy-by-height.toml" -n 100 -o "$work/small.h5" --quiet
head -c 4000 "$work/small.h5" >"$work/truncated.h5"
expect 2 "report of a truncated results file" -- "$strewn" report "$work/truncated.h5" --json
expect 0 "report of a whole results file" -- "$strewn" report "$work/small.h5" --json
# report: every output is checked before any is written; no two outputs may be one file.
expect 2 "two outputs named alike" -- "$strewn" report "$work/small.h5" --svg "$work/same.out" --html "$work/./same.out"
grep -q "named for two outputs (--svg and --html)" "$work/err" || fail "two outputs named alike: $(cat "$work/err")"
[[ -e "$work/same.out" ]] && fail "two outputs named alike: a file was written"
expect 2 "one output refused, none written" -- "$strewn" report "$work/small.h5" --svg "$work/first.svg" --html /dev/null
[[ -e "$work/first.svg" ]] && fail "one output refused: the map was written before the refusal"
expect 0 "a study of two bodies" -- "$strewn" run "$source_dir/inputs/drone-survey.toml" -n 60 -o "$work/two.h5" --quiet
first_body="$(sed -n 's/^name = "\(.*\)"/\1/p' "$source_dir/inputs/drone-survey.toml" | head -1)"
expect 2 "a body's map named as another output" -- "$strewn" report "$work/two.h5" --svg "$work/m.svg" --csv "$work/m-$first_body.svg"
grep -q "named for two outputs (the map of body $first_body beside --svg and --csv)" "$work/err" ||
  fail "a body's map named as another output: $(cat "$work/err")"
# A map of millimetre cells 3000 km from the site: indices beyond 2^31 cells, which used to fail
# after every flight (status 3); each impact is in the cell floor(east / cell), floor(north / cell).
# (On a level ground: the demo's terrain covers a few kilometres about the site.)
sed -e 's|^track = .*|&\neast = 3000000.0|' -e 's|^energy_threshold = .*|&\ngrid = 0.001|' \
  -e 's|^terrain = .*|ground = 540.0|' \
  "$source_dir/inputs/ridge-drop.toml" >"$work/far.toml"
printf '\n[output]\nfile = "far.h5"\n' >>"$work/far.toml"
expect 0 "a millimetre map 3000 km away" -- "$strewn" run "$work/far.toml" -n 300 --quiet
if python3 - "$work/far.h5" <<'PY'; then echo "ok: the millimetre map 3000 km away holds each impact in its cell"; else fail "the millimetre map does not hold each impact in its cell"; fi
import collections, math, re, subprocess, sys
def column(name):
    text = subprocess.run(["h5dump", "-y", "-w", "0", "-m", "%.17g", "-d", name, sys.argv[1]], capture_output=True,
                          text=True, check=True).stdout
    return [float(x) for x in re.search(r"DATA \{(.*?)\}", text, re.S).group(1).replace(",", " ").split()]
east, north = column("/samples/east"), column("/samples/north")
ei, ni, count = column("/footprint/bundle/grid/east_index"), column("/footprint/bundle/grid/north_index"), column("/footprint/bundle/grid/count")
expected = collections.Counter((math.floor(e / 0.001), math.floor(n / 0.001)) for e, n in zip(east, north))
got = {(int(a), int(b)): int(c) for a, b, c in zip(ei, ni, count)}
assert min(ei) > 2**31, min(ei)
assert got == dict(expected), (len(got), len(expected))
assert [(int(a), int(b)) for a, b in zip(ei, ni)] == sorted(got), "cells not in (east, north) order"
PY
sed 's|^grid = 0.001|grid = 0.0005|' "$work/far.toml" >"$work/finer.toml"
expect 2 "a map cell below a millimetre" -- "$strewn" check "$work/finer.toml"
grep -q "study.grid: must be at least 0.001 m" "$work/err" || fail "a map cell below a millimetre: $(cat "$work/err")"
# sweep: a folder of the user's under the name of the cases' folder is never emptied or removed.
mkdir -p "$work/mine.h5.cases"
echo "keep me" >"$work/mine.h5.cases/notes.txt"
expect 2 "a sweep over a folder it did not make" -- "$strewn" sweep "$source_dir/tests/data/sweeps/box.toml" -n 20 -o "$work/mine.h5" --fresh --quiet
grep -q "was not made by a strewn sweep" "$work/err" || fail "a sweep over a folder it did not make: $(cat "$work/err")"
[[ "$(cat "$work/mine.h5.cases/notes.txt" 2>/dev/null)" == "keep me" ]] || fail "the sweep emptied a folder it did not make"
expect 0 "a sweep in a folder of its own" -- "$strewn" sweep "$source_dir/tests/data/sweeps/box.toml" -n 20 -o "$work/own.h5" --quiet
[[ -e "$work/own.h5.cases" ]] && fail "the sweep left its folder of cases"
finish "exit codes"
