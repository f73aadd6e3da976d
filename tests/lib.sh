# The shell tests' common start and end, sourced by each after its `set` line:
#   source "$(dirname "$0")/../lib.sh" STREWN_BINARY SOURCE_DIR
# It sets $strewn (the binary, an absolute path) and $source_dir, makes $work (a temporary folder
# removed at exit), counts failures through `fail MESSAGE`, and `finish NAME` prints the count and
# exits with status 1 when any check failed.
strewn="$(realpath "$1")"
source_dir="$2"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
failures=0
fail() {
  echo "FAIL: $*"
  failures=$((failures + 1))
}
finish() {
  echo "$1: $failures failed"
  exit $((failures > 0))
}
