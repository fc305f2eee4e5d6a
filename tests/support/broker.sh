#!/bin/sh
# broker.sh - a throw-away mosquitto test broker on 127.0.0.1.
#
#   broker.sh start DIR [PORT]   write DIR/conf, start /usr/sbin/mosquitto on
#                                PORT or on a free port picked here, wait until
#                                it listens (ss -ltn), print the port; DIR/pid,
#                                DIR/port and DIR/log are left for stop and for
#                                post-mortems. Exit 0, or 1 when no broker came up.
#   broker.sh stop DIR           stop that broker by its pid (TERM, then KILL
#                                after 5 s), wait until it is gone. Exit 0 also
#                                when it was not running.
#
# Listens on 127.0.0.1 only, anonymous clients allowed, no persistence. The
# readiness check is the listening socket, not the log (mosquitto's stdout to a
# file is block-buffered). Everything it starts is stopped by `stop`.
set -u

MOSQUITTO=${MOSQUITTO:-/usr/sbin/mosquitto}

usage() {
	echo "usage: $0 start DIR [PORT] | stop DIR" >&2
	exit 2
}

listening() { # port
	ss -ltnH "sport = :$1" 2>/dev/null | grep -q .
}

alive() { # pid; a zombie (our own child that exited) counts as gone
	kill -0 "$1" 2>/dev/null || return 1
	[ "$(cut -d' ' -f3 "/proc/$1/stat" 2>/dev/null)" != Z ]
}

random_port() { # 20000..31999: below Linux's ephemeral range (32768..60999)
	n=$(od -An -N2 -tu2 /dev/urandom | tr -d ' ')
	echo $((20000 + n % 12000))
}

try_start() { # dir port -> 0 when listening
	dir=$1
	port=$2
	cat >"$dir/conf" <<EOF
listener $port 127.0.0.1
allow_anonymous true
persistence false
log_dest stdout
EOF
	"$MOSQUITTO" -c "$dir/conf" >>"$dir/log" 2>&1 &
	pid=$!
	i=0
	while [ $i -lt 100 ]; do
		if ! alive "$pid"; then
			return 1 # exited: most likely the port was taken meanwhile
		fi
		if listening "$port"; then
			echo "$pid" >"$dir/pid"
			echo "$port" >"$dir/port"
			return 0
		fi
		sleep 0.05
		i=$((i + 1))
	done
	kill "$pid" 2>/dev/null
	return 1
}

start() { # dir [port]
	dir=$1
	want=${2:-}
	[ -x "$MOSQUITTO" ] || { echo "broker.sh: $MOSQUITTO not installed" >&2; exit 1; }
	mkdir -p "$dir" || exit 1
	if [ -f "$dir/pid" ] && alive "$(cat "$dir/pid")"; then
		echo "broker.sh: a broker from $dir is still running" >&2
		exit 1
	fi
	if [ -n "$want" ]; then
		try_start "$dir" "$want" && { echo "$want"; exit 0; }
		echo "broker.sh: could not start on port $want (log: $dir/log)" >&2
		exit 1
	fi
	attempt=0
	while [ $attempt -lt 20 ]; do
		port=$(random_port)
		if ! listening "$port" && try_start "$dir" "$port"; then
			echo "$port"
			exit 0
		fi
		attempt=$((attempt + 1))
	done
	echo "broker.sh: no broker came up (log: $dir/log)" >&2
	exit 1
}

stop() { # dir
	dir=$1
	[ -f "$dir/pid" ] || exit 0
	pid=$(cat "$dir/pid")
	if alive "$pid"; then
		kill "$pid"
		i=0
		while alive "$pid" && [ $i -lt 100 ]; do
			sleep 0.05
			i=$((i + 1))
		done
		if alive "$pid"; then
			kill -9 "$pid" 2>/dev/null
			while alive "$pid"; do sleep 0.05; done
		fi
	fi
	rm -f "$dir/pid"
	exit 0
}

[ $# -ge 2 ] || usage
case "$1" in
start) [ $# -le 3 ] || usage; start "$2" "${3:-}" ;;
stop) [ $# -eq 2 ] || usage; stop "$2" ;;
*) usage ;;
esac
