"""test_replay.py - `floodgauge replay` and `simulate` on the demo plant.

The upset times come from the scenario generator itself (its stderr summary
names the model flood point), so the test follows the models when they move.
What is asserted is the monitor's job: the flood alarm comes before the
injected flood point and nothing alarms in the steady hours; a frozen
transmitter raises its diagnostic alarm and no process alarm; weeping raises
the low alarm; bad files end with a message and the right exit code; two runs
give byte-identical outputs.
"""
import json
import os
import re
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402

DEMO = "configs/demo.ini"
tmp = tempfile.mkdtemp(prefix="fg-replay-")


def iso(t):
    return t  # ISO 8601 strings of one format compare in time order


def replay(data, out, *extra):
    rc, so, se = fg("replay", "-c", DEMO, data, "--out", out, *extra)
    events = []
    path = os.path.join(out, "events.jsonl")
    if os.path.exists(path):
        with open(path) as f:
            events = [json.loads(line) for line in f if line.strip()]
    return rc, so, se, events


def simulate(scenario, out):
    rc, so, se = fg("simulate", "-c", DEMO, "--scenario", scenario, "--seed", "1",
                    "--period-s", "2", "--out", out)
    # The bundled demo sets are these very runs (tools/make-demo-data.sh): a model
    # or config change that moves them must regenerate them.
    bundled = f"replay/data/demo-{scenario}.csv"
    ok(open(out, "rb").read() == open(bundled, "rb").read(),
       f"{bundled} matches a fresh simulate run (regenerate: sh tools/make-demo-data.sh)")
    return rc, se


# --- flood: alarm before the injected flood point, none in the steady hours
csv = os.path.join(tmp, "flood.csv")
rc, summary = simulate("flood", csv)
ok(rc == 0, "simulate flood runs", summary)
m = re.search(r"C401 flood point \(model flood_pct 100 %[^)]*\) at (\S+?Z)", summary)
ok(m is not None, "simulate names the C401 flood point", summary)
ramp = re.search(r"gas load \+25 %/h from (\S+?Z)", summary)
ok(ramp is not None, "simulate names the start of the ramp", summary)
if m and ramp:
    flood_point, ramp_start = m.group(1), ramp.group(1)
    out = os.path.join(tmp, "flood")
    rc, so, se, ev = replay(csv, out)
    ok(rc == 0, "replay of the flood set exits 0", se)
    raised = [e for e in ev if e["alarm"] == "C401_FLOOD_H" and e["state"] == "unacknowledged"]
    ok(len(raised) >= 1, "C401 flood alarm raised", ev)
    if raised:
        ok(raised[0]["t"] < flood_point,
           f"C401 flood alarm {raised[0]['t']} before the flood point {flood_point}")
    ok(all(e["t"] >= ramp_start for e in ev), "no alarm in the steady hours before the ramp",
       [e for e in ev if e["t"] < ramp_start])
    ok(not any(e["kind"] == "diagnostic" for e in ev), "no diagnostic alarm on healthy data")
    for name in ("results.csv", "events.jsonl", "report.html"):
        ok(os.path.getsize(os.path.join(out, name)) > 0, f"{name} written")
    ok("alarms raised:" in so and "first alarm per section:" in so and "advisory" in so,
       "summary printed with the caution", so)
    with open(os.path.join(out, "results.csv")) as f:
        header = f.readline().strip().split(",")
        first = f.readline().strip().split(",")
    ok(header[0] == "time" and "C401.flood_index" in header and "R404.regime" in header,
       "results.csv header has SECTION.FIELD columns")
    ok("C401.gas_holdup_frac" not in header and "C401.regime" not in header
       and "Q403.jet_flood_pct" not in header and "C402.carryover_frac" not in header,
       "results.csv has no column of another section type", header)
    ok("C401.jet_flood_pct" in header and "C402.loading_pct" in header
       and "Q403.carryover_frac" in header and "R404.gas_holdup_frac" in header,
       "results.csv has each type's own columns", header)
    ok(len(first) == len(header), "each row has as many fields as the header", first)

    # the same run twice: byte-identical outputs
    out2 = os.path.join(tmp, "flood2")
    replay(csv, out2)
    for name in ("results.csv", "events.jsonl", "summary.json", "report.html"):
        a = open(os.path.join(out, name), "rb").read()
        b = open(os.path.join(out2, name), "rb").read()
        ok(a == b, f"{name} is byte-identical on a second run")

    # --from / --to keep only the window
    out3 = os.path.join(tmp, "window")
    rc, so, se, ev = replay(csv, out3, "--from", "2026-03-02T06:00:00Z",
                            "--to", "2026-03-02T07:59:58Z")
    ok(rc == 0 and "rows used 3600" in so and ev == [], "--from/--to limit the rows", so + se)

    # --event and summary.json: the figures recounted here from events.jsonl
    out4 = os.path.join(tmp, "event")
    rc, so, se, ev = replay(csv, out4, "--event", flood_point + "=flood point (model)",
                            "--event", ramp_start)
    ok(rc == 0 and "flood point (model)" in so and "lead" in so,
       "--event is accepted and named in the summary", so + se)
    sj = json.load(open(os.path.join(out4, "summary.json")))
    ok(sorted(sj) == ["alarms", "overall"], "summary.json has alarms and overall", sj)
    ok(sorted(sj["overall"]) == sorted(["alarm_rate_per_10min_avg", "alarm_rate_per_10min_max",
                                        "pct_10min_over_10", "standing_alarms",
                                        "priority_share"]), "overall keys", sj["overall"])
    akeys = sorted(["activations", "chattering_episodes", "fleeting", "time_in_alarm_s",
                    "longest_active_s", "first_activation", "lead_s"])
    ok(all(sorted(v) == akeys for v in sj["alarms"].values()) and len(sj["alarms"]) == 10,
       "every configured alarm with the per-alarm keys", sj["alarms"])
    active = ("unacknowledged", "acknowledged")

    def secs(t):
        import datetime
        return datetime.datetime.strptime(t, "%Y-%m-%dT%H:%M:%SZ").replace(
            tzinfo=datetime.timezone.utc).timestamp()

    # the earlier of the two events is the ramp start (no alarm before it):
    # lead_s is null for every alarm
    ok(all(v["lead_s"] is None for v in sj["alarms"].values()),
       "no lead before the first event (the ramp start)", sj["alarms"])
    for name, fig in sj["alarms"].items():
        starts, state = [], "normal"
        for e in ev:
            if e["alarm"] != name:
                continue
            if e["state"] in active and state not in active:
                starts.append(e["t"])
            state = e["state"]
        ok(fig["activations"] == len(starts) and
           fig["first_activation"] == (starts[0] if starts else None),
           f"{name}: activations and first activation as counted from events.jsonl",
           (fig, starts))
    # lead before the flood point alone
    out5 = os.path.join(tmp, "event2")
    rc, so, se, ev = replay(csv, out5, "--event", flood_point)
    sj = json.load(open(os.path.join(out5, "summary.json")))
    starts = [e["t"] for e in ev if e["alarm"] == "C401_FLOOD_H" and e["state"] in active
              and e["t"] < flood_point]
    ok(starts and abs(sj["alarms"]["C401_FLOOD_H"]["lead_s"] -
                      (secs(flood_point) - secs(starts[-1]))) < 1e-6,
       "C401_FLOOD_H lead_s = flood point - start of its last activation before it",
       (sj["alarms"]["C401_FLOOD_H"], starts))
    rc, so, se, ev = replay(csv, os.path.join(tmp, "event3"), "--event", "yesterday=x")
    ok(rc == 2 and "--event" in se and "yesterday" in se, "a bad --event time exits 2", se)

    # --no-results: events and report as before, no results.csv (an old one removed)
    out4n = os.path.join(tmp, "nores")
    os.makedirs(out4n, exist_ok=True)
    open(os.path.join(out4n, "results.csv"), "w").write("stale\n")
    rc, so, se, ev = replay(csv, out4n, "--no-results")
    ok(rc == 0 and not os.path.exists(os.path.join(out4n, "results.csv")),
       "--no-results writes no results.csv and removes an old one", so + se)
    ok(open(os.path.join(out4n, "events.jsonl"), "rb").read()
       == open(os.path.join(out, "events.jsonl"), "rb").read(),
       "--no-results gives the same events.jsonl")
    ok(os.path.getsize(os.path.join(out4n, "report.html")) > 0, "--no-results writes the report")
    # (its reader and engine threads spin before they wait: the same bytes)
    for name in ("summary.json", "report.html"):
        ok(open(os.path.join(out4n, name), "rb").read()
           == open(os.path.join(out, name), "rb").read(),
           f"--no-results gives the same {name}")

    # --results-every 60: the last row of each minute, byte for byte as in the full file
    out5e = os.path.join(tmp, "every")
    rc, so, se, ev = replay(csv, out5e, "--results-every", "60")
    full = open(os.path.join(out, "results.csv")).read().splitlines()
    every = open(os.path.join(out5e, "results.csv")).read().splitlines()
    by_minute = {}
    for line in full[1:]:
        by_minute[line[:16]] = line  # "YYYY-MM-DDTHH:MM": the last row of the minute wins
    ok(rc == 0 and every[0] == full[0], "--results-every keeps the header", se)
    ok(every[1:] == sorted(by_minute.values()),
       "--results-every 60 writes the last sample of each minute, unchanged",
       (len(every), len(by_minute)))
    rc, so, se = fg("replay", "-c", DEMO, csv, "--out", out5e, "--no-results",
                    "--results-every", "60")
    ok(rc == 2 and "exclude" in se, "--no-results with --results-every is a usage error", se)
    rc, so, se = fg("replay", "-c", DEMO, csv, "--out", out5e, "--results-every", "0")
    ok(rc == 2 and "--results-every" in se, "--results-every 0 is a usage error", se)

    # one thread or two (the reader apart): the same bytes
    out8 = os.path.join(tmp, "onethread")
    rc, so1, se, ev = replay(csv, out8, "--threads", "1")
    ok(rc == 0, "--threads 1 runs", se)
    for name in ("results.csv", "events.jsonl", "summary.json", "report.html"):
        ok(open(os.path.join(out8, name), "rb").read()
           == open(os.path.join(out, name), "rb").read(),
           f"{name} with one thread equals the two-thread run's")
    # the reader thread also evaluates the models of some sections ahead
    # (engine_premodel): a window, overlapping files and the other contactor
    # types give the same bytes with one thread as with two
    cases = [("window", DEMO, [csv, "--from", "2026-03-02T07:00:00Z",
                               "--to", "2026-03-02T09:00:00Z"]),
             ("overlap", DEMO, [csv, os.path.join(tmp, "flood.csv")]),
             ("contactors", "configs/demo-contactors.ini",
              ["replay/data/demo-impeller-flood.csv"])]
    for label, cfg, args in cases:
        outs = []
        for threads in ("1", "2"):
            o = os.path.join(tmp, f"thr-{label}-{threads}")
            rc, so, se = fg("replay", "-c", cfg, *args, "--out", o, "--threads", threads)
            ok(rc == 0, f"{label}: --threads {threads} runs", se)
            outs.append(o)
        for name in ("results.csv", "events.jsonl", "summary.json"):
            ok(open(os.path.join(outs[0], name), "rb").read()
               == open(os.path.join(outs[1], name), "rb").read(),
               f"{label}: {name} with one thread equals two threads'")
    rc, so, se = fg("replay", "-c", DEMO, csv, "--out", out8, "--threads", "3")
    ok(rc == 2 and "--threads" in se, "--threads 3 is a usage error", se)
    # --results-every through the writer thread and without it: the same rows
    out8e = os.path.join(tmp, "onethread-every")
    rc, so, se, ev = replay(csv, out8e, "--threads", "1", "--results-every", "60")
    ok(rc == 0 and open(os.path.join(out8e, "results.csv"), "rb").read()
       == open(os.path.join(out5e, "results.csv"), "rb").read(),
       "--results-every 60 with one thread equals the two-thread run's", se)
    # a results.csv that cannot be written (a full disk): exit 1 naming the
    # reason, from the writer thread as from one thread
    for threads in ("1", "2"):
        out9 = os.path.join(tmp, "full" + threads)
        os.makedirs(out9, exist_ok=True)
        target = os.path.join(out9, "results.csv")
        if os.path.lexists(target):
            os.remove(target)
        os.symlink("/dev/full", target)
        rc, so, se, ev = replay(csv, out9, "--threads", threads)
        ok(rc == 1 and "No space left on device" in se,
           f"a full disk under results.csv ends the run with exit 1 (--threads {threads})",
           (rc, se))

    # several files as one series: the flood set cut in three, given out of order
    lines = open(csv).read().splitlines(keepends=True)
    parts = []
    for i, chunk in enumerate((lines[1:4001], lines[4001:8001], lines[8001:])):
        path = os.path.join(tmp, f"part{i}.csv")
        open(path, "w").write(lines[0] + "".join(chunk))
        parts.append(path)
    out6 = os.path.join(tmp, "series")
    rc, so, se, ev = replay(parts[2], out6, parts[0], parts[1])
    ok(rc == 0 and "replay of 3 files" in so, "three files replay as one series", so + se)
    for name in ("results.csv", "events.jsonl"):
        ok(open(os.path.join(out6, name), "rb").read()
           == open(os.path.join(out, name), "rb").read(),
           f"{name} of the three files in any order equals the single file's")
    out6t = os.path.join(tmp, "series-onethread")
    rc, so, se, ev = replay(parts[2], out6t, parts[0], parts[1], "--threads", "1")
    ok(rc == 0 and open(os.path.join(out6t, "results.csv"), "rb").read()
       == open(os.path.join(out, "results.csv"), "rb").read(),
       "the three files with one thread write the single file's results.csv", se)
    # --from inside a file starts the engine there, as a file that begins at that
    # row does: the same bytes (the solvers' warm starts begin cold in both)
    t_from = lines[4001].split(",")[0]
    outf = os.path.join(tmp, "from")
    rc, so, se, ev = replay(csv, outf, "--from", t_from)
    outc = os.path.join(tmp, "cut")
    rc2, so2, se2, ev2 = replay(parts[1], outc, parts[2])
    ok(rc == 0 and rc2 == 0 and "rows used 6800" in so, "--from mid-file runs", so + se + se2)
    for name in ("results.csv", "events.jsonl"):
        ok(open(os.path.join(outf, name), "rb").read()
           == open(os.path.join(outc, name), "rb").read(),
           f"{name} of --from {t_from} equals that of the file cut at that row")
    # overlapping files: the rows of the second already covered are skipped and counted
    out7 = os.path.join(tmp, "overlap")
    rc, so, se, ev = replay(csv, out7, parts[1])
    ok(rc == 0 and "4000 rows skipped where the files overlap" in se
       and "4000 out of time order" in so, "rows where files overlap are skipped", so + se)
    ok(open(os.path.join(out7, "results.csv"), "rb").read()
       == open(os.path.join(out, "results.csv"), "rb").read(),
       "an overlapping file changes no result")

# --- steady: nothing at all
csv = os.path.join(tmp, "steady.csv")
simulate("steady", csv)
rc, so, se, ev = replay(csv, os.path.join(tmp, "steady"))
ok(rc == 0 and ev == [], "steady hours raise no alarm", ev)

# --- frozen transmitter: diagnostic, no process alarm
csv = os.path.join(tmp, "frozen.csv")
rc, summary = simulate("frozen", csv)
fm = re.search(r"C402_PDI frozen from (\S+?Z) to (\S+?Z)", summary)
rc, so, se, ev = replay(csv, os.path.join(tmp, "frozen"))
diag = [e for e in ev if e["alarm"] == "C402_DIAG" and e["state"] == "unacknowledged"]
ok(len(diag) == 1 and diag[0].get("reason") == "frozen", "frozen DP raises C402_DIAG (frozen)",
   ev)
ok(not any(e["section"] == "C402" and e["kind"] != "diagnostic" and e["state"] == "unacknowledged"
           for e in ev), "frozen DP raises no process alarm", ev)
if fm and diag:
    # frozen_s = 120 and on_delay_s = 10 in the demo config
    ok(fm.group(1) < diag[0]["t"] < fm.group(2), "diagnostic inside the frozen window",
       (fm.groups(), diag[0]["t"]))

# --- weeping: the low alarm
csv = os.path.join(tmp, "weep.csv")
rc, summary = simulate("weep", csv)
wm = re.search(r"weep_pct below 100 % from (\S+?Z)", summary)
rc, so, se, ev = replay(csv, os.path.join(tmp, "weep"))
weep = [e for e in ev if e["alarm"] == "C401_WEEP_L" and e["state"] == "unacknowledged"]
ok(len(weep) >= 1, "weeping raises C401_WEEP_L", ev)
if wm and weep:
    # the low alarm's setpoint is 110 %: it warns before the model says "weeping"
    ok(weep[0]["t"] < wm.group(1), "weep alarm before weep_pct falls below 100 %",
       (weep[0]["t"], wm.group(1)))
ok(not any(e["alarm"].endswith("FLOOD_H") for e in ev), "no flood alarm while weeping")

# --- communication gap: diagnostics only
csv = os.path.join(tmp, "gap.csv")
simulate("gap", csv)
rc, so, se, ev = replay(csv, os.path.join(tmp, "gap"))
stale = [e for e in ev if e["kind"] == "diagnostic" and e["state"] == "unacknowledged"]
ok(len(stale) >= 1 and all(e.get("reason") == "stale" for e in stale),
   "the gap raises stale diagnostics", ev)
ok(all(e["kind"] == "diagnostic" for e in ev), "the gap raises no process alarm", ev)

# --- bad files
hdr = open("replay/data/demo-steady.csv").readline().strip()
row = open("replay/data/demo-steady.csv").readlines()[1].strip()
ncol = len(hdr.split(","))
bad = {
    "truncated": hdr + "\n" + row + "\n" + ",".join(row.split(",")[:5]) + "\n",
    "bad time": hdr + "\n" + row + "\n" + row.replace("2026-03-02T06:00:00Z", "2026-03-02T06:0x:02Z")
    + "\n",
    "unsorted": hdr + "\n" + row.replace("06:00:00Z", "06:00:10Z") + "\n" + row + "\n",
}
for name, text in bad.items():
    p = os.path.join(tmp, name + ".csv")
    open(p, "w").write(text)
    rc, so, se, ev = replay(p, os.path.join(tmp, "bad-" + name))
    ok(rc == 0 and re.search(re.escape(p) + r":3: \w+ row skipped", se) is not None,
       f"{name} row: warned with its line number and skipped", se)
cases = {
    "empty": ("", 2, "empty file"),
    "header only": (hdr + "\n", 2, "no data rows"),
    # A column the config needs but the file lacks is a warning (the run goes
    # on, tests/cli/test_historian.py); a file with no tag column at all is an error.
    "missing column": (hdr.replace(",C401_PDI", ",C401_PDX") + "\n" + row + "\n", 0, "C401_PDI"),
    "no tag column": ("time,X\n2026-03-02T06:00:00Z,1\n", 2, "no column for any tag"),
}
for name, (text, want, msg) in cases.items():
    p = os.path.join(tmp, name.replace(" ", "_") + ".csv")
    open(p, "w").write(text)
    rc, so, se, ev = replay(p, os.path.join(tmp, "bad-" + name.replace(" ", "_")))
    ok(rc == want and msg in se, f"{name}: exit {want} with '{msg}'", (rc, se))
rc, so, se = fg("replay", "-c", DEMO, os.path.join(tmp, "nonexistent.csv"),
                "--out", os.path.join(tmp, "x"))
ok(rc == 2 and "nonexistent.csv" in se, "missing file: exit 2 naming it", se)

shutil.rmtree(tmp)
done()
