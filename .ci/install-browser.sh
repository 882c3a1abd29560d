#!/usr/bin/env bash
# Installs Debian's chromium for tests/report_browser.rs (the report page in a real
# headless browser). Called by .ci/run; safe to run again. Exits non-zero when the browser
# cannot be installed, so CI fails and says why.
set -euo pipefail
if command -v chromium >/dev/null 2>&1; then
    exit 0
fi
if ! command -v apt-get >/dev/null 2>&1; then
    echo "install-browser: no apt-get here; install Debian's chromium by hand" >&2
    exit 1
fi
export DEBIAN_FRONTEND=noninteractive
SUDO=""
if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq --no-install-recommends chromium fonts-dejavu-core
command -v chromium >/dev/null 2>&1 || { echo "install-browser: chromium did not install" >&2; exit 1; }
