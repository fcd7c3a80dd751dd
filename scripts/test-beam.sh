#!/usr/bin/env bash
# Vet and test the Apache Beam module (beam/, its own go.mod) on Beam's
# local prism runner. Quiet on success but for one closing line
# ("beam: N passed, 0 failed"); on failure it prints the whole log.
# The first build of the Beam SDK takes a few minutes on 2 cores.
set -euo pipefail
cd "$(dirname "$0")/../beam"
export PATH="$PATH:/usr/local/go/bin"
log=$(mktemp)
trap 'rm -f "$log"' EXIT
if ! go vet ./... >"$log" 2>&1; then
  cat "$log" >&2
  echo "beam: go vet failed" >&2
  exit 1
fi
if ! go test -v ./... >"$log" 2>&1; then
  grep -v 'level=INFO' "$log" >&2
  echo "beam: $(grep -c '^--- PASS' "$log" || true) passed, $(grep -c '^--- FAIL' "$log" || true) failed" >&2
  exit 1
fi
echo "beam: $(grep -c '^--- PASS' "$log") passed, 0 failed"
