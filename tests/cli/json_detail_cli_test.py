"""Drives loopwright (LOOPWRIGHT_BIN) for the results document and the
printed tables of large cases (README, "Results"):
- `--json-detail summary` (the compact document: rows under
  "summary_columns", check outcomes grouped by check and limit) and the default
  full document agree on every shared value: the summary, read back into
  objects by its own columns and groups (expand() here, not the project's
  code), holds every node, component and check outcome of the full document
  (the same count) and every key it holds is in the full document with the
  identical value, for solve and check on the demo cases (cases/*.json) and a
  two-loop thermal case; the summary drops every non-temperature detail item,
  keeps the outlet temperatures, and is at most half the full document's size;
- the streamed file is valid JSON (python3's json module) with every section,
  one node and one component per node and component of the case file (counted
  from the case file itself), and its solved values equal those of the
  in-memory document lw_probe builds for the same isothermal point
  (ResultsJson; the demo cases' isothermal points and the branched case);
- a write that cannot happen exits 4 and leaves nothing behind;
- a generated header of 2,000 bearings prints summarised tables: 40 rows of
  the 6,002 components (the first 20 in case-file order, then the 20 lowest
  flows of the rest, found here from the --csv rows) and a line counting the
  5,962 left out; a small case prints every component.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import csv
import glob
import json
import os
import re
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
PROBE = os.environ.get("LOOPWRIGHT_PROBE")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402
from header_case import header_case  # noqa: E402

CASES = sorted(f for f in glob.glob(os.path.join(SRC, "cases", "*.json")) if ".schema." not in f)
CASES.append(os.path.join(SRC, "tests", "network", "two_loop_case.json"))
SOLVE_KEYS = {"tool", "version", "case", "case_file", "verdict", "ambient_pressure_Pa", "cautions", "fluids", "points"}
CHECK_KEYS = SOLVE_KEYS | {"fixes", "fixes_note", "checks", "check_warnings", "not_converged_points",
                           "not_converged_causes"}
POINT_KEYS = {"name", "values", "converged", "solver", "checks", "nodes", "components", "warnings",
              "mass_balance_closure", "max_mass_imbalance_relative"}


def run(*args):
    r = subprocess.run([BIN, *args], capture_output=True, text=True, timeout=600)
    return r.returncode, r.stdout, r.stderr


def read_case(path):
    """The case file's JSON (// comments removed outside strings)."""
    text = open(path).read()
    out, i, in_str = [], 0, False
    while i < len(text):
        ch = text[i]
        if in_str:
            out.append(ch)
            if ch == "\\":
                out.append(text[i + 1])
                i += 1
            elif ch == '"':
                in_str = False
        elif ch == '"':
            in_str = True
            out.append(ch)
        elif text.startswith("//", i):
            while i < len(text) and text[i] != "\n":
                i += 1
            continue
        else:
            out.append(ch)
        i += 1
    return json.loads("".join(out))


def subset_mismatches(small, big, path=""):
    """Where `small` holds a key or value that `big` does not hold identically."""
    if isinstance(small, dict):
        if not isinstance(big, dict):
            return [path]
        bad = []
        for k, v in small.items():
            if path == "" and k == "json_detail":
                continue
            bad += subset_mismatches(v, big[k], f"{path}/{k}") if k in big else [f"{path}/{k} (missing)"]
        return bad
    if isinstance(small, list):
        if not isinstance(big, list) or len(small) != len(big):
            return [path + " (length)"]
        return [m for i, (a, b) in enumerate(zip(small, big)) for m in subset_mismatches(a, b, f"{path}/{i}")]
    return [] if type(small) is type(big) and small == big else [f"{path}: {small!r} != {big!r}"]


def rows_to_objects(rows, columns):
    """Rows of the compact document as objects: the columns, then the row's
    trailing object (what only some rows have) merged in."""
    out = []
    for row in rows:
        obj = dict(zip(columns, row[:len(columns)]))
        if len(row) == len(columns) + 1:
            obj.update(row[-1])
        elif len(row) != len(columns):
            raise ValueError(f"row of {len(row)} values for {len(columns)} columns: {row!r}")
        out.append(obj)
    return out


def groups_to_outcomes(groups, columns):
    """Check groups as the full document's outcome objects, keyed by (name, where)."""
    out = {}
    for g in groups:
        shared = {k: v for k, v in g.items() if k != "outcomes"}
        for o in rows_to_objects(g["outcomes"], columns):
            o.update(shared)
            out[(o["name"], o["where"])] = o
    return out


def expand(summary, full):
    """The compact document in the full one's shape: checks keyed by (name,
    where) on both sides (the groups reorder them)."""
    cols = summary["summary_columns"]
    doc = {k: v for k, v in summary.items() if k not in ("json_detail", "summary_columns")}
    ref = dict(full)
    if "checks" in doc:
        doc["checks"] = groups_to_outcomes(doc["checks"], cols["check_worst"])
        ref["checks"] = {(o["name"], o["where"]): o for o in full["checks"]}
    doc["points"], ref["points"] = [], []
    for p, fp in zip(summary["points"], full["points"]):
        p, fp = dict(p), dict(fp)
        p["nodes"] = rows_to_objects(p["nodes"], cols["nodes"])
        p["components"] = rows_to_objects(p["components"], cols["components"])
        p["checks"] = groups_to_outcomes(p["checks"], cols["check_outcomes"])
        fp["checks"] = {(o["name"], o["where"]): o for o in fp["checks"]}
        doc["points"].append(p)
        ref["points"].append(fp)
    return doc, ref


def dict_key_mismatches(small, big, path):
    """subset_mismatches for dicts keyed by tuples, with equal key sets."""
    if set(small) != set(big):
        return [f"{path}: keys differ ({len(small)} against {len(big)})"]
    return [m for k in small for m in subset_mismatches(small[k], big[k], f"{path}/{k}")]


def outcome_count(groups):
    return sum(len(g["outcomes"]) for g in groups)


def compact_mismatches(summary, full):
    bad = []
    if "checks" in full and outcome_count(summary["checks"]) != len(full["checks"]):
        bad.append("/checks: outcome count")
    bad += [f"/points/{i}/checks: outcome count" for i, (p, fp) in enumerate(zip(summary["points"], full["points"]))
            if outcome_count(p["checks"]) != len(fp["checks"])]
    doc, ref = expand(summary, full)
    if "checks" in doc:
        bad += dict_key_mismatches(doc.pop("checks"), ref.pop("checks"), "/checks")
    for i, (p, fp) in enumerate(zip(doc["points"], ref["points"])):
        bad += dict_key_mismatches(p.pop("checks"), fp.pop("checks"), f"/points/{i}/checks")
    if len(doc["points"]) != len(ref["points"]):
        bad.append("/points (length)")
    return bad + subset_mismatches(doc, ref)


def detail_keys(doc):
    return [k for p in doc["points"] for c in p["components"] for k in c.get("details", {})]


with tempfile.TemporaryDirectory() as tmp:
    full_path, summary_path = os.path.join(tmp, "full.json"), os.path.join(tmp, "summary.json")
    thermal_docs = 0
    for case in CASES:
        name = os.path.basename(case)
        spec = read_case(case)
        ncomp = sum(len(loop["components"]) for loop in spec["loops"])
        nnode = sum(len(loop["nodes"]) for loop in spec["loops"])
        for cmd in ("solve", "check"):
            extra = ["--no-fix"] if cmd == "check" else []
            c1, _, e1 = run(cmd, case, "-q", "--json", full_path, *extra)
            c2, _, e2 = run(cmd, case, "-q", "--json", summary_path, "--json-detail", "summary", *extra)
            check(c1 == c2 and c1 in (0, 1), f"{cmd} {name}: both runs end alike", f"{c1} {c2} {e1[-500:]} {e2[-500:]}")
            with open(full_path) as f:
                full = json.load(f)
            with open(summary_path) as f:
                summary = json.load(f)
            keys = CHECK_KEYS if cmd == "check" else SOLVE_KEYS
            check(set(full) == keys and set(summary) == keys | {"json_detail", "summary_columns"},
                  f"{cmd} {name}: every section present", f"{sorted(full)} {sorted(summary)}")
            check(summary.get("json_detail") == "summary", f"{cmd} {name}: summary says so")
            bad = compact_mismatches(summary, full)
            check(not bad, f"{cmd} {name}: every summary value is the full document's", "; ".join(bad[:5]))
            summary = expand(summary, full)[0]
            conv = [p for p in full["points"] if p["converged"]]
            check(conv and all(POINT_KEYS <= set(p) for p in conv), f"{cmd} {name}: every point section present")
            check(all(len(p["components"]) == ncomp and len(p["nodes"]) == nnode for p in conv),
                  f"{cmd} {name}: a component and node entry for each of the case's {ncomp} and {nnode}")
            check(all(p["checks"] for p in conv), f"{cmd} {name}: every solved point carries its checks")
            dropped = [k for k in detail_keys(full) if not k.endswith("_K")]
            kept = detail_keys(summary)
            check(dropped and all(k.endswith("_K") for k in kept), f"{cmd} {name}: summary drops the detail items",
                  f"{len(dropped)} dropped, kept {sorted(set(kept))[:8]}")
            if any("energy" in p for p in conv):  # a thermal point
                thermal_docs += 1
                check("outlet_temperature_K" in kept, f"{cmd} {name}: summary keeps outlet temperatures (thermal)")
            check(2 * os.path.getsize(summary_path) <= os.path.getsize(full_path),
                  f"{cmd} {name}: summary at most half the size",
                  f"{os.path.getsize(summary_path)} of {os.path.getsize(full_path)} bytes")

    check(thermal_docs >= 2, f"thermal documents compared ({thermal_docs})")

    # The streamed file against the in-memory document of lw_probe (which
    # solves the hydraulic network only: isothermal points).
    compared = 0
    for case in CASES + [os.path.join(SRC, "tests", "network", "branched_case.json")]:
        name = os.path.basename(case)
        spec = read_case(case)
        if PROBE:
            point = spec.get("envelope", {}).get("points", [{}])[0].get("name")
            run("solve", case, "-q", "--json", full_path, *(["--point", point] if point else []))
            r = subprocess.run([PROBE, "solve", case, *([point] if point else [])], capture_output=True, text=True,
                               timeout=600)
            mem = json.loads(r.stdout)
            with open(full_path) as f:
                streamed = json.load(f)
            if "energy" in streamed["points"][0]:
                continue
            compared += 1
            for key in ("nodes", "components", "values", "mass_balance_closure", "warnings"):
                check(streamed["points"][0][key] == mem["points"][0][key],
                      f"solve {name}: streamed '{key}' equal to the in-memory document")
            check({k: v for k, v in streamed.items() if k not in ("points", "verdict")}
                  == {k: v for k, v in mem.items() if k not in ("points", "verdict", "fluid_states")},
                  f"solve {name}: streamed top level equal to the in-memory document")

    check(compared >= 1 or not PROBE, f"isothermal cases compared with lw_probe ({compared})")

    # A write that cannot happen: exit 4, nothing written.
    target = os.path.join(tmp, "no_such_dir", "out.json")
    code, _, err = run("solve", CASES[0], "-q", "--json", target)
    check(code == 4 and "error[write]" in err and not os.path.exists(os.path.dirname(target)),
          "unwritable --json: exit 4, nothing written", err)

    # A large generated header: summarised tables.
    big = os.path.join(tmp, "header2000.json")
    with open(big, "w") as f:
        json.dump(header_case(2000), f)
    comps = [c["id"] for c in header_case(2000)["loops"][0]["components"]]
    csv_path = os.path.join(tmp, "rows.csv")
    code, out, err = run("solve", big, "--csv", csv_path)
    check(code == 0, "header 2000 solves", err[-800:])
    section = out.split("Loop l — components\n", 1)[-1].split("\n\n", 1)[0].splitlines()
    listed = [line.split()[0] for line in section[2:] if not line.strip().startswith("...")]
    with open(csv_path) as f:
        flows = {row["component"]: float(row["flow_m3_s"]) for row in csv.DictReader(f)}
    rest = sorted(comps[20:], key=lambda c: flows[c])[:20]
    expected = comps[:20] + sorted(rest, key=comps.index)
    check(listed == expected, "header 2000: first 20 components, then the 20 lowest flows", f"{listed[:45]}")
    check(re.search(r"\.\.\. 5962 of 6002 rows not listed", out) is not None, "header 2000: a count of the rows left out")
    check(out.count("\n") < 200, f"header 2000: a short printout ({out.count(chr(10))} lines)")
    code, out, err = run("check", big, "--no-fix")
    check(code == 1 and out.count("\n") < 200 and "rows not listed" in out, "header 2000 check: summarised table",
          out[:1500])

    # A small case prints every component, no count line.
    code, out, _ = run("solve", CASES[0])
    spec = read_case(CASES[0])
    ids = [c["id"] for loop in spec["loops"] for c in loop["components"]]
    printed = {line.split()[0] for line in out.splitlines() if line.startswith("  ") and line.split()}
    check(set(ids) <= printed and "rows not listed" not in out, "small case: every component printed")

finish()
