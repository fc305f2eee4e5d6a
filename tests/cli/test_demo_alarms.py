"""test_demo_alarms.py - every flood alarm of the demo plant can fire on valid readings.

An alarm whose setpoint the section cannot reach while its gas-flow transmitter
still reads inside its range only fires on a bad reading, which the engine
refuses: such an alarm never fires at all. For every high / high-high alarm on
flood_pct or flood_index in configs/demo.ini, the section is rated with its gas
flow at 97 % of the tag's max (the top of the span the scenario generator uses)
and every other tag at its nominal value; the model flood % must reach the
setpoint. A bubble column's flood % (level swell) comes from the measured tap
DP, so its DP is set to what the model's own gas holdup gives,
(1 - eps) rho_l g dz, as a plant at that air rate would read.

Before the fix: Q403's gas max (40 000 kg/h) was below its 80 % carry-over
load (about 56 800 kg/h), and R404's air max gave 88.5 % against a 90 % alarm.
"""
import configparser
import json
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402

DEMO = "configs/demo.ini"
G = 9.80665
SPAN_USED = 0.97

cp = configparser.ConfigParser(interpolation=None, strict=False,
                               inline_comment_prefixes=None, comment_prefixes=(";", "#"))
cp.read(DEMO)


def rate(section, sets):
    args = ["rate", "-c", DEMO, "--section", section, "--json"]
    for k, v in sets.items():
        args += ["--set", f"{k}={v:.6g}"]
    rc, out, err = fg(*args)
    return rc, (json.loads(out) if rc == 0 else None), err


alarms = [s for s in cp.sections() if s.startswith("alarm.")]
checked = 0
for a in alarms:
    al = cp[a]
    if al.get("kind") not in ("high", "high-high"):
        continue
    if al.get("signal") not in ("flood_pct", "flood_index"):
        continue
    sec_name = al["section"]
    sec = cp["section." + sec_name]
    gas_tag = sec.get("gas_flow")
    gas_max = float(cp["tag." + gas_tag]["max"])
    sets = {gas_tag: SPAN_USED * gas_max}
    rc, r, err = rate(sec_name, sets)
    if rc == 0 and sec.get("type") == "bubble" and "gas_holdup_frac" in r:
        eps = r["gas_holdup_frac"]
        rho_l = float(sec["liquid_density_kgm3"])
        dz = float(sec["tap_spacing_m"])
        sets[sec["dp"]] = (1.0 - eps) * rho_l * G * dz / 100.0  # mbar, the demo tag's unit
        rc, r, err = rate(sec_name, sets)
    checked += 1
    sp = float(al["setpoint"])
    got = r.get("flood_pct", float("nan")) if r else float("nan")
    ok(rc == 0 and got >= sp,
       f"{a[6:]} ({al['signal']} >= {sp:g}) is reachable: {got:.1f} % at "
       f"{SPAN_USED:g} x {gas_tag} max {gas_max:g}", err)

ok(checked >= 4, f"found the demo's flood alarms ({checked})")
done()
