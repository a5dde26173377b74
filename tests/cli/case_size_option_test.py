"""`--max-case-size` raises (or lowers) the case-file size limit (default 8 MiB).

Drives the real binary (LOOPWRIGHT_BIN) on the catalog's valid minimal case
padded with a comment to 9 MiB in a temporary folder: refused by default
(too-large, exit 2, naming the 8 MiB limit and the option that raises it), read with `--max-case-size
"16 MiB"` on validate, solve, check and size; a limit below the file's size
refuses it again; a size without a unit, with an unknown unit or below 1 KiB
is a bad option (exit 2) naming the option.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
VALID = os.path.join(SRC, "tests", "malformed", "000_valid_minimal.json")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def run(*args):
    r = subprocess.run([BIN, *args], capture_output=True, text=True, timeout=120)
    return r.returncode, r.stdout, r.stderr


with tempfile.TemporaryDirectory() as tmp:
    path = os.path.join(tmp, "padded.json")
    with open(VALID) as f:
        text = f.read()
    nine_mib = 9 * 1024 * 1024
    with open(path, "w") as f:
        f.write(text + "//" + "." * (nine_mib - len(text) - 3) + "\n")
    check(os.path.getsize(path) == nine_mib, "the padded case is 9 MiB")

    code, out, err = run("validate", path)
    check(code == 2, f"9 MiB refused by default (exit {code})")
    check("error[too-large]" in err and "(8 MiB)" in err, "too-large names the 8 MiB limit: " + err[:200])
    check("--max-case-size" in err, "too-large says how to raise the limit: " + err[:300])

    code, out, err = run("validate", path, "--max-case-size", "16 MiB")
    check(code == 0 and "valid" in out, f"validate reads it with 16 MiB (exit {code}): {err[:300]}")
    for cmd in ("solve", "check", "size"):
        code, out, err = run(cmd, path, "--max-case-size", "16MiB", "-q")
        check("too-large" not in err, f"{cmd} reads it with 16 MiB: {err[:300]}")

    code, out, err = run("validate", path, "--max-case-size", "9000 kB")
    check(code == 2 and "error[too-large]" in err and "9000000 bytes" in err,
          f"9,000 kB (below 9 MiB = 9,437,184 bytes) refuses it: {err[:200]}")

    for bad in ("64", "64 mib", "MiB", "0.5 KiB"):
        code, out, err = run("validate", VALID, "--max-case-size", bad)
        check(code == 2 and "error[bad-option] --max-case-size" in err, f"{bad!r} is a bad option: {err[:200]}")

finish()
