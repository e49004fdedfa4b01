#!/bin/sh
# The browser tests (tests/e2e/reasoning-page.test.ts) drive Debian's chromium with playwright-core. `npm test`
# runs this first: if /usr/bin/chromium is missing it is installed with apt-get; if that cannot be done the test
# run stops here, loudly (a browser test never skips silently).
set -eu
CHROMIUM="${TIDEMARK_CHROMIUM:-/usr/bin/chromium}"
if [ -x "$CHROMIUM" ]; then exit 0; fi
echo "ensure-chromium: $CHROMIUM is missing; installing Debian's chromium with apt-get" >&2
SUDO=""
if [ "$(id -u)" -ne 0 ]; then
  if command -v sudo >/dev/null 2>&1; then SUDO="sudo"; else
    echo "ensure-chromium: not root and no sudo: install chromium yourself (apt-get install -y chromium)" >&2; exit 1
  fi
fi
if ! command -v apt-get >/dev/null 2>&1; then
  echo "ensure-chromium: no apt-get on this machine: install chromium and set TIDEMARK_CHROMIUM to its path" >&2; exit 1
fi
$SUDO apt-get update
DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y chromium
if [ ! -x "$CHROMIUM" ]; then echo "ensure-chromium: apt-get ran but $CHROMIUM is still missing" >&2; exit 1; fi
