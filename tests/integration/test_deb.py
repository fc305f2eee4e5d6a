"""test_deb.py - `make deb` builds the Debian package, and it holds what it must.

Runs dpkg-buildpackage through `make deb` (in build/deb/, a copy of the tree)
and inspects the .deb with dpkg-deb: the binary in /usr/bin, the config as a
conffile in /etc/floodgauge, the systemd unit (Type=notify, a watchdog, the
state directory), the man page; lintian reports no error or warning. Skipped
under SAN=1 (the same package twice) and where dpkg-buildpackage is missing.
"""
import os
import re
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done  # noqa: E402

if os.environ.get("SAN") == "1":
    print("ok 1 # SKIP the package is built once, in the plain run")
    print("1..1")
    sys.exit(0)
if subprocess.run(["sh", "-c", "command -v dpkg-buildpackage"], capture_output=True).returncode:
    print("ok 1 # SKIP dpkg-buildpackage is not installed (tools/deps.sh deb)")
    print("1..1")
    sys.exit(0)

p = subprocess.run(["make", "--no-print-directory", "deb"], capture_output=True, text=True,
                   timeout=600)
ok(p.returncode == 0, "make deb succeeds", (p.stdout + p.stderr)[-1500:])
debs = [f for f in os.listdir("build/deb") if re.match(r"floodgauge_.*_amd64\.deb$|"
                                                        r"floodgauge_[^_]+_[a-z0-9]+\.deb$", f)]
ok(len(debs) == 1, "one package", debs)
deb = os.path.join("build/deb", debs[0])
files = subprocess.run(["dpkg-deb", "-c", deb], capture_output=True, text=True).stdout
for path in ("./usr/bin/floodgauge", "./etc/floodgauge/floodgauge.ini",
             "./lib/systemd/system/floodgauge.service", "./usr/share/man/man1/floodgauge.1.gz",
             "./usr/share/doc/floodgauge/copyright"):
    ok(re.search(r"\s" + re.escape(path) + r"$", files, re.M), f"package has {path}")
ctl = os.path.join("build/deb", "ctl")
subprocess.run(["rm", "-rf", ctl])
subprocess.run(["dpkg-deb", "-e", deb, ctl], check=True)
ok(open(os.path.join(ctl, "conffiles")).read().split() == ["/etc/floodgauge/floodgauge.ini"],
   "the config is the package's conffile")
x = os.path.join("build/deb", "x")
subprocess.run(["rm", "-rf", x])
os.makedirs(x)
subprocess.run(["dpkg-deb", "-x", deb, x], check=True)
svc = open(os.path.join(x, "lib/systemd/system/floodgauge.service")).read()
ok("Type=notify" in svc and re.search(r"^WatchdogSec=\d+", svc, re.M),
   "the unit is Type=notify with a watchdog")
ok("ExecStart=/usr/bin/floodgauge run -c /etc/floodgauge/floodgauge.ini" in svc,
   "the unit runs /usr/bin/floodgauge on the conffile")
ok("StateDirectory=floodgauge" in svc, "state under /var/lib/floodgauge (StateDirectory)")
ini = open(os.path.join(x, "etc/floodgauge/floodgauge.ini")).read()
ok("/var/lib/floodgauge/" in ini, "the config keeps its state in /var/lib/floodgauge")
v = subprocess.run([os.path.join(x, "usr/bin/floodgauge"), "--version"], capture_output=True,
                   text=True)
ok(v.returncode == 0 and v.stdout.startswith("floodgauge "), "the packaged binary runs", v)
lint = subprocess.run(["lintian", deb], capture_output=True, text=True)
bad = [l for l in lint.stdout.splitlines() if re.match(r"[EW]: ", l)]
ok(not bad, "lintian: no error or warning", bad)
print("# lintian said: " + (" | ".join(lint.stdout.splitlines()) or "nothing"))
done()
