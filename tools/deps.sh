#!/bin/sh
# deps.sh - install the Debian packages floodgauge needs, when they are missing.
#
#   deps.sh [build|run|test|fuzz|deb]    (default build)
#
#   build  what compiling needs (make, make bin)
#   run    build + mosquitto: what `make run` (the demo) needs, nothing more
#   test   run + the test tools: cmocka, mosquitto-clients, openssl (TLS test
#          certificates), python3 with python3-fluids (reference values),
#          chromium (the report rendering check), the packaging tools (the
#          test that builds the Debian package)
#   fuzz   build + clang (libFuzzer)
#   deb    build + the Debian packaging tools
#
# As root: runs apt-get (update once, then install) for whatever is missing.
# Otherwise: prints the one apt-get line to run and exits 0 when nothing is
# missing, 1 when something is (so `make` stops with a clear message).
set -eu

BUILD="gcc make pkg-config libmodbus-dev libpaho-mqtt-dev libinih-dev libcjson-dev \
libsystemd-dev"
case "${1:-build}" in
build) PKGS="$BUILD" ;;
run) PKGS="$BUILD mosquitto" ;;
test) PKGS="$BUILD mosquitto libcmocka-dev mosquitto-clients openssl python3 python3-fluids \
chromium debhelper dpkg-dev fakeroot lintian" ;;
fuzz) PKGS="$BUILD clang" ;;
deb) PKGS="$BUILD debhelper dpkg-dev fakeroot lintian" ;;
*)
	echo "usage: $0 [build|run|test|fuzz|deb]" >&2
	exit 2
	;;
esac

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
