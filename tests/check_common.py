"""What every outside check script (tests/*_check.py) shares: its command line
(--lobecast, --samples, --workdir), the list of failed checks, and the summary line
and exit status. Run by /usr/bin/python3 from ctest; the scripts import this module
from their own folder."""
import argparse
import os
import sys

failures = []


def check(ok, what):
    """Records a failed check and prints it; returns ok."""
    if not ok:
        failures.append(what)
        print("FAIL:", what)
    return ok


def arguments():
    """The scripts' common options; the work folder is created."""
    ap = argparse.ArgumentParser()
    ap.add_argument("--lobecast", required=True, help="the lobecast executable")
    ap.add_argument("--samples", required=True, help="the sample-arrays folder")
    ap.add_argument("--workdir", required=True, help="a folder for outputs")
    a = ap.parse_args()
    os.makedirs(a.workdir, exist_ok=True)
    return a


def summary(name):
    """Prints how the checks went; the exit status (0 when all passed)."""
    if failures:
        print(f"{name}: {len(failures)} check(s) failed", file=sys.stderr)
        return 1
    print(f"{name}: all passed")
    return 0
