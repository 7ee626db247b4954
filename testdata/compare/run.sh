#!/usr/bin/env bash
# run.sh: speed and accuracy of phasecast's fast alt/az path against the
# astronomy-engine library (npm), on one work set, in one run, on this machine.
#
#   bash testdata/compare/run.sh [REPS]
#
# Needs Go (go.mod's version) and Node.js with npm. Installs astronomy-engine
# into testdata/compare/node_modules from package-lock.json (npm ci) when it is
# missing, runs main.go (writes out/phasecast.json and times phasecast), then
# compare.mjs (times astronomy-engine on the same work and prints the
# comparison; also writes out/summary.json). REPS (default 25) is the number of
# timed repetitions of the fast paths (the slow full-precision paths get 3 to
# 5); the best of each is reported. On a busy machine run it more than once.
set -euo pipefail

here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/../.." && pwd)"
reps="${1:-25}"

if [[ ! -f "$here/node_modules/astronomy-engine/package.json" ]]; then
	echo "==> npm ci (astronomy-engine, as pinned in package-lock.json)"
	(cd "$here" && npm ci --no-audit --no-fund)
fi
mkdir -p "$here/out"

echo "==> machine"
echo "date: $(date -u +%Y-%m-%dT%H:%M:%SZ)"
echo "cpus: $(nproc); $(lscpu 2>/dev/null | grep 'Model name' | sed 's/  */ /g' || echo 'model unknown')"
echo "go: $(go version)"
echo "node: $(node --version)"
echo "load average (1, 5, 15 min): $(cut -d' ' -f1-3 /proc/loadavg 2>/dev/null || echo unknown)"

rev="$(git -C "$root" rev-parse --short HEAD 2>/dev/null || echo unknown)"
# Uncommitted changes to ephem's non-test sources change what is measured.
if ! git -C "$root" diff --quiet HEAD -- ephem ':(exclude)ephem/*_test.go' 2>/dev/null; then
	rev="$rev+modified-ephem"
fi

echo "==> phasecast (go run ./testdata/compare)"
(cd "$root" && CGO_ENABLED=0 go run ./testdata/compare -out "$here/out/phasecast.json" -reps "$reps" -rev "$rev")

echo "==> astronomy-engine (node compare.mjs)"
node "$here/compare.mjs" "$here/out/phasecast.json" "$reps"
