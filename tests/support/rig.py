"""rig.py - the pieces the fault tests start and stop on 127.0.0.1.

A throw-away mosquitto (no persistence, so a restart forgets every retained
message, as many site brokers do), `floodgauge feed` as the plant, the
daemon under test, and mosquitto_sub read-backs. Every process started here
is remembered and stopped by stop_all(), by its own pid.
"""
import json
import os
import shutil
import socket
import subprocess
import time

FG = os.environ.get("FG_BIN", "build/floodgauge")
MOSQ = shutil.which("mosquitto") or "/usr/sbin/mosquitto"
PREFIX = "tarnwick/u40/floodgauge"
procs = []


def have_broker():
    return os.path.exists(MOSQ) and shutil.which("mosquitto_sub") is not None


def free_port():
    s = socket.socket()
    s.bind(("127.0.0.1", 0))
    port = s.getsockname()[1]
    s.close()
    return port


def wait_port(port, timeout=10.0, host="127.0.0.1"):
    end = time.time() + timeout
    while time.time() < end:
        try:
            socket.create_connection((host, port), 0.2).close()
            return True
        except OSError:
            time.sleep(0.02)
    return False


def start(args, **kw):
    p = subprocess.Popen(args, **kw)
    procs.append(p)
    return p


def stop(p, sig=None):
    if p.poll() is None:
        if sig is None:
            p.kill()
        else:
            p.send_signal(sig)
        try:
            p.wait(timeout=20)
        except subprocess.TimeoutExpired:
            p.kill()
            p.wait()


def stop_all():
    for p in procs:
        if p.poll() is None:
            p.kill()
            p.wait()


class Broker:
    def __init__(self, tmp, port):
        self.port = port
        self.conf = os.path.join(tmp, "mosq.conf")
        open(self.conf, "w").write(
            f"listener {port} 127.0.0.1\nallow_anonymous true\npersistence false\n")
        self.p = None

    def start(self):
        self.p = start([MOSQ, "-c", self.conf], stdout=subprocess.DEVNULL,
                       stderr=subprocess.DEVNULL)
        return wait_port(self.port)

    def stop(self):
        stop(self.p)


class Sub:
    """mosquitto_sub -v on PREFIX/#, one line a message, read as they come."""

    def __init__(self, tmp, port, prefix=PREFIX, name="sub"):
        self.path = os.path.join(tmp, f"{name}-{len(procs)}.log")
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
            time.sleep(0.05)
        return None

    def stop(self):
        stop(self.p)


def retained(port, timeout=3.0, prefix=PREFIX):
    """Every retained message under PREFIX as {suffix: payload} (a late joiner's view)."""
    p = subprocess.run(["mosquitto_sub", "-h", "127.0.0.1", "-p", str(port), "-v", "-t",
                        prefix + "/#", "--retained-only", "-W", str(int(timeout))],
                       capture_output=True, text=True, timeout=timeout + 10)
    out = {}
    for line in p.stdout.splitlines():
        topic, _, payload = line.partition(" ")
        out[topic[len(prefix) + 1:]] = payload
    return out


def pub(port, topic, payload, qos=1):
    subprocess.run(["mosquitto_pub", "-h", "127.0.0.1", "-p", str(port), "-q", str(qos),
                    "-t", topic, "-m", payload], check=True, timeout=10)


def plant_csv(tmp, rows=600):
    """The demo's steady data, times from 2026-03-04T06:00:00Z, one row a second."""
    base = open("replay/data/demo-steady.csv").read().splitlines()
    header, body = base[0], base[1:rows + 1]
    t0 = 1772604000
    data = [header]
    for i, r in enumerate(body):
        f = r.split(",")
        f[0] = str(t0 + i)
        data.append(",".join(f))
    path = os.path.join(tmp, "plant.csv")
    open(path, "w").write("\n".join(data) + "\n")
    return path


def config(tmp, mqtt_port, feed_port, exp_port, events=None, state=None, extra=None):
    """The demo config on spare ports, diagnostic alarms after 1 s instead of 10, and
    back after 1 s instead of their default 60 s off-delay."""
    text = open("configs/demo.ini").read()
    text = (text.replace("port = 15020", f"port = {feed_port}")
            .replace("tcp://127.0.0.1:18830", f"tcp://127.0.0.1:{mqtt_port}")
            .replace("listen = 127.0.0.1:15021", f"listen = 127.0.0.1:{exp_port}")
            .replace("build/demo/alarm-state.txt", state or os.path.join(tmp, "state.txt"))
            .replace("build/demo/events.jsonl", events or os.path.join(tmp, "events.jsonl"))
            .replace("on_delay_s = 10", "on_delay_s = 1\noff_delay_s = 1"))
    for section, lines in (extra or {}).items():
        text = text.replace(f"[{section}]\n", f"[{section}]\n{lines}\n", 1)
    path = os.path.join(tmp, "fault.ini")
    open(path, "w").write(text)
    return path


def alarm_names(cfg_path):
    return [line.strip()[len("[alarm."):-1] for line in open(cfg_path)
            if line.startswith("[alarm.")]


def feed(cfg, csv):
    p = start([FG, "feed", "-c", cfg, csv, "--loop"], stdout=subprocess.PIPE,
              stderr=subprocess.STDOUT, text=True)
    line = p.stdout.readline()
    return p, line


def daemon(cfg, log_path):
    log = open(log_path, "a")
    return start([FG, "run", "-c", cfg, "--no-view"], stdout=log, stderr=subprocess.STDOUT)


def events(path):
    out = []
    if os.path.exists(path):
        for line in open(path):
            out.append(json.loads(line))
    return out
