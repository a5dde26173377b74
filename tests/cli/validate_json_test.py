"""`validate --json FILE` writes the problems found as JSON, atomically.

Drives the real binary (LOOPWRIGHT_BIN) on catalog files: the file holds every
error and warning the text output names (same ids and pointers), exit codes
stay 0 (valid) and 2 (invalid), and a file that cannot be written leaves
nothing behind and exits 4.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import json
import os
import re
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CATALOG = os.path.join(SRC, "tests", "malformed")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def run(*args):
    r = subprocess.run([BIN, *args], capture_output=True, text=True, timeout=120)
    return r.returncode, r.stdout, r.stderr


# The text lines "error[id] FILE POINTER: message", parsed independently of
# the JSON writer.
LINE = re.compile(r"^(error|warning)\[([a-z-]+)\] \S+ (\S+): ")


def text_problems(err):
    out = []
    for line in err.splitlines():
        m = LINE.match(line)
        if m:
            pointer = "" if m.group(3) == "(document)" else m.group(3)
            out.append((m.group(1), m.group(2), pointer))
    return out


with tempfile.TemporaryDirectory() as tmp:
    out_json = os.path.join(tmp, "problems.json")
    for name, want_code in [("073_boundary_below_vacuum.json", 2), ("081_candidate_wrong_category.json", 2),
                            ("070_pressure_text_without_unit.json", 2), ("000_valid_minimal.json", 0)]:
        path = os.path.join(CATALOG, name)
        if os.path.exists(out_json):
            os.remove(out_json)
        code, out, err = run("validate", "--json", out_json, path)
        check(code == want_code, f"validate --json {name} exits {want_code}", f"exit {code}: {err[-300:]}")
        check(os.path.exists(out_json), f"validate --json {name} writes the file")
        if not os.path.exists(out_json):
            continue
        with open(out_json, encoding="utf-8") as f:
            doc = json.load(f)
        first = open(path, encoding="utf-8").readline()
        expect = first.split()[2] if "expect: valid" not in first else None
        check(doc["file"] == path, f"{name}: names the case file")
        check(doc["valid"] == (want_code == 0), f"{name}: valid is {want_code == 0}")
        got = [(p["severity"], p["id"], p["pointer"]) for p in doc["problems"]]
        check(got == text_problems(err), f"{name}: the JSON holds the problems the text names", f"{got} vs {text_problems(err)}")
        check(doc["errors"] == sum(1 for p in got if p[0] == "error"), f"{name}: error count")
        check(doc["warnings"] == sum(1 for p in got if p[0] == "warning"), f"{name}: warning count")
        if expect:
            check(any(p["id"] == expect and p["severity"] == "error" for p in doc["problems"]),
                  f"{name}: the expected error {expect} is in the file")
        check(all(p["message"] for p in doc["problems"]), f"{name}: every problem has a message")
    # Nothing written where the file cannot be (a missing folder): exit 4, no stray file.
    bad = os.path.join(tmp, "no_such_dir", "p.json")
    code, out, err = run("validate", "--json", bad, os.path.join(CATALOG, "000_valid_minimal.json"))
    check(code == 4, "validate --json into a missing folder exits 4", f"exit {code}")
    check(not os.path.exists(os.path.dirname(bad)), "and creates nothing")
    check(sorted(os.listdir(tmp)) in (["problems.json"], []), "no temporary file left behind", str(os.listdir(tmp)))

finish()
