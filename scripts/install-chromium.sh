#!/usr/bin/env bash
# What the browser and print tests need from Debian: Chromium (never a browser downloaded by
# a test tool) and poppler-utils (pdfinfo, pdftoppm) to check printed pages.
set -euo pipefail
if [ -x /usr/bin/chromium ] && command -v pdfinfo >/dev/null 2>&1; then
  echo "chromium: $(/usr/bin/chromium --version 2>/dev/null | grep -i chromium || echo present); poppler-utils: present"
  exit 0
fi
SUDO=""
if [ "$(id -u)" != "0" ]; then SUDO="sudo"; fi
$SUDO apt-get update
DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y chromium poppler-utils
