#!/usr/bin/env bash
# Runs the demo, check and run on every case under testdata/good and
# testdata/bench and check on every embedded example, a compare
# of the good cases, a small sweep (with each run's files) and a short tune
# with two cureslab binaries and compares their outputs byte for byte (report
# pages modulo the line that carries the drawing time; sweep.log, which holds
# wall times, left out). Used to show that a refactoring changes no output.
#
#   go build -o /tmp/before ./cmd/cureslab      # on the old commit
#   go build -o /tmp/after ./cmd/cureslab       # on the new one
#   bash testdata/compare-outputs.sh /tmp/before /tmp/after
set -uo pipefail
before=$(realpath "$1"); after=$(realpath "$2")
root=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d); trap 'rm -rf "$work"' EXIT

runall() { # BIN DIR
  local bin=$1 out=$2; mkdir -p "$out"; cd "$out"
  "$bin" demo -o demo >demo.stdout 2>&1; echo "demo $?" >>codes
  for f in "$root"/testdata/good/*.toml "$root"/testdata/bench/*.toml; do
    n=$(basename "$(dirname "$f")")-$(basename "$f" .toml)
    "$bin" run "$f" -o "$n" >"$n.stdout" 2>&1; echo "$n $?" >>codes
    "$bin" check "$f" >"$n.check" 2>&1; echo "$n check $?" >>codes
  done
  "$bin" compare "$root"/testdata/good/potting.toml "$root"/testdata/good/platen.toml \
    "$root"/testdata/good/volumetric-controlled.toml -o cmp >cmp.stdout 2>&1; echo "cmp $?" >>codes
  "$bin" sweep "$root"/testdata/sweep/tiny.toml --vary 'initial.temperature=20 C,30 C' --keep-fields -j 1 \
    -o sweep >sweep.stdout 2>&1; echo "sweep $?" >>codes
  "$bin" ttt "$root"/testdata/good/potting.toml --material grey-potting-7 -o ttt.csv --plot ttt.html >ttt.stdout 2>&1; echo "ttt $?" >>codes
  "$bin" fit "$root"/testdata/dsc/dyn-*.csv -o fit.toml --plot fit.html >fit.stdout 2>&1; echo "fit $?" >>codes
  "$bin" example thick-potting-oven >demo/thick-potting-oven.toml
  for ex in $("$bin" example | awk '{print $1}'); do
    "$bin" example "$ex" >"ex-$ex.toml" 2>/dev/null && "$bin" check "ex-$ex.toml" >"ex-$ex.check" 2>&1
  done
  "$bin" tune "$root"/testdata/tune/hold.toml --program oven -j 1 -o tune >tune.stdout 2>&1; echo "tune $?" >>codes
  "$bin" run demo/thick-potting-oven.toml --uncertain 4 -j 1 -o unc >unc.stdout 2>&1; echo "unc $?" >>codes
  "$bin" report demo/thick-potting-oven >report.stdout 2>&1; echo "report $?" >>codes
  cd "$root"
}
runall "$before" "$work/before"
runall "$after" "$work/after"

status=0
cd "$work/before"
while IFS= read -r f; do
  b="$work/before/$f" a="$work/after/$f"
  if [ ! -f "$a" ]; then echo "missing after: $f"; status=1; continue; fi
  case "$f" in
    *.html) cmp -s <(grep -v ' · drawn \| drawn 20' "$b") <(grep -v ' · drawn \| drawn 20' "$a") ;;
    *.log) continue ;; # wall times, hosts and process ids
    *.stdout) cmp -s <(sed "s#$work/before#W#g" "$b") <(sed "s#$work/after#W#g" "$a") ;;
    *) cmp -s "$b" "$a" ;;
  esac || { echo "differs: $f"; status=1; }
done < <(find . -type f | sort)
n=$(find . -type f | wc -l)
[ $status = 0 ] && echo "identical: $n files"
exit $status
