#!/usr/bin/env bash
# Interruption and resume with real processes:
#  - SIGINT and SIGTERM end a run with status 4, its finished samples kept in the checkpoint
#    beside the output and no file under the final name; `run --resume` completes it;
#  - SIGKILL at random moments, several times over, each followed by `run --resume` (itself
#    killed again at random), ends in a file whose samples and footprint equal an uninterrupted
#    run's, bit for bit;
#  - a final file never exists in an incomplete state;
#  - with slow flights, a signal stops within about a second keeping every finished sample,
#    SIGHUP acts as SIGTERM, a second signal ends the run at once, and the same signal again
#    within a quarter of a second (one Ctrl-C reaching the process twice, through its terminal
#    group and a launcher that forwards it) is taken as the first.
# Usage: interrupt.sh STREWN_BINARY SOURCE_DIR
set -uo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"
# The ridge drop: about 70 us per sample on one core, so a 20 000-sample run lasts about 0.7 s on
# two threads in Release (ten times that under the sanitizers); kills come at random fractions of
# the time an uninterrupted run takes on this build.
scenario="$source_dir/inputs/ridge-drop.toml"
samples=20000
summary() { "$strewn" report "$1" --json | python3 -c 'import json,sys; j=json.load(sys.stdin); j.pop("provenance"); j.pop("convergence", None); print(json.dumps(j, sort_keys=True))'; }

start=$(date +%s%N)
"$strewn" run "$scenario" -n $samples -j 2 -o "$work/straight.h5" --quiet >/dev/null || fail "the uninterrupted run failed"
duration_ms=$((($(date +%s%N) - start) / 1000000))

# SIGINT and SIGTERM: status 4, a checkpoint, no final file; --resume completes.
for signal in INT TERM; do
  out="$work/signal-$signal.h5"
  "$strewn" run "$scenario" -n $samples -j 2 -o "$out" --quiet >/dev/null 2>"$work/err" &
  pid=$!
  # Once the run is under way (its checkpoint exists; up to 60 s on a slow build), stop it.
  for _ in $(seq 1 600); do [[ -e "$out.checkpoint" ]] && break; sleep 0.1; done
  sleep 0.2
  kill -"$signal" "$pid"
  wait "$pid"
  status=$?
  [[ $status == 4 ]] || fail "SIG$signal: exit status $status, not 4 ($(cat "$work/err"))"
  [[ -e "$out" ]] && fail "SIG$signal: a file under the final name"
  [[ -s "$out.checkpoint" ]] || fail "SIG$signal: no checkpoint"
  grep -q -- "--resume" "$work/err" || fail "SIG$signal: the message does not say how to resume"
  "$strewn" run "$scenario" -n $samples -j 2 -o "$out" --quiet --resume >/dev/null || fail "SIG$signal: resume failed"
  h5diff -q "$work/straight.h5" "$out" /samples /samples || fail "SIG$signal: resumed samples differ"
  [[ "$(summary "$work/straight.h5")" == "$(summary "$out")" ]] || fail "SIG$signal: resumed footprint differs"
  [[ -e "$out.checkpoint" ]] && fail "SIG$signal: the checkpoint was left behind"
  echo "ok: SIG$signal ends with status 4 and --resume completes the study"
done

# SIGKILL at random moments, several times, each resume itself killed at random.
for trial in 1 2 3; do
  out="$work/killed-$trial.h5"
  args=("$strewn" run "$scenario" -n $samples -j 2 -o "$out" --quiet)
  kills=0
  for attempt in 1 2 3 4 5 6; do
    "${args[@]}" >/dev/null 2>&1 &
    pid=$!
    sleep "$(awk -v ms="$duration_ms" -v r="$RANDOM" 'BEGIN { printf "%.3f", ms / 1000 * (0.05 + 0.9 * r / 32768) }')"
    if kill -9 "$pid" 2>/dev/null; then kills=$((kills + 1)); fi
    wait "$pid" 2>/dev/null
    [[ -e "$out" ]] && break  # it finished before the kill
    # A killed run never leaves a final file; its checkpoint may be torn at the end.
    args=("$strewn" run "$scenario" -n $samples -j 2 -o "$out" --quiet --resume)
  done
  [[ -e "$out" ]] || "${args[@]}" >/dev/null || fail "trial $trial: the last resume failed"
  h5diff -q "$work/straight.h5" "$out" /samples /samples || fail "trial $trial: samples differ after $kills kills"
  [[ "$(summary "$work/straight.h5")" == "$(summary "$out")" ]] || fail "trial $trial: footprint differs after $kills kills"
  echo "ok: killed $kills times at random, resumed, equal to the uninterrupted run"
done

# Slow flights (tens of milliseconds each, a few hundred under the sanitizers): a signal midway
# stops the run within about a second and keeps every finished sample, not only whole rounds of
# blocks (a study of 120 such samples is less than one round: before, it kept none); SIGHUP is
# treated like SIGTERM; a second signal ends the run at once, leaving no partial file. Each run
# resumes to the uninterrupted file.
slow="$source_dir/tests/data/slow-droplets.toml"
slow_samples=120
start=$(date +%s%N)
"$strewn" run "$slow" -n $slow_samples -j 2 -o "$work/slow.h5" --quiet >/dev/null || fail "the slow study failed"
slow_ms=$((($(date +%s%N) - start) / 1000000))
for signal in INT HUP TWICE REPEATED; do
  out="$work/slow-$signal.h5"
  "$strewn" run "$slow" -n $slow_samples -j 2 -o "$out" --quiet >/dev/null 2>"$work/err" &
  pid=$!
  sleep "$(awk -v ms="$slow_ms" 'BEGIN { printf "%.3f", ms / 1000 * 0.5 }')"
  sent=$(date +%s%N)
  if [[ $signal == TWICE ]]; then
    # Two different signals: the kernel merges a signal sent again before it is handled.
    kill -INT "$pid"
    kill -TERM "$pid"
  elif [[ $signal == REPEATED ]]; then
    # The same signal twice, 5 ms apart: handled one by one (the kernel merges only a signal
    # still pending), and the second sent while the run is still stopping (tens of ms). A run
    # that had already ended would test nothing: then the case starts again, up to three times.
    for attempt in 1 2 3; do
      kill -INT "$pid"
      sleep 0.005
      kill -INT "$pid" 2>/dev/null && break
      wait "$pid"
      rm -f "$out.checkpoint"
      ((attempt < 3)) || fail "slow, repeated: each run ended before the second SIGINT"
      "$strewn" run "$slow" -n $slow_samples -j 2 -o "$out" --quiet >/dev/null 2>"$work/err" &
      pid=$!
      sleep "$(awk -v ms="$slow_ms" 'BEGIN { printf "%.3f", ms / 1000 * 0.5 }')"
      sent=$(date +%s%N)
    done
  else
    kill -"$signal" "$pid"
  fi
  wait "$pid"
  status=$?
  took=$((($(date +%s%N) - sent) / 1000000))
  [[ $status == 4 ]] || fail "slow, SIG$signal: exit status $status, not 4 ($(cat "$work/err"))"
  ((took < 2000)) || fail "slow, SIG$signal: it took $took ms to stop"
  ls "$out".partial-* >/dev/null 2>&1 && fail "slow, SIG$signal: a partial results file was left"
  [[ -e "$out" ]] && fail "slow, SIG$signal: a file under the final name"
  kept=""
  if [[ $signal == TWICE ]]; then
    grep -q "stopped at once by a second signal" "$work/err" || fail "slow, twice: $(cat "$work/err")"
  else
    kept=$(sed -n 's/^interrupted: \([0-9]*\) of .*/\1/p' "$work/err")
    [[ -n "$kept" ]] && ((kept >= slow_samples / 5)) ||
      fail "slow, SIG$signal: halfway through, only '${kept}' samples were kept ($(cat "$work/err"))"
  fi
  "$strewn" run "$slow" -n $slow_samples -j 2 -o "$out" --quiet --resume >/dev/null 2>"$work/resumed" ||
    fail "slow, SIG$signal: resume failed"
  # The resumed run says how much it took from the checkpoint (found by a user: it said nothing).
  grep -q "^resumed: [1-9][0-9]* of $slow_samples samples taken from the checkpoint" "$work/resumed" ||
    fail "slow, SIG$signal: the resume does not say what it took: $(cat "$work/resumed")"
  h5diff -q "$work/slow.h5" "$out" /samples /samples || fail "slow, SIG$signal: resumed samples differ"
  [[ "$(summary "$work/slow.h5")" == "$(summary "$out")" ]] || fail "slow, SIG$signal: footprint differs"
  echo "ok: slow flights, $signal: stopped in $took ms, ${kept:-the written} samples kept, resumed to the same file"
done

finish "interruption tests"
