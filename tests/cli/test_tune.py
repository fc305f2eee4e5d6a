"""test_tune.py - `floodgauge tune`: alarm what-if on recorded data.

The contract: every candidate's figures equal those of a full `replay` with
that setting written into the config (the engine runs once and only the
alarm's state machine is replayed per candidate, so they must be equal, to the
last digit). The pareto marking is recomputed here from the printed figures
with the definition of the help text, and a setting that is active all the
time is a nuisance, not an early warning.
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
DATA = "replay/data/demo-flood.csv"
# Model flood point of C401 in the bundled set (replay/data/README.md); any
# time in the ramp serves: the test compares tune with replay, not with it.
EVENT = "2026-03-02T09:06:56Z"
ALARM = "C401_FLOOD_H"
KEYS = ["activations", "chattering_episodes", "fleeting", "time_in_alarm_s",
        "longest_active_s", "first_activation", "lead_s"]
tmp = tempfile.mkdtemp(prefix="fg-tune-")


def config_with(setpoint, deadband, on_delay):
    """The demo config with the alarm's three settings replaced."""
    out, inside = [], False
    for line in open(DEMO):
        s = line.strip()
        if s.startswith("["):
            inside = s == f"[alarm.{ALARM}]"
        if inside and re.match(r"(setpoint|deadband|on_delay_s)\s*=", s):
            key = s.split("=")[0].strip()
            val = {"setpoint": setpoint, "deadband": deadband, "on_delay_s": on_delay}[key]
            line = f"{key} = {val!r}\n"
        out.append(line)
    path = os.path.join(tmp, f"c-{setpoint}-{deadband}-{on_delay}.ini")
    open(path, "w").write("".join(out))
    return path


rc, so, se = fg("tune", "-c", DEMO, DATA, "--alarm", ALARM, "--setpoint", "10:90:5",
                "--deadband", "1:3:2", "--on-delay", "0:60:30", "--event", EVENT, "--json",
                timeout=600)
ok(rc == 0, "tune runs a 17 x 2 x 3 grid", se)
cands = json.loads(so) if rc == 0 else []
ok(len(cands) == 17 * 2 * 3, "one object per candidate", len(cands))
ok(all(set(c) >= set(KEYS + ["setpoint", "deadband", "on_delay_s", "pareto"]) for c in cands),
   "each candidate has its settings, the summary.json figures and pareto", cands[:1])
ok(sorted({c["setpoint"] for c in cands}) == [10 + 5 * i for i in range(17)] and
   sorted({c["on_delay_s"] for c in cands}) == [0, 30, 60], "the grid includes both ends")


def useful(c):
    lead = c["lead_s"]
    return lead if lead is not None and lead <= 7200 else float("-inf")


pareto = []
for c in cands:
    dominated = any(useful(d) >= useful(c) and d["nuisance"] <= c["nuisance"] and
                    (useful(d) > useful(c) or d["nuisance"] < c["nuisance"]) for d in cands)
    pareto.append(not dominated)
ok([c["pareto"] for c in cands] == pareto and any(pareto),
   "pareto marks exactly the candidates no other beats on both lead and nuisance",
   [(c["setpoint"], c["deadband"], c["on_delay_s"], c["lead_s"], c["nuisance"], c["pareto"])
    for c in cands])
low = [c for c in cands if c["setpoint"] == 10]
ok(low and all(c["lead_s"] is not None and c["lead_s"] > 7200 and not c["pareto"] and
               c["nuisance"] >= 1 for c in low),
   "setpoint 10 %: active from the start, a nuisance and never pareto", low)
ok(any(c["pareto"] and c["lead_s"] is not None and 0 < c["lead_s"] <= 7200 for c in cands),
   "a pareto candidate warns within the 2 h before the event")

# equality with a full replay, for a spread of candidates
picks = [cands[i] for i in (0, len(cands) // 3, len(cands) // 2, len(cands) - 1)]
picks += [c for c in cands if c["setpoint"] == 85 and c["deadband"] == 3][:1]
for c in picks:
    cfg = config_with(c["setpoint"], c["deadband"], c["on_delay_s"])
    out = os.path.join(tmp, "r")
    rc, so, se = fg("replay", "-c", cfg, DATA, "--out", out, "--event", EVENT, timeout=600)
    sj = json.load(open(os.path.join(out, "summary.json"))) if rc == 0 else {"alarms": {}}
    r = sj["alarms"].get(ALARM, {})
    ok(rc == 0 and all(r.get(k) == c[k] for k in KEYS),
       f"setpoint {c['setpoint']}, deadband {c['deadband']}, on-delay {c['on_delay_s']}: "
       "the figures equal a full replay", (se, {k: (c[k], r.get(k)) for k in KEYS}))

# the table: every candidate, the configured value where an axis is left out
rc, so, se = fg("tune", "-c", DEMO, DATA, "--alarm", ALARM, "--setpoint", "80:90:5",
                "--event", EVENT, timeout=600)
rows = [line for line in so.splitlines() if re.match(r"\s+\d+(\.\d)?\s", line)]
ok(rc == 0 and len(rows) == 3 and "pareto" in so and "advisory" in so,
   "the table has one row per candidate and the caution", so + se)
ok(all(" 3.0 " in r and "0:00:20" in r for r in rows),
   "deadband and on-delay default to the config's (3 %, 20 s)", rows)

# mistakes
rc, so, se = fg("tune", "-c", DEMO, DATA, "--alarm", "NOPE")
ok(rc == 2 and "NOPE" in se and ALARM in se, "an unknown alarm exits 2 and lists the names", se)
rc, so, se = fg("tune", "-c", DEMO, DATA, "--alarm", ALARM, "--setpoint", "90:80:5")
ok(rc == 2 and "--setpoint" in se and "A:B:STEP" in se, "a backward range exits 2", se)
rc, so, se = fg("tune", "-c", DEMO, DATA, "--alarm", ALARM, "--deadband", "-1")
ok(rc == 2 and "deadband" in se, "a negative deadband exits 2", se)
rc, so, se = fg("tune", "-c", DEMO, DATA, "--alarm", "C401_DIAG", "--setpoint", "1")
ok(rc == 2 and "diagnostic" in se, "a diagnostic alarm has no setpoint to tune", se)

shutil.rmtree(tmp)
done()
