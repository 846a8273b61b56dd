#!/usr/bin/env bash
# The hostile-input benchmark (not part of .ci/run: it writes a few GB and takes several
# minutes). It builds the program and runs, each as its own process with its peak memory
# measured: the kept hostile list (each entry must answer exit 1 naming the file and the place,
# or a correct result with a warning), big inputs at and past the size limits (every answer
# under 4 GB), and kill -9 at random moments during 20 runs of each command that writes files
# (no output may be lost or left cut under its final name).
#   bash .ci/hostile.sh            all of it
#   bash .ci/hostile.sh Kill       only the tests whose names match
set -euo pipefail
cd "$(dirname "$0")/.."
export PATH=$PATH:/usr/local/go/bin
bin=$(mktemp -d)/tapersweep
go build -o "$bin" ./cmd/tapersweep
go test ./cmd/tapersweep -count=1 -timeout 60m -v -run "Hostile${1:-}" -args -hostile.exec="$bin" |
  grep -E '^(=== RUN|--- |    |ok|FAIL|PASS)' | grep -v '^=== RUN'
