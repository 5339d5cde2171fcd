#!/usr/bin/env bash
# Whole-process timings of the command line: a hello-world Go binary (the
# floor of any Go program on the machine), `cureslab help` (start-up:
# loading and package initialisation) and `cureslab run --no-report` of the
# coupled bench case (start-up, load, solve, fields.csv, probes.csv,
# summary.json), for one or more cureslab binaries. Every command runs once
# per round, in turn, for N rounds (default 30), so that a slow spell of a
# shared machine hits all of them alike; prints the minimum and the median
# of each, in ms.
#
#   bash testdata/bench/time-process.sh [N] [CURESLAB...]
#
# Without CURESLAB, a fresh `go build` of ./cmd/cureslab. Give two binaries
# (built before and after a change) to compare them side by side.
set -euo pipefail
root=$(cd "$(dirname "$0")/../.." && pwd)
n=${1:-30}
shift || true
work=$(mktemp -d "${TMPDIR:-/tmp}/cureslab-time.XXXXXX"); trap 'rm -rf "$work"' EXIT
bins=("$@")
if [ ${#bins[@]} -eq 0 ]; then
  (cd "$root" && go build -o "$work/cureslab" ./cmd/cureslab)
  bins=("$work/cureslab")
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
for _ in $(seq "$n"); do
  us "$work/hello-bin" >>"$work/hello.t"
  for k in "${!bins[@]}"; do
    us "${bins[$k]}" help >>"$work/help-$k.t"
    us "${bins[$k]}" run "$root/testdata/bench/potting.toml" -o "$work/out" --no-report >>"$work/run-$k.t"
  done
done
stats() { # LABEL FILE
  sort -n "$2" | awk -v k="$1" '{v[NR]=$1/1000} END {printf "%-40s n=%d  min %6.1f ms  median %6.1f ms\n", k, NR, v[1], (NR%2 ? v[(NR+1)/2] : (v[NR/2]+v[NR/2+1])/2)}'
}
stats "hello world" "$work/hello.t"
for k in "${!bins[@]}"; do
  stats "$(basename "${bins[$k]}") help" "$work/help-$k.t"
  stats "$(basename "${bins[$k]}") run --no-report potting.toml" "$work/run-$k.t"
done
