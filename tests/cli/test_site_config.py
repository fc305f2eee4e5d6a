"""test_site_config.py - a site's own config: units, warnings and help that finds mistakes.

Each case edits the demo config the way a site would (or would by mistake)
and checks what `check`, `rate` and `replay` say, with FILE:LINE where the
config is at fault.
"""
import csv
import io
import math
import os
import re
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402

DEMO = "configs/demo.ini"
BASE = open(DEMO).read()
tmp = tempfile.mkdtemp(prefix="fg-site-")


def cfg(name, text):
    p = os.path.join(tmp, name)
    open(p, "w").write(text)
    return p


def line_of(path, startswith, after=None):
    lines = open(path).read().splitlines()
    start = 0
    if after is not None:
        start = next(i for i, x in enumerate(lines) if x.strip() == after)
    for i in range(start, len(lines)):
        if lines[i].startswith(startswith):
            return i + 1
    return -1


def check(path):
    rc, so, se = fg("check", "-c", path)
    return rc, so + se


# --- a level in % of span
pct = BASE.replace("[tag.R404_LI]\nsource = plc40\ntable = input\naddress = 32\ntype = float32\n"
                   "unit = m\nmin = 0\nmax = 12\nnominal = 8\n",
                   "[tag.R404_LI]\nsource = plc40\ntable = input\naddress = 32\ntype = float32\n"
                   "unit = %\nmin = 0\nmax = 100\nnominal = 66.6667\n")
ok(pct != BASE, "test set-up: the demo's R404_LI block found")
p = cfg("pct.ini", pct)
rc, out = check(p)
ln = line_of(p, "[tag.R404_LI]")
ok(rc == 0 and f"{p}:{ln}: warning: level tag R404_LI of [section.R404] is in % of span without "
   "span_m" in out and "it uses clear_liquid_height_m instead" in out,
   "% level without span: accepted; check names the level swell falling back", out)
p_span = cfg("pct-span.ini", pct.replace("nominal = 66.6667\n", "nominal = 66.6667\nspan_m = 12\n"))
rc, out = check(p_span)
ok(rc == 0 and "warning" not in out, "% level with span_m: no warning", out)

# The same data with the level written in % of a 12 m span (zero 0) gives
# R404's results as the level in metres did.
src = list(csv.reader(open("replay/data/demo-steady.csv")))[:1801]
k = src[0].index("R404_LI")
conv = [src[0]] + [r[:k] + [repr(float(r[k]) * 100.0 / 12.0)] + r[k + 1:] for r in src[1:]]
buf = io.StringIO()
csv.writer(buf, lineterminator="\n").writerows(conv)
open(os.path.join(tmp, "pct.csv"), "w").write(buf.getvalue())
open(os.path.join(tmp, "m.csv"), "w").write("\n".join(",".join(r) for r in src) + "\n")
rc1, so1, se1 = fg("replay", "-c", DEMO, os.path.join(tmp, "m.csv"), "--out", os.path.join(tmp, "rm"))
rc2, so2, se2 = fg("replay", "-c", p_span, os.path.join(tmp, "pct.csv"), "--out",
                   os.path.join(tmp, "rp"))
ok(rc1 == 0 and rc2 == 0, "replays in m and in % run", se1 + se2)


def column(out, name):
    rows = list(csv.reader(open(os.path.join(tmp, out, "results.csv"))))
    i = rows[0].index(name)
    return [float(r[i]) if r[i] else math.nan for r in rows[1:]]


a, b = column("rm", "R404.expanded_level_m"), column("rp", "R404.expanded_level_m")
# x * 100 / 12 and back: a few ulps apart in the engine (float64 rounding),
# so results.csv's 12-digit texts are the same or one unit of the 12th
# digit apart: 1e-11 relative at most.
worst = max(abs(x - y) / abs(x) for x, y in zip(a, b))
ok(len(a) == 1800 and worst <= 1e-11, f"R404 expanded level equal within 1e-11 (worst {worst:.1e})")
# Without span_m the level cannot be metres: the bubble model falls back to
# clear_liquid_height_m (8.0 m in the demo) and says nothing false.
rc3, so3, se3 = fg("replay", "-c", p, os.path.join(tmp, "pct.csv"), "--out", os.path.join(tmp, "rn"))
# The expanded level is h0 / (1 - eps): with h0 = 8.0 m instead of the measured
# level L, each row scales by 8.0 / L (eps is the same: same gas rates).
c = column("rn", "R404.expanded_level_m")
lv = [float(r[k]) for r in src[1:]]
dev = max(abs(ci / ai - 8.0 / li) for ci, ai, li in zip(c, a, lv))
ok(rc3 == 0 and dev < 1e-9, f"without span_m the level swell uses clear_liquid_height_m "
   f"(expanded level x 8.0/L, worst {dev:.1e})")
p_bad = cfg("span-on-m.ini", BASE.replace("unit = m\nmin = 0\nmax = 12\n",
                                          "unit = m\nmin = 0\nmax = 12\nspan_m = 12\n"))
rc, out = check(p_bad)
ok(rc == 2 and f"{p_bad}:{line_of(p_bad, '[tag.R404_LI]')}: [tag.R404_LI]: span_m and zero_m are for a "
   "level in % of span" in out, "span_m on a metre tag: refused at FILE:LINE", out)

# --- check warnings
p = cfg("field.ini", BASE.replace("[alarm.C402_FLOOD_RATE]", "[alarm.C402_WEEP_L]\nsection = C402\n"
                                  "signal = weep_pct\nkind = low\nsetpoint = 110\n\n"
                                  "[alarm.C402_FLOOD_RATE]"))
rc, out = check(p)
ok(rc == 0 and f"{p}:{line_of(p, 'signal = weep_pct', '[alarm.C402_WEEP_L]')}: warning: "
   "[alarm.C402_WEEP_L] watches weep_pct, which a packed section never has" in out,
   "weep_pct on a packed section: warning at the signal line", out)
hh = BASE.split("[alarm.C401_FLOOD_HH]")[1].split("[alarm.")[0]
sp = re.search(r"setpoint = (\S+)", hh).group(1)
p = cfg("hh.ini", BASE.replace("[alarm.C401_FLOOD_HH]" + hh,
                               "[alarm.C401_FLOOD_HH]" + hh.replace("setpoint = " + sp,
                                                                    "setpoint = 85")))
rc, out = check(p)
ok(rc == 0 and f"{p}:{line_of(p, '[alarm.C401_FLOOD_HH]')}: warning: [alarm.C401_FLOOD_HH] "
   "high-high setpoint 85 is not above the high setpoint 85" in out,
   "high-high not above high: warning at its header", out)
p = cfg("reg.ini", BASE.replace("[tag.R404_LI]\nsource = plc40\ntable = input\naddress = 32\n",
                                "[tag.R404_LI]\nsource = plc40\ntable = input\naddress = 31\n"))
rc, out = check(p)
ok(rc == 0 and re.search(re.escape(p) + r":\d+: warning: \[tag\.R404_\w+\] reads input register "
                         r"3[12], as \[tag\.R404_\w+\] \(line \d+\) does on source plc40", out),
   "two tags on one register: warning", out)
rc, out = check(DEMO)
ok(rc == 0 and "warning" not in out, "the demo config has no warning", out)

# --- did you mean
p = cfg("key.ini", BASE.replace("nominal = 8\n", "nominal = 8\nfozen_s = 300\n", 1))
rc, out = check(p)
ok(rc == 2 and re.search(re.escape(p) + r":\d+: unknown key 'fozen_s' in \[tag\.R404_LI\] "
                         r"\(did you mean 'frozen_s'\?\)", out), "mistyped tag key: suggestion", out)
p = cfg("seckey.ini", BASE.replace("tap_spacing_m = 4.0", "tap_spacing = 4.0"))
rc, out = check(p)
ok(rc == 2 and "unknown key 'tap_spacing' in [section.R404] (did you mean 'tap_spacing_m'?)" in out,
   "mistyped section key: suggestion", out)
p = cfg("tag.ini", BASE.replace("level = R404_LI", "level = R404_L1"))
rc, out = check(p)
ok(rc == 2 and f"{p}:{line_of(p, 'level = R404_L1')}: level: tag 'R404_L1' is not defined "
   "(did you mean 'R404_LI'?)" in out, "mistyped tag: suggestion at FILE:LINE", out)
p = cfg("sec.ini", BASE.replace("section = C401\nsignal = flood_index\nkind = high\n",
                                "section = C410\nsignal = flood_index\nkind = high\n", 1))
rc, out = check(p)
ok(rc == 2 and "section 'C410' is not defined (did you mean 'C401'?)" in out,
   "mistyped section in an alarm: suggestion", out)
p = cfg("fld.ini", BASE.replace("signal = flood_index\nkind = high\nsetpoint = 85",
                                "signal = flood_idx\nkind = high\nsetpoint = 85", 1))
rc, out = check(p)
ok(rc == 2 and "'flood_idx' is not a result field (did you mean 'flood_index'?)" in out,
   "mistyped result field: suggestion", out)
p = cfg("hdr.ini", BASE.replace("[tag.R404_LI]", "[tags.R404_LI]"))
rc, out = check(p)
ok(rc == 2 and "unknown section [tags.R404_LI] (did you mean [tag.R404_LI]?)" in out,
   "mistyped header kind: suggestion", out)
rc, so, se = fg("rate", "-c", DEMO)
ok(rc == 2 and "give --section NAME" in se and "C401 (tray) C402 (packed)" in se,
   "rate without --section says so and lists the sections", se)
rc, so, se = fg("rate", "-c", DEMO, "--section", "C410")
ok(rc == 2 and "(did you mean 'C401'?)" in se and "sections in" in se,
   "rate --section mistyped: suggestion and the list", se)
rc, so, se = fg("rate", "-c", DEMO, "--section", "C401", "--set", "C401_PDII=3")
ok(rc == 2 and "(did you mean 'C401_PDI'?)" in se, "rate --set mistyped tag: suggestion", se)

rc, so, se = fg("tune", "-c", DEMO, os.path.join(tmp, "m.csv"), "--alarm", "C401_FLOD_H")
ok(rc == 2 and "(did you mean 'C401_FLOOD_H'?)" in se, "tune --alarm mistyped: suggestion", se)

shutil.rmtree(tmp)
done()
