#!/usr/bin/env bash
# End-to-end check of the HTML reports in a real browser.
#
# Runs the demo, renders every report.html it wrote in headless Chromium
# (Debian's package, installed with apt-get when missing and running as
# root), takes a screenshot of each, and fails if a page logs anything to
# the console, starts a network request, or renders blank. The checks of the
# browser's artefacts are the Go test TestE2EReportsInBrowser (build tag
# e2e, cases/report/report_e2e_test.go); two control pages prove that each
# detector fires.
#
# Usage: bash .ci/e2e.sh            (CI=true: a missing browser is an error)
# Env:   CHROMIUM   browser binary (default: chromium)
#        E2E_OUT    keep the demo, screenshots and logs in this directory
#                   (default: a temporary directory, removed on success)
set -euo pipefail
cd "$(dirname "$0")/.."
start=$(date +%s)
say() { echo "== e2e [+$(($(date +%s) - start)) s]: $*"; }

chromium=${CHROMIUM:-chromium}
if ! command -v "$chromium" >/dev/null 2>&1; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
    say "installing Debian's chromium (apt-get)"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq >/dev/null
    apt-get install -y -qq --no-install-recommends chromium fonts-liberation >/dev/null
  fi
fi
if ! command -v "$chromium" >/dev/null 2>&1; then
  msg="e2e: no Chromium ('$chromium' not found, and it cannot be installed here: apt-get as root is needed)"
  if [ "${CI:-}" = true ]; then
    echo "$msg" >&2
    exit 1
  fi
  echo "$msg: SKIPPED the browser check"
  exit 0
fi
say "$("$chromium" --version 2>/dev/null | head -n1)"

if [ -n "${E2E_OUT:-}" ]; then
  work=$E2E_OUT
  rm -rf "$work"
  mkdir -p "$work"
else
  work=$(mktemp -d "${TMPDIR:-/tmp}/cureslab-e2e.XXXXXX")
fi
ok=0
cleanup() {
  if [ "$ok" = 1 ] && [ -z "${E2E_OUT:-}" ]; then
    rm -rf "$work"
  else
    echo "e2e: artefacts kept in $work"
  fi
}
trap cleanup EXIT

say "building cureslab and running the demo"
go build -o "$work/cureslab" ./cmd/cureslab
set +e
"$work/cureslab" demo -o "$work/demo" >"$work/demo.log" 2>&1
rc=$?
set -e
if [ "$rc" -ne 0 ] && [ "$rc" -ne 1 ]; then
  echo "e2e: the demo failed (exit $rc, want 0 or 1):" >&2
  tail -n 30 "$work/demo.log" >&2
  exit 1
fi

mapfile -t reports < <(find "$work/demo" -name report.html | sort)
if [ "${#reports[@]}" -eq 0 ]; then
  echo "e2e: the demo wrote no report.html" >&2
  exit 1
fi

# Control pages: each must be caught by a detector.
mkdir -p "$work/control-bad" "$work/control-blank"
cat >"$work/control-bad/page.html" <<'EOF'
<!DOCTYPE html><html><head><meta charset="utf-8"><title>control</title></head>
<body><h1>control page</h1><img src="http://cureslab-e2e.invalid/x.png" alt="">
<script>missingFunction();</script></body></html>
EOF
cat >"$work/control-blank/page.html" <<'EOF'
<!DOCTYPE html><html><head><meta charset="utf-8"><title>blank</title></head><body></body></html>
EOF

shots="$work/shots"
mkdir -p "$shots"
render() { # render NAME PAGE
  local out="$shots/$1"
  mkdir -p "$out"
  if ! timeout 120 "$chromium" --headless --no-sandbox --disable-gpu --no-first-run \
      --disable-background-networking --disable-component-update --disable-sync \
      --disable-default-apps --disable-extensions --no-default-browser-check \
      --host-resolver-rules="MAP * ~NOTFOUND" \
      --user-data-dir="$out/profile" \
      --enable-logging=stderr --v=0 --log-net-log="$out/netlog.json" \
      --hide-scrollbars --window-size=1024,3300 \
      --screenshot="$out/screenshot.png" "file://$2" \
      >"$out/stdout.log" 2>"$out/stderr.log"; then
    echo "e2e: Chromium failed on $2:" >&2
    tail -n 20 "$out/stderr.log" >&2
    exit 1
  fi
  rm -rf "$out/profile"
  if [ ! -s "$out/screenshot.png" ]; then
    echo "e2e: no screenshot of $2" >&2
    exit 1
  fi
}

# Chromium takes seconds to start: render the pages side by side.
pids=()
for page in "${reports[@]}"; do
  name=$(basename "$(dirname "$page")")
  say "rendering $name ($(stat -c %s "$page") bytes)"
  render "$name" "$page" &
  pids+=($!)
done
render control-bad "$work/control-bad/page.html" &
pids+=($!)
render control-blank "$work/control-blank/page.html" &
pids+=($!)
failed=0
for pid in "${pids[@]}"; do
  wait "$pid" || failed=1
done
if [ "$failed" = 1 ]; then
  echo "e2e: rendering failed" >&2
  exit 1
fi

say "checking console, network and screenshots"
set +e
CURESLAB_E2E_DIR="$shots" go test -tags e2e -count=1 -run '^TestE2EReportsInBrowser$' -v ./cases/report/ >"$work/check.log" 2>&1
rc=$?
set -e
if [ "$rc" -ne 0 ]; then
  cat "$work/check.log" >&2
  echo "e2e: FAILED" >&2
  exit 1
fi
grep -E '^(--- |ok|PASS)|report_e2e_test' "$work/check.log" || true

ok=1
echo "e2e: ${#reports[@]} report pages passed in $(($(date +%s) - start)) s"
