#!/bin/sh
# run.sh - runs every floodgauge test and prints one summary line.
#
# Every test program speaks TAP ("ok N - name" / "not ok N - name"): the cmocka
# binaries through CMOCKA_MESSAGE_OUTPUT=TAP, the python and shell tests by
# themselves. A program that exits non-zero without reporting a failure, or
# reports no test at all, counts as one failure. Logs: $FG_BUILD/test-logs/.
set -u

: "${FG_BUILD:=build}"
: "${FG_BIN:=$FG_BUILD/floodgauge}"
: "${FG_REF_SO:=build/ref/libfgmodels.so}"
export FG_BUILD FG_BIN FG_REF_SO
export CMOCKA_MESSAGE_OUTPUT=TAP
PY=/usr/bin/python3

logs="$FG_BUILD/test-logs"
rm -rf "$logs"
mkdir -p "$logs"
passed=0
failed=0
failed_names=""

run_one() { # name command...
	name=$1
	shift
	log="$logs/$(echo "$name" | tr '/' '_').log"
	# A hung network test must not stall the suite: 300 s is ten times the
	# slowest program's normal run.
	timeout 300 "$@" >"$log" 2>&1
	rc=$?
	ok=$(grep -c '^ok ' "$log")
	# cmocka prints a skip as "not ok N # SKIP": count it as neither.
	nok=$(grep '^not ok ' "$log" | grep -vc '# SKIP')
	if [ "$rc" -ne 0 ] && [ "$nok" -eq 0 ]; then
		nok=1
		echo "not ok - $name exited with status $rc" >>"$log"
	fi
	if [ "$ok" -eq 0 ] && [ "$nok" -eq 0 ]; then
		nok=1
		echo "not ok - $name ran no test" >>"$log"
	fi
	passed=$((passed + ok))
	failed=$((failed + nok))
	if [ "$nok" -eq 0 ]; then
		printf 'PASS %-40s %4d\n' "$name" "$ok"
	else
		printf 'FAIL %-40s %4d passed, %d failed (log: %s)\n' "$name" "$ok" "$nok" "$log"
		grep -E '^not ok|^# ' "$log" | head -n 20 | sed 's/^/     /'
		failed_names="$failed_names $name"
	fi
}

for t in "$FG_BUILD"/tests/unit/test_* "$FG_BUILD"/tests/ref/test_*; do
	case "$t" in *.d) continue ;; esac
	[ -x "$t" ] || continue
	run_one "${t#"$FG_BUILD"/tests/}" "$t"
done

for t in tests/ref/*.py; do
	[ -f "$t" ] || continue
	run_one "${t#tests/}" "$PY" "$t"
done

for t in tests/cli/*.sh tests/cli/test_*.py tests/integration/*.sh tests/integration/test_*.py; do
	[ -f "$t" ] || continue
	case "$t" in
	*.py) run_one "${t#tests/}" "$PY" "$t" ;;
	*) run_one "${t#tests/}" sh "$t" ;;
	esac
done

echo
[ -n "$failed_names" ] && echo "failed:$failed_names"
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
