#!/usr/bin/env bash
# The demo's terrain (inputs/terrain/ridge.tif) is what scripts/make-ridge-terrain makes: the same
# posts, heights (GDAL's checksum of the band), georeferencing, no-data value and unit. Compared
# through gdalinfo rather than byte for byte, so that another GDAL's encoding does not fail it.
# Usage: check_ridge.sh SOURCE_DIR
set -euo pipefail
source_dir=$1
work=$(mktemp -d "${TMPDIR:-/tmp}/strewn-ridge-XXXXXX")
trap 'rm -rf "$work"' EXIT
"$source_dir/scripts/make-ridge-terrain" "$work/ridge.tif" >/dev/null
describe() {
  GDAL_PAM_ENABLED=NO gdalinfo -json -checksum "$1" | python3 -c '
import json, sys
j = json.load(sys.stdin)
band = j["bands"][0]
print(j["size"], j["geoTransform"], j["coordinateSystem"]["wkt"][:60], band["checksum"],
      band.get("noDataValue"), band.get("unit"), band["type"])'
}
committed=$(describe "$source_dir/inputs/terrain/ridge.tif")
made=$(describe "$work/ridge.tif")
if [[ "$committed" != "$made" ]]; then
  echo "FAIL: inputs/terrain/ridge.tif differs from what scripts/make-ridge-terrain makes"
  echo "  committed: $committed"
  echo "  made:      $made"
  exit 1
fi
echo "ok: inputs/terrain/ridge.tif is what scripts/make-ridge-terrain makes ($made)"
