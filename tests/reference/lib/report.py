"""report.py - the pass and failure lines of the reference scripts (tests/reference/*.py), which
import it from here; it is no test itself (ctest registers only tests/reference/*.py)."""

failures = []


def fail(message):
    failures.append(message)
    print("FAIL: " + message)


def ok(message):
    print("ok: " + message)
