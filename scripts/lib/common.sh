# Shared by the scripts in scripts/: package installation and the CMake build.
# Source it; it sets STREWN_ROOT to the repository root.
set -euo pipefail
STREWN_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
export STREWN_ROOT

# Installs the packages listed in scripts/packages.txt that are missing (apt-get, idempotent).
install_packages() {
  local wanted missing=()
  wanted=$(grep -v '^\s*#' "$STREWN_ROOT/scripts/packages.txt" | grep -v '^\s*$')
  for package in $wanted; do
    dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q "install ok installed" ||
      missing+=("$package")
  done
  if ((${#missing[@]} == 0)); then
    echo "packages: all present"
    return
  fi
  echo "packages: installing ${missing[*]}"
  local sudo=""
  [[ $(id -u) -eq 0 ]] || sudo="sudo"
  $sudo apt-get update -q
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -q --no-install-recommends "${missing[@]}"
}

# The compiler cache: a second build of the same sources, in this clone or in another one
# (paths are taken relative to the clone, and the working folder is left out of the key), is
# read from ~/.cache/ccache instead of compiled again. Debug information may then name the
# other clone's folder; the objects are otherwise the same. The settings are exported here, in
# the shell that builds: the function below runs in a subshell, $(...), whose exports are lost.
export CCACHE_BASEDIR="$STREWN_ROOT" CCACHE_NOHASHDIR=1
compiler_cache_arguments() {
  command -v ccache >/dev/null || return 0
  echo -DCMAKE_CXX_COMPILER_LAUNCHER=ccache -DCMAKE_C_COMPILER_LAUNCHER=ccache
}

# Configures and builds into the folder $1 with extra CMake arguments after it.
build_in() {
  local folder="$1"
  shift
  # shellcheck disable=SC2046  # the arguments are words without blanks
  cmake -S "$STREWN_ROOT" -B "$STREWN_ROOT/$folder" -G Ninja $(compiler_cache_arguments) "$@" \
    >/dev/null
  cmake --build "$STREWN_ROOT/$folder" --parallel "$(nproc)"
}
