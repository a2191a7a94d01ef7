#!/usr/bin/env bash
# Install Debian's poppler-utils (pdftoppm, pdfinfo, pdftotext) for the tests that look at
# the PDF sheets as pictures, if it is missing. Needs root and apt-get; anywhere else it
# only says what is missing, and those tests then skip.
set -euo pipefail
if command -v pdftoppm >/dev/null 2>&1; then
    exit 0
fi
if ! command -v apt-get >/dev/null 2>&1 || [ "$(id -u)" -ne 0 ]; then
    echo "setup_pdf_tools: pdftoppm missing; as root: apt-get install poppler-utils" >&2
    exit 0
fi
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
apt-get install -y -qq --no-install-recommends poppler-utils >/dev/null
pdftoppm -v 2>&1 | head -1
