"""test_fault_disk_broker.py - faults of the disk, the plant link and the broker.

Started here on 127.0.0.1 and stopped here: mosquitto (no persistence),
`floodgauge feed` (the plant) and `floodgauge run`. The events file lives on a
64 KiB tmpfs mounted here (root only; without root a file size limit set on
the daemon with prlimit stands in for the full disk). Checked, with what was
measured printed as '# measured:' lines:
  1. disk full: alarm events raised while the events file cannot be written
     are held, the failure is logged once and the recovery once, and every
     event logged by the daemon ends up in the file, in order;
  5. the plant link comes back: seconds from the feed listening again to the
     first good state message (and the daemon's own "recovered after");
  2. the broker restarts without persistence: a late subscriber sees every
     configured alarm's retained state again (never-fired ones normal) and
     "online"; seconds from the broker listening to the retained "online";
  2. a clean stop right after the broker returns: the queued alarm messages
     reach the broker before "offline".
No timing is asserted (the machine is shared); the bounds below only stop a
hung wait.
"""
import os
import re
import resource
import shutil
import signal
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
import rig  # noqa: E402
from tap import ok, done  # noqa: E402

if not rig.have_broker():
    print("ok 1 # SKIP mosquitto is not installed")
    print("1..1")
    sys.exit(0)

tmp = tempfile.mkdtemp(prefix="fg-fault-")
small = os.path.join(tmp, "small")
os.makedirs(small)
mounted = False
if os.geteuid() == 0:
    mounted = subprocess.run(["mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", small],
                             capture_output=True).returncode == 0
print(f"# disk full by: {'a 64 KiB tmpfs' if mounted else 'prlimit RLIMIT_FSIZE (no mount)'}")

ev_path = os.path.join(small, "events.jsonl")
mqtt_port, feed_port, exp_port = rig.free_port(), rig.free_port(), rig.free_port()
csv = rig.plant_csv(tmp)
cfg = rig.config(tmp, mqtt_port, feed_port, exp_port, events=ev_path)
names = rig.alarm_names(cfg)
run_log = os.path.join(tmp, "run.log")
filler = os.path.join(small, "filler")


def log_text():
    return open(run_log).read()


def fill_disk(pid):
    """Fills the tmpfs (or caps the daemon's file size at what the file has now)."""
    if mounted:
        fdesc = os.open(filler, os.O_WRONLY | os.O_CREAT, 0o644)
        try:
            while os.write(fdesc, b"\0" * 512) > 0:
                pass
        except OSError:
            pass
        os.close(fdesc)
    else:
        size = os.path.getsize(ev_path) if os.path.exists(ev_path) else 0
        resource.prlimit(pid, resource.RLIMIT_FSIZE, (size, resource.RLIM_INFINITY))


def free_disk(pid):
    if mounted:
        os.unlink(filler)
    else:
        resource.prlimit(pid, resource.RLIMIT_FSIZE,
                         (resource.RLIM_INFINITY, resource.RLIM_INFINITY))


def wait_log(pattern, timeout):
    end = time.time() + timeout
    while time.time() < end:
        if re.search(pattern, log_text()):
            return True
        time.sleep(0.05)
    return False


try:
    broker = rig.Broker(tmp, mqtt_port)
    ok(broker.start(), "broker listening")
    sub = rig.Sub(tmp, mqtt_port)
    time.sleep(0.3)
    fd, line = rig.feed(cfg, csv)
    ok(line.startswith("listening on"), "feed listening", line)
    d = rig.daemon(cfg, run_log)
    ok(sub.wait_for(lambda m: m[0] == "C401/state" and '"quality":"good"' in m[1], 20)
       is not None, "running with good data")

    # --- 1. disk full while alarms are raised and cleared ---------------------
    fill_disk(d.pid)
    n_log0 = len(re.findall(r" alarm \S+ \S+ -> ", log_text()))
    rig.stop(fd)  # the plant goes away: diagnostic alarms after their 1 s delay
    ok(wait_log(r"cannot write events file", 20), "the write failure is logged")
    ok(wait_log(r"alarm R404_DIAG \S+ -> ", 10) and wait_log(r"alarm C402_DIAG \S+ -> ", 10),
       "diagnostic alarms raised while the disk is full")

    # --- 5. the plant returns -------------------------------------------------
    n_state = len(sub.messages())
    fd, line = rig.feed(cfg, csv)
    t_feed = time.time()
    good = sub.wait_for(lambda m: m[0] == "C401/state" and '"quality":"good"' in m[1]
                        and sub.messages().index(m) >= n_state, 30)
    t_good = time.time()
    ok(good is not None, "good data again after the plant returns")
    print(f"# measured: plant back -> first good state message {t_good - t_feed:.2f} s "
          "(includes up to one 1 s period and the 1 s state interval)")
    m = re.findall(r"source plc40: recovered after ([0-9.]+) s", log_text())
    ok(len(m) >= 1, "the daemon logs the plant link's recovery")
    ok(wait_log(r"alarm R404_DIAG \S+ -> RTNUN|alarm R404_DIAG \S+ -> returned", 20),
       "diagnostic alarm returns to normal, still on a full disk")
    n_fail = log_text().count("cannot write events file")
    ok(n_fail == 1, "the failure is said once, not per event", n_fail)

    # space returns
    free_disk(d.pid)
    ok(wait_log(r"events file \S+ writable again: \d+ held", 10), "the recovery is logged")
    held = re.findall(r"writable again: (\d+) held", log_text())
    print(f"# measured: events held while the disk was full and written after: {held[-1]}")
    ok(int(held[-1]) >= 4, "at least the 4 diagnostic transitions were held", held)

    # --- 2. broker restart without persistence ---------------------------------
    sub.stop()
    broker.stop()
    time.sleep(1.5)
    ok(broker.start(), "broker back")
    t_back = time.time()
    sub2 = rig.Sub(tmp, mqtt_port, name="late")
    online = sub2.wait_for(lambda m: m == ("status", "online"), 15)
    t_online = time.time()
    ok(online is not None, "online again after the broker restart")
    print(f"# measured: broker listening again -> daemon's 'online' at a subscriber "
          f"{t_online - t_back:.2f} s")
    end = time.time() + 15
    while time.time() < end and not all(("alarm/" + n) in dict(sub2.messages()) for n in names):
        time.sleep(0.05)
    print(f"# measured: broker listening again -> all {len(names)} alarm states republished "
          f"{time.time() - t_back:.2f} s (the republish runs in the next 1 s cycle)")
    seen = rig.retained(mqtt_port, timeout=2)
    ok(seen.get("status") == "online", "retained online after the broker restart", seen)
    missing = [n for n in names if f"alarm/{n}" not in seen]
    ok(not missing, "every configured alarm's state is retained again", missing)
    m = re.findall(r"reconnected after ([0-9.]+) s", log_text())
    if m:
        print(f"# measured: daemon's own figure: reconnected after {m[-1]} s of outage "
              "(1.5 s of it with the broker stopped)")
    import json
    states = {n: json.loads(seen[f"alarm/{n}"])["state"] for n in names if f"alarm/{n}" in seen}
    evs = rig.events(ev_path)
    fired = {e["alarm"] for e in evs}
    never = [n for n in names if n not in fired]
    ok(never and all(states.get(n) in ("NORM", "normal") for n in never),
       "alarms that never fired are published as normal", (never, states))
    last = {}
    for e in evs:
        last[e["alarm"]] = e["state"]
    ok(all(states.get(a) == s for a, s in last.items()),
       "the retained states equal each alarm's last event", (last, states))

    # --- 2. clean stop with alarm messages queued ------------------------------
    broker.stop()
    n_before = len(re.findall(r"alarm R404_DIAG \S+ -> ", log_text()))
    rig.stop(fd)  # diagnostics again, with the broker away: queued
    end = time.time() + 20
    while time.time() < end and len(re.findall(r"alarm R404_DIAG \S+ -> ", log_text())) == n_before:
        time.sleep(0.05)
    ok(len(re.findall(r"alarm R404_DIAG \S+ -> ", log_text())) > n_before,
       "alarm raised while the broker is away")
    ok(broker.start(), "broker back once more")
    d.send_signal(signal.SIGTERM)  # at once: the queue is flushed by the stop itself
    rc = d.wait(timeout=30)
    ok(rc == 0, "clean stop exits 0", rc)
    seen = rig.retained(mqtt_port, timeout=2)
    evs = rig.events(ev_path)
    last = {}
    for e in evs:
        last[e["alarm"]] = e["state"]
    states = {n: json.loads(seen[f"alarm/{n}"])["state"] for n in last if f"alarm/{n}" in seen}
    ok(seen.get("status") == "offline", "offline after the stop", seen.get("status"))
    ok(states == last, "queued alarm messages reached the broker before offline",
       (last, states))
    ok("not delivered at close" not in log_text(), "nothing left undelivered at close")

    # every event the daemon logged is in the file, in the same order
    logged = re.findall(r" alarm (\S+) \S+ -> (\S+) \(", log_text())
    infile = [(e["alarm"], e["state"]) for e in rig.events(ev_path)]
    ok(logged == infile, "every logged alarm event is in the events file, in order",
       (len(logged), len(infile), n_log0))
    print(f"# measured: {len(infile)} events in the file, {len(logged)} logged, 0 lost")
finally:
    rig.stop_all()
    if os.environ.get("FG_KEEP"):
        shutil.copy(run_log, "/tmp/fault-run.log")
    if mounted:
        subprocess.run(["umount", "-l", small], capture_output=True)
    shutil.rmtree(tmp, ignore_errors=True)
done()
