#!/usr/bin/env bash
# Makes sure Debian's chromium is installed for the browser tests (never a browser download).
set -euo pipefail
if command -v chromium >/dev/null 2>&1; then exit 0; fi
if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
  echo "Installing Debian's chromium for the browser tests (about 40 s)..."
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq >/dev/null
  apt-get install -y -qq chromium >/dev/null
  command -v chromium >/dev/null 2>&1 && exit 0
fi
echo "The browser tests need Debian's chromium. Install it with:  sudo apt-get install -y chromium" >&2
exit 1
