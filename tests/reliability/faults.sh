#!/usr/bin/env bash
# Faults while writing: a file-size limit (the disk is full, as the process sees it: writes fail
# with EFBIG), and the output folder removed while a study runs. Each ends with status 3 and a
# message naming the path, and leaves no file under the final name.
# Usage: faults.sh STREWN_BINARY SOURCE_DIR
set -uo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"
scenario="$source_dir/tests/bench/bundle-study.toml"

# A full disk: at most 2 MiB per file (ulimit -f counts 1 KiB blocks).
(ulimit -f 2048; "$strewn" run "$scenario" -n 100000 -o "$work/full.h5" --quiet >/dev/null 2>"$work/err")
status=$?
[[ $status == 3 ]] || fail "full disk: exit status $status, not 3"
grep -q "full.h5" "$work/err" || fail "full disk: the message does not name the file: $(cat "$work/err")"
[[ -e "$work/full.h5" ]] && fail "full disk: a file under the final name"
compgen -G "$work/full.h5.partial*" >/dev/null && fail "full disk: the temporary file was left behind"
echo "ok: full disk ends with status 3: $(head -1 "$work/err")"

# The output folder vanishes while the study runs.
mkdir -p "$work/vanishing"
"$strewn" run "$scenario" -n 400000 -j 2 -o "$work/vanishing/out.h5" --quiet >/dev/null 2>"$work/err" &
pid=$!
sleep 0.5
rm -rf "$work/vanishing"
wait "$pid"
status=$?
[[ $status == 3 ]] || fail "vanished folder: exit status $status, not 3 ($(cat "$work/err"))"
[[ -e "$work/vanishing/out.h5" ]] && fail "vanished folder: a file under the final name"
echo "ok: vanished output folder ends with status 3: $(head -1 "$work/err")"

finish "fault tests"
