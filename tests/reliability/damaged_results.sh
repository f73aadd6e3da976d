#!/usr/bin/env bash
# A damaged results file is refused, not believed: bits flipped at random across a real results
# file (and a sweep's file), one flip a copy, many times; `report` on each copy must exit with
# status 2 and a message, print nothing on standard output, never crash or hang, and never show
# figures. Truncated and lengthened copies likewise.
# Usage: damaged_results.sh STREWN_BINARY SOURCE_DIR [FLIPS]
set -uo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"
flips="${3:-200}"

cat >"$work/study.toml" <<'TOML'
title = "damaged results"
[site]
ground = 120.0
[release]
altitude = 900.0
speed = 30.0
track = 45.0
[[body]]
name = "crate"
mass = { dist = "uniform", min = 18.0, max = 22.0 }
[body.drag]
model = "area"
cd = { dist = "uniform", min = 0.9, max = 1.2 }
area = 0.3
[output]
samples = true
TOML
"$strewn" run "$work/study.toml" -n 3000 -o "$work/intact.h5" --quiet >/dev/null 2>"$work/run.err" ||
  fail "the study did not run: $(cat "$work/run.err")"
"$strewn" report "$work/intact.h5" --json >"$work/intact.json" 2>"$work/report.err" ||
  fail "the intact file was not reported: $(cat "$work/report.err")"

# Makes COUNT copies of FILE as PREFIX-<k>.h5, each with one bit flipped at a random place, and
# prints "k byte bit" a copy.
flip_copies() {
  python3 - "$1" "$2" "$3" <<'PY'
import random, sys
intact = open(sys.argv[1], "rb").read()
for k in range(int(sys.argv[3])):
    data = bytearray(intact)
    at, bit = random.randrange(len(data)), random.randrange(8)
    data[at] ^= 1 << bit
    open(f"{sys.argv[2]}-{k}.h5", "wb").write(data)
    print(k, at, bit)
PY
}

# `report` on a damaged copy: status 2, a message naming the file, nothing on standard output.
refused_copies=0
expect_refused() {
  local what="$1" status
  refused_copies=$((refused_copies + 1))
  timeout 60 "$strewn" report "$work/damaged.h5" --json >"$work/out" 2>"$work/err"
  status=$?
  if [[ $status -ne 2 ]]; then
    fail "$what: status $status, not 2 ($(head -c 300 "$work/err"))"
    cp "$work/damaged.h5" "$work/kept-$status.h5"
  elif [[ -s "$work/out" ]]; then
    fail "$what: figures printed for a damaged file"
  elif ! grep -q "damaged.h5: " "$work/err"; then
    fail "$what: the message does not name the file: $(head -c 300 "$work/err")"
  fi
}

flip_copies "$work/intact.h5" "$work/flipped" "$flips" >"$work/flips.txt"
while read -r k byte bit; do
  mv "$work/flipped-$k.h5" "$work/damaged.h5"
  expect_refused "bit $bit of byte $byte flipped"
done <"$work/flips.txt"
size=$(stat -c %s "$work/intact.h5")
head -c $((size / 3)) "$work/intact.h5" >"$work/damaged.h5"
expect_refused "truncated to a third"
cp "$work/intact.h5" "$work/damaged.h5"
printf 'x' >>"$work/damaged.h5"
expect_refused "one byte appended"
# A crafted file sealed again by its author reaches the HDF5 library; on this one (found by
# scripts/fuzz, results_fuzz with STREWN_FUZZ_RESEAL=1) HDF5 1.10's global-heap reader loops for
# ever. The read time limit (10 s for a small file) ends it with status 2 and a message. (Its
# format_version attribute is raised with each new results format, and the file sealed again.)
start=$(date +%s)
timeout 120 "$strewn" report "$source_dir/tests/data/crafted/global-heap-loop.h5" --json \
  >"$work/out" 2>"$work/err"
status=$?
took=$(($(date +%s) - start))
[[ $status -eq 2 ]] || fail "crafted file that hangs HDF5: status $status after $took s"
[[ $took -le 40 ]] || fail "crafted file that hangs HDF5: ended only after $took s"
grep -q "did not end in time" "$work/err" || fail "crafted file: $(head -c 300 "$work/err")"
[[ -s "$work/out" ]] && fail "crafted file: figures printed"

# A results file is read from disk: a pipe, a FIFO or a file of /proc is refused with status 2
# (found by a tester: HDF5's exception escaped, status 134).
mkfifo "$work/fifo.h5"
for special in "$work/fifo.h5" /proc/self/mem; do
  status=0
  timeout 60 "$strewn" report "$special" --json >"$work/out" 2>"$work/err" || status=$?
  [[ $status -eq 2 && ! -s "$work/out" ]] || fail "report $special: status $status ($(head -c 200 "$work/err"))"
done
status=0
timeout 60 "$strewn" report <(cat "$work/intact.h5") --json >"$work/out" 2>"$work/err" || status=$?
[[ $status -eq 2 ]] || fail "report from a pipe: status $status ($(head -c 200 "$work/err"))"
grep -q "is not a regular file" "$work/err" || fail "report from a pipe: $(head -c 200 "$work/err")"

# The intact file still reports the same figures (the attack changed only copies).
"$strewn" report "$work/intact.h5" --json >"$work/again.json" 2>/dev/null
cmp -s "$work/intact.json" "$work/again.json" || fail "the intact file reports other figures"

# A sweep's file is sealed the same way.
printf 'base = "study.toml"\n[[axis]]\nkey = "release.altitude"\nvalues = [800.0, 900.0]\n' \
  >"$work/sweep.toml"
"$strewn" sweep "$work/sweep.toml" -n 400 -o "$work/sweep.h5" --quiet >/dev/null 2>"$work/sweep.err" ||
  fail "the sweep did not run: $(cat "$work/sweep.err")"
flip_copies "$work/sweep.h5" "$work/flipped-sweep" $((flips / 5)) >"$work/flips.txt"
while read -r k byte bit; do
  status=0
  timeout 60 "$strewn" report "$work/flipped-sweep-$k.h5" --case 1 --json >"$work/out" \
    2>"$work/err" || status=$?
  [[ $status -eq 2 && ! -s "$work/out" ]] ||
    fail "sweep file, bit $bit of byte $byte flipped: status $status"
done <"$work/flips.txt"
echo "damaged_results: $refused_copies damaged copies of a study's file and $((flips / 5)) of a sweep's reported"
finish damaged_results
