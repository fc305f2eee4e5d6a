"""test_calibrate.py - the soft sensors on the demo data, the early warning on a
column that floods below the model's capacity, and `floodgauge calibrate`.

The injected truth comes from the scenario generator (`simulate --capacity
0.85`: the plant floods at 85 % of the model's gas capacity, 2 h steady at
75 % of its real capacity, then +10 % of it per hour; its stderr summary names
the flood point). What is asserted is what issue 7 asks of the monitor:
- on demo-steady.csv the DP correction ends within +-0.05 of the 1.1 built
  into the demo data and the DP noise ratio is reported on most rows;
- the fused flood_index high alarm at 90 % comes at least 10 min before the
  injected flood point, no process alarm in the steady hours, no alarm
  activating 3 or more times within 10 min, on several seeds;
- calibrate finds the onset within 20 min and capacity_factor within +-0.05
  of 0.85 (the +-0.05 and 20 min are the issue's acceptance figures; 20 min
  of a 10 %/h ramp is 3.3 % of capacity, i.e. +-0.028 in the factor, inside
  +-0.05); with --flood-at at the true onset within +-0.03 (the model flood
  fraction in the minute around it moves by 0.1 %/min x 0.85 and the flow
  noise is 0.5 %: +-0.03 is several times both); a replay with the fitted keys
  puts the model flood % at 100 +- 3 at the onset (the same +-0.03);
- no flood episode: capacity_factor and flood_onset null, exit 0; nothing
  to fit: a reason and exit 2; a bubble section is refused.
"""
import csv
import json
import os
import re
import sys
import tempfile
from datetime import datetime, timezone

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402

DEMO = "configs/demo.ini"
tmp = tempfile.mkdtemp(prefix="fg-calibrate-")
KEYS = ["section", "capacity_factor", "capacity_factor_spread", "dp_factor",
        "dp_factor_spread", "flood_onset", "onset_method", "samples_used"]


def ts(s):
    return datetime.strptime(s, "%Y-%m-%dT%H:%M:%SZ").replace(tzinfo=timezone.utc).timestamp()


def rows(path):
    with open(path) as f:
        return list(csv.DictReader(f))


def num(s):
    return float(s) if s not in ("", None) else None


# --- soft sensors on demo-steady.csv ---------------------------------------
out = os.path.join(tmp, "steady")
rc, so, se = fg("replay", "-c", DEMO, "replay/data/demo-steady.csv", "--out", out)
ok(rc == 0, "replay demo-steady runs", se)
res = rows(os.path.join(out, "results.csv"))
for sec in ("C401", "C402"):
    last = num(res[-1][f"{sec}.dp_correction"])
    ok(last is not None and abs(last - 1.1) <= 0.05,
       f"{sec} dp_correction ends within +-0.05 of the demo's 1.1 (got {last})")
    have = sum(1 for r in res if num(r[f"{sec}.dp_noise_ratio"]) is not None)
    ok(have >= 0.8 * len(res), f"{sec} dp_noise_ratio reported on most rows "
       f"({have} of {len(res)})")
    idx = [num(r[f"{sec}.flood_index"]) for r in res]
    ok(max(i for i in idx if i is not None) < 90.0,
       f"{sec} flood_index stays below 90 % in steady operation at about 75-80 %")

# --- demo-flood.csv: the DP branch is bounded --------------------------------
out = os.path.join(tmp, "flood")
rc, so, se = fg("replay", "-c", DEMO, "replay/data/demo-flood.csv", "--out", out)
res = rows(os.path.join(out, "results.csv"))
peak = max(num(r["C401.flood_index"]) or 0.0 for r in res)
ok(rc == 0 and 100.0 <= peak <= 150.0,
   f"C401 flood_index on demo-flood.csv peaks at or below its 150 % bound (got {peak:.1f})")

# --- a column flooding at 85 % of the model's capacity, several seeds -------
cfg90 = os.path.join(tmp, "demo90.ini")
with open(DEMO) as f:
    text = f.read()
# The fused index's high alarms at 90 % (the demo has 85 and 80).
text = re.sub(r"(\[alarm\.C40[12]_FLOOD_H\][^\[]*?setpoint = )\d+", r"\g<1>90", text)
with open(cfg90, "w") as f:
    f.write(text)

for seed in ("1", "2", "3"):
    data = os.path.join(tmp, f"cap{seed}.csv")
    rc, so, se = fg("simulate", "-c", DEMO, "--scenario", "flood", "--capacity", "0.85",
                    "--seed", seed, "--period-s", "2", "--out", data)
    ok(rc == 0, f"seed {seed}: simulate --capacity 0.85 runs", se)
    m = re.search(r"C401 flood point \(model flood_pct 85 %[^)]*\) at (\S+?Z)", se)
    ramp = re.search(r"per hour from (\S+?Z)", se)
    ok(m is not None and ramp is not None, f"seed {seed}: simulate names the flood point", se)
    if not (m and ramp):
        continue
    onset, ramp_start = ts(m.group(1)), ts(ramp.group(1))
    ok(abs(onset - ramp_start - 2.5 * 3600) < 15 * 60,
       f"seed {seed}: the plant floods about 2.5 h into the 10 %/h ramp")

    out = os.path.join(tmp, f"cap{seed}")
    rc, so, se = fg("replay", "-c", cfg90, data, "--out", out)
    ok(rc == 0, f"seed {seed}: replay runs", se)
    with open(os.path.join(out, "events.jsonl")) as f:
        events = [json.loads(line) for line in f if line.strip()]
    first = [ts(e["t"]) for e in events if e["alarm"] == "C401_FLOOD_H" and e["state"] == "unacknowledged"]
    ok(first and first[0] <= onset - 600,
       f"seed {seed}: C401 flood_index alarm at 90 % at least 10 min before the flood point "
       f"({(onset - first[0]) / 60:.1f} min)" if first else f"seed {seed}: C401 alarm raised")
    early = [e for e in events if e["kind"] != "diagnostic" and ts(e["t"]) < ramp_start]
    ok(not early, f"seed {seed}: no process alarm in the steady hours", early)
    acts = {}
    for e in events:
        if e["state"] == "unacknowledged":
            acts.setdefault(e["alarm"], []).append(ts(e["t"]))
    chatter = [a for a, t in acts.items()
               if any(t[i + 2] - t[i] < 600 for i in range(len(t) - 2))]
    ok(not chatter, f"seed {seed}: no alarm activates 3 times within 10 min", acts)

    # calibrate, detected onset
    rc, so, se = fg("calibrate", "-c", DEMO, data, "--section", "C401", "--json")
    ok(rc == 0, f"seed {seed}: calibrate runs", se)
    j = json.loads(so) if rc == 0 else {}
    ok(list(j.keys()) == KEYS, f"seed {seed}: calibrate --json keys", so)
    ok(j.get("onset_method") == "detected" and j.get("flood_onset") is not None and
       abs(ts(j["flood_onset"]) - onset) <= 20 * 60,
       f"seed {seed}: detected onset within 20 min of the injected one ({j.get('flood_onset')} "
       f"vs {m.group(1)})")
    cf = j.get("capacity_factor")
    ok(cf is not None and abs(cf - 0.85) <= 0.05,
       f"seed {seed}: detected capacity_factor within +-0.05 of 0.85 (got {cf})")
    ok(j.get("dp_factor") is not None and abs(j["dp_factor"] - 1.1) <= 0.02,
       f"seed {seed}: dp_factor 1.1 +- 0.02 (the demo's plant factor; got {j.get('dp_factor')})")
    # calibrate, given onset
    rc, so, se = fg("calibrate", "-c", DEMO, data, "--section", "C401", "--json",
                    "--flood-at", m.group(1))
    g = json.loads(so) if rc == 0 else {}
    ok(g.get("onset_method") == "given" and g.get("capacity_factor") is not None and
       abs(g["capacity_factor"] - 0.85) <= 0.03,
       f"seed {seed}: capacity_factor with --flood-at within +-0.03 of 0.85 "
       f"(got {g.get('capacity_factor')})")
    # C402 (packed) too, detected
    rc, so, se = fg("calibrate", "-c", DEMO, data, "--section", "C402", "--json")
    p = json.loads(so) if rc == 0 else {}
    ok(p.get("capacity_factor") is not None and abs(p["capacity_factor"] - 0.85) <= 0.05,
       f"seed {seed}: C402 (packed) detected capacity_factor within +-0.05 of 0.85 "
       f"(got {p.get('capacity_factor')})")

    if seed == "1" and j.get("capacity_factor") is not None:
        # the INI form, and a replay with the fitted keys
        rc, so, se = fg("calibrate", "-c", DEMO, data, "--section", "C401")
        mm = re.search(r"^capacity_factor = (\S+)$", so, re.M)
        ok(rc == 0 and mm and re.search(r"^dp_factor = 1\.\d+$", so, re.M),
           "calibrate prints INI lines to paste", so)
        fitted = os.path.join(tmp, "fitted.ini")
        with open(fitted, "w") as f:
            f.write(text.replace("[section.C401]\n", "[section.C401]\ncapacity_factor = %s\n"
                                 "dp_factor = %s\n" % (mm.group(1), j["dp_factor"])))
        out = os.path.join(tmp, "fitted")
        rc, so, se = fg("replay", "-c", fitted, data, "--out", out)
        res = rows(os.path.join(out, "results.csv"))
        at = min(res, key=lambda r: abs(ts(r["time"]) - ts(j["flood_onset"])))
        fp = num(at["C401.flood_pct"])
        ok(rc == 0 and fp is not None and abs(fp - 100.0) <= 3.0,
           f"replay with the fitted keys: model flood % at the onset is about 100 (got {fp})")

# --- no flood episode; nothing to fit; a bubble section ----------------------
rc, so, se = fg("calibrate", "-c", DEMO, "replay/data/demo-steady.csv", "--section", "C401",
                "--json")
j = json.loads(so) if rc == 0 else {}
ok(rc == 0 and j.get("capacity_factor", 0) is None and j.get("flood_onset", 0) is None
   and j.get("dp_factor") is not None and abs(j["dp_factor"] - 1.1) <= 0.02,
   "steady data: capacity_factor and flood_onset null, dp_factor fitted, exit 0", so + se)
rc, so, se = fg("calibrate", "-c", DEMO, "replay/data/demo-steady.csv", "--section", "C401")
ok(rc == 0 and "no flood episode" in so and "capacity_factor =" not in so,
   "steady data, INI form: says there is no flood episode", so)
rc, so, se = fg("calibrate", "-c", DEMO, "replay/data/demo-steady.csv", "--section", "Q403")
ok(rc == 2 and "nothing could be fitted" in se and "no dp tag" in se,
   "a spray section without DP on steady data: reason and exit 2", se)
rc, so, se = fg("calibrate", "-c", DEMO, "replay/data/demo-steady.csv", "--section", "R404")
ok(rc == 2 and "bubble" in se, "a bubble section is refused with exit 2", se)
rc, so, se = fg("calibrate", "-c", DEMO, "replay/data/demo-steady.csv", "--section", "NOPE")
ok(rc == 2 and "NOPE" in se, "an unknown section: exit 2 naming it", se)
rc, so, se = fg("calibrate", "-c", DEMO, "replay/data/demo-steady.csv", "--section", "C401",
                "--flood-at", "yesterday")
ok(rc == 2 and "--flood-at" in se, "a bad --flood-at: exit 2 naming the option", se)

done()
