#!/bin/sh
# bench.sh - `make bench`: performance figures, printed, never asserted.
#
# Generates a day of 1 s demo data (86 400 rows, all four sections) with
# `simulate`, then times `replay` over it: rows per second and microseconds
# per row (CSV read + engine step + results.csv + report), best of three.
set -eu
FG=${FG_BIN:-build/floodgauge}
DIR=$(mktemp -d /tmp/floodgauge-bench-XXXXXX)
trap 'rm -rf "$DIR"' EXIT
"$FG" simulate -c configs/demo.ini --scenario flood --hours 24 --period-s 1 \
	--out "$DIR/day.csv" 2>/dev/null
rows=$(($(wc -l <"$DIR/day.csv") - 1))
bytes=$(wc -c <"$DIR/day.csv")
best=""
for i in 1 2 3; do
	t0=$(date +%s.%N)
	"$FG" replay -c configs/demo.ini "$DIR/day.csv" --out "$DIR/out" >/dev/null
	t1=$(date +%s.%N)
	t=$(echo "$t1 - $t0" | bc -l 2>/dev/null || awk "BEGIN{print $t1 - $t0}")
	if [ -z "$best" ] || [ "$(awk "BEGIN{print ($t < $best)}")" = 1 ]; then best=$t; fi
done
awk -v r="$rows" -v b="$bytes" -v t="$best" 'BEGIN {
	printf "replay: %d rows (%.1f MB), best of 3: %.3f s, %.0f rows/s, %.1f us/row\n",
		r, b / 1e6, t, r / t, t / r * 1e6 }'
out=$(du -k "$DIR/out/results.csv" | cut -f1)
echo "results.csv: ${out} KiB"
