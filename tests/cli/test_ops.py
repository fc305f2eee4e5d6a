"""test_ops.py - operations: --version, the register map, syslog priorities
under the journal, sd_notify readiness/watchdog/stopping, and the package.

Everything runs on 127.0.0.1 and in a temporary directory; the notify socket
is a Unix datagram socket of our own, standing in for systemd's.
"""
import csv
import io
import os
import re
import shutil
import signal
import socket
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402
from rig import free_port  # noqa: E402

FG = os.environ.get("FG_BIN", "build/floodgauge")
tmp = tempfile.mkdtemp(prefix="fg-ops-")
try:
    # --- --version agrees with the Debian changelog's version ------------------
    rc, out, err = fg("--version")
    deb = re.match(r"floodgauge \(([^)]+)\)", open("debian/changelog").readline())
    ok(rc == 0 and deb and out.strip() == f"floodgauge {deb.group(1)}",
       "--version prints the version the package carries", (out, deb and deb.group(1)))

    # --- map ----------------------------------------------------------------------
    rc, out, err = fg("map", "-c", "configs/demo.ini")
    rows = list(csv.DictReader(io.StringIO(out)))
    ok(rc == 0 and rows and list(rows[0].keys()) ==
       ["address", "table", "type", "field", "unit", "section"], "map prints the CSV columns")
    cfg = open("configs/demo.ini").read()
    fields_line = re.search(r"^fields = (.*(?:\n[ \t]+.*)*)", cfg, re.M).group(1)
    fields = [f.strip() for f in re.split(r"[,\s]+", fields_line) if f.strip()]
    floats = [r for r in rows if r["type"] == "float32"]
    ok([f"{r['section']}.{r['field']}" for r in floats] == fields,
       "one float32 row per configured export field, in order", (floats[:3], fields[:3]))
    ok([int(r["address"]) for r in floats] == list(range(0, 2 * len(fields), 2)),
       "float32 addresses step by two from base_address 0")
    q = [r for r in rows if r["field"] == "quality"]
    ok(len(q) == 4 and int(q[0]["address"]) == 2 * len(fields),
       "then one quality register per section", q)
    hb = [r for r in rows if r["field"] == "heartbeat"]
    ok(len(hb) == 1 and int(hb[0]["address"]) == 2 * len(fields) + 4, "then the heartbeat")
    disc = [r for r in rows if r["table"] == "discrete"]
    alarms = re.findall(r"^\[alarm\.(\S+)\]", cfg, re.M)
    ok(len(disc) == 2 * len(alarms) and disc[0]["field"] == f"{alarms[0]} active"
       and disc[1]["field"] == f"{alarms[0]} unacknowledged", "two discrete inputs per alarm")
    units = {r["field"]: r["unit"] for r in floats}
    ok(units.get("flood_index") == "%", "units come from the result field table", units)
    rc, out, err = fg("map", "-c", "configs/demo.ini", "--format", "md")
    ok(rc == 0 and out.startswith("| address | table | type | field | unit | section |"),
       "map --format md prints a Markdown table")
    rc, out, err = fg("map", "-c", "configs/demo.ini", "--format", "xml")
    ok(rc == 2 and "csv or md" in err, "an unknown format is a usage error", err)

    # The daemons below must not meet anything else on this machine (a demo
    # running beside the tests holds the demo's export and broker ports).
    cfg = (cfg.replace("listen = 127.0.0.1:15021", f"listen = 127.0.0.1:{free_port()}")
           .replace("tcp://127.0.0.1:18830", f"tcp://127.0.0.1:{free_port()}"))

    # --- the journal: syslog priority prefixes --------------------------------------
    cfgp = os.path.join(tmp, "once.ini")
    open(cfgp, "w").write(cfg.replace("build/demo/", tmp + "/")
                          .replace("port = 15020", "port = 1"))  # nothing listens there
    errp = os.path.join(tmp, "stderr")
    with open(errp, "w") as ef:
        st = os.fstat(ef.fileno())
        env = dict(os.environ, JOURNAL_STREAM=f"{st.st_dev}:{st.st_ino}")
        p = subprocess.run([FG, "run", "-c", cfgp, "--once", "--no-view"], stderr=ef,
                           stdout=subprocess.DEVNULL, env=env, timeout=60)
    lines = open(errp).read().splitlines()
    ok(lines and all(re.match(r"<[3467]>(error|warning|info|debug): ", l) for l in lines),
       "under the journal every line starts with its syslog priority", lines[:5])
    ok(any(l.startswith("<4>warning: ") for l in lines) and
       any(l.startswith("<6>info: ") for l in lines), "warnings are <4>, info <6>", lines[:8])
    p = subprocess.run([FG, "run", "-c", cfgp, "--once", "--no-view"], capture_output=True,
                       text=True, timeout=60)
    ok(re.match(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ info: ", p.stderr),
       "elsewhere lines keep their time stamp", p.stderr[:80])

    # --- sd_notify ---------------------------------------------------------------
    sock_path = os.path.join(tmp, "notify")
    ns = socket.socket(socket.AF_UNIX, socket.SOCK_DGRAM)
    ns.bind(sock_path)
    ns.settimeout(10)
    env = dict(os.environ, NOTIFY_SOCKET=sock_path, WATCHDOG_USEC="400000")
    d = subprocess.Popen([FG, "run", "-c", cfgp, "--no-view"], stdout=subprocess.DEVNULL,
                         stderr=subprocess.DEVNULL, env=env)
    got = []
    end = time.time() + 15
    while time.time() < end and sum("WATCHDOG=1" in m for m in got) < 3:
        try:
            got.append(ns.recv(4096).decode())
        except socket.timeout:
            break
    ok(any(m.startswith("READY=1") for m in got), "READY=1 once running", got[:3])
    ok(sum("WATCHDOG=1" in m for m in got) >= 3, "the watchdog is kicked while it runs",
       got[:6])
    d.send_signal(signal.SIGTERM)
    stopping = False
    end = time.time() + 15
    while time.time() < end and not stopping:
        try:
            stopping = "STOPPING=1" in ns.recv(4096).decode()
        except socket.timeout:
            break
    ok(stopping and d.wait(timeout=20) == 0, "STOPPING=1 at a clean stop, exit 0")
    ns.close()

    # --- the events file: SIGUSR1 reopens it, events_max_bytes rotates it ---------
    # No plant (port 1): the three diagnostic alarms go off after their 3 s
    # delay: three events, each longer than the 100-byte limit, so each
    # starts a new file.
    evp = os.path.join(tmp, "ev.jsonl")
    rot = (cfg.replace("build/demo/events.jsonl", evp).replace("build/demo/", tmp + "/")
           .replace("port = 15020", "port = 1").replace("on_delay_s = 10", "on_delay_s = 3")
           .replace("[monitor]\n", "[monitor]\nevents_max_bytes = 100\nevents_keep = 5\n", 1))
    rotp = os.path.join(tmp, "rot.ini")
    open(rotp, "w").write(rot)
    logp = os.path.join(tmp, "rot.log")
    with open(logp, "w") as lf:
        d = subprocess.Popen([FG, "run", "-c", rotp, "--no-view"], stdout=subprocess.DEVNULL,
                             stderr=lf)
    end = time.time() + 10
    while time.time() < end and not os.path.exists(evp):
        time.sleep(0.05)
    os.rename(evp, evp + ".moved")  # as logrotate does, before any event
    d.send_signal(signal.SIGUSR1)
    end = time.time() + 10
    while time.time() < end and "reopened" not in open(logp).read():
        time.sleep(0.05)
    ok("events file " + evp + " reopened" in open(logp).read(), "SIGUSR1 reopens the events file")
    end = time.time() + 20
    count = lambda: sum(len(open(f).read().splitlines()) for f in
                        (evp, evp + ".1", evp + ".2", evp + ".3") if os.path.exists(f))
    while time.time() < end and count() < 3:
        time.sleep(0.1)
    d.send_signal(signal.SIGTERM)
    d.wait(timeout=20)
    ok(count() == 3 and open(evp + ".moved").read() == "",
       "the events go to the new file, none to the moved one", count())
    ok(os.path.exists(evp + ".1") and os.path.exists(evp + ".2") and not os.path.exists(evp + ".3"),
       "events_max_bytes = 100 rotates the file after each ~250-byte event (PATH.1, PATH.2)",
       sorted(os.listdir(tmp)))
finally:
    shutil.rmtree(tmp, ignore_errors=True)
done()
