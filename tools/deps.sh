#!/bin/sh
# deps.sh - install the Debian packages floodgauge needs, when they are missing.
#
# As root: runs apt-get (update once, then install) for whatever is missing.
# Otherwise: prints the one apt-get line to run and exits 0 when nothing is
# missing, 1 when something is (so `make` stops with a clear message).
set -eu

PKGS="gcc make pkg-config libmodbus-dev libpaho-mqtt-dev libinih-dev libcjson-dev \
libcmocka-dev mosquitto mosquitto-clients openssl python3 python3-fluids chromium"

missing=""
for p in $PKGS; do
	st=$(dpkg-query -W -f='${Status}' "$p" 2>/dev/null || true)
	case "$st" in
	*"install ok installed"*) ;;
	*) missing="$missing $p" ;;
	esac
done

[ -z "$missing" ] && exit 0

if [ "$(id -u)" = 0 ]; then
	echo "deps: installing:$missing"
	export DEBIAN_FRONTEND=noninteractive
	apt-get update -qq
	# shellcheck disable=SC2086
	apt-get install -y -qq $missing
	exit 0
fi

echo "deps: missing Debian packages:$missing"
echo "deps: run:  sudo apt-get install$missing"
exit 1
