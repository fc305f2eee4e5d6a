"""tap.py - a few lines of TAP for the python and CLI tests."""
import os
import subprocess
import sys

_count = 0
_failed = 0


def ok(cond, name, diag=None):
    """Reports one test; prints diag lines when it fails."""
    global _count, _failed
    _count += 1
    if cond:
        print(f"ok {_count} - {name}")
    else:
        _failed += 1
        print(f"not ok {_count} - {name}")
        if diag:
            for line in str(diag).splitlines():
                print(f"# {line}")
    sys.stdout.flush()
    return cond


def done():
    print(f"1..{_count}")
    sys.exit(1 if _failed else 0)


def fg(*args, input_text=None, timeout=120):
    """Runs the floodgauge binary under test; returns (rc, stdout, stderr)."""
    binary = os.environ.get("FG_BIN", "build/floodgauge")
    p = subprocess.run([binary, *args], capture_output=True, text=True, input=input_text,
                       timeout=timeout)
    return p.returncode, p.stdout, p.stderr
