#!/usr/bin/env bash
# Install Debian's Chromium for the end-to-end browser test (tests/e2e), if it is missing.
#
# Playwright for Python drives /usr/bin/chromium; `playwright install` is never used (it
# downloads its own browser builds, which this project does not rely on). Needs root and
# apt-get; anywhere else it only says what is missing, and the e2e test then skips.
set -euo pipefail
CHROMIUM=/usr/bin/chromium
if [ -x "$CHROMIUM" ]; then
    "$CHROMIUM" --version 2>/dev/null || true
    exit 0
fi
if ! command -v apt-get >/dev/null 2>&1; then
    echo "setup_browser: $CHROMIUM missing and apt-get not available; the e2e test will skip" >&2
    exit 0
fi
if [ "$(id -u)" -ne 0 ]; then
    echo "setup_browser: $CHROMIUM missing; run as root: apt-get install chromium" >&2
    exit 0
fi
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
apt-get install -y -qq --no-install-recommends chromium fonts-dejavu-core >/dev/null
"$CHROMIUM" --version
