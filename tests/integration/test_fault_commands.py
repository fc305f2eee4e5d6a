"""test_fault_commands.py - hostile and stale commands on PREFIX/cmd.

Started here on 127.0.0.1 and stopped here: mosquitto, `floodgauge feed` and
`floodgauge run`. Checked (counts printed as '# measured:' lines):
  - a shelve sent while the daemon was stopped is not carried out when it
    comes back (the broker keeps no session for it);
  - a command whose "t" is older than cmd_max_age_s is refused with a reply
    saying why; a fresh one is carried out;
  - a burst of 80 commands in one period: every one gets an answer (its own
    reply, or a reply saying how many were not carried out), none vanishes;
  - a payload with a newline and a terminal escape is logged escaped: it
    cannot forge a log line.
"""
import datetime
import json
import os
import re
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

tmp = tempfile.mkdtemp(prefix="fg-cmd-")
mqtt_port, feed_port, exp_port = rig.free_port(), rig.free_port(), rig.free_port()
csv = rig.plant_csv(tmp)
cfg = rig.config(tmp, mqtt_port, feed_port, exp_port)
run_log = os.path.join(tmp, "run.log")
CMD = rig.PREFIX + "/cmd"


def iso(t):
    return datetime.datetime.fromtimestamp(t, datetime.timezone.utc).strftime(
        "%Y-%m-%dT%H:%M:%SZ")


def replies(sub):
    return [json.loads(p) for t, p in sub.messages() if t == "cmd/reply"]


try:
    broker = rig.Broker(tmp, mqtt_port)
    ok(broker.start(), "broker listening")
    fd, line = rig.feed(cfg, csv)
    sub = rig.Sub(tmp, mqtt_port)
    d = rig.daemon(cfg, run_log)
    ok(sub.wait_for(lambda m: m == ("status", "online"), 15) is not None, "daemon online")
    time.sleep(1.0)

    # --- a command sent while the daemon is away ------------------------------
    rig.stop(d, signal.SIGTERM)
    rig.pub(mqtt_port, CMD, '{"op":"shelve","alarm":"C401_FLOOD_H","duration_s":600,'
            '"id":"while-away"}')
    d = rig.daemon(cfg, run_log)
    n_online = len([m for m in sub.messages() if m == ("status", "online")])
    sub.wait_for(lambda m: len([x for x in sub.messages() if x == ("status", "online")])
                 > n_online, 15)
    rig.pub(mqtt_port, CMD, '{"op":"unshelve","alarm":"C401_FLOOD_H","id":"marker"}')
    mk = sub.wait_for(lambda m: m[0] == "cmd/reply" and '"marker"' in m[1], 15)
    ok(mk is not None, "the daemon answers after its restart")
    away = [r for r in replies(sub) if r.get("id") == "while-away"]
    ok(not away, "a shelve sent while the daemon was away is not carried out", away)
    ok(mk is not None and json.loads(mk[1]).get("error") ==
       "nothing to do in the alarm's current state",
       "and the alarm was not shelved (unshelve has nothing to do)", mk)

    # --- the age limit ---------------------------------------------------------
    rig.pub(mqtt_port, CMD, json.dumps({"op": "ack", "alarm": "C401_FLOOD_H", "id": "old",
                                        "t": iso(time.time() - 120)}))
    r = sub.wait_for(lambda m: m[0] == "cmd/reply" and '"old"' in m[1], 10)
    ok(r is not None and json.loads(r[1]).get("ok") is False
       and "too old" in json.loads(r[1]).get("error", ""),
       "a command 120 s old is refused, and the reply says why", r)
    if r:
        print(f"# measured: reply to the stale command: {json.loads(r[1])['error']}")
    rig.pub(mqtt_port, CMD, json.dumps({"op": "shelve", "alarm": "C401_FLOOD_H", "id": "fresh",
                                        "duration_s": 60, "t": iso(time.time())}))
    r = sub.wait_for(lambda m: m[0] == "cmd/reply" and '"fresh"' in m[1], 10)
    ok(r is not None and json.loads(r[1]).get("ok") is True, "a fresh command is carried out", r)

    # --- a burst of 80 commands in one period ----------------------------------
    before = len(replies(sub))
    burst = "\n".join(json.dumps({"op": "ack", "alarm": "NO_SUCH", "id": f"b{i}"})
                      for i in range(80)) + "\n"
    subprocess.run(["mosquitto_pub", "-h", "127.0.0.1", "-p", str(mqtt_port), "-q", "1",
                    "-t", CMD, "-l"], input=burst, text=True, check=True, timeout=20)
    end = time.time() + 15
    answered, dropped = 0, 0
    while time.time() < end:
        new = replies(sub)[before:]
        answered = len([x for x in new if str(x.get("id", "")).startswith("b")])
        dropped = sum(int(m.group(1)) for x in new if "id" not in x
                      for m in [re.match(r"(\d+) command\(s\) not carried out",
                                         x.get("error", ""))] if m)
        if answered + dropped >= 80:
            break
        time.sleep(0.1)
    print(f"# measured: burst of 80: {answered} answered one by one, {dropped} refused as a "
          "batch with one reply")
    ok(answered + dropped == 80, "every command of the burst is answered", (answered, dropped))

    # --- log injection -----------------------------------------------------------
    evil = '{"op":"ack","alarm":"X"}\n2026-01-01T00:00:00Z error: forged\x1b[31m'
    rig.pub(mqtt_port, CMD, evil)
    time.sleep(2.0)
    log = open(run_log).read()
    ok("\x1b" not in log, "no raw escape character reaches the log")
    ok(not re.search(r"^2026-01-01T00:00:00Z error: forged", log, re.M),
       "the payload cannot start a log line of its own")
    ok("\\x0a2026-01-01T00:00:00Z error: forged\\x1b[31m" in log, "the payload is logged escaped")
finally:
    rig.stop_all()
    shutil.rmtree(tmp, ignore_errors=True)
done()
