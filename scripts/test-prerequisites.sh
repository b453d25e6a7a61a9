#!/usr/bin/env bash
# What the test suite needs beyond npm's packages, installed when missing: Debian's redis-server (the queue tests
# start their own throwaway server from it unless REDIS_URL names one) and Debian's chromium (the report tests drive
# it through playwright-core). npm runs this before `npm test` (the "pretest" script); .ci/run goes through the same
# command. Quiet when everything is there.
set -euo pipefail

need=()
command -v redis-server >/dev/null 2>&1 || need+=(redis-server)
[ -x /usr/bin/chromium ] || need+=(chromium)
[ ${#need[@]} -eq 0 ] && exit 0

if ! command -v apt-get >/dev/null 2>&1; then
  echo "error: the tests need ${need[*]} (Debian packages); install them with your system's package manager, or set REDIS_URL for an existing Redis" >&2
  exit 3
fi
if [ "$(id -u)" -eq 0 ]; then
  as_root=()
elif command -v sudo >/dev/null 2>&1; then
  as_root=(sudo)
else
  echo "error: the tests need ${need[*]}; run as root: apt-get install -y ${need[*]}" >&2
  exit 3
fi
echo "test set-up: installing ${need[*]} from Debian's packages" >&2
"${as_root[@]}" apt-get update -qq
"${as_root[@]}" env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
