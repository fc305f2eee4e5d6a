#!/bin/sh
# make-demo-data.sh - regenerates the demo data sets in replay/data/ from
# configs/demo.ini and configs/demo-contactors.ini with `floodgauge simulate`
# (see replay/data/README.md).
#
#   sh tools/make-demo-data.sh          (from the repository root)
#
# FG_BIN names the floodgauge binary (default build/floodgauge, built with
# `make bin` when missing). Every set uses seed 1 and 2 s rows; the summary
# line of each run (flood point, weep times, windows) goes to
# replay/data/README.md by hand when the models change.
set -eu

: "${FG_BIN:=build/floodgauge}"
CONFIG=configs/demo.ini
OUT=replay/data
SEED=1
PERIOD_S=2

if [ ! -x "$FG_BIN" ]; then
	make --no-print-directory bin
fi
if ! "$FG_BIN" simulate --help >/dev/null 2>&1; then
	echo "make-demo-data: $FG_BIN has no working 'simulate' command" >&2
	exit 1
fi
mkdir -p "$OUT"
for scenario in steady flood weep frozen gap; do
	"$FG_BIN" simulate -c "$CONFIG" --scenario "$scenario" --seed "$SEED" \
		--period-s "$PERIOD_S" --out "$OUT/demo-$scenario.csv"
done
# The historian examples ("Bringing your plant's data" in the README): one
# frozen-DP run across the autumn clock change, with two historian status
# texts, written as a wide export in local time and as a long export, with
# the config lines a site adds (replay/data/historian.ini).
"$FG_BIN" simulate -c "$CONFIG" --scenario frozen --seed "$SEED" --period-s 10 --hours 3 \
	--start 2026-10-24T23:30:00Z --out "$OUT/.historian-src.csv"
python3 tools/historian-forms.py --config "$CONFIG" --in "$OUT/.historian-src.csv" \
	--tz Europe/Berlin --out-wide "$OUT/historian-wide-local.csv" \
	--out-long "$OUT/historian-long.csv" --out-config "$OUT/historian.ini" \
	--bad "C401_PDI,2026-10-25T00:40:00Z,2026-10-25T00:42:00Z,Bad Input" \
	--bad "C402_FI_GAS,2026-10-25T02:00:00Z,2026-10-25T02:00:40Z,I/O Timeout"
rm -f "$OUT/.historian-src.csv"
# The high-holdup contactors of the same unit: packed bubble column, stirred
# vessel, airlift loop.
CONTACTORS=configs/demo-contactors.ini
for scenario in impeller-flood loop-stall; do
	"$FG_BIN" simulate -c "$CONTACTORS" --scenario "$scenario" --seed "$SEED" \
		--period-s "$PERIOD_S" --out "$OUT/demo-$scenario.csv"
done
"$FG_BIN" simulate -c "$CONTACTORS" --scenario flood --seed "$SEED" \
	--period-s "$PERIOD_S" --out "$OUT/demo-packed-bubble-flood.csv"
ls -l "$OUT"/demo-*.csv "$OUT"/historian*
