#!/usr/bin/env bash
# Installs headless Chromium from Debian's packages when missing; the HTML report tests
# (tests/html_report.rs) open the report in it. Called by scripts/test-all.sh.
set -euo pipefail
if command -v chromium >/dev/null 2>&1; then
  exit 0
fi
echo "installing: chromium" >&2
sudo=""
if [ "$(id -u)" != 0 ]; then sudo="sudo"; fi
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -q
$sudo apt-get install -y -q --no-install-recommends chromium fonts-dejavu-core
