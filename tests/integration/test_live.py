"""test_live.py - the daemon with real parts, all on 127.0.0.1 and spare ports.

mosquitto is the broker, `floodgauge feed` is the plant, `floodgauge run` is
the daemon under test, mosquitto_sub reads back MQTT and a Modbus TCP client
of our own (below, raw sockets) reads the export. Checked: state messages with
the right fields and values, an alarm raised and acknowledged by a command, a
malformed command refused, the export registers holding what the engine
computed, a write to the export refused, the status going offline when the
daemon is SIGKILLed, SIGHUP keeping the running config when the new one is
invalid, and the live alarm sequence equal to replay's on the same data.
Everything started here is stopped here.
"""
import json
import math
import os
import shutil
import signal
import socket
import struct
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done  # noqa: E402

FG = os.environ.get("FG_BIN", "build/floodgauge")
MOSQ = shutil.which("mosquitto") or "/usr/sbin/mosquitto"
if not os.path.exists(MOSQ) or not shutil.which("mosquitto_sub"):
    print("ok 1 # SKIP mosquitto is not installed")
    print("1..1")
    sys.exit(0)

tmp = tempfile.mkdtemp(prefix="fg-live-")
procs = []


def free_port():
    s = socket.socket()
    s.bind(("127.0.0.1", 0))
    port = s.getsockname()[1]
    s.close()
    return port


def wait_port(port, timeout=10.0):
    end = time.time() + timeout
    while time.time() < end:
        try:
            socket.create_connection(("127.0.0.1", port), 0.2).close()
            return True
        except OSError:
            time.sleep(0.05)
    return False


def start(args, **kw):
    p = subprocess.Popen(args, **kw)
    procs.append(p)
    return p


def stop_all():
    for p in procs:
        if p.poll() is None:
            p.kill()
            p.wait()


# --- the MQTT read-back --------------------------------------------------
class Sub:
    """mosquitto_sub -v on PREFIX/#, one line a message, read as they come."""

    def __init__(self, port, prefix):
        self.path = os.path.join(tmp, f"sub-{len(procs)}.log")
        self.f = open(self.path, "w")
        self.p = start(["mosquitto_sub", "-h", "127.0.0.1", "-p", str(port), "-v", "-t",
                        prefix + "/#"], stdout=self.f, stderr=subprocess.STDOUT)
        self.prefix = prefix

    def messages(self):
        out = []
        with open(self.path) as f:
            for line in f:
                topic, _, payload = line.rstrip("\n").partition(" ")
                out.append((topic[len(self.prefix) + 1:], payload))
        return out

    def wait_for(self, pred, timeout):
        end = time.time() + timeout
        while time.time() < end:
            for m in self.messages():
                if pred(m):
                    return m
            time.sleep(0.1)
        return None


def pub(port, topic, payload):
    subprocess.run(["mosquitto_pub", "-h", "127.0.0.1", "-p", str(port), "-t", topic, "-m",
                    payload], check=True, timeout=10)


# --- a Modbus TCP client of our own -------------------------------------
def mb_request(port, fc, body, tid=1):
    with socket.create_connection(("127.0.0.1", port), 2.0) as s:
        pdu = bytes([fc]) + body
        s.sendall(struct.pack(">HHHB", tid, 0, len(pdu) + 1, 1) + pdu)
        head = s.recv(7)
        _, _, length, _ = struct.unpack(">HHHB", head)
        data = b""
        while len(data) < length - 1:
            data += s.recv(length - 1 - len(data))
        return data


def mb_read_input_floats(port, addr, count):
    data = mb_request(port, 4, struct.pack(">HH", addr, 2 * count))
    assert data[0] == 4, data
    return list(struct.unpack(">" + "f" * count, data[2:2 + 4 * count]))


# --- the plant data: 10 s design, 25 s C401 pushed to flood, 15 s design --
base = open("replay/data/demo-steady.csv").read().splitlines()
header, rows = base[0], base[1:51]
cols = header.split(",")
gas = cols.index("C401_FI_GAS")
t0 = 1772604000  # 2026-03-04T06:00:00Z, epoch seconds
data = [header]
for i, r in enumerate(rows):
    f = r.split(",")
    f[0] = str(t0 + i)
    if 10 <= i < 35:
        f[gas] = "34"
    data.append(",".join(f))
csv = os.path.join(tmp, "plant.csv")
open(csv, "w").write("\n".join(data) + "\n")

# --- the config: the demo's, on spare ports, with short alarm delays ------
mqtt_port, feed_port, exp_port = free_port(), free_port(), free_port()
cfg_text = open("configs/demo.ini").read()
cfg_text = (cfg_text.replace("port = 15020", f"port = {feed_port}")
            .replace("tcp://127.0.0.1:18830", f"tcp://127.0.0.1:{mqtt_port}")
            .replace("listen = 127.0.0.1:15021", f"listen = 127.0.0.1:{exp_port}")
            .replace("build/demo/alarm-state.txt", os.path.join(tmp, "state.txt"))
            .replace("build/demo/events.jsonl", os.path.join(tmp, "events.jsonl"))
            .replace("on_delay_s = 20", "on_delay_s = 3"))
cfg = os.path.join(tmp, "live.ini")
open(cfg, "w").write(cfg_text)
prefix = "tarnwick/u40/floodgauge"

try:
    open(os.path.join(tmp, "mosq.conf"), "w").write(
        f"listener {mqtt_port} 127.0.0.1\nallow_anonymous true\npersistence false\n")
    start([MOSQ, "-c", os.path.join(tmp, "mosq.conf")], stdout=subprocess.DEVNULL,
          stderr=subprocess.DEVNULL)
    ok(wait_port(mqtt_port), "broker listening")
    sub = Sub(mqtt_port, prefix)
    time.sleep(0.3)

    feed = start([FG, "feed", "-c", cfg, csv], stdout=subprocess.PIPE, stderr=subprocess.STDOUT,
                 text=True)
    line = feed.stdout.readline()
    ok(line.startswith(f"listening on 127.0.0.1:{feed_port}"), "feed listening", line)
    run_log = open(os.path.join(tmp, "run.log"), "w")
    daemon = start([FG, "run", "-c", cfg, "--no-view"], stdout=run_log, stderr=subprocess.STDOUT)

    # state messages: the right fields and values
    st = sub.wait_for(lambda m: m[0] == "C401/state" and '"quality":"good"' in m[1], 15)
    ok(st is not None, "C401 state message with good quality")
    online = sub.wait_for(lambda m: m[0] == "status" and m[1] == "online", 5)
    ok(online is not None, "status online")
    if st:
        s = json.loads(st[1])
        for k in ("t", "section", "flood_pct", "flood_index", "jet_flood_pct", "weep_pct",
                  "gas_density_kgm3", "dp_pa", "quality", "extrapolated"):
            ok(k in s, f"state has {k}")
        # first data row: C401_PI 0.6 barg-ish and C401_TI ~110 degC; density from the
        # ideal gas law with M 19.5 (our own arithmetic on the fed values)
        f = rows[0].split(",")
        p = float(f[cols.index("C401_PI")]) * 1e5 + 101325
        t = float(f[cols.index("C401_TI")]) + 273.15
        rho = p * 19.5 / (8314.462618 * t)
        ok(abs(s["gas_density_kgm3"] - rho) / rho < 0.01, "state gas density from P and T",
           (s["gas_density_kgm3"], rho))
        ok(s["section"] == "C401" and 40 < s["flood_index"] < 90, "C401 at design", s)

    # export registers hold what the engine computed (compare with state messages)
    time.sleep(1.5)
    vals = mb_read_input_floats(exp_port, 0, 4)  # C401 flood_index, jet, dc_backup, weep
    recent = [json.loads(m[1]) for m in sub.messages() if m[0] == "C401/state"][-6:]
    match = any(all(math.isclose(v, r[k], rel_tol=1e-6) for v, k in
                    zip(vals, ("flood_index", "jet_flood_pct", "dc_backup_pct", "weep_pct")))
                for r in recent)
    ok(match, "export float32 registers equal a published state (float32 rounding)",
       (vals, [r["flood_index"] for r in recent]))
    resp = mb_request(exp_port, 6, struct.pack(">HH", 0, 1234))
    ok(resp[0] == 0x86 and resp[1] == 1, "a write to the export gets exception 1", resp)
    ok(mb_read_input_floats(exp_port, 0, 1)[0] != 1234, "and changes nothing")

    # the flood alarm, acknowledged by a command
    al = sub.wait_for(lambda m: m[0] == "alarm/C401_FLOOD_H" and '"unacknowledged"' in m[1], 30)
    ok(al is not None, "C401_FLOOD_H raised on its retained topic")
    pub(mqtt_port, prefix + "/cmd", '{"op":"ack","alarm":"C401_FLOOD_H","id":7}')
    rep = sub.wait_for(lambda m: m[0] == "cmd/reply" and '"id":7' in m[1], 10)
    ok(rep is not None and json.loads(rep[1]).get("ok") is True, "ack replied ok", rep)
    acked = sub.wait_for(lambda m: m[0] == "alarm/C401_FLOOD_H" and '"acknowledged"' in m[1], 10)
    ok(acked is not None, "alarm topic shows ACKED")
    pub(mqtt_port, prefix + "/cmd", '{"op":"ack","alarm":')
    bad = sub.wait_for(lambda m: m[0] == "cmd/reply" and '"ok":false' in m[1], 10)
    ok(bad is not None and "error" in json.loads(bad[1]), "malformed command refused", bad)
    pub(mqtt_port, prefix + "/cmd", '{"op":"ack","alarm":"NO_SUCH","id":"x9"}')
    unk = sub.wait_for(lambda m: m[0] == "cmd/reply" and '"x9"' in m[1], 10)
    ok(unk is not None and json.loads(unk[1]).get("ok") is False, "unknown alarm refused", unk)

    # SIGHUP with an invalid config keeps the running one
    good_text = open(cfg).read()
    open(cfg, "w").write(good_text.replace("trays = 20", "trays = twenty"))
    daemon.send_signal(signal.SIGHUP)
    time.sleep(2.0)
    open(cfg, "w").write(good_text)
    log = open(os.path.join(tmp, "run.log")).read()
    ok("keeping the running config" in log and daemon.poll() is None,
       "SIGHUP with an invalid config keeps running on the old one")

    # the data ends: then SIGKILL, and the will says offline
    feed.wait(timeout=90)
    time.sleep(3.0)
    n_before = len([m for m in sub.messages() if m == ("status", "offline")])
    daemon.send_signal(signal.SIGKILL)
    daemon.wait()
    off = None
    end = time.time() + 10
    while time.time() < end and off is None:
        if len([m for m in sub.messages() if m == ("status", "offline")]) > n_before:
            off = True
        time.sleep(0.1)
    ok(off is True, "status offline (the last will) after SIGKILL")

    # live and replay agree on the alarm sequence (the ack aside)
    live = [json.loads(l) for l in open(os.path.join(tmp, "events.jsonl"))]
    out = os.path.join(tmp, "replay")
    subprocess.run([FG, "replay", "-c", cfg, csv, "--out", out], check=True,
                   capture_output=True, timeout=60)
    rep_ev = [json.loads(l) for l in open(os.path.join(out, "events.jsonl"))]

    def seq(ev):
        # C401_FLOOD_H is left out: the live run acknowledged it, replay did not
        return [(e["alarm"], e["state"]) for e in ev if e["alarm"] != "C401_FLOOD_H"]

    ok(len(seq(rep_ev)) > 0 and seq(live) == seq(rep_ev), "live alarm sequence equals replay's",
       (seq(live), seq(rep_ev)))
    ok(any(e["alarm"] == "C401_FLOOD_H" and e["state"] == "unacknowledged" for e in rep_ev),
       "replay raises the same flood alarm")

    # a clean stop: --once publishes offline itself and saves the state
    n_before = len([m for m in sub.messages() if m == ("status", "offline")])
    rc = subprocess.run([FG, "run", "-c", cfg, "--once", "--no-view"], capture_output=True,
                        timeout=30).returncode
    ok(rc == 0 and os.path.exists(os.path.join(tmp, "state.txt")), "--once exits 0, state saved")
    end = time.time() + 5
    while time.time() < end and len([m for m in sub.messages()
                                     if m == ("status", "offline")]) <= n_before:
        time.sleep(0.1)
    ok(len([m for m in sub.messages() if m == ("status", "offline")]) > n_before,
       "a clean stop publishes offline")
finally:
    stop_all()
    shutil.rmtree(tmp, ignore_errors=True)
done()
