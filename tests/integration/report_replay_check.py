#!/usr/bin/python3
"""report_replay_check.py - checks a screenshot of a replay report.

Usage: report_replay_check.py PNG [--no-event]

Exit 0 when the picture shows what the report must draw for a section: the
load trend (gas and liquid load lines), the operating window (its flood limit
line and the trajectory's first and last colours) and the --event marker
(with --no-event: checks that the marker colour is absent, so the check is
seen to fail on a page without one). Colours are those of replay/report_html.c
and replay/report_window.c; tolerance and pixel counts as in
report_png_check.py (anti-aliasing keeps the middle of a stroke within a few
units per channel; 20 stays far from every other colour of the page).
"""
import os
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from report_png_check import read_png  # noqa: E402

TOLERANCE = 20
CHECKS = {
    # name: (colour, minimum pixels)
    "gas load trend": ((0xB5, 0x44, 0x6E), 150),
    "liquid load trend": ((0x7B, 0x5E, 0x2A), 150),
    "operating window flood limit": ((0x9B, 0x1D, 0x20), 150),
    # the trajectory's dots (r 2.2, about 15 pixels each) at the start and the end
    "window trajectory, first colour": ((0x25, 0x34, 0x94), 10),
    "window trajectory, last colour": ((0xED, 0xCF, 0x28), 10),
    "event marker": ((0xD4, 0x00, 0x7A), 150),
}


def main(argv):
    if len(argv) not in (2, 3):
        print("# usage: report_replay_check.py PNG [--no-event]")
        return 2
    no_event = len(argv) == 3 and argv[2] == "--no-event"
    w, h, pixels = read_png(argv[1])
    counts = {}
    for p in pixels:
        counts[p] = counts.get(p, 0) + 1
    problems = []
    for name, (ref, least) in CHECKS.items():
        n = sum(c for p, c in counts.items()
                if max(abs(p[0] - ref[0]), abs(p[1] - ref[1]), abs(p[2] - ref[2])) <= TOLERANCE)
        print("# %-34s #%02x%02x%02x: %d pixels" % (name, ref[0], ref[1], ref[2], n))
        if name == "event marker" and no_event:
            if n >= least:
                problems.append("event marker drawn on a page without --event")
        elif n < least:
            problems.append("%s: %d pixels, want >= %d" % (name, n, least))
    for p in problems:
        print("# " + p)
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
