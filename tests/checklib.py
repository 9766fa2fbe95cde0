"""checklib.py - the tally the Python test scripts share.

count() counts a check; fail(msg) prints "FAIL: msg" and counts a failure;
check(cond, msg) is both; finish() prints "N checks, N failures" and exits
1 on a failure or when nothing was checked (a check that cannot fail is a
defect).
"""
import sys

tally = {"checks": 0, "failures": 0}


def count():
    tally["checks"] += 1


def fail(msg):
    tally["failures"] += 1
    print("FAIL:", msg)


def check(cond, msg):
    count()
    if not cond:
        fail(msg)
    return cond


def finish(extra=""):
    print("%d checks, %d failures%s" % (tally["checks"], tally["failures"], extra))
    sys.exit(1 if tally["failures"] or tally["checks"] == 0 else 0)
