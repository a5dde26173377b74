"""Drives the real loopwright binary (LOOPWRIGHT_BIN) through its command line.

Checks the contracts of DESIGN.md section 5: exit codes (0 ok, 2 invalid input
with the place named), `validate` on the shipped cases and on catalog files,
`solve --json` and the keys of the results JSON, mass balance and the dp sign
convention in that JSON, a reported pressure drop against python3-fluids and
python3-iapws, atomic output (no partial file on failure),
`--point` with a suggestion, `--units us`, `library list|show`, `--help` on
every subcommand, and an unknown subcommand.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import glob
import json
import os
import re
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
DEMO = os.path.join(SRC, "cases", "apu_test_cell.json")
CATALOG = os.path.join(SRC, "tests", "malformed")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402
from refcheck import load_case  # noqa: E402


def run(*args, cwd=None):
    r = subprocess.run([BIN, *args], capture_output=True, text=True, timeout=120, cwd=cwd)
    return r.returncode, r.stdout, r.stderr


def short(text, n=600):
    return text if len(text) <= n else text[:n] + "..."


# --- validate: shipped cases are valid --------------------------------------
shipped = sorted(p for p in glob.glob(os.path.join(SRC, "cases", "*.json"))
                 if os.path.basename(p) != "case.schema.json")
check(len(shipped) >= 1, "there is a shipped case")
for path in shipped + [os.path.join(CATALOG, "000_valid_minimal.json")]:
    code, out, err = run("validate", path)
    check(code == 0, f"validate {os.path.basename(path)} exits 0", short(err))
    check(out.rstrip().endswith(f"{path}: valid"), f"validate {os.path.basename(path)} says valid", short(out[-300:]))

# --- validate: catalog files exit 2 and name the place and the id ------------
for fname in ["001_missing_comma.json", "016_pipe_missing_diameter.json", "023_unknown_unit.json",
              "027_unknown_node.json", "031_unknown_variable.json", "044_unknown_type.json",
              "048_choice_misspelt.json", "055_centrifugal_not_ascending.json", "057_coupling_missing_component.json",
              "062_glycol_fraction.json"]:
    path = os.path.join(CATALOG, fname)
    with open(path, encoding="utf-8") as f:
        m = re.match(r"// expect: (\S+) (\S+)", f.readline())
    eid, where = m.group(1), m.group(2)
    code, out, err = run("validate", path)
    check(code == 2, f"validate {fname} exits 2", f"exit {code}")
    # "error[ID] FILE POINTER: ..." or "error[ID] FILE:LINE:COL (document): ..."
    if re.fullmatch(r"\d+:\d+", where):
        expected = f"error[{eid}] {path}:{where} "
    else:
        expected = f"error[{eid}] {path} {where}: "
    check(expected in err, f"validate {fname} prints {expected!r}", short(err))
    check("the case was not run" in err, f"validate {fname} says the case was not run", short(err))

# A missing file is invalid input too.
code, out, err = run("validate", os.path.join(CATALOG, "no_such_case.json"))
check(code == 2 and "cannot-read" in err, "validate of a missing file exits 2 with cannot-read", f"{code} {short(err)}")

# --- solve --json ----------------------------------------------------------
with tempfile.TemporaryDirectory() as tmp:
    out_json = os.path.join(tmp, "result.json")
    code, out, err = run("solve", DEMO, "--json", out_json, "--quiet")
    check(code == 0, "solve demo --json exits 0", short(err))
    check(os.path.isfile(out_json), "solve demo writes the JSON file")
    leftovers = [f for f in os.listdir(tmp) if f != "result.json"]
    check(not leftovers, "solve leaves no temporary file beside the JSON", str(leftovers))
    try:
        with open(out_json, encoding="utf-8") as f:
            res = json.load(f)
    except (OSError, ValueError) as e:
        res = None
        check(False, "the results JSON parses", str(e))
    if res is not None:
        for key in ["tool", "version", "case", "verdict", "points"]:
            check(key in res, f"results JSON has top-level {key!r}", str(sorted(res)))
        check(res.get("tool") == "loopwright", "results JSON tool is loopwright", str(res.get("tool")))
        code_v, out_v, _ = run("--version")
        check(code_v == 0 and str(res.get("version")) in out_v, "results JSON version is the binary's version",
              f"{res.get('version')} vs {out_v.strip()}")
        check(res.get("verdict") != "not-converged", "the demo's first point converges", str(res.get("verdict")))
        points = res.get("points") or [{}]
        p0 = points[0]
        for key in ["name", "converged", "nodes", "components"]:
            check(key in p0, f"points[0] has {key!r}", str(sorted(p0)))
        demo = load_case(DEMO)
        first = demo["envelope"]["points"][0]
        check(p0.get("name") == first["name"], "points[0] is the first envelope point", str(p0.get("name")))
        nodes = p0.get("nodes", [])
        comps = p0.get("components", [])
        n_nodes = sum(len(l["nodes"]) for l in demo["loops"])
        n_comps = sum(len(l["components"]) for l in demo["loops"])
        check(len(nodes) == n_nodes, f"one node entry per node of the demo ({n_nodes})", str(len(nodes)))
        check(len(comps) == n_comps, f"one component entry per component of the demo ({n_comps})", str(len(comps)))
        node_keys = ["loop", "id", "boundary", "pressure_Pa", "temperature_K"]
        comp_keys = ["loop", "id", "type", "from", "to", "flow_m3_s", "mass_flow_kg_s", "dp_Pa", "heat_W", "warnings"]
        check(all(all(k in n for k in node_keys) for n in nodes), "every node has " + ", ".join(node_keys),
              str(sorted(nodes[0]) if nodes else "no nodes"))
        check(all(all(k in c for k in comp_keys) for c in comps), "every component has " + ", ".join(comp_keys),
              str(sorted(comps[0]) if comps else "no components"))
        check(all(isinstance(n.get("boundary"), bool) for n in nodes), "node boundary is true/false")
        check(all(isinstance(c.get("warnings"), list) for c in comps), "component warnings is a list")
        # Boundary flags are those of the case file.
        bnames = sorted(f"{n['loop']}/{n['id']}" for n in nodes if n.get("boundary"))
        expected_b = sorted(f"{l['id']}/{n['id']}" for l in demo["loops"] for n in l["nodes"] if "boundary" in n)
        check(bnames == expected_b, "boundary flags match the case", f"{bnames} vs {expected_b}")
        # DESIGN.md section 5: dp_Pa = p(from) - p(to); flow positive from -> to.
        p = {(n["loop"], n["id"]): n["pressure_Pa"] for n in nodes}
        worst = 0.0
        for c in comps:
            dp = p[(c["loop"], c["from"])] - p[(c["loop"], c["to"])]
            worst = max(worst, abs(c["dp_Pa"] - dp) / max(1.0, abs(dp)))
        check(worst < 1e-6, "dp_Pa = p(from) - p(to) for every component", f"worst relative mismatch {worst:g}")
        # Mass balance at every node without a boundary.
        worst = 0.0
        for n in nodes:
            if n["boundary"]:
                continue
            net = sum(c["mass_flow_kg_s"] for c in comps if c["loop"] == n["loop"] and c["to"] == n["id"]) - \
                sum(c["mass_flow_kg_s"] for c in comps if c["loop"] == n["loop"] and c["from"] == n["id"])
            scale = sum(abs(c["mass_flow_kg_s"]) for c in comps if c["loop"] == n["loop"]) or 1.0
            worst = max(worst, abs(net) / scale)
        check(worst < 1e-8, "mass balances at every free node", f"worst relative imbalance {worst:g}")
        # mass flow / volume flow is a liquid density (oil and water: 700-1100 kg/m3).
        dens = [c["mass_flow_kg_s"] / c["flow_m3_s"] for c in comps if abs(c["flow_m3_s"]) > 1e-9]
        check(dens and all(700 < d < 1100 for d in dens), "mass_flow / flow is a liquid density",
              str([round(d) for d in dens]))
        # Temperatures are kelvin of a liquid (200-500 K); at an isothermal
        # point every node of a loop has one temperature.
        temps = [n["temperature_K"] for n in nodes]
        check(temps and all(200 < t < 500 for t in temps), "node temperatures are liquid temperatures in K",
              str(temps[:6]))
        if first.get("isothermal"):
            for loop in {n["loop"] for n in nodes}:
                tl = {round(n["temperature_K"], 9) for n in nodes if n["loop"] == loop}
                check(len(tl) == 1, f"loop {loop} is isothermal at the isothermal first point", str(tl))

    # --json into a folder that does not exist: non-zero exit, no file.
    missing_dir = os.path.join(tmp, "no_such_dir")
    target = os.path.join(missing_dir, "r.json")
    code, out, err = run("solve", DEMO, "--json", target, "--quiet")
    check(code != 0, "solve --json into a missing folder exits non-zero", f"exit {code}")
    check(not os.path.exists(target) and not os.path.exists(missing_dir), "and writes nothing")
    check("r.json" in err, "and names the file it could not write", short(err))
    # --json onto an existing folder: the rename fails; no temporary is left.
    blocker = os.path.join(tmp, "blocker")
    os.mkdir(blocker)
    before = sorted(os.listdir(tmp))
    code, out, err = run("solve", DEMO, "--json", blocker, "--quiet")
    check(code != 0, "solve --json onto a folder exits non-zero", f"exit {code}")
    check(sorted(os.listdir(tmp)) == before and os.listdir(blocker) == [],
          "and leaves no partial or temporary file", str(os.listdir(tmp)))

# --- solve: a reported pressure drop against an independent recomputation -----
# The jacket loop's suction hose (hose-16: 1 in bore, SAE J517 dash 16; 1.8 m,
# no fittings, the hose's 5e-6 m default roughness; from the tank at 1.5 m to
# the pump inlet at 0 m) at the isothermal cold start (water at 5 degC): the
# Darcy-Weisbach drop with python3-fluids' Churchill (1977) friction factor and
# python3-iapws water properties (IAPWS-IF97, IAPWS 2008 viscosity) for the
# reported flow, less the hydrostatic gain rho g dz, is p(from) - p(to).
with tempfile.TemporaryDirectory() as tmp:
    out_json = os.path.join(tmp, "cold.json")
    code, out, err = run("solve", DEMO, "--point", "cold_start", "--json", out_json, "--quiet")
    try:
        with open(out_json, encoding="utf-8") as f:
            cold = json.load(f)["points"][0]
    except (OSError, ValueError, KeyError, IndexError):
        cold = None
    check(code == 0 and cold is not None and cold.get("converged"), "solve cold_start --json", short(err))
    if cold:
        import math
        import fluids
        from iapws import IAPWS97
        hose = next(c for c in cold["components"] if c["loop"] == "jacket" and c["id"] == "suction")
        p_in = next(n for n in cold["nodes"] if n["loop"] == "jacket" and n["id"] == "pump_in")
        w = IAPWS97(T=278.15, P=(p_in["pressure_abs_Pa"]) / 1e6)
        d, length, g = 0.0254, 1.8, 9.80665
        v = hose["flow_m3_s"] / (math.pi * d * d / 4)
        re_d = w.rho * v * d / w.mu
        f = fluids.friction_factor(Re=re_d, eD=5e-6 / d, Method="Churchill_1977")
        want = f * length / d * w.rho * v * v / 2
        # The friction part: p(from) - p(to) + rho g dz with our density
        # (mass over volume flow); 1e-4 covers the density of water at the
        # node's pressure against ours at the loop's (3e-5).
        rho = hose["mass_flow_kg_s"] / hose["flow_m3_s"]
        ours = hose["dp_Pa"] + rho * g * 1.5
        check(abs(ours - want) <= 1e-4 * want,
              "jacket suction hose: friction drop = fluids Churchill (1977) with iapws water (1e-4)",
              f"ours {ours:.6g} Pa, reference {want:.6g} Pa, Re {re_d:.0f}")

# --- solve --point -----------------------------------------------------------
code, out, err = run("solve", DEMO, "--point", "nosuchpoint")
check(code == 2, "solve --point nosuchpoint exits 2", f"exit {code}")
check("cold_start" in err and "dirty_filter" in err, "and lists the points", short(err))
code, out, err = run("solve", DEMO, "--point", "full_power_hot_dya")
check(code == 2, "solve --point with a typo exits 2", f"exit {code}")
check('did you mean "full_power_hot_day"' in err, "and suggests the nearest point", short(err))
code, out, err = run("solve", DEMO, "--point", "idle_warm")
check(code == 0 and 'point "idle_warm" solved' in out, "solve --point idle_warm solves that point",
      short(err or out[-300:]))

# --- units ---------------------------------------------------------------------
code, out_us, err = run("solve", DEMO, "--units", "us")
check(code == 0, "solve --units us exits 0", short(err))
check("psi" in out_us and "degF" in out_us, "--units us prints psi and degF")
code, out_si, err = run("solve", DEMO, "--units", "si")
check(code == 0 and "bar" in out_si and "psi" not in out_si, "--units si prints bar, not psi")
code, out, err = run("solve", DEMO, "--units", "imperial")
check(code == 2, "--units with an unknown system exits 2", f"exit {code}")

# --- library -------------------------------------------------------------------
parts = {}
for pf in sorted(glob.glob(os.path.join(SRC, "library", "parts", "*.json"))):
    with open(pf, encoding="utf-8") as f:
        for entry in json.load(f)["parts"]:
            parts[entry["id"]] = entry
code, out, err = run("library", "list")
check(code == 0, "library list exits 0", short(err))
listed = {line.split()[0] for line in out.splitlines() if line.strip()}
missing = sorted(set(parts) - listed)
check(len(parts) > 10 and not missing, "library list lists every part of library/parts", str(missing[:10]))
code, out, err = run("library", "show", "gp-08")
check(code == 0, "library show gp-08 exits 0", short(err))
try:
    shown = json.loads(out)
except ValueError:
    shown = {}
check(shown.get("source") == parts.get("gp-08", {}).get("source") and shown.get("source"),
      "library show gp-08 prints its source", short(out))
check(shown.get("type") == "displacement_pump", "library show gp-08 prints its type", short(out))
code, out, err = run("library", "show", "gp-8")
check(code == 2 and 'did you mean "gp-08"' in err, "library show of a misspelt id exits 2 with a suggestion",
      f"{code} {short(err)}")

# --- help and subcommands --------------------------------------------------------
code, out, err = run("--help")
check(code == 0 and "Subcommands:" in out, "loopwright --help exits 0 and lists subcommands", short(out))
subs = []
if "Subcommands:" in out:
    for line in out.split("Subcommands:", 1)[1].splitlines():
        m = re.match(r"^  (\S+)\s", line)
        if m:
            subs.append(m.group(1))
for s in ["validate", "solve", "library"]:
    check(s in subs, f"--help lists {s}", str(subs))
for s in subs:
    code, out, err = run(s, "--help")
    check(code == 0 and "Usage" in out, f"loopwright {s} --help exits 0 with usage", f"{code} {short(out + err)}")
for s in ["list", "show"]:
    code, out, err = run("library", s, "--help")
    check(code == 0 and "Usage" in out, f"loopwright library {s} --help exits 0 with usage", f"{code} {short(out)}")
code, out, err = run("frobnicate")
check(code == 2, "an unknown subcommand exits 2", f"exit {code}")
code, out, err = run()
check(code == 2, "no subcommand exits 2", f"exit {code}")
code, out, err = run("validate")
check(code == 2, "validate without a case exits 2", f"exit {code}")

finish()
