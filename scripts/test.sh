#!/usr/bin/env bash
# The tests, as README's second set-up command and CI run them: every test binary in release
# mode, then the report page in a real headless browser (Debian's chromium, installed by
# .ci/install-browser.sh when missing; the screenshot is kept as
# target/tmp/report-screenshot.png). Fails when any test fails or the browser cannot be had.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo test --release
bash .ci/install-browser.sh
cargo test --release --test report_browser -- --ignored
