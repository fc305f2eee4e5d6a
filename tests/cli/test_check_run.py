"""test_check_run.py - `floodgauge check` catches what `run` would fail on.

Each case edits the demo config in a temporary directory and runs check:
errors exit 2 with FILE:LINE: what; warnings keep exit 0. Files that are not
configs (a device, a directory, NUL bytes, old Mac CR-only line ends) get a
clear message and check ends (bounded here by a 10 s timeout).
"""
import os
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "support"))
from tap import ok, done, fg  # noqa: E402

tmp = tempfile.mkdtemp(prefix="fg-check-")
base = open("configs/demo.ini", encoding="utf-8").read()
base = base.replace("build/demo/", tmp + "/")
MQTT_LINE = base.splitlines().index("[mqtt]") + 1


def check_text(text, name="c.ini", mode="w"):
    path = os.path.join(tmp, name)
    with open(path, mode) as f:
        f.write(text)
    return fg("check", "-c", path, timeout=10)


try:
    rc, out, err = check_text(base)
    ok(rc == 0 and "ok:" in out and err == "", "the demo config is ok, with no warning", err)

    rc, out, err = check_text(base.replace("tcp://127.0.0.1:18830", "mqtt://127.0.0.1:18830"))
    ok(rc == 2 and "scheme not supported" in err and f":{MQTT_LINE}: " in err,
       "an unsupported MQTT URI scheme is an error with its line", err)

    pw = os.path.join(tmp, "no-such-password")
    rc, out, err = check_text(base.replace("[mqtt]\n", f"[mqtt]\npassword_file = {pw}\n"))
    ok(rc == 2 and "password_file" in err and "No such file or directory" in err,
       "a missing password file is an error", err)

    ca = os.path.join(tmp, "ca.pem")
    open(ca, "w").write("x\n")
    rc, out, err = check_text(base.replace("[mqtt]\n", f"[mqtt]\nca_file = {ca}\n"))
    ok(rc == 2 and "ca_file is given but the uri is not ssl://" in err,
       "a CA file with a tcp:// URI is an error", err)

    rc, out, err = check_text(base.replace("name = tarnwick-u40", "name = tarnwick-u40\xe9")
                              .encode("latin-1", "replace"), mode="wb")
    ok(rc == 2 and "not valid UTF-8" in err, "invalid UTF-8 in the name is an error", err)

    rc, out, err = check_text(base.replace("tcp://127.0.0.1:18830", "tcp://broker.invalid:1883"))
    ok(rc == 0 and "warning: mqtt host 'broker.invalid' does not resolve" in err,
       "an unresolvable broker host is a warning, not an error", err)

    rc, out, err = check_text(base.replace("listen = 127.0.0.1:15021", "listen = 0.0.0.0:15021"))
    ok(rc == 0 and "warning: the Modbus export listens beyond loopback" in err,
       "an export listening beyond loopback is warned about", err)

    rc, out, err = check_text(base.replace("listen = 127.0.0.1:15021",
                                           "listen = export.invalid:15021"))
    ok(rc == 0 and "export listen host 'export.invalid' does not resolve" in err,
       "an unresolvable export host is a warning", err)

    rc, out, err = fg("check", "-c", "/dev/zero", timeout=10)
    ok(rc == 2 and "not a regular file" in err, "check -c /dev/zero ends with a clear message",
       err)
    rc, out, err = fg("check", "-c", tmp, timeout=10)
    ok(rc == 2 and "is a directory" in err, "a directory is refused", err)

    big = os.path.join(tmp, "big.ini")
    with open(big, "wb") as f:
        f.truncate(2 * 1024 * 1024)
    rc, out, err = fg("check", "-c", big, timeout=10)
    ok(rc == 2 and "larger than any config" in err, "a file over 1 MiB is refused", err)

    rc, out, err = check_text(base.replace("period_s = 1", "period_s = 1\0junk", 1), "nul.ini")
    ok(rc == 2 and "NUL byte in the line" in err, "a NUL byte is reported as such", err)
    ok("longer than" not in err, "and not as a long line", err)
    lines = [l for l in err.splitlines() if "nul.ini:" in l]
    ok(len(lines) == 1, "the line after the NUL is not swallowed (one message only)", err)

    rc, out, err = check_text(base.replace("\n", "\r"), "cr.ini")
    ok(rc == 2 and "lone CR" in err and err.count("lone CR") == 1,
       "CR-only line ends are reported once, clearly", err)
    rc, out, err = check_text(base.replace("\n", "\r\n"), "crlf.ini")
    ok(rc == 0, "CRLF line ends are fine", err)
finally:
    shutil.rmtree(tmp, ignore_errors=True)
done()
