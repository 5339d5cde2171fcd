#!/usr/bin/env bash
# Whole-process timings of the command line: a hello-world Go binary (the
# floor of any Go program on the machine), `cureslab help` (start-up:
# loading and package initialisation), and `cureslab run --no-report` of
# the coupled bench case (start-up + load + solve + fields.csv, probes.csv,
# summary.json). The three are run in turn, N rounds (default 30), so that
# a slow spell of a shared machine hits all of them; prints the minimum and
# the median of each, in ms.
#
#   bash testdata/bench/time-process.sh [N] [CURESLAB]
#
# CURESLAB defaults to a fresh `go build` of ./cmd/cureslab.
set -euo pipefail
root=$(cd "$(dirname "$0")/../.." && pwd)
n=${1:-30}
work=$(mktemp -d "${TMPDIR:-/tmp}/cureslab-time.XXXXXX"); trap 'rm -rf "$work"' EXIT
bin=${2:-}
if [ -z "$bin" ]; then
  bin=$work/cureslab
  (cd "$root" && go build -o "$bin" ./cmd/cureslab)
fi
mkdir -p "$work/hello"
printf 'package main\n\nimport "fmt"\n\nfunc main() { fmt.Println("hello, world") }\n' >"$work/hello/main.go"
printf 'module hello\n\ngo 1.26\n' >"$work/hello/go.mod"
(cd "$work/hello" && go build -o "$work/hello-bin" .)

us() { # elapsed µs of one run of "$@", output discarded
  local s=$EPOCHREALTIME
  "$@" >/dev/null 2>&1 || true
  local e=$EPOCHREALTIME
  echo $(( 10#${e/./} - 10#${s/./} ))
}
: >"$work/hello.t"; : >"$work/help.t"; : >"$work/run.t"
for _ in $(seq "$n"); do
  us "$work/hello-bin" >>"$work/hello.t"
  us "$bin" help >>"$work/help.t"
  us "$bin" run "$root/testdata/bench/potting.toml" -o "$work/out" --no-report >>"$work/run.t"
done
for k in hello help run; do
  sort -n "$work/$k.t" | awk -v k="$k" '{v[NR]=$1/1000} END {printf "%-6s n=%d  min %6.1f ms  median %6.1f ms\n", k, NR, v[1], (NR%2 ? v[(NR+1)/2] : (v[NR/2]+v[NR/2+1])/2)}'
done
