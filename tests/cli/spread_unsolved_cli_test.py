"""Drives `loopwright spread` (LOOPWRIGHT_BIN) on a tolerance study in which
some samples have no result: tests/network/check_cases/
expander_skid_tolerances.json (invented data), an expander skid whose journal
bearings, with a tight clearance and a thick oil batch drawn together, at
48,000 rpm with 15 degC cooling water take too little oil for their friction
heat and run past the oil model's range. Checks:

- such samples are counted (`samples_unsolved`); the first of each sweep
  block (at most 4 a block, 20 in all) are listed with their cause, naming
  a journal bearing, in the JSON and in the printed summary;
- no check counts them as passes: every check's `solved` is the samples
  less the unsolved ones;
- the printed summary bounds what they could change: were all K of N
  failures of a check with f failures among S = N - K solved samples, its
  probability would be (f + K) / N instead of f / S, higher by
  K (S - f) / (N S) <= K / N (closed form); the printed bound is K / N,
  and every check's rise computed here from its own counts is within it.
"""
import json
import os
import re
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASE = os.path.join(SRC, "tests", "network", "check_cases", "expander_skid_tolerances.json")
N = 200

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402

with tempfile.TemporaryDirectory() as tmp:
    out = os.path.join(tmp, "spread.json")
    r = subprocess.run([BIN, "spread", CASE, "--samples", str(N), "--threads", "2", "--json", out],
                       capture_output=True, text=True, timeout=600)
    check(r.returncode == 0, "spread runs (exit 0: a probability is an answer)", r.stderr[-800:])
    with open(out) as f:
        d = json.load(f)
    k = d["samples_unsolved"]
    check(k > 0, "some samples have no result (bearings past the oil model's range)", str(k))
    causes = d["unsolved_samples"]
    check(0 < len({u["sample"] for u in causes}) == len(causes) <= min(k, 20)
          and all("journal_bearing" in u["cause"] for u in causes),
          "unsolved samples are listed once each, with a cause naming a journal bearing", str(causes[:1]))
    check(all(c["sampled"]["solved"] == N - k for c in d["checks"]),
          "every check's probability is over the solved samples only (never counting the others as passes)",
          str({c["sampled"]["solved"] for c in d["checks"]}))
    m = re.search(r"over the (\d+) solved samples\. Were the (\d+) without a result all failures, a check's sampled "
                  r"probability would be higher by at most ([0-9.e+-]+)", r.stdout)
    check(m is not None, "the summary states how much the unsolved samples could raise a probability", r.stdout[:600])
    if m:
        check(int(m.group(1)) == N - k and int(m.group(2)) == k, "the summary's counts", m.group(0))
        check(abs(float(m.group(3)) - k / N) <= 1e-3 * k / N, "the printed bound is K / N", f"{m.group(3)} vs {k / N}")
        rises = [(c["sampled"]["failures"] + k) / N - c["sampled"]["failures"] / (N - k) for c in d["checks"]]
        check(max(rises) <= k / N + 1e-15, "every check's possible rise (f + K)/N - f/S is within the bound",
              f"{max(rises)} vs {k / N}")
    check(r.stdout.count(" has no result at ") == len(causes), "the printed summary lists the JSON's unsolved samples",
          str(len(causes)))
    check(f"({len(causes) if len(causes) < k else 'all'} listed at the end" in r.stdout,
          "the summary says how many of them are listed", r.stdout[:600])
finish()
