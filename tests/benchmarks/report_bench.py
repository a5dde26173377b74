#!/usr/bin/python3
"""Report-generation benchmark (not a test: run by hand, never by CTest;
speed is measured here only).

For every demo case it times, one after another on the same machine, the
whole process of
- `loopwright check CASE -q --json OUT` (the reference: the envelope sweep,
  checks and fixes the report also runs), and
- `loopwright size CASE -q` (the second reference: the design questions the
  report also answers; cases without questions: 0),
- `loopwright report CASE -o OUT.html --md OUT.md -q --run envelope` (the
  check run plus the pump and system curves, the Graphviz drawing and the
  page with its inlined plot scripts), and
- `loopwright report CASE -o OUT.html --md OUT.md -q` (all of it, with the
  sizing answers and their scans),
each `--reps` times (default 3), and prints the median wall times, the
ratio of the envelope-only report to check and of the whole report to check
plus size, and the page's size.

Run: tests/benchmarks/report_bench.py [--bin build/loopwright] [--reps 3]
"""
import argparse
import os
import statistics
import subprocess
import tempfile
import time

HERE = os.path.dirname(os.path.abspath(__file__))
SRC = os.path.normpath(os.path.join(HERE, "..", ".."))


def wall(cmd, reps):
    times = []
    for _ in range(reps):
        t0 = time.perf_counter()
        subprocess.run(cmd, capture_output=True, check=False)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--bin", default=os.path.join(SRC, "build", "loopwright"))
    ap.add_argument("--reps", type=int, default=3)
    a = ap.parse_args()
    print(f"{'case':<20} {'check s':>8} {'size s':>7} {'report env s':>13} {'ratio':>6} {'report s':>9} {'ratio':>6} "
          f"{'page kB':>8} {'md B':>6}")
    with tempfile.TemporaryDirectory() as tmp:
        for stem in ("apu_test_cell", "gearbox_lube_skid", "turbo_test_stand"):
            case = os.path.join(SRC, "cases", stem + ".json")
            page, md, js = (os.path.join(tmp, stem + ext) for ext in (".html", ".md", ".json"))
            t_check = wall([a.bin, "check", case, "-q", "--json", js], a.reps)
            t_size = wall([a.bin, "size", case, "-q"], a.reps)
            t_env = wall([a.bin, "report", case, "-o", page, "--md", md, "-q", "--run", "envelope"], a.reps)
            t_report = wall([a.bin, "report", case, "-o", page, "--md", md, "-q"], a.reps)
            size = os.path.getsize(page) if os.path.exists(page) else float("nan")
            msize = os.path.getsize(md) if os.path.exists(md) else float("nan")
            print(f"{stem:<20} {t_check:8.2f} {t_size:7.2f} {t_env:13.2f} {t_env / t_check:6.1f} {t_report:9.2f} "
                  f"{t_report / (t_check + t_size):6.1f} {size / 1024:8.0f} {msize:6.0f}")

if __name__ == "__main__":
    main()
