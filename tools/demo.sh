#!/bin/sh
# demo.sh - `make run`: the demo plant, live.
#
# Starts `floodgauge feed` on 127.0.0.1:15020 replaying the bundled flooding
# upset (sped up DEMO_SPEED times, default 30), a local mosquitto on
# 127.0.0.1:18830 when mosquitto is installed and the port is free, and
# `floodgauge run` on configs/demo.ini with its live view. Everything it
# started is stopped on Ctrl-C or when the data ends.
set -u
FG=${FG_BIN:-build/floodgauge}
SPEED=${DEMO_SPEED:-30}
DATA=${DEMO_DATA:-replay/data/demo-flood.csv}
DIR=build/demo
CFG=configs/demo.ini
MQTT_PORT=18830
mkdir -p "$DIR"
feed_pid=""
broker_pid=""

cleanup() {
	[ -n "$feed_pid" ] && kill "$feed_pid" 2>/dev/null
	[ -n "$broker_pid" ] && kill "$broker_pid" 2>/dev/null
	wait 2>/dev/null
}
trap cleanup EXIT INT TERM

port_busy() { ss -ltn "sport = :$1" 2>/dev/null | grep -q LISTEN; }

if port_busy 15020; then
	echo "demo: 127.0.0.1:15020 is in use; stop what listens there first" >&2
	exit 1
fi

if command -v mosquitto >/dev/null 2>&1 || [ -x /usr/sbin/mosquitto ]; then
	if port_busy $MQTT_PORT; then
		echo "demo: port $MQTT_PORT is busy; assuming a broker is already there"
	else
		printf 'listener %s 127.0.0.1\nallow_anonymous true\npersistence false\n' \
			$MQTT_PORT >"$DIR/mosquitto.conf"
		MOSQ=$(command -v mosquitto || echo /usr/sbin/mosquitto)
		# Its own session: Ctrl-C must reach the daemon, not the broker it
		# still has to say "offline" to.
		setsid "$MOSQ" -c "$DIR/mosquitto.conf" >"$DIR/mosquitto.log" 2>&1 &
		broker_pid=$!
		for _ in $(seq 50); do port_busy $MQTT_PORT && break; sleep 0.1; done
		echo "demo: mosquitto on 127.0.0.1:$MQTT_PORT; watch it with"
		echo "      mosquitto_sub -h 127.0.0.1 -p $MQTT_PORT -t 'tarnwick/u40/floodgauge/#' -v"
	fi
else
	echo "demo: mosquitto is not installed: running without MQTT"
	awk '/^\[mqtt\]/{skip=1; next} /^\[/{skip=0} !skip' configs/demo.ini >"$DIR/demo-nomqtt.ini"
	CFG=$DIR/demo-nomqtt.ini
fi

setsid "$FG" feed -c "$CFG" "$DATA" --speed "$SPEED" >"$DIR/feed.log" 2>&1 &
feed_pid=$!
for _ in $(seq 50); do port_busy 15020 && break; sleep 0.1; done
echo "demo: plant stand-in serving $DATA at ${SPEED}x on 127.0.0.1:15020"
sleep 1

# The daemon runs in the foreground; when the feed ends, stop it.
"$FG" run -c "$CFG" &
run_pid=$!
( while kill -0 "$feed_pid" 2>/dev/null; do sleep 1; done
  sleep 3; kill -TERM "$run_pid" 2>/dev/null ) &
wait "$run_pid"
rc=$?
echo "demo: finished; alarm events in $DIR/events.jsonl"
exit $rc
