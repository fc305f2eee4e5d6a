#!/bin/sh
# report_replay_render.sh - replays the bundled flood set with an --event,
# renders the report in headless Chromium and checks the screenshot: the load
# trend, the operating window and the event marker are drawn. The same page
# replayed without --event must fail the marker check. Prints TAP.
#
# Chromium opens a local file only; it listens on nothing, and the flags
# below keep it off the network. The first section (C401) fills the first
# 4000 pixels of a 1280 px wide page.
set -u

: "${FG_BIN:=build/floodgauge}"
CHROMIUM=/usr/bin/chromium
PY=/usr/bin/python3
here=$(cd "$(dirname "$0")" && pwd)

if [ ! -x "$CHROMIUM" ]; then
	echo "1..1"
	echo "ok 1 # SKIP chromium not installed"
	exit 0
fi

work=$(mktemp -d "${TMPDIR:-/tmp}/report_replay.XXXXXX") || exit 1
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
		--window-size=1280,4000 "file://$2" >"$work/$1.chromium.log" 2>&1
}

echo "1..6"

"$FG_BIN" replay -c configs/demo.ini replay/data/demo-flood.csv --out "$work/ev" \
	--event "2026-03-02T09:06:56Z=flood point" >"$work/ev.log" 2>&1
st=$?
result "$st" "replay with --event writes the report"

st=1
if shoot ev "$work/ev/report.html" && [ -s "$work/ev.png" ]; then
	st=0
else
	sed 's/^/# /' "$work/ev.chromium.log" | tail -n 10
fi
result "$st" "chromium renders the report"

st=1
[ -s "$work/ev.png" ] && "$PY" "$here/report_replay_check.py" "$work/ev.png" && st=0
result "$st" "the screenshot shows the load trend, the operating window and the event marker"

"$FG_BIN" replay -c configs/demo.ini replay/data/demo-flood.csv --out "$work/noev" \
	>"$work/noev.log" 2>&1 && shoot noev "$work/noev/report.html"
st=$?
result "$st" "the same replay without --event renders"

st=1
if [ -s "$work/noev.png" ]; then
	if "$PY" "$here/report_replay_check.py" "$work/noev.png" >"$work/noev.check" 2>&1; then
		echo "# the check passed a page without an event marker:"
		sed 's/^/# /' "$work/noev.check"
	else
		st=0
	fi
fi
result "$st" "the same check fails on the page without --event (it can fail)"

st=1
[ -s "$work/noev.png" ] && "$PY" "$here/report_replay_check.py" "$work/noev.png" --no-event && st=0
result "$st" "without --event: no marker drawn, load trend and operating window still there"

[ "$failed" -eq 0 ]
