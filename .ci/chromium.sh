#!/usr/bin/env bash
# Install Debian's chromium when it is missing (the report's browser test drives it through
# playwright-core at /usr/bin/chromium). Safe to run more than once.
set -euo pipefail
command -v chromium >/dev/null || (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium)
