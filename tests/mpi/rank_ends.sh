#!/usr/bin/env bash
# A job whose ranks end badly, with real processes under mpirun: a rank killed outright
# (SIGKILL), a rank sent SIGTERM, the launcher interrupted (SIGINT, as Ctrl-C), rank 0 failing
# alone mid-study (its file-size limit reached), a command line refused on one rank only, and a
# sweep whose ranks read different files. Each time every rank ends within seconds with a
# non-zero status and a message naming the cause; no results file, partial file or lock file is
# left (issue "Clusters fail loudly"; the launcher's part is Open MPI's documented behaviour: a
# rank that ends without finishing ends the job).
# Usage: rank_ends.sh STREWN_BINARY SOURCE_DIR
set -euo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"
export ASAN_OPTIONS="${ASAN_OPTIONS:-}:detect_leaks=0"  # leaks inside the MPI library (ranks.sh)
mpi=(mpirun --allow-run-as-root --oversubscribe -x ASAN_OPTIONS)
scenario="$source_dir/inputs/drone-survey.toml"
long=(run "$scenario" -n 4000000 -j 1 --quiet)  # minutes on two ranks: ended long before

# No file of the output `name` is left in $work.
no_litter() {
  local what="$1" name="$2"
  local left
  left=$(cd "$work" && compgen -G "$name*" || true)
  [[ -z "$left" ]] || fail "$what: files left: $left"
}

# The process id of rank $2 among the children of launcher $1, once it runs.
rank_pid() {
  local launcher="$1" rank="$2" pid
  for _ in $(seq 1 600); do
    for pid in $(pgrep -P "$launcher" 2>/dev/null || true); do
      if tr '\0' '\n' <"/proc/$pid/environ" 2>/dev/null | grep -qx "OMPI_COMM_WORLD_RANK=$rank"; then
        echo "$pid"
        return 0
      fi
    done
    sleep 0.05
  done
  return 1
}

# Waits until rank 0 writes the results file (its partial file exists): the flights are under way.
wait_for_flights() {
  local name="$1"
  for _ in $(seq 1 1200); do
    compgen -G "$work/$name.partial-*" >/dev/null && return 0
    sleep 0.05
  done
  return 1
}

# Waits at most $2 seconds for process $1 (a child of this shell) and sets `ended_status` to its
# status, or to 124 when it was still running (then killed).
wait_at_most() {
  local pid="$1" seconds="$2"
  ended_status=0
  for _ in $(seq 1 $((seconds * 20))); do
    kill -0 "$pid" 2>/dev/null || break
    sleep 0.05
  done
  if kill -0 "$pid" 2>/dev/null; then
    pkill -9 -P "$pid" 2>/dev/null || true  # the ranks first: they would outlive the launcher
    kill -9 "$pid" 2>/dev/null || true
    wait "$pid" 2>/dev/null || true
    ended_status=124
    return
  fi
  wait "$pid" || ended_status=$?
}

# 1-3. A rank killed, a rank signalled, the launcher interrupted.
ended_by() {  # ended_by WHAT NAME SIGNAL TARGET(rank0|rank1|launcher) EXPECTED_TEXT
  local what="$1" name="$2" signal="$3" target="$4" expected="$5"
  "${mpi[@]}" -np 2 "$strewn" "${long[@]}" -o "$work/$name.h5" >/dev/null 2>"$work/$name.err" &
  local launcher=$! victim
  if ! wait_for_flights "$name.h5"; then
    wait_at_most "$launcher" 0
    fail "$what: the study did not start"
    return
  fi
  case "$target" in
    rank0) victim=$(rank_pid "$launcher" 0) || victim="" ;;
    rank1) victim=$(rank_pid "$launcher" 1) || victim="" ;;
    launcher) victim=$launcher ;;
  esac
  if [[ -z $victim ]]; then
    wait_at_most "$launcher" 0
    fail "$what: rank not found among the launcher's children"
    return
  fi
  kill "-$signal" "$victim"
  wait_at_most "$launcher" 30
  local status=$ended_status
  [[ $status == 124 ]] && fail "$what: the job did not end within 30 s"
  [[ $status != 0 ]] || fail "$what: status 0"
  grep -q -- "$expected" "$work/$name.err" || fail "$what: no cause named: $(head -5 "$work/$name.err")"
  sleep 0.5  # ranks the launcher killed last are gone by now
  no_litter "$what" "$name.h5"
  echo "ok: $what ends the job (status $status)"
}
ended_by "rank 1 killed (SIGKILL)" killed KILL rank1 "rank 0 ended by SIGTERM"
ended_by "rank 0 sent SIGTERM" termed TERM rank0 "rank 0 ended by SIGTERM from process"
ended_by "the launcher interrupted (SIGINT)" interrupted INT launcher "rank [01] ended by SIG"
# SIGUSR1, which mpirun forwards to the ranks (and a scheduler sends as a warning): it used to end
# them silently, leaving the partial and lock files.
ended_by "the launcher sent SIGUSR1" warned USR1 launcher "rank [01] ended by SIGUSR1"

# Launches `mpirun ARGS...` (after the first four arguments) for at most 120 s, standard error to
# $work/NAME.err: it must end with status STATUS, its messages matching TEXT, and leave no file of
# the output NAME.h5.
job_ends() {
  local what="$1" name="$2" expected_status="$3" expected_text="$4" status=0
  shift 4
  timeout 120 "${mpi[@]}" "$@" >/dev/null 2>"$work/$name.err" || status=$?
  [[ $status == 124 ]] && fail "$what: the job hung"
  [[ $status == "$expected_status" ]] || fail "$what: status $status, not $expected_status"
  grep -q -- "$expected_text" "$work/$name.err" ||
    fail "$what: no cause named: $(head -5 "$work/$name.err")"
  no_litter "$what" "$name.h5"
  echo "ok: $what ends every rank with status $status"
}

# 4. Rank 0 fails alone while rank 1 flies (its file-size limit stops the results file): it
#    used to wait for ever in MPI_Finalize while rank 1 waited to send its rows.
job_ends "rank 0 failing alone" full 3 "full.h5.*\(File too large\|cannot write\)" \
  -np 1 bash -c 'ulimit -f 64; exec "$@"' - "$strewn" run "$scenario" -n 400000 -j 1 \
  -o "$work/full.h5" --quiet : -np 1 "$strewn" run "$scenario" -n 400000 -j 1 \
  -o "$work/full.h5" --quiet
grep -q "rank 0 failed alone; ending every rank of the job" "$work/full.err" ||
  fail "rank 0 failing alone: the ending is not said"

# 5. A command line refused on rank 1 only (an option it does not know): every rank ends with
#    status 2 and rank 1's refusal, before any flight (rank 0 used to wait for it at start-up).
job_ends "a command line refused on rank 1" parsed 2 "error (rank 1): .*no-such-option" \
  -np 1 "$strewn" run "$scenario" -n 500 -o "$work/parsed.h5" --quiet : \
  -np 1 "$strewn" run "$scenario" -n 500 -o "$work/parsed.h5" --quiet --no-such-option

# 6. A sweep whose ranks read different files (a base scenario changed on rank 1's side) is
#    refused before any case: its cases would mix two studies in one results file.
for side in a b; do
  mkdir -p "$work/$side/sweeps"
  cp "$source_dir/tests/data/sweeps/box.toml" "$work/$side/sweeps/box.toml"
  cp "$source_dir/tests/data/canopy-by-height.toml" "$work/$side/canopy-by-height.toml"
done
sed -i 's/^temperature_offset = 12.0$/temperature_offset = 13.0/' "$work/b/canopy-by-height.toml"
cmp -s "$work/a/canopy-by-height.toml" "$work/b/canopy-by-height.toml" && fail "the two bases are the same"
job_ends "a sweep whose ranks read different files" mixed 2 \
  "rank 1 read or was given other inputs than rank 0" \
  -np 1 "$strewn" sweep "$work/a/sweeps/box.toml" -n 50 -o "$work/mixed.h5" --quiet : \
  -np 1 "$strewn" sweep "$work/b/sweeps/box.toml" -n 50 -o "$work/mixed.h5" --quiet

# 7. Ranks given different commands: a replay of one sample or a check on one rank while the
#    other runs the study (the first ended at once while the other waited for its rows).
job_ends "a replay on rank 1 while rank 0 runs the study" replay 2 \
  "error (rank 1): given another command than rank 0 (run --sample 3)" \
  -np 1 "$strewn" run "$scenario" -n 500 -o "$work/replay.h5" --quiet : \
  -np 1 "$strewn" run "$scenario" -n 500 -o "$work/replay.h5" --quiet --sample 3
job_ends "a check on rank 0 while rank 1 runs the study" checked 2 \
  "error (rank 1): given another command than rank 0 (run)" \
  -np 1 "$strewn" check "$scenario" : \
  -np 1 "$strewn" run "$scenario" -n 500 -o "$work/checked.h5" --quiet

job_ends "--version on rank 1 while rank 0 runs the study" versioned 2 \
  "error (rank 1): given another command than rank 0 (--help or --version)" \
  -np 1 "$strewn" run "$scenario" -n 500 -o "$work/versioned.h5" --quiet : \
  -np 1 "$strewn" --version

# 8. A sweep whose ranks name its output through a link (lnk/../out.h5 is sub/out.h5 when lnk
#    leads to sub/deeper): other folders of cases, refused before any case.
mkdir -p "$work/sub/deeper"
ln -s sub/deeper "$work/lnk"
job_ends "a sweep whose output differs through a link" linked 2 \
  "rank 1 read or was given other inputs than rank 0" \
  -np 1 "$strewn" sweep "$work/a/sweeps/box.toml" -n 50 -o "$work/linked.h5" --quiet : \
  -np 1 "$strewn" sweep "$work/a/sweeps/box.toml" -n 50 -o "$work/lnk/../linked.h5" --quiet

finish "rank ends"
