"""test_historian.py - historian exports as they come (replay's shared reader).

The same invented data (a frozen-DP run of the demo plant across the autumn
clock change in Europe/Berlin, 2026-10-25 03:00 CEST -> 02:00 CET, with two
historian status texts) is written three ways by tools/historian-forms.py:
wide UTC, wide in local time with the historian's column names, and long
with a status column. The local times come from Python's zoneinfo, an
implementation independent of floodgauge's zoneinfo reader. All three must
give byte-identical results.csv and events.jsonl, in UTC. Then each refusal
and warning of the reader and of its config keys.
"""
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402

DEMO = "configs/demo.ini"
tmp = tempfile.mkdtemp(prefix="fg-historian-")
BAD = ["C401_PDI,2026-10-25T00:40:00Z,2026-10-25T00:42:00Z,Bad Input",
       "C402_FI_GAS,2026-10-25T02:00:00Z,2026-10-25T02:00:40Z,I/O Timeout"]


def path(name):
    return os.path.join(tmp, name)


def replay(cfg, data, out, *extra):
    rc, so, se = fg("replay", "-c", cfg, data, "--out", path(out), *extra)
    ev = []
    p = os.path.join(path(out), "events.jsonl")
    if os.path.exists(p):
        ev = [json.loads(x) for x in open(p) if x.strip()]
    return rc, so, se, ev


def same_outputs(a, b):
    return all(open(os.path.join(path(a), f), "rb").read() ==
               open(os.path.join(path(b), f), "rb").read()
               for f in ("results.csv", "events.jsonl"))


def write_config(name, text):
    open(path(name), "w").write(text)
    return path(name)


# --- the same data three ways
rc, so, se = fg("simulate", "-c", DEMO, "--scenario", "frozen", "--seed", "1", "--period-s", "10",
                "--hours", "3", "--start", "2026-10-24T23:30:00Z", "--out", path("src.csv"))
ok(rc == 0, "simulate across the autumn clock change", se)
args = [sys.executable, "tools/historian-forms.py", "--config", DEMO, "--in", path("src.csv"),
        "--tz", "Europe/Berlin", "--out-utc", path("utc.csv"), "--out-wide", path("wide.csv"),
        "--out-long", path("long.csv"), "--out-config", path("site.ini")]
for b in BAD:
    args += ["--bad", b]
p = subprocess.run(args, capture_output=True, text=True)
ok(p.returncode == 0, "historian-forms.py writes the three forms", p.stderr)
SITE = path("site.ini")

rc, so, se, ev_utc = replay(DEMO, path("utc.csv"), "r-utc")
ok(rc == 0, "wide UTC replays", se)
rc, so, se, ev_wide = replay(SITE, path("wide.csv"), "r-wide", "--tz", "Europe/Berlin")
ok(rc == 0 and "rows skipped: 0 malformed, 0 out of time order, 0 duplicate" in so,
   "wide local (repeated hour included) replays with no row skipped", so + se)
rc, so, se, ev_long = replay(SITE, path("long.csv"), "r-long")
ok(rc == 0 and "rows used 1080" in so, "long form gives one row per time stamp (1080)", so + se)
ok(same_outputs("r-utc", "r-wide"), "wide local == wide UTC: results and events, byte for byte")
ok(same_outputs("r-utc", "r-long"), "long == wide UTC: results and events, byte for byte")
ok(all(e["t"].endswith("Z") for e in ev_long), "event times are UTC", ev_long)
res = open(os.path.join(path("r-long"), "results.csv")).read().splitlines()
ok(res[1].startswith("2026-10-24T23:30:00") and res[-1].startswith("2026-10-25T02:29:50"),
   "results run 23:30Z to 02:29:50Z (the local hour 02:xx twice)", (res[1][:24], res[-1][:24]))
frozen = [e for e in ev_long if e["state"] == "unacknowledged" and e.get("reason") == "frozen"]
ok(len(frozen) == 1 and frozen[0]["alarm"] == "C402_DIAG", "the frozen DP is still found", ev_long)
hist = {e["alarm"]: e for e in ev_long
        if e["state"] == "unacknowledged" and e.get("reason") == "historian_status"}
ok(hist.get("C401_DIAG", {}).get("status_text") == "Bad Input",
   "'Bad Input' (status column) -> C401_DIAG, reason historian_status, status_text kept", hist)
ok(hist.get("C402_DIAG", {}).get("status_text") == "I/O Timeout",
   "'I/O Timeout' (text in the value cell) -> C402_DIAG with its status_text", hist)
# on_delay_s = 10 in the demo config: raised at the second bad sample
ok(hist.get("C401_DIAG", {}).get("t") == "2026-10-25T00:40:10Z", "raised after its on-delay",
   hist.get("C401_DIAG"))
ok(not any(e["kind"] != "diagnostic" for e in ev_long), "no process alarm from bad samples",
   ev_long)

# [replay] tz in the config does what --tz does
cfg_tz = write_config("site-tz.ini", open(SITE).read().replace(
    "# tz = Europe/Berlin", "tz = Europe/Berlin"))
rc, so, se, ev = replay(cfg_tz, path("wide.csv"), "r-cfgtz")
ok(rc == 0 and same_outputs("r-utc", "r-cfgtz"), "[replay] tz = Europe/Berlin == --tz", se)
# Without a zone the same local file is read as UTC, an hour or two off, and
# the repeated hour goes back in time.
rc, so, se, ev = replay(SITE, path("wide.csv"), "r-notz")
ok(rc == 0 and re.search(r"rows skipped: 0 malformed, 3\d\d out of time order", so),
   "without --tz the repeated local hour is out of order", so)

# --- command-line times: minutes, local zone, gap
rc, so, se, ev = replay(SITE, path("long.csv"), "r-win", "--from", "2026-10-25T00:30Z",
                        "--to", "2026-10-25 02:30", "--tz", "Europe/Berlin")
ok(rc == 0 and "from 2026-10-25T00:30:00Z to 2026-10-25T00:30:00Z" in so,
   "--from 00:30Z (no seconds) and --to 02:30 local (first pass: 00:30Z)", so + se)
rc, so, se, ev = replay(SITE, path("long.csv"), "r-win2", "--from", "2026-10-25 02:59",
                        "--tz", "Europe/Berlin")
ok(rc == 0 and "from 2026-10-25T00:59:00Z" in so, "--from in the repeated hour: first pass",
   so + se)
rc, so, se, ev = replay(SITE, path("long.csv"), "r-gap", "--from", "2026-03-29 02:30",
                        "--tz", "Europe/Berlin")
ok(rc == 2 and "daylight-saving gap" in se and "--from" in se,
   "--from in the spring gap: exit 2, said so", se)
rc, so, se, ev = replay(SITE, path("long.csv"), "r-badzone", "--tz", "Europe/Tarnwick")
ok(rc == 2 and "Europe/Tarnwick" in se and "not installed" in se, "unknown --tz: exit 2", se)
rc, so, se, ev = replay(SITE, path("long.csv"), "r-badtime", "--from", "08:00")
ok(rc == 2 and "--from '08:00' is not a time" in se, "--from without a date: exit 2", se)

# --- a spring-gap time inside the data is a skipped row with its line
lines = open(path("wide.csv")).read().splitlines()
lines[5] = re.sub(r"2026-10-2\d \d\d:\d\d:\d\d", "2026-03-29 02:30:00", lines[5])
open(path("gap.csv"), "w").write("\n".join(lines) + "\n")
rc, so, se, ev = replay(SITE, path("gap.csv"), "r-gaprow", "--tz", "Europe/Berlin")
ok(rc == 0 and re.search(r"gap\.csv:6: malformed row skipped: local time in the daylight-saving gap",
                         se), "a data row in the spring gap is skipped with its line", se)

# --- a column the config needs but the file lacks: warning, tags missing, run goes on
hdr = lines[0].split(",")
k = hdr.index("U40.C401.FI.GAS.PV")
cut = [",".join(x.split(",")[:k] + x.split(",")[k + 1:]) for x in lines]
open(path("cut.csv"), "w").write("\n".join(cut) + "\n")
rc, so, se, ev = replay(SITE, path("cut.csv"), "r-cut", "--tz", "Europe/Berlin")
ok(rc == 0 and "no column for 1 tag" in se and "C401_FI_GAS (column 'U40.C401.FI.GAS.PV')" in se,
   "missing column: warning names the tag and its column; exit 0", se)
mc = [e for e in ev if e["alarm"] == "C401_DIAG" and e["state"] == "unacknowledged"]
ok(len(mc) == 1 and mc[0]["reason"] == "missing_column", "C401_DIAG with reason missing_column", ev)
res = open(os.path.join(path("r-cut"), "results.csv")).read().splitlines()
hdr_r = res[1 - 1].split(",")
q = hdr_r.index("C401.quality") if "C401.quality" in hdr_r else None
ok(q is not None and all(r.split(",")[q] == "bad" for r in res[1:]),
   "C401 is bad for the whole run (gas flow is required)", hdr_r[:8])
ok(any(e["section"] == "C402" and e.get("reason") == "frozen" for e in ev),
   "the other sections go on", ev)
cfg_t = write_config("site-time.ini", open(SITE).read().replace("time_column = Time Stamp",
                                                                "time_column = time"))
rc, so, se, ev = replay(cfg_t, path("utc.csv"), "r-none")
ok(rc == 2 and "no column for any tag" in se and "column =" in se,
   "a file with no column for any tag: exit 2, pointing at column =", se)

# --- tune reads through the same reader: the same candidates from every form
tune_out = []
for cfgp, data, extra in ((DEMO, path("utc.csv"), []),
                          (SITE, path("wide.csv"), ["--tz", "Europe/Berlin"]),
                          (SITE, path("long.csv"), [])):
    rc, so, se = fg("tune", "-c", cfgp, data, "--alarm", "C402_DIAG", "--on-delay", "0:60:30",
                    "--json", *extra)
    tune_out.append((rc, so))
ok(all(rc == 0 for rc, so in tune_out) and tune_out[0][1] == tune_out[1][1] == tune_out[2][1]
   and '"first_activation":"2026-10-25T00:31:50Z"' in tune_out[0][1],
   "tune gives the same candidates from the three forms", tune_out)

# --- calibrate reads through the same reader too, and --flood-at in the zone
cal = []
for cfgp, data, extra in ((DEMO, path("utc.csv"), []),
                          (SITE, path("wide.csv"), ["--tz", "Europe/Berlin"]),
                          (SITE, path("long.csv"), [])):
    rc, so, se = fg("calibrate", "-c", cfgp, data, "--section", "C401", "--json", *extra)
    cal.append((rc, so))
ok(all(rc == 0 for rc, so in cal) and cal[0][1] == cal[1][1] == cal[2][1],
   "calibrate gives the same fit from the three forms", cal)
rc, so, se = fg("calibrate", "-c", SITE, path("wide.csv"), "--tz", "Europe/Berlin", "--section",
                "C401", "--flood-at", "2026-10-25 02:30", "--json")
ok(rc == 0 and '"flood_onset":"2026-10-25T00:30:00Z"' in so and '"onset_method":"given"' in so,
   "calibrate --flood-at 02:30 local (first pass) is 00:30Z", so + se)

# --- a long file with a tag that never appears: warned at the end
long_lines = [x for x in open(path("long.csv")).read().splitlines()
              if not x.startswith("U40.R404.TI.PV,")]
open(path("long-cut.csv"), "w").write("\n".join(long_lines) + "\n")
rc, so, se, ev = replay(SITE, path("long-cut.csv"), "r-longcut")
ok(rc == 0 and "tag R404_TI: no sample named 'U40.R404.TI.PV'" in se,
   "long file: a tag without samples is named", se)

# --- config refusals, with FILE:LINE
base = open(SITE).read()


def refused(name, text, want, what):
    p = write_config(name, text)
    rc, so, se = fg("check", "-c", p)
    m = re.search(re.escape(p) + r":(\d+): .*" + re.escape(want), se)
    ok(rc == 2 and m is not None, what, se)
    return int(m.group(1)) if m else 0


line = refused("bad-tz.ini", base.replace("# tz = Europe/Berlin", "tz = Mars/Olympus"),
               "not installed", "[replay] tz unknown: FILE:LINE")
ok(line > 0 and open(path("bad-tz.ini")).read().splitlines()[line - 1].startswith("tz ="),
   "... at the tz line", line)
refused("dup-col.ini", base.replace("column = U40.C401.FI.LIQ.PV", "column = U40.C401.FI.GAS.PV"),
        "already tag C401_FI_GAS's", "two tags on one data column: FILE:LINE")
refused("bad-key.ini", base.replace("[replay]", "[replay]\ntime_colum = x"),
        "unknown key 'time_colum' in [replay]", "unknown [replay] key: FILE:LINE")
fixed = "[tag.FIXED_X]\nvalue = 1\ncolumn = X\n\n"
refused("fixed-col.ini", base.replace("[replay]", fixed + "[replay]"),
        "not 'value =' tags", "column on a value tag: FILE:LINE")

# --- the bundled examples are this very run (regenerate: sh tools/make-demo-data.sh)
for f, g in (("historian-wide-local.csv", "wide.csv"), ("historian-long.csv", "long.csv")):
    ok(open("replay/data/" + f, "rb").read() == open(path(g), "rb").read(),
       f"replay/data/{f} matches a fresh run (regenerate: sh tools/make-demo-data.sh)")
ok(open("replay/data/historian.ini").read() == open(SITE).read(),
   "replay/data/historian.ini matches a fresh run")
rc, so, se, ev = replay("replay/data/historian.ini", "replay/data/historian-long.csv", "r-bundled")
ok(rc == 0 and same_outputs("r-utc", "r-bundled"), "the bundled long example replays as documented",
   se)
# status texts (bad samples) cross the reader thread: one thread gives the same bytes
rc, so, se, ev = replay("replay/data/historian.ini", "replay/data/historian-long.csv", "r-one",
                        "--threads", "1")
ok(rc == 0 and same_outputs("r-bundled", "r-one"),
   "the long example with status texts replays the same in one thread", se)

shutil.rmtree(tmp)
done()
