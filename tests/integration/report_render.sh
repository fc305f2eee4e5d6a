#!/bin/sh
# report_render.sh - renders the replay report in headless Chromium and checks
# the picture: the demo page that test_report writes to $FG_REPORT_OUT must
# render to a non-blank screenshot showing every chart line colour; a blank
# page must fail the same check (so the check can fail). Prints TAP.
#
# Chromium opens a local file only; it listens on nothing, and the flags
# below keep it off the network.
set -u

: "${FG_BUILD:=build}"
CHROMIUM=/usr/bin/chromium
PY=/usr/bin/python3
here=$(cd "$(dirname "$0")" && pwd)
unit="$FG_BUILD/tests/unit/test_report"

if [ ! -x "$CHROMIUM" ]; then
	echo "1..1"
	echo "ok 1 # SKIP chromium not installed"
	exit 0
fi

work=$(mktemp -d "${TMPDIR:-/tmp}/report_render.XXXXXX") || exit 1
trap 'rm -rf "$work"' EXIT INT TERM

n=0
failed=0
result() { # status description
	n=$((n + 1))
	if [ "$1" -eq 0 ]; then
		echo "ok $n - $2"
	else
		echo "not ok $n - $2"
		failed=$((failed + 1))
	fi
}

shoot() { # name file
	timeout 120 "$CHROMIUM" --headless --no-sandbox --disable-gpu --disable-quic \
		--no-first-run --disable-background-networking --disable-component-update \
		--disable-sync --user-data-dir="$work/profile-$1" --screenshot="$work/$1.png" \
		--window-size=1280,2400 "file://$2" >"$work/$1.chromium.log" 2>&1
}

echo "1..4"

FG_REPORT_OUT="$work/report.html" CMOCKA_MESSAGE_OUTPUT=TAP "$unit" >"$work/unit.log" 2>&1
st=$?
if [ "$st" -ne 0 ] || [ ! -s "$work/report.html" ]; then
	echo "# $unit (status $st) wrote no report; build it with: make $unit"
	sed 's/^/# /' "$work/unit.log" | tail -n 15
	st=1
fi
result "$st" "test_report writes the demo report to FG_REPORT_OUT"

st=1
if [ -s "$work/report.html" ] && shoot report "$work/report.html" && [ -s "$work/report.png" ]; then
	st=0
else
	sed 's/^/# /' "$work/report.chromium.log" 2>/dev/null | tail -n 10
fi
result "$st" "chromium renders the report to a screenshot"

st=1
if [ -s "$work/report.png" ]; then
	"$PY" "$here/report_png_check.py" "$work/report.png"
	st=$?
fi
result "$st" "the screenshot is not blank and shows every chart line colour"

printf '<!DOCTYPE html><html><body style="background:#fff"></body></html>\n' \
	>"$work/blank.html"
st=1
if shoot blank "$work/blank.html" && [ -s "$work/blank.png" ]; then
	if "$PY" "$here/report_png_check.py" "$work/blank.png" >"$work/blank.check" 2>&1; then
		echo "# the check passed a blank page:"
		sed 's/^/# /' "$work/blank.check"
	else
		st=0
	fi
fi
result "$st" "the same check rejects a blank page"

[ "$failed" -eq 0 ]
