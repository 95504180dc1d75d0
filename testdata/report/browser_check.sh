#!/usr/bin/env bash
# Opens a wavsieve HTML report in a real browser (Debian's chromium,
# headless), checks that it renders (its script ran, every plot is inline
# SVG, nothing was fetched) and saves a screenshot to out/report-screenshot.png.
#
# Where chromium is missing it is installed with apt-get when run as root;
# under CI (CI=true) on a machine without it, the check is skipped and says so.
set -euo pipefail
cd "$(dirname "$0")/../.."

browser=$(command -v chromium || command -v chromium-browser || true)
if [ -z "$browser" ]; then
  if [ "${CI:-}" = "true" ]; then
    echo "browser check: skipped, chromium is not installed on this machine"
    exit 0
  fi
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    echo "browser check: installing Debian's chromium"
    apt-get install -y chromium >/dev/null 2>&1 || { apt-get update >/dev/null && apt-get install -y chromium >/dev/null; }
    browser=$(command -v chromium)
  else
    echo "browser check: needs chromium (apt-get install chromium)" >&2
    exit 1
  fi
fi

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/wavsieve" ./cmd/wavsieve
"$work/wavsieve" apply --spec samples/specs/rumble-and-hum.json --zero-phase --output "$work/clean" samples >/dev/null 2>&1
"$work/wavsieve" report --from "$work/clean/wavsieve-manifest.json" --output "$work/report.html" 2>/dev/null

flags=(--headless --no-sandbox --disable-gpu --disable-quic --no-first-run
  --disable-background-networking --disable-component-update --disable-sync
  --user-data-dir="$work/profile")
timeout 120 "$browser" "${flags[@]}" --window-size=1200,3000 --screenshot="$work/shot.png" "file://$work/report.html" >/dev/null 2>&1
timeout 120 "$browser" "${flags[@]}" --dump-dom "file://$work/report.html" >"$work/dom.html" 2>/dev/null

fail=0
check() { if eval "$2"; then echo "ok    $1"; else echo "FAIL  $1"; fail=1; fi; }
check "the page's script ran (body marked ready)" "grep -q 'data-ready=\"1\"' '$work/dom.html'"
svgs=$(grep -o '<svg' "$work/dom.html" | wc -l)
check "plots are inline SVG ($svgs found, want at least 8)" "[ $svgs -ge 8 ]"
check "no external resource is referenced" "! grep -Eq '(src|href)=\"(https?:)?//' '$work/report.html'"
check "the manifest table lists every sample" "[ \$(grep -o 'reedmere-\|pumphouse-' '$work/dom.html' | wc -l) -ge 4 ]"
size=$(stat -c %s "$work/shot.png" 2>/dev/null || echo 0)
check "a screenshot was saved ($size bytes)" "[ $size -gt 20000 ]"
mkdir -p out
cp "$work/shot.png" out/report-screenshot.png 2>/dev/null || true
if [ $fail = 0 ]; then
  echo "browser check: 5 passed, 0 failed; screenshot in out/report-screenshot.png"
else
  echo "browser check: failed"
  exit 1
fi
