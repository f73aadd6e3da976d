#!/usr/bin/env bash
# The bad-input catalogue: every malformed scenario here (catalogue.tsv: file, exit status, the
# message it must produce) is refused by `strewn run` with that status and message, the file's
# name, line and key path, and nothing written. Scenario problems are refused by `strewn check`
# as well, given the same options (the catalogue's fourth column, when there is one).
# In a message, {here} stands for this folder.
# Usage: run.sh STREWN_BINARY SOURCE_DIR
set -uo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"
here="$(cd "$(dirname "$0")" && pwd)"
cases=0
while IFS=$'\t' read -r file status expected options; do
  [[ -z "$file" || "$file" == \#* ]] && continue
  cases=$((cases + 1))
  expected="${expected//\{here\}/$here}"  # {here}: this folder, wherever the clone is
  run="$work/$cases"
  mkdir -p "$run/results"  # the default output folder exists: only the case's own problem counts
  read -r -a given <<<"${options:-}"  # the case's own options, split at spaces
  (cd "$run" && timeout 60 "$strewn" run "$here/$file" "${given[@]}" --quiet >"$run/out" 2>"$run/err"; echo $? >"$run/status")
  got=$(cat "$run/status")
  problem=""
  [[ "$got" == "$status" ]] || problem="exit $got, expected $status"
  if [[ "$expected" == "~"* ]]; then
    grep -qF -- "${expected#\~}" "$run/err" || problem="$problem; message lacks: ${expected#\~}"
  else
    grep -qF -- "$file$expected" "$run/err" || problem="$problem; message lacks: $file$expected"
  fi
  [[ -s "$run/out" ]] && problem="$problem; standard output not empty"
  left=$(find "$run" -name '*.h5*' | head -1)
  [[ -n "$left" ]] && problem="$problem; wrote $left"
  if [[ "$status" == 2 ]]; then
    timeout 60 "$strewn" check "$here/$file" "${given[@]}" >/dev/null 2>&1
    check=$?
    [[ "$check" == 2 ]] || problem="$problem; check exit $check"
  fi
  if [[ -n "$problem" ]]; then
    fail "$file: ${problem#; }"
    sed 's/^/      /' "$run/err" | head -5
  fi
done <"$here/catalogue.tsv"
((cases >= 50)) || fail "the catalogue must hold at least 50 cases (it holds $cases)"
finish "bad-input catalogue of $cases cases"
