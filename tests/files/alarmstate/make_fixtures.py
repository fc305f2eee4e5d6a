#!/usr/bin/python3
"""Writes the alarm state file fixtures of tests/unit/test_alarmstate.c.

Run with Debian's /usr/bin/python3 from the repository root. The checksums are
computed here with zlib.crc32, an implementation independent of
monitor/alarmstate.c, so the "good" fixtures also check our CRC-32 and our
reading of the format described in monitor/alarmstate.h. Names are of an
invented column, T1.
"""
import os
import zlib

HERE = os.path.dirname(os.path.abspath(__file__))

# 2026-01-01T00:00:00Z and a shelve expiry one hour later, ms since the epoch.
SAVED = 1767225600000
UNTIL = SAVED + 3600 * 1000

ALARMS = [
    "alarm UNACK active=1 unacked=1 shelved=0 until_t_ms=0 oos=0 dsupr=0 name=T1_flood_hi\n",
    "alarm SHLVD active=1 unacked=0 shelved=1 until_t_ms=%d oos=0 dsupr=0 name=T1_weep_lo\n"
    % UNTIL,
    "alarm OOSRV active=0 unacked=0 shelved=0 until_t_ms=0 oos=1 dsupr=0 name=T1 dp diag\n",
]


def body(version, alarms):
    return "floodgauge-alarmstate %d\nsaved_t_ms %d\ncount %d\n%s" % (
        version, SAVED, len(alarms), "".join(alarms))


def framed(text):
    return text + "crc32 0x%08x\n" % zlib.crc32(text.encode("ascii"))


def write(name, text):
    with open(os.path.join(HERE, name), "w", encoding="ascii", newline="\n") as f:
        f.write(text)


def main():
    good = framed(body(1, ALARMS))
    write("good.state", good)
    # Cut in the middle of the second alarm line: no checksum line at the end.
    cut = good.index("name=T1_weep_lo")
    write("truncated.state", good[:cut])
    # One digit of the shelve expiry changed after the checksum was taken.
    write("bad_checksum.state", good.replace(str(UNTIL), str(UNTIL + 1)))
    write("wrong_version.state", framed(body(2, ALARMS)))
    extra = ALARMS + [
        "alarm ACKED active=1 unacked=0 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
        "name=T1_retired_hi\n"]
    write("unknown_name.state", framed(body(1, extra)))


if __name__ == "__main__":
    main()
