#!/usr/bin/env bash
# Runs every fuzz target briefly: its seed corpus plus a fixed number of new
# inputs (a count, not a duration: a duration can end mid-minimisation and
# fail with "context deadline exceeded" on a loaded machine).
set -euo pipefail
t=${1:-20000x}
for pkg in $(go list ./...); do
  dir=$(go list -f '{{.Dir}}' "$pkg")
  for f in $(grep -ho '^func Fuzz[A-Za-z0-9_]*' "$dir"/*_test.go 2>/dev/null | sed 's/^func //'); do
    echo "fuzz $pkg $f ($t)"
    go test -run '^$' -fuzz "^$f\$" -fuzztime "$t" "$pkg"
  done
done
