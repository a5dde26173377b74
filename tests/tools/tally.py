"""Pass/fail tally shared by the Python tests that drive the command line.

check(ok, what, detail)  records one assertion; a failure prints "FAIL: what"
    and the detail.
finish()  prints "N passed, M failed" (the closing line CTest logs show) and
    exits 1 if anything failed or nothing was checked, else 0.
"""
import sys

_passed = 0
_failed = 0


def check(ok, what, detail=""):
    global _passed, _failed
    if ok:
        _passed += 1
    else:
        _failed += 1
        print(f"FAIL: {what}" + (f"\n      {detail}" if detail else ""))


def finish():
    print(f"{_passed} passed, {_failed} failed")
    sys.exit(1 if _failed or not _passed else 0)
