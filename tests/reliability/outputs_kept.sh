#!/usr/bin/env bash
# strewn destroys nothing it was not told it may, with real processes and files:
#  - an output file that already exists (run's results file, from -o, output.file or the default;
#    report's GeoJSON, map, per-body maps, page and CSV; a sweep's results file and its summary)
#    is refused with status 2 and one line saying to pass --force, and left byte for byte as it
#    was; nothing else is written. With --force it is replaced.
#  - the output a scenario or sweep file names may not climb out of that file's folder (by `..`,
#    an absolute path, or a link to a folder elsewhere): refused with status 2 by `run`, `check`
#    and `sweep`, nothing made there; -o on the command line, or --allow-outside, lets it.
# Usage: outputs_kept.sh STREWN_BINARY SOURCE_DIR
set -uo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"

# expect STATUS WHAT -- COMMAND...: the command's status; its output kept in $work/stdout and
# $work/stderr.
expect() {
  local want="$1" what="$2"
  shift 3
  "$@" >"$work/stdout" 2>"$work/stderr"
  local got=$?
  if [[ $got != "$want" ]]; then
    fail "$what: status $got, expected $want: $(head -3 "$work/stderr")"
    return 1
  fi
  return 0
}
# refused_once WHAT FRAGMENT: the refusal is one line on standard error that holds FRAGMENT, and
# nothing on standard output.
refused_once() {
  [[ $(wc -l <"$work/stderr") == 1 ]] || fail "$1: the refusal is not one line: $(cat "$work/stderr")"
  grep -qF -- "$2" "$work/stderr" || fail "$1: the message lacks \"$2\": $(cat "$work/stderr")"
  [[ -s "$work/stdout" ]] && fail "$1: standard output is not empty"
  return 0
}
# The SHA-256 of each file given, one line each ("missing" for a file that is not there).
sums() {
  local f
  for f in "$@"; do
    if [[ -e "$f" ]]; then sha256sum "$f"; else echo "missing $f"; fi
  done
}
# ok WHAT: says WHAT passed when no check failed since the last one.
said=0
ok() {
  ((failures == said)) && echo "ok: $1"
  said=$failures
}
# Every entry under the folders given, with its kind and size: what a refused command must leave
# alone.
listing() { find "$@" -printf '%p %y %s\n' 2>&1 | sort; }

# The drone survey (two bodies: a map per body beside the map of all) at a few samples.
mkdir -p "$work/study"
sed '/^\[output\]/,$d' "$source_dir/inputs/drone-survey.toml" >"$work/study/survey.toml"
study=(run "$work/study/survey.toml" -n 60 -j 2 --quiet)
bodies=($(sed -n 's/^name = "\(.*\)"/\1/p' "$work/study/survey.toml"))
((${#bodies[@]} == 2)) || fail "the survey should have two bodies, has ${#bodies[@]}"

# 1. run's results file, named by -o: kept without --force, replaced with it.
results="$work/out/results.h5"
expect 0 "the first run" -- "$strewn" "${study[@]}" -o "$results"
before=$(sums "$results")
expect 2 "a second run onto the results file" -- "$strewn" "${study[@]}" -o "$results" --seed 2 &&
  refused_once "a second run" "$results: already exists; pass --force to replace it"
[[ "$(sums "$results")" == "$before" ]] || fail "the refused run changed the results file"
leftover=$(compgen -G "$results.*")
[[ -z "$leftover" ]] || fail "the refused run left $leftover"
# --resume continues a stopped run, whose results file does not exist; onto one that does, the
# same rule.
expect 2 "a resume onto an existing results file" -- "$strewn" "${study[@]}" -o "$results" --resume &&
  refused_once "a resume" "pass --force to replace it"
[[ "$(sums "$results")" == "$before" ]] || fail "the refused resume changed the results file"
expect 0 "a run with --force" -- "$strewn" "${study[@]}" -o "$results" --seed 2 --force
[[ "$(sums "$results")" != "$before" ]] || fail "--force did not replace the results file"
"$strewn" report "$results" --json | python3 -c 'import json,sys; assert json.load(sys.stdin)["seed"] == 2' ||
  fail "the replaced results file is not the second study's"
ok "run keeps an existing results file without --force and replaces it with"

# The scenario's own output.file, and the default results/<scenario name>.h5 of the working
# directory: the same rule.
cp "$work/study/survey.toml" "$work/study/named.toml"
printf '\n[output]\nfile = "named.h5"\n' >>"$work/study/named.toml"
line=$(grep -n '^file = "named.h5"' "$work/study/named.toml" | cut -d: -f1)
expect 0 "a run into output.file" -- "$strewn" run "$work/study/named.toml" -n 60 --quiet
before=$(sums "$work/study/named.h5")
expect 2 "a second run into output.file" -- "$strewn" run "$work/study/named.toml" -n 60 --quiet &&
  refused_once "output.file" "named.toml:$line: output.file: $work/study/named.h5: already exists; pass --force to replace it"
[[ "$(sums "$work/study/named.h5")" == "$before" ]] || fail "the refused run changed output.file"
expect 0 "check of a scenario whose results exist" -- "$strewn" check "$work/study/named.toml"
mkdir -p "$work/cwd"
expect 0 "a run into the default output" -- bash -c 'cd "$1" && shift && "$@"' _ "$work/cwd" \
  "$strewn" "${study[@]}"
before=$(sums "$work/cwd/results/survey.h5")
expect 2 "a second run into the default output" -- bash -c 'cd "$1" && shift && "$@"' _ "$work/cwd" \
  "$strewn" "${study[@]}" && refused_once "default output" "results/survey.h5: already exists"
[[ "$(sums "$work/cwd/results/survey.h5")" == "$before" ]] || fail "the refused run changed the default output"
ok "output.file and the default output are kept alike"

# 2. report's files, the per-body maps among them: all checked before any is written.
page="$work/report"
outputs=("$page/map.svg" "$page/map-${bodies[0]}.svg" "$page/map-${bodies[1]}.svg" "$page/page.html"
  "$page/figures.csv" "$page/zones.geojson")
report=(report "$results" --svg "$page/map.svg" --html "$page/page.html" --csv "$page/figures.csv"
  --geojson "$page/zones.geojson")
expect 0 "the first report" -- "$strewn" "${report[@]}"
for f in "${outputs[@]}"; do [[ -s "$f" ]] || fail "the report did not write $f"; done
before=$(sums "${outputs[@]}")
# The results file replaced by another study's: a report of it differs in every file.
expect 0 "a third run with --force" -- "$strewn" "${study[@]}" -o "$results" --seed 3 --force
expect 2 "a second report onto its files" -- "$strewn" "${report[@]}" &&
  refused_once "a second report" "$page/zones.geojson: already exists; pass --force to replace it"
[[ "$(sums "${outputs[@]}")" == "$before" ]] || fail "the refused report changed its files"
# One body's map alone in the way: nothing is written, not even the files that are missing.
rm "$page/map.svg" "$page/page.html" "$page/figures.csv" "$page/zones.geojson" "$page/map-${bodies[0]}.svg"
kept=$(sums "$page/map-${bodies[1]}.svg")
expect 2 "a report onto one body's map" -- "$strewn" "${report[@]}" &&
  refused_once "one body's map" "$page/map-${bodies[1]}.svg: already exists; pass --force to replace it"
[[ "$(sums "$page/map-${bodies[1]}.svg")" == "$kept" ]] || fail "the refused report changed the body's map"
[[ "$(ls "$page")" == "map-${bodies[1]}.svg" ]] || fail "the refused report wrote: $(ls "$page")"
# The report's first files again, then --force replaces them all.
expect 0 "a report with --force" -- "$strewn" "${report[@]}" --force
for f in "${outputs[@]}"; do
  [[ "$(sums "$f")" != "$(grep -F " $f" <<<"$before")" ]] || fail "--force did not replace $f"
done
ok "report keeps every existing output without --force, writes none, and replaces them with"

# 3. A sweep's results file and its summary CSV.
sweep=(sweep "$source_dir/tests/data/sweeps/box.toml" -n 20 -j 2 --quiet -o "$work/sweep/box.h5")
summary="$work/sweep/box-summary.csv"
expect 0 "the first sweep" -- "$strewn" "${sweep[@]}"
before=$(sums "$work/sweep/box.h5" "$summary")
expect 2 "a second sweep onto its file" -- "$strewn" "${sweep[@]}" &&
  refused_once "a second sweep" "$work/sweep/box.h5: already exists; pass --force to replace it"
expect 2 "a fresh sweep onto its file" -- "$strewn" "${sweep[@]}" --fresh
[[ "$(sums "$work/sweep/box.h5" "$summary")" == "$before" ]] || fail "the refused sweep changed its files"
[[ -e "$work/sweep/box.h5.cases" ]] && fail "the refused sweep made its folder of cases"
# The summary alone in the way: refused too, and the results file is not made.
mv "$work/sweep/box.h5" "$work/box.kept"
expect 2 "a sweep onto its summary" -- "$strewn" "${sweep[@]}" &&
  refused_once "the sweep's summary" "$summary: already exists; pass --force to replace it"
[[ -e "$work/sweep/box.h5" ]] && fail "the sweep refused for its summary wrote its results file"
[[ "$(sums "$summary")" == "$(sed -n 2p <<<"$before")" ]] || fail "the refused sweep changed its summary"
sweep[3]=30  # -n 30: other figures in the summary
expect 0 "a sweep with --force" -- "$strewn" "${sweep[@]}" --force
[[ "$(sums "$summary")" != "$(sed -n 2p <<<"$before")" ]] || fail "--force did not replace the summary"
[[ -s "$work/sweep/box.h5" ]] || fail "the sweep with --force wrote no results file"
ok "sweep keeps its results file and summary without --force and replaces them with"

# 4. A scenario's output may not climb out of its folder.
outside="$work/outside"
shared="$outside/shared"
mkdir -p "$shared" "$work/elsewhere" "$shared/real"
ln -s "$work/elsewhere" "$shared/away"  # a link to a folder outside
ln -s real "$shared/inner"               # a link to a folder inside
# scenario NAME OUTPUT: the survey in the shared folder, naming OUTPUT as its output.file.
scenario() {
  sed '/^\[output\]/,$d' "$work/study/survey.toml" >"$shared/$1.toml"
  printf '\n[output]\nfile = "%s"\n' "$2" >>"$shared/$1.toml"
}
scenario up "../x.h5"
scenario down-up "sub/../../x.h5"
scenario absolute "$work/absolute/x.h5"
scenario linked "away/x.h5"
scenario linked-deeper "away/sub/x.h5"
# Where a refused run could have written: the folders out of the scenario's, and the one its
# absolute path names.
around=("$outside" "$work/elsewhere" "$work/absolute")
for name in up down-up absolute linked linked-deeper; do
  was=$(listing "${around[@]}")
  line=$(grep -n '^file = ' "$shared/$name.toml" | cut -d: -f1)
  expect 2 "$name: run" -- "$strewn" run "$shared/$name.toml" -n 60 --quiet &&
    refused_once "$name: run" "$name.toml:$line: output.file: " &&
    refused_once "$name: run" "is outside the scenario's folder ($shared) once .. and links are resolved; pass -o or --allow-outside"
  if expect 2 "$name: check" -- "$strewn" check "$shared/$name.toml"; then
    grep -qF "is outside the scenario's folder" "$work/stderr" || fail "$name: check: $(cat "$work/stderr")"
  fi
  [[ "$(listing "${around[@]}")" == "$was" ]] ||
    fail "$name: the refused run wrote: $(diff <(echo "$was") <(listing "${around[@]}"))"
done
[[ -e "$work/absolute" ]] && fail "the refused run made the folder of its absolute path"
[[ -n "$(ls -A "$work/elsewhere")" ]] && fail "something was written through the link: $(ls -A "$work/elsewhere")"
ok ".., an absolute path and a link out of the folder are refused, nothing written"
# Within the folder: `.`, a folder made below it, a link to a folder inside.
scenario dot "sub/./x.h5"
scenario inside-link "inner/x.h5"
expect 0 "a scenario writing below its folder" -- "$strewn" run "$shared/dot.toml" -n 60 --quiet
[[ -s "$shared/sub/x.h5" ]] || fail "sub/./x.h5 was not written below the scenario"
expect 0 "a scenario writing through a link inside its folder" -- "$strewn" run "$shared/inside-link.toml" -n 60 --quiet
[[ -s "$shared/real/x.h5" ]] || fail "inner/x.h5 was not written through the link inside"
# -o is the user's own choice; --allow-outside lets the scenario's path stand.
expect 0 "-o outside the scenario's folder" -- "$strewn" run "$shared/up.toml" -n 60 --quiet -o "$work/chosen/x.h5"
[[ -s "$work/chosen/x.h5" ]] || fail "-o outside: no file"
expect 0 "check --allow-outside" -- "$strewn" check "$shared/absolute.toml" --allow-outside
expect 0 "--allow-outside, an absolute path" -- "$strewn" run "$shared/absolute.toml" -n 60 --quiet --allow-outside
[[ -s "$work/absolute/x.h5" ]] || fail "--allow-outside: the absolute path was not written"
expect 0 "--allow-outside, through a link" -- "$strewn" run "$shared/linked.toml" -n 60 --quiet --allow-outside
[[ -s "$work/elsewhere/x.h5" ]] || fail "--allow-outside: nothing written through the link"
expect 0 "--allow-outside, .." -- "$strewn" run "$shared/up.toml" -n 60 --quiet --allow-outside
[[ -s "$outside/x.h5" ]] || fail "--allow-outside: ../x.h5 was not written"
ok "-o and --allow-outside let an output lie outside the scenario's folder"

# 5. A sweep file's output likewise.
cp "$source_dir/tests/data/canopy-by-height.toml" "$shared/box.toml"
sed -e 's|^base = .*|base = "box.toml"|' -e 's|^combine = .*|&\noutput = "../sweep.h5"|' \
  "$source_dir/tests/data/sweeps/box.toml" >"$shared/sweep.toml"
line=$(grep -n '^output = ' "$shared/sweep.toml" | cut -d: -f1)
was=$(listing "${around[@]}")
expect 2 "a sweep naming ../sweep.h5" -- "$strewn" sweep "$shared/sweep.toml" -n 20 --quiet &&
  refused_once "a sweep naming ../sweep.h5" "sweep.toml:$line: output: $outside/sweep.h5: is outside the sweep file's folder ($shared) once .. and links are resolved; pass -o or --allow-outside"
[[ "$(listing "${around[@]}")" == "$was" ]] ||
  fail "the refused sweep wrote: $(diff <(echo "$was") <(listing "${around[@]}"))"
expect 0 "a sweep with --allow-outside" -- "$strewn" sweep "$shared/sweep.toml" -n 20 --quiet --allow-outside
[[ -s "$outside/sweep.h5" && -s "$outside/sweep-summary.csv" ]] || fail "--allow-outside: the sweep wrote no file outside"
expect 0 "a sweep with -o outside" -- "$strewn" sweep "$shared/sweep.toml" -n 20 --quiet -o "$work/chosen/sweep.h5"
[[ -s "$work/chosen/sweep.h5" ]] || fail "-o outside: the sweep wrote no file"
ok "a sweep file's output is kept in its folder unless -o or --allow-outside"

# 6. A path that names a folder (a trailing slash, "." or "..") is refused before any flight or
#    any write, by run and by report, even where nothing is there yet (found by a tester: the run
#    flew every sample, then failed, and left a checkpoint in a folder it had made; report wrote
#    its other outputs first).
for bad in "$work/slash/new.h5/" "$work/slash/new.h5/." "$work/slash/.."; do
  expect 2 "run -o $bad" -- "$strewn" "${study[@]}" -o "$bad" &&
    refused_once "run -o $bad" "names a folder, not a file"
  expect 2 "report --html $bad" -- "$strewn" report "$results" --csv "$work/slash/c.csv" \
    --html "$bad" && refused_once "report --html $bad" "names a folder, not a file"
done
[[ -e "$work/slash" ]] && fail "a refused path that names a folder left $(find "$work/slash")"
ok "a path that names a folder is refused before anything is flown or written"

# 7. Two reports racing to one new output without --force: at most one writes it (found by a
#    tester: both could succeed, the second replacing the first between its check and its rename).
mkdir -p "$work/race"
both=0
for _ in $(seq 10); do
  rm -f "$work/race/page.html"
  "$strewn" report "$results" --html "$work/race/page.html" >/dev/null 2>&1 &
  first=$!
  "$strewn" report "$results" --html "$work/race/page.html" >/dev/null 2>&1
  second=$?
  wait "$first"
  [[ $? -eq 0 && $second -eq 0 ]] && both=$((both + 1))
done
((both == 0)) || fail "two racing reports both wrote one output in $both of 10 races"
ok "two reports racing to one output: one writes it, the other is refused"

finish "outputs kept"
