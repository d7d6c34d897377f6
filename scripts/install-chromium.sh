#!/usr/bin/env bash
# Browser tests use Debian's Chromium (never a browser downloaded by a test tool).
set -euo pipefail
if [ -x /usr/bin/chromium ]; then
  echo "chromium: $(/usr/bin/chromium --version 2>/dev/null | grep -i chromium || echo present)"
  exit 0
fi
SUDO=""
if [ "$(id -u)" != "0" ]; then SUDO="sudo"; fi
$SUDO apt-get update
DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y chromium
