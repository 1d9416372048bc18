# Installs what is missing: Debian packages (as root, else prints the apt line and stops) and npm packages.
# shellcheck shell=bash

# poppler-utils: pdftoppm renders the printed Session report's PDF to PNG in the browser tests.
DEBIAN_PACKAGES=(mariadb-server ffmpeg chromium poppler-utils)

debian_package_installed() {
  dpkg-query -W -f='${Status}' "$1" 2>/dev/null | grep -q 'install ok installed'
}

ensure_node() {
  command -v node >/dev/null 2>&1 || die "Node.js 20.19 or newer is needed (node not found). Install it from https://nodejs.org or your distribution, then run this again."
  local version major minor
  version="$(node -p 'process.versions.node')"
  major="${version%%.*}"
  minor="$(echo "$version" | cut -d. -f2)"
  if [ "$major" -lt 20 ] || { [ "$major" -eq 20 ] && [ "$minor" -lt 19 ]; }; then
    die "Node.js $version is too old: Arcwright needs 20.19 or newer. Upgrade Node.js, then run this again."
  fi
}

ensure_debian_packages() {
  local missing=() pkg
  if ! command -v dpkg-query >/dev/null 2>&1; then
    # Not Debian: check the programs themselves.
    command -v mariadbd >/dev/null 2>&1 || [ -x /usr/sbin/mariadbd ] || missing+=(mariadb-server)
    command -v ffmpeg >/dev/null 2>&1 || missing+=(ffmpeg)
    command -v chromium >/dev/null 2>&1 || missing+=(chromium)
    command -v pdftoppm >/dev/null 2>&1 || missing+=(poppler-utils)
    [ ${#missing[@]} -eq 0 ] || die "Missing programs: ${missing[*]}. Install them with your package manager, then run this again."
    return 0
  fi
  for pkg in "${DEBIAN_PACKAGES[@]}"; do
    debian_package_installed "$pkg" || missing+=("$pkg")
  done
  [ ${#missing[@]} -eq 0 ] && return 0
  if [ "$(id -u)" -ne 0 ]; then
    die "Missing Debian packages: ${missing[*]}. Install them as root with:
    sudo apt-get update && sudo apt-get install -y ${missing[*]}
then run this again."
  fi
  say "Installing Debian packages: ${missing[*]}"
  DEBIAN_FRONTEND=noninteractive apt-get update
  DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends "${missing[@]}"
}

# npm ci when node_modules is missing or older than package-lock.json (npm keeps its own copy of the
# lock file in node_modules/.package-lock.json after every install).
ensure_npm_packages() {
  cd "$ROOT" || die "Cannot enter $ROOT"
  if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    say "Installing npm packages (npm ci)"
    npm ci --no-audit --no-fund
  fi
}

ensure_dependencies() {
  ensure_node
  ensure_debian_packages
  ensure_npm_packages
}
