#!/usr/bin/python3
"""report_png_check.py - checks a screenshot of the replay report.

Usage: report_png_check.py PNG

Exit 0 when the picture is a rendered report: the expected size, not blank
(enough non-background pixels and colours) and every chart line colour of
replay/report.c present in enough pixels. Exit 1 otherwise, with the reasons
on stdout as TAP diagnostics ("# ..."). Uses python3-pil when installed,
else decodes the PNG itself with zlib (8-bit RGB/RGBA, not interlaced, which
is what Chromium writes).
"""
import struct
import sys
import zlib

# Stroke colours of the chart series and the setpoint lines (report.c CSS).
LINE_COLOURS = {
    "flood_index": (0x1B, 0x4F, 0x9C),
    "flood_pct": (0xE0, 0x76, 0x1B),
    "dp_pa": (0x0D, 0x8A, 0x80),
    "dp_model_pa": (0x8E, 0x3F, 0xB0),
    "liquid_holdup_frac": (0x3C, 0x8D, 0x2F),
    "setpoint": (0xC0, 0x39, 0x2B),
}
# Anti-aliasing blends a 1.6 px stroke with its background; the middle of the
# stroke keeps its colour to within a few units per channel. 20 per channel
# accepts those pixels and stays far from every other colour of the page.
TOLERANCE = 20
# A line across a 1070 px plot covers about a thousand pixels; 150 is well
# below one line and far above chance matches in text or shading.
MIN_PIXELS = 150


def read_png_pure(path):
    with open(path, "rb") as f:
        data = f.read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise ValueError("not a PNG file")
    pos, idat, hdr = 8, [], None
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        pos += 12 + length
        if kind == b"IHDR":
            hdr = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat.append(body)
        elif kind == b"IEND":
            break
    w, h, depth, ctype, _, _, interlace = hdr
    if depth != 8 or ctype not in (2, 6) or interlace != 0:
        raise ValueError("unsupported PNG layout %r" % (hdr,))
    bpp = 3 if ctype == 2 else 4
    raw = zlib.decompress(b"".join(idat))
    stride = w * bpp
    rows, prev, i = [], bytearray(stride), 0
    for _ in range(h):
        ftype = raw[i]
        line = bytearray(raw[i + 1:i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if ftype == 1:
                line[x] = (line[x] + a) & 255
            elif ftype == 2:
                line[x] = (line[x] + b) & 255
            elif ftype == 3:
                line[x] = (line[x] + (a + b) // 2) & 255
            elif ftype == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pr = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[x] = (line[x] + pr) & 255
        rows.append(line)
        prev = line
    pixels = [tuple(r[x:x + 3]) for r in rows for x in range(0, stride, bpp)]
    return w, h, pixels


def read_png(path):
    try:
        from PIL import Image
    except ImportError:
        return read_png_pure(path)
    with Image.open(path) as im:
        rgb = im.convert("RGB")
        return rgb.width, rgb.height, list(rgb.getdata())


def main(argv):
    if len(argv) != 2:
        print("# usage: report_png_check.py PNG")
        return 2
    w, h, pixels = read_png(argv[1])
    problems = []
    if (w, h) != (1280, 2400):
        problems.append("size %dx%d, expected 1280x2400" % (w, h))
    counts = {}
    for p in pixels:
        counts[p] = counts.get(p, 0) + 1
    background, bg_count = max(counts.items(), key=lambda kv: kv[1])
    covered = 1.0 - bg_count / float(len(pixels))
    print("# background %s covers %.1f %%, %d colours" %
          ("#%02x%02x%02x" % background, 100 * (1 - covered), len(counts)))
    if covered < 0.10 or len(counts) < 200:
        problems.append("blank: %.1f %% of pixels differ from the background, %d colours"
                        % (100 * covered, len(counts)))
    for name, ref in LINE_COLOURS.items():
        n = sum(c for p, c in counts.items()
                if max(abs(p[0] - ref[0]), abs(p[1] - ref[1]), abs(p[2] - ref[2])) <= TOLERANCE)
        print("# %-20s #%02x%02x%02x: %d pixels" % (name, ref[0], ref[1], ref[2], n))
        if n < MIN_PIXELS:
            problems.append("line colour of %s: %d pixels, want >= %d" % (name, n, MIN_PIXELS))
    for p in problems:
        print("# " + p)
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
