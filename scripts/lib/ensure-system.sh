#!/usr/bin/env bash
# Installs what the project needs on a fresh machine: Debian's MariaDB and Chromium (when root;
# otherwise prints the command) and the npm packages from the lock file. Sourced by the start and
# test scripts; safe to run again (does nothing when everything is there).

ensure_debian_packages() {
  local missing=()
  command -v mariadbd >/dev/null 2>&1 || [ -x /usr/sbin/mariadbd ] || missing+=(mariadb-server-core mariadb-client-core)
  if [ "${1:-}" = "with-browser" ]; then
    [ -x /usr/bin/chromium ] || missing+=(chromium)
    # pdftoppm renders the printed report (page.pdf) to an image in the release browser test
    command -v pdftoppm >/dev/null 2>&1 || missing+=(poppler-utils)
  fi
  [ ${#missing[@]} -eq 0 ] && return 0
  local cmd="apt-get update && apt-get install -y --no-install-recommends ${missing[*]}"
  if [ "$(id -u)" -ne 0 ]; then
    echo "Quorum needs Debian packages that are missing. As root, run: $cmd" >&2
    return 4
  fi
  echo "installing Debian packages: ${missing[*]}"
  apt-get update -q >/dev/null && DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends "${missing[@]}" >/dev/null
}

ensure_node_modules() {
  # Reinstall when node_modules is missing or older than the lock file.
  if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    echo "installing npm packages (npm ci)"
    PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1 npm ci --no-audit --no-fund --loglevel=error
  fi
}
