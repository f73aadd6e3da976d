#!/usr/bin/env bash
# The HTML report rendered by a real browser (Debian's Chromium, headless): the page loads, its
# DOM holds the map and the tables, and the screenshot shows a drawn map, not a blank page.
# Usage: html_in_browser.sh STREWN_BINARY SOURCE_DIR
set -euo pipefail
source "$(dirname "$0")/../lib.sh" "$1" "$2"
fail() {  # this test stops at its first failure: each step needs the one before
  echo "FAIL: $*" >&2
  exit 1
}
browser="$(command -v chromium || true)"
[[ -n "$browser" ]] || fail "chromium is not installed (scripts/test installs it from scripts/packages.txt)"

"$strewn" run "$source_dir/inputs/ridge-drop.toml" -n 2000 -o "$work/ridge.h5" --quiet >/dev/null
"$strewn" report "$work/ridge.h5" --html "$work/report.html" >/dev/null

flags=(--headless --no-sandbox --disable-gpu --hide-scrollbars --no-first-run
       --user-data-dir="$work/profile" --window-size=1100,1500)
timeout 120 "$browser" "${flags[@]}" --dump-dom "file://$work/report.html" >"$work/dom.html" 2>"$work/browser.log" ||
  fail "chromium could not load the page: $(tail -3 "$work/browser.log")"
for part in '<svg[^>]*id="map"' 'class="density"' 'class="hazard-polygon"' 'class="legend"' \
            '<table id="rules"' '<table id="containment"' '<table id="sensitivity"' \
            '<table id="provenance"' 'responsible authority'; do
  grep -Eq "$part" "$work/dom.html" || fail "the rendered page has no $part"
done
rows=$(grep -o '<tr>' "$work/dom.html" | wc -l)
((rows > 20)) || fail "the rendered tables hold only $rows rows"

timeout 120 "$browser" "${flags[@]}" --screenshot="$work/page.png" "file://$work/report.html" \
  >/dev/null 2>>"$work/browser.log" || fail "chromium could not take the screenshot"
read -r width height colours share < <(python3 "$source_dir/tests/report/png_colours.py" "$work/page.png")
echo "screenshot ${width}x${height}: $colours colours, $share of the pixels not white"
# A blank or text-only page has a handful of colours; the density shading alone has dozens.
((colours > 60)) || fail "the screenshot has only $colours colours: the map was not drawn"
awk -v s="$share" 'BEGIN { exit !(s > 0.05) }' || fail "only $share of the screenshot is drawn"
echo "PASS: the HTML report renders in Chromium with its map and tables"
