"""test_contactors.py - packed bubble columns, stirred vessels and loops, end to end.

On configs/demo-contactors.ini (the invented Tarnwick unit 40 contactors:
P405 packed bubble column, M406 gassed stirred vessel, L407 airlift loop):
`check`, `rate` (table and JSON), and `simulate` + `replay` of the three
scenarios. The event times come from the scenario generator's own summary
line, so the test follows the models. What is asserted is the monitor's job:
the impeller-flooding alarms (a falling measured power ratio, the flood
approach) come before the model's impeller flood point, the loop alarms
(circulation below its learned normal, the downcomer gassing up) before the
stall, the level-swell alarm before the packed bubble column's overflow, and
nothing alarms in the steady hours before each upset starts.
"""
import json
import os
import re
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402

CFG = "configs/demo-contactors.ini"
tmp = tempfile.mkdtemp(prefix="fg-contactors-")

rc, out, err = fg("check", "-c", CFG)
ok(rc == 0 and "1 packed-bubble, 1 stirred, 1 loop" in out, "check counts the new types",
   out + err)


def rate(section, *sets):
    args = ["rate", "-c", CFG, "--section", section, "--json"]
    for s in sets:
        args += ["--set", s]
    rc, so, se = fg(*args)
    try:
        return rc, json.loads(so), se
    except ValueError:
        return rc, None, so + se


rc, r, err = rate("M406")
ok(rc == 0 and r is not None, "rate M406 runs", err)
if r:
    ok(r["type"] == "stirred", "rate names the stirred type")
    for k in ("flow_number", "froude_number", "flood_pct", "dispersion_pct",
              "power_ratio_model", "power_ratio_measured", "gas_holdup_frac"):
        ok(isinstance(r.get(k), (int, float)), f"M406 {k} is a number", r)
    # Fr = N^2 D / g at 90 rpm and D = 0.8 m: 1.5^2 * 0.8 / 9.80665 = 0.18355
    ok(abs(r["froude_number"] - 0.183549) < 1e-5, "M406 Froude number from rpm", r)
    ok(r["flood_basis"] == "impeller" and r["quality"] == "good", "M406 basis and quality", r)
    ok("riser_holdup_frac" not in r, "no loop fields on a stirred section", r)
    for k in ("flow_param", "cap_factor_ms", "f_factor_pa05"):
        ok(k not in r, f"M406 has no {k} (a countercurrent vapour-load term)", r)
rc, r, err = rate("M406", "M406_SI=0")
ok(rc == 0 and r is not None, "rate M406 at zero speed runs", err)
if r:
    ok(r["quality"] == "bad" and "flow_number" not in r and "flood_pct" not in r,
       "zero speed: speed fields absent, quality bad", r)
rc, r, err = rate("M406", "M406_FI_AIR=0")
if r:
    ok(r.get("flood_pct") == 0 and r.get("power_ratio_model") == 1,
       "zero gas: no flooding, full power", r)

rc, r, err = rate("L407")
ok(rc == 0 and r is not None, "rate L407 runs", err)
if r:
    for k in ("riser_holdup_frac", "downcomer_holdup_frac", "circulation_velocity_ms",
              "flood_pct", "carry_under_m3s"):
        ok(isinstance(r.get(k), (int, float)), f"L407 {k} is a number", r)
    ok(abs(r["flood_pct"] - 100 * r["downcomer_holdup_frac"] / r["riser_holdup_frac"]) < 1e-6,
       "L407 flood_pct is downcomer over riser holdup", r)
    ok("circulation_pct" not in r, "rate has no learned normal circulation", r)
    for k in ("flow_param", "cap_factor_ms", "f_factor_pa05"):
        ok(k not in r, f"L407 has no {k} (a countercurrent vapour-load term)", r)

rc, r, err = rate("P405")
ok(rc == 0 and r is not None, "rate P405 runs", err)
if r:
    for k in ("gas_holdup_dp_frac", "gas_holdup_frac", "gas_holdup_column_frac",
              "expanded_level_m", "carryover_margin_m", "liquid_holdup_m3"):
        ok(isinstance(r.get(k), (int, float)), f"P405 {k} is a number", r)
    # per column volume = voidage x per free volume (the tap holdup is used)
    ok(abs(r["gas_holdup_column_frac"] / r["gas_holdup_dp_frac"] - 0.95) < 0.05,
       "P405 column-volume holdup is the voidage times the free-volume one", r)



def no_nonfinite(const):
    raise ValueError("non-finite number " + const)


# Zero gas, zero speed, empty vessel and out-of-range readings (each tag in its
# own unit): the JSON must stay strict (no NaN or Infinity) and the CSV-style
# table must hold no nan/inf text.
for section, tagset in (("P405", "P405_FI_AIR=0"), ("P405", "P405_PDI_TAPS=0"),
                        ("P405", "P405_PDI_TAPS=500"), ("P405", "P405_LI=0"),
                        ("P405", "P405_FI_AIR=1e6"), ("M406", "M406_FI_AIR=0"),
                        ("M406", "M406_SI=0"), ("M406", "M406_JI=0"),
                        ("M406", "M406_SI=1e5"), ("M406", "M406_FI_AIR=1e6"),
                        ("L407", "L407_FI_AIR=0"), ("L407", "L407_PDI_RISER=0"),
                        ("L407", "L407_PDI_DOWNCOMER=0"), ("L407", "L407_PDI_RISER=5000"),
                        ("L407", "L407_PDI_RISER=980"), ("L407", "L407_FI_AIR=1e6")):
    rc, so, se = fg("rate", "-c", CFG, "--section", section, "--set", tagset, "--json")
    try:
        json.loads(so, parse_constant=no_nonfinite)
        strict = rc == 0
    except ValueError as e:
        strict, se = False, se + str(e)
    ok(strict, f"rate {section} {tagset}: strict JSON, every number finite", so + se)
    rc, so, se = fg("rate", "-c", CFG, "--section", section, "--set", tagset)
    ok(rc == 0 and not re.search(r"\b(nan|inf)\b", so, re.I),
       f"rate {section} {tagset}: table has no nan/inf", so + se)

rc, out, err = fg("rate", "-c", CFG, "--section", "L407")
ok(rc == 0 and "circulation_velocity_ms" in out and "advisory" in out,
   "rate table lists the loop fields with the caution", out + err)


def run(scenario, bundled, start_re, event_re, alarms):
    csv = os.path.join(tmp, scenario + ".csv")
    rc, so, se = fg("simulate", "-c", CFG, "--scenario", scenario, "--seed", "1",
                    "--period-s", "2", "--out", csv)
    ok(rc == 0, f"simulate {scenario} runs", se)
    ok(open(csv, "rb").read() == open(bundled, "rb").read(),
       f"{bundled} matches a fresh simulate run (regenerate: sh tools/make-demo-data.sh)")
    m, s = re.search(event_re, se), re.search(start_re, se)
    ok(m is not None and s is not None, f"simulate {scenario} names the upset and its event", se)
    if not (m and s):
        return None
    event, start = m.group(1), s.group(1)
    out = os.path.join(tmp, scenario)
    rc, so, se = fg("replay", "-c", CFG, csv, "--out", out)
    ok(rc == 0, f"replay {scenario} exits 0", se)
    with open(os.path.join(out, "events.jsonl")) as f:
        ev = [json.loads(line) for line in f if line.strip()]
    for name in alarms:
        raised = [e for e in ev if e["alarm"] == name and e["state"] == "unacknowledged"]
        ok(len(raised) >= 1 and raised[0]["t"] < event,
           f"{name} raised before the event at {event}",
           raised[:1] or ev)
    ok(ev and all(e["t"] >= start for e in ev), f"{scenario}: nothing alarms before {start}",
       [e for e in ev if e["t"] < start])
    ok(not any(e["kind"] == "diagnostic" for e in ev), f"{scenario}: no diagnostic alarm")
    return out


out = run("impeller-flood", "replay/data/demo-impeller-flood.csv",
          r"stirred gas \+150 %/h at fixed speed from (\S+?Z)",
          r"M406 impeller flood point \(model flood_pct 100 %\) at (\S+?Z)",
          ["M406_POWER_L", "M406_FLOOD_H"])
if out:
    with open(os.path.join(out, "results.csv")) as f:
        header = f.readline().strip().split(",")
        first = f.readline().strip().split(",")
    ok("M406.power_ratio_measured" in header and "L407.circulation_pct" in header,
       "results.csv has the new fields")
    ok("M406.riser_holdup_frac" not in header and "L407.power_ratio_model" not in header,
       "no columns for fields of other types")
    html = open(os.path.join(out, "report.html")).read()
    ok("M406" in html and "power ratio" in html, "report has the stirred vessel's chart")

out = run("loop-stall", "replay/data/demo-loop-stall.csv",
          r"loop gas cut -50 %/h from (\S+?Z)",
          r"L407 stall point \(model circulation below 25 % of design\) at (\S+?Z)",
          ["L407_CIRC_L", "L407_DC_GAS_H"])
if out:
    html = open(os.path.join(out, "report.html")).read()
    ok("L407" in html and "circulation" in html, "report has the loop's chart")
    panels = {p.split("<h3>", 1)[1].split(None, 1)[0]: p
              for p in html.split('<section class="panel">')[1:] if "<h3>" in p}
    ok(set(panels) >= {"P405", "M406", "L407"}, "report has a panel per section", list(panels))
    # batch liquid and no level tag: no empty liquid-load chart
    for name in ("M406", "L407"):
        ok("Liquid load" not in panels.get(name, "Liquid load"),
           f"report: no empty liquid-load chart for {name}")
    ok("Liquid level" in panels.get("P405", ""), "report: P405 keeps its level chart")

csv = os.path.join(tmp, "pb.csv")
rc, so, se = fg("simulate", "-c", CFG, "--scenario", "flood", "--seed", "1",
                "--period-s", "2", "--out", csv)
ok(open(csv, "rb").read() == open("replay/data/demo-packed-bubble-flood.csv", "rb").read(),
   "demo-packed-bubble-flood.csv matches a fresh simulate run")
m = re.search(r"P405 flood point \(model flood_pct 100 %, level_swell\) at (\S+?Z)", se)
s = re.search(r"gas load \+25 %/h from (\S+?Z)", se)
ok(m is not None and s is not None, "simulate flood names the P405 overflow point", se)
if m and s:
    out = os.path.join(tmp, "pb")
    rc, so, se = fg("replay", "-c", CFG, csv, "--out", out)
    with open(os.path.join(out, "events.jsonl")) as f:
        ev = [json.loads(line) for line in f if line.strip()]
    raised = [e for e in ev if e["alarm"] == "P405_SWELL_H" and e["state"] == "unacknowledged"]
    ok(raised and raised[0]["t"] < m.group(1), "P405 swell alarm before the overflow point",
       ev)
    ok(ev and all(e["t"] >= s.group(1) for e in ev), "P405: nothing before the ramp")

done()
