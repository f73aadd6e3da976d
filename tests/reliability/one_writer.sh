#!/usr/bin/env bash
# A checkpoint belongs to one study and one writer: a second run or resume on an output that a
# run is writing is refused (status 2) and changes nothing; a resume after a file the scenario
# reads has changed is refused; a lock left by a killed run is taken over by the next, and no
# lock file is left behind.
# Usage: one_writer.sh STREWN_BINARY SOURCE_DIR
set -uo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"

printf 'altitude_m,speed_ms,from_deg\n540,3,240\n1500,8,255\n3500,14,275\n' >"$work/wind.csv"
cat >"$work/study.toml" <<'TOML'
title = "one writer"
[site]
ground = 540.0
[wind]
file = "wind.csv"
[release]
altitude = 3240.0
speed = 62.0
track = 90.0
[[body]]
name = "bundle"
mass = { dist = "normal", mean = 95.0, sd = 4.0, min = 80.0 }
[body.drag]
model = "area"
cd = { dist = "uniform", min = 0.9, max = 1.2 }
area = 0.55
TOML
out="$work/out.h5"

# Waits (up to a minute) for a file to appear.
wait_for() {
  for _ in $(seq 600); do [[ -e "$1" ]] && return 0; sleep 0.1; done
  return 1
}

"$strewn" run "$work/study.toml" -n 600000 -j 1 -o "$out" --quiet >/dev/null 2>"$work/first.err" &
first=$!
wait_for "$out.lock" || fail "no lock file while the first run writes"
wait_for "$out.checkpoint" || fail "no checkpoint while the first run writes"
"$strewn" run "$work/study.toml" -n 1000 -o "$out" --quiet >/dev/null 2>"$work/second.err"
[[ $? == 2 ]] || fail "a second run on the same output was not refused"
grep -q "another strewn run is writing this output now" "$work/second.err" || fail "second run: $(cat "$work/second.err")"
"$strewn" run "$work/study.toml" -n 600000 -o "$out" --resume --quiet >/dev/null 2>"$work/resume.err"
[[ $? == 2 ]] || fail "a resume on an output being written was not refused"
kill -INT "$first"
wait "$first"
status=$?
[[ $status == 4 ]] || fail "the first run, stopped: status $status, not 4 ($(cat "$work/first.err"))"
[[ -e "$out.checkpoint" ]] || fail "the stopped run left no checkpoint"
[[ -e "$out.lock" ]] && fail "the stopped run left its lock file"
echo "ok: one writer at a time; the stopped run kept its checkpoint and removed its lock"

# The wind file changes: the checkpoint is another study's.
cp "$work/wind.csv" "$work/wind.kept"
sed -i 's/^1500,8,255$/1500,9,255/' "$work/wind.csv"
"$strewn" run "$work/study.toml" -n 600000 -o "$out" --resume --quiet >/dev/null 2>"$work/changed.err"
[[ $? == 2 ]] || fail "a resume after the wind file changed was not refused"
grep -q "belongs to another study (the scenario, a file it reads" "$work/changed.err" || fail "changed wind file: $(cat "$work/changed.err")"
[[ -e "$out.checkpoint" ]] || fail "the refused resume removed the checkpoint"
echo "ok: a resume after a file the scenario reads changed is refused"

# The same file again: the resume goes on, after a kill -9 that left a lock file behind.
cp "$work/wind.kept" "$work/wind.csv"
"$strewn" run "$work/study.toml" -n 600000 -j 1 -o "$out" --resume --quiet >/dev/null 2>&1 &
killed=$!
wait_for "$out.lock" || fail "no lock file while the resume writes"
kill -KILL "$killed"
wait "$killed" 2>/dev/null
[[ -e "$out.lock" ]] || echo "note: the killed run left no lock file"
"$strewn" run "$work/study.toml" -n 600000 -o "$out" --resume --quiet >/dev/null 2>"$work/last.err"
status=$?
[[ $status == 0 ]] || fail "the last resume: status $status ($(cat "$work/last.err"))"
[[ -e "$out" ]] || fail "no results file after the last resume"
for left in "$out.lock" "$out.checkpoint"; do [[ -e "$left" ]] && fail "left behind: $left"; done
compgen -G "$out.partial*" >/dev/null && fail "left behind: a partial file"
echo "ok: a lock left by a killed run is taken over; nothing is left behind"

# One sweep per output: a second sweep on an output a sweep is writing is refused before it
# touches the folder of the cases (it used to empty it under the first, which then failed).
mkdir -p "$work/sweep/sweeps"
cp "$source_dir/tests/data/sweeps/box.toml" "$work/sweep/sweeps/box.toml"
cp "$source_dir/tests/data/canopy-by-height.toml" "$work/sweep/canopy-by-height.toml"
swept="$work/swept.h5"
"$strewn" sweep "$work/sweep/sweeps/box.toml" -n 20000 -j 1 -o "$swept" --quiet >/dev/null \
  2>"$work/sweep1.err" &
first_sweep=$!
wait_for "$swept.lock" || fail "no lock file while the first sweep writes"
wait_for "$swept.cases/strewn-sweep-cases" || fail "no folder of cases while the first sweep runs"
"$strewn" sweep "$work/sweep/sweeps/box.toml" -n 20000 -o "$swept" --fresh --quiet >/dev/null \
  2>"$work/sweep2.err"
status=$?
[[ $status == 2 ]] || fail "a second sweep on the same output: status $status, not 2"
grep -q "another strewn run is writing this output now" "$work/sweep2.err" ||
  fail "second sweep: $(cat "$work/sweep2.err")"
[[ -e "$swept.cases/strewn-sweep-cases" ]] || fail "the second sweep removed the first's cases"
# Another output of the same stem shares the summary (swept-summary.csv): refused too.
"$strewn" sweep "$work/sweep/sweeps/box.toml" -n 2000 -o "$work/swept.hdf5" --quiet >/dev/null \
  2>"$work/sweep3.err"
status=$?
[[ $status == 2 ]] || fail "a sweep sharing the summary: status $status, not 2"
grep -q "swept-summary.csv.*another strewn run is writing this output now" "$work/sweep3.err" ||
  fail "a sweep sharing the summary: $(cat "$work/sweep3.err")"
wait "$first_sweep"
status=$?
[[ $status == 0 ]] || fail "the first sweep: status $status ($(cat "$work/sweep1.err"))"
[[ -e "$swept" && ! -e "$swept.lock" ]] || fail "the first sweep: no results file, or its lock left"
echo "ok: one sweep per output at a time"

# A sweep on one process stopped by a signal ends at once (status 4, said), removes the files it
# was writing and keeps its finished cases: the next run goes on. It used to be killed, its lock
# and partial files left.
stopped="$work/stopped.h5"
"$strewn" sweep "$work/sweep/sweeps/box.toml" -n 20000 -j 1 -o "$stopped" --quiet >/dev/null \
  2>"$work/stopped.err" &
sweeping=$!
wait_for "$stopped.cases/strewn-sweep-cases" || fail "no folder of cases while the sweep runs"
sleep 0.5
kill -TERM "$sweeping"
wait "$sweeping"
status=$?
[[ $status == 4 ]] || fail "a sweep sent SIGTERM: status $status, not 4"
grep -q "strewn: ended by SIGTERM" "$work/stopped.err" || fail "a sweep sent SIGTERM: $(cat "$work/stopped.err")"
[[ -e "$stopped.lock" ]] && fail "a sweep sent SIGTERM: its lock file was left"
compgen -G "$stopped.cases/*.partial-*" >/dev/null && fail "a sweep sent SIGTERM: a partial file was left"
[[ -d "$stopped.cases" ]] || fail "a sweep sent SIGTERM: its finished cases were not kept"
"$strewn" sweep "$work/sweep/sweeps/box.toml" -n 20000 -j 1 -o "$stopped" --quiet >/dev/null 2>&1 ||
  fail "the stopped sweep run again"
[[ -e "$stopped" ]] || fail "the stopped sweep run again: no results file"
echo "ok: a sweep stopped by a signal ends at once, without litter, and goes on"

finish "one writer"
