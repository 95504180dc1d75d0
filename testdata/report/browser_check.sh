#!/usr/bin/env bash
# Opens a wavsieve HTML report in a real browser (Debian's chromium,
# headless), checks that it renders (its script ran, every plot is inline
# SVG, nothing was fetched, the page is no wider than the window at a
# desktop width of 1400 px and at a phone width of 390 px, apart from the
# tables' own scrolling) and saves screenshots at both widths to
# out/report-screenshot.png and out/report-screenshot-phone.png.
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
timeout 120 "$browser" "${flags[@]}" --window-size=1400,3000 --screenshot="$work/shot.png" "file://$work/report.html" >/dev/null 2>&1
# Headless chromium keeps its window at least 500 px wide: the phone
# width is a 390 px frame holding the report.
printf '<!DOCTYPE html><html><body style="margin:0"><iframe src="report.html" style="width:390px;height:3000px;border:0"></iframe></body></html>' >"$work/phone.html"
timeout 120 "$browser" "${flags[@]}" --window-size=500,3000 --screenshot="$work/phone.png" "file://$work/phone.html" >/dev/null 2>&1
timeout 120 "$browser" "${flags[@]}" --dump-dom "file://$work/report.html" >"$work/dom.html" 2>/dev/null
# The page's width against its viewport's at each width, measured by a
# script the report itself does not have, in a 1400 px window and in a
# 390 px frame.
measure() {
  printf '<!DOCTYPE html><html><head><title>-</title></head><body style="margin:0"><iframe id="f" src="report.html" style="width:%spx;height:2000px;border:0"></iframe><script>document.getElementById("f").addEventListener("load",function(){var d=this.contentDocument.documentElement;document.title="W="+d.scrollWidth+"/"+d.clientWidth;});</script></body></html>' "$1" >"$work/measure.html"
  timeout 120 "$browser" "${flags[@]}" --allow-file-access-from-files --window-size=1500,2000 --virtual-time-budget=10000 --dump-dom "file://$work/measure.html" 2>/dev/null | grep -o '<title>W=[0-9]*/[0-9]*' | sed 's#<title>W=##'
}
wide=$(measure 1400)
narrow=$(measure 390)

fail=0
check() { if eval "$2"; then echo "ok    $1"; else echo "FAIL  $1"; fail=1; fi; }
check "the page's script ran (body marked ready)" "grep -q 'data-ready=\"1\"' '$work/dom.html'"
svgs=$(grep -o '<svg' "$work/dom.html" | wc -l)
check "plots are inline SVG ($svgs found, want at least 8)" "[ $svgs -ge 8 ]"
check "no external resource is referenced" "! grep -Eq '(src|href)=\"(https?:)?//' '$work/report.html'"
check "the manifest table lists every sample" "[ \$(grep -o 'reedmere-\|pumphouse-' '$work/dom.html' | wc -l) -ge 4 ]"
rsize=$(stat -c %s "$work/report.html")
check "the report of the four samples is under 1.5 MB ($rsize bytes)" "[ $rsize -lt 1500000 ]"
fits() { [ -n "$1" ] && [ "${1%/*}" -le "${1#*/}" ]; }
check "at 1400 px the page fits the window (page/window: ${wide:-unknown})" "fits '$wide'"
check "at 390 px the page fits the window (page/window: ${narrow:-unknown})" "fits '$narrow'"
size=$(stat -c %s "$work/shot.png" 2>/dev/null || echo 0)
check "a screenshot was saved at 1400 px ($size bytes)" "[ $size -gt 20000 ]"
psize=$(stat -c %s "$work/phone.png" 2>/dev/null || echo 0)
check "a screenshot was saved at 390 px ($psize bytes)" "[ $psize -gt 10000 ]"
mkdir -p out
cp "$work/shot.png" out/report-screenshot.png 2>/dev/null || true
cp "$work/phone.png" out/report-screenshot-phone.png 2>/dev/null || true
if [ $fail = 0 ]; then
  echo "browser check: 9 passed, 0 failed; screenshots in out/report-screenshot.png and out/report-screenshot-phone.png"
else
  echo "browser check: failed"
  exit 1
fi
