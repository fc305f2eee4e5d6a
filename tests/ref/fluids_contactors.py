"""fluids_contactors.py - the impeller Froude number against python3-fluids.

python3-fluids (Debian's, run with /usr/bin/python3) has no gassed-stirred-
vessel, airlift-loop or packed-bubble-column method: its mixing module covers
blend times, helical ribbons and motionless mixers, and its voidage
correlations are for pipe flow. What it does share is the Froude number:
fluids.core.Froude(V, L, squared=True) = V^2 / (g L), which with V = N D (the
impeller's speed scale) and L = D is the impeller Froude number N^2 D / g of
stirred_froude_number. Compared on a grid of speeds 0.2..10 rev/s and
impeller diameters 0.05..3 m.

Tolerance 1e-12 relative: the same closed form in double precision with the
same g (9.80665, checked first); the only difference is the order of the
floating-point operations. Prints TAP; exits non-zero on failure.
"""
import ctypes
import os
import sys

sys.path.insert(0, "/usr/lib/python3/dist-packages")

TOL = 1e-12
G = 9.80665


def main():
    so = os.environ.get("FG_REF_SO", "build/ref/libfgmodels.so")
    try:
        from fluids.core import Froude
        from fluids.constants import g as fluids_g
    except ImportError as e:
        print("1..1")
        print("not ok 1 - import fluids (%s)" % e)
        return 1
    try:
        lib = ctypes.CDLL(so)
    except OSError as e:
        print("1..1")
        print("not ok 1 - load %s (%s)" % (so, e))
        return 1
    fr = lib.stirred_froude_number
    fr.restype = ctypes.c_double
    fr.argtypes = [ctypes.c_double, ctypes.c_double]
    tests = [("fluids uses standard gravity 9.80665", fluids_g == G, "")]
    worst = (0.0, None)
    failures = []
    points = 0
    for i in range(15):
        n = 0.2 * (10.0 / 0.2) ** (i / 14.0)
        for j in range(12):
            d = 0.05 * (3.0 / 0.05) ** (j / 11.0)
            ours = fr(n, d)
            ref = Froude(V=n * d, L=d, squared=True)
            rel = abs(ours / ref - 1.0)
            if rel > worst[0]:
                worst = (rel, (n, d))
            if not rel <= TOL:
                failures.append("# N %g D %g: ours %.15g fluids %.15g\n" % (n, d, ours, ref))
            points += 1
    tests.append(("at least 150 points compared (%d)" % points, points >= 150, ""))
    tests.append(("impeller Froude number matches fluids.core.Froude(squared=True)",
                  not failures, "".join(failures[:10])))
    print("1..%d" % len(tests))
    rc = 0
    for i, (name, ok, diag) in enumerate(tests, 1):
        print("%s %d - %s" % ("ok" if ok else "not ok", i, name))
        if diag:
            sys.stdout.write(diag)
        if not ok:
            rc = 1
    if worst[1] is not None:
        print("# worst relative difference %.3e at N %g rev/s, D %g m" % (worst[0], *worst[1]))
    return rc


if __name__ == "__main__":
    sys.exit(main())
