#!/usr/bin/env bash
# The strewn binary's exit statuses as the shell sees them (interface: 0 done, 2 bad usage or an
# invalid scenario with nothing on standard output). Usage: exit_codes.sh STREWN SOURCE_DIR
set -u
strewn="$1"
source_dir="$2"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
failures=0
expect() {  # expect STATUS DESCRIPTION -- COMMAND...
  local want="$1" what="$2"
  shift 3
  "$@" >"$work/out" 2>"$work/err"
  local got=$?
  if [[ $got -ne $want ]]; then
    echo "FAIL: $what: exit $got, expected $want"
    cat "$work/err"
    failures=$((failures + 1))
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
  echo "FAIL: message lacks file, line and key path:"; cat "$work/err"; failures=$((failures + 1)); }
[[ -s "$work/out" ]] && { echo "FAIL: standard output not empty on error"; failures=$((failures + 1)); }
printf '[release\n' >"$work/syntax.toml"
expect 2 "TOML syntax error" -- "$strewn" trace "$work/syntax.toml"
head -c 300 /dev/urandom >"$work/binary.toml"
expect 2 "binary file" -- "$strewn" trace "$work/binary.toml"
expect 2 "missing file" -- "$strewn" trace "$work/missing.toml"
expect 2 "no command" -- "$strewn"
expect 2 "unknown option" -- "$strewn" trace "$source_dir/inputs/ridge-drop.toml" --speed 3
echo "exit codes: $failures failed"
exit $((failures > 0))
