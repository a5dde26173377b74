"""The data behind the report's plots equals the solver's results, checked
from outside the report (data invented: the demo cases).

1. Pump and system curves (cases/apu_test_cell.json, cases/gearbox_lube_skid.json,
   cases/turbo_test_stand.json): for every pump at every point drawn, the
   system curve, read from the page's embedded Vega-Lite data and
   interpolated linearly (numpy) at the flow `solve --point P --json`
   reports for the pump, gives the rise p(to) - p(from) that solve's node
   pressures give, to the solver's tolerance (1e-6 of the rise, or 1 Pa):
   the system curve crosses the pump's at the solved operating point. The
   pump's own curve is interpolated there too and must agree to 1 % (its
   samples are coarser: 0.3 %). A quadratic
   through the three system samples nearest the solved flow on one side
   (the sample at that flow left out; the better side, as a relief cracking
   there puts a kink in the curve) must give the solved rise to 2e-5 of it. The system curve must also rise with flow across
   the operating point (a loop of resistances asks more pressure for more
   flow), and the crossing found by scipy's brentq on the difference of the
   two interpolated curves must be the solved flow to 0.5 %.
2. Margins: every cell of the heat map (check at place and point) holds the
   margin `check --json` writes for that point's check (the results
   document's per-point "checks", a different writer), to 1e-9 relative;
   every check of check --json is in the heat map; rows are ordered worst
   first by margin / |limit| recomputed here.
3. The Markdown summary (--md) carries the verdict and the cautions.
4. An unknown --point exits 2 listing the points; missing plot scripts exit
   4 naming the file; neither writes a page. With --units us the plotted
   flow is in US gal/min and the rise in psi (NIST SP 811 factors).
5. Scenario traces (cases/turbo_test_stand.json, `--run scenarios`): one
   plot per scenario of the case; every mass's temperature at every time in
   the page equals the `simulate --scenario S --json` run's (a separate
   command and writer) to 1e-9 K, and the coking limit is drawn at 200 degC
   (the check table's default, common practice).
6. Tolerance study (tests/network/tolerance/spread_cases.json, `--run
   spread`): each histogram's bins, counted here with numpy at the page's
   edges from `spread --margins-csv`, hold the same counts and add up to the
   samples; the limit is drawn at margin 0; the table's sampled
   probabilities equal the failures counted from the CSV, the nonlinear
   margin flagged UNRELIABLE and the linear one not.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import csv
import json
import os
import re
import subprocess
import sys
import tempfile

import numpy as np
from scipy.optimize import brentq

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def embedded_specs(page):
    text = open(page, encoding="utf-8").read()
    m = re.search(r'<script type="application/json" id="lw-plot-specs">(.*?)</script>', text, re.S)
    return json.loads(m.group(1)) if m else {}


def spread_plots(tmp):
    """6. The tolerance study's histograms against `spread --margins-csv`
    (a separate command and writer) binned here with numpy at the page's
    bin edges; counts add up to the samples; limit at margin 0; the
    probability table against the failures counted here from the CSV."""
    case = os.path.join(SRC, "tests", "network", "tolerance", "spread_cases.json")
    page, csv_path = os.path.join(tmp, "spread.html"), os.path.join(tmp, "margins.csv")
    n = 300
    r = subprocess.run([BIN, "report", case, "-o", page, "--run", "spread", "--spread-samples", str(n), "-q"],
                       capture_output=True, text=True, timeout=300)
    check(r.returncode == 0, "report --run spread writes the page", r.stderr)
    r = subprocess.run([BIN, "spread", case, "--samples", str(n), "--no-shard", "--margins-csv", csv_path, "-q"],
                       capture_output=True, text=True, timeout=300)
    check(r.returncode == 0, "spread --margins-csv runs", r.stderr)
    if not os.path.exists(page) or not os.path.exists(csv_path):
        return
    with open(csv_path, newline="") as f:
        rows = list(csv.reader(f))
    cols = {name: np.array([float(x[i]) for x in rows[1:] if x[i] != ""]) for i, name in enumerate(rows[0]) if i}
    specs = embedded_specs(page)
    hists = [v for k, v in specs.items() if k.startswith("plot-spread-hist-")]
    check(len(hists) == 3 and len([k for k in specs if k.startswith("plot-spread-share-")]) == 3,
          "a histogram and a contributors plot per check (3 checks)", str(list(specs)))
    for spec in hists:
        label = spec["title"].replace("Sampled margin of ", "").replace(" at ", " @ ", 1)
        m = cols.get(label)
        bins = spec["layer"][0]["data"]["values"]
        check(m is not None, f"{label}: a column of the margins CSV", str(list(cols)))
        if m is None:
            continue
        edges = [b["lo_si"] for b in bins] + [bins[-1]["hi_si"]]
        mine, _ = np.histogram(m, bins=edges)
        got = [b["count"] for b in bins]
        check(sum(got) == n and list(mine) == got, f"{label}: the page's bins hold the CSV's margins",
              f"{got} vs {list(mine)}")
        check(spec["layer"][1]["data"]["values"] == [{"limit": 0}], f"{label}: the limit drawn at margin 0")
    text = open(page, encoding="utf-8").read()
    table = re.search(r'<div id="spread-table">(.*?)</div>', text, re.S)
    cells = [re.findall(r"<td>(.*?)</td>", tr) for tr in re.findall(r"<tr>(.*?)</tr>", table.group(1))[1:]] if table else []
    check(len(cells) == 3, "the probability table has a row per check", str(cells))
    for c in cells:
        k = int((cols[c[0] + " @ " + c[1]] < 0).sum())
        p = float(c[4])
        check(abs(p - k / n) <= 5e-3 * k / n + 1e-12, f"{c[0]}: the table's sampled probability is {k}/{n}", c[4])
        if c[0] == "velocity_pressure_max":
            check(c[6] == "UNRELIABLE", "the nonlinear margin is flagged UNRELIABLE", str(c))
        if c[0] == "bearing_flow_min":
            check(c[6] == "ok", "the linear margin's first order is ok", str(c))


def curves_of(spec):
    """{point: {"pump": [(q, rise)], "system": [...], "op": (q, rise)}} of a pump plot."""
    out = {}
    lines, ops = spec["layer"][0]["data"]["values"], spec["layer"][1]["data"]["values"]
    for r in lines:
        out.setdefault(r["point"], {"pump": [], "system": []})[r["curve"]].append((r["flow_m3_s"], r["rise_Pa"]))
    for r in ops:
        out.setdefault(r["point"], {"pump": [], "system": []})["op"] = (r["flow_m3_s"], r["rise_Pa"])
    return out


def solved(case, point, tmp):
    out = os.path.join(tmp, "solve.json")
    r = subprocess.run([BIN, "solve", case, "--point", point, "--json", out, "-q"], capture_output=True, text=True,
                       timeout=300)
    if r.returncode != 0:
        return None
    return json.load(open(out, encoding="utf-8"))["points"][0]


def pump_state(point_json, where):
    loop, comp = where.split("/")
    c = next(c for c in point_json["components"] if c["loop"] == loop and c["id"] == comp)
    p = {(n["loop"], n["id"]): n["pressure_Pa"] for n in point_json["nodes"]}
    return c["flow_m3_s"], p[(loop, c["to"])] - p[(loop, c["from"])]


def one_sided_quadratics(samples, q):
    """The curve at q extrapolated by a quadratic through the three samples
    nearest q below it, and by one through the three nearest above it (the
    sample at q itself left out: the values come from re-solves at other
    flows). A relief valve cracking near q puts a kink there: one side is
    smooth up to q, so the better of the two is compared."""
    out = []
    for side in (-1, 1):
        s = sorted((abs(a - q), a, b) for a, b in samples if side * (a - q) > 1e-9 * abs(q))[:3]
        if len(s) == 3:
            out.append(float(np.polyval(np.polyfit([a for _, a, _ in s], [b for _, _, b in s], 2), q)))
    return out


def interp(samples, q):
    s = sorted(samples)
    return float(np.interp(q, [a for a, _ in s], [b for _, b in s]))


def check_curves(stem, case, specs, tmp):
    pumps = [k for k in specs if k.startswith("plot-pump-")]
    check(len(pumps) > 0, f"{stem}: the report has pump curves")
    for key in pumps:
        for point, c in curves_of(specs[key]).items():
            tag = f"{stem} {key} at {point}"
            pj = solved(case, point, tmp)
            check(pj is not None, f"{tag}: solve --point gives a result")
            if pj is None:
                continue
            q, rise = pump_state(pj, specs[key]["title"].split(":")[0])
            sysr = interp(c["system"], q)
            tol = max(1e-6 * abs(rise), 1.0)
            check(abs(sysr - rise) <= tol, f"{tag}: system curve at the solved flow = solved rise",
                  f"system {sysr:.9g} Pa, solve {rise:.9g} Pa, flow {q:.6g} m3/s")
            near = one_sided_quadratics(c["system"], q)
            check(len(near) > 0 and min(abs(v - rise) for v in near) <= max(2e-5 * abs(rise), 1.0),
                  f"{tag}: system curve from its neighbouring re-solves = solved rise",
                  f"quadratics {near} Pa, solve {rise:.9g} Pa")
            if len(c["pump"]) >= 2:
                pr = interp(c["pump"], q)
                check(abs(pr - rise) <= 0.003 * abs(rise) + 1.0, f"{tag}: pump curve at the solved flow = solved rise",
                      f"pump {pr:.6g} Pa, solve {rise:.6g} Pa")
                lo, hi = 0.9 * q, 1.1 * q
                f = lambda x: interp(c["system"], x) - interp(c["pump"], x)  # noqa: E731
                if f(lo) * f(hi) < 0:
                    qc = brentq(f, lo, hi, xtol=1e-12 * q)
                    check(abs(qc - q) <= 5e-3 * q, f"{tag}: the curves cross at the solved flow",
                          f"crossing {qc:.6g}, solved {q:.6g} m3/s")
                else:
                    check(False, f"{tag}: the curves change order across the solved flow", f"{f(lo)} {f(hi)}")
            check(interp(c["system"], 1.005 * q) > interp(c["system"], 0.995 * q),
                  f"{tag}: the system asks more rise for more flow")


def check_margins(stem, case, specs, tmp):
    out = os.path.join(tmp, "check.json")
    subprocess.run([BIN, "check", case, "--json", out, "-q", "--no-fix"], capture_output=True, text=True, timeout=600)
    doc = json.load(open(out, encoding="utf-8"))
    cells = {}
    for cell in specs["plot-margins"]["data"]["values"]:
        if "outcome" in cell:
            cells[(cell["row"], cell["point"])] = cell["outcome"]
    n = 0
    for p in doc["points"]:
        for o in p.get("checks", []):
            key = (f'{o["name"]} @ {o["where"]}', p["name"])
            got = cells.get(key)
            n += 1
            if got is None:
                check(False, f"{stem}: heat map holds {key}")
                continue
            ok = abs(got["margin"] - o["margin"]) <= 1e-9 * max(abs(o["margin"]), abs(o["limit"]), 1e-12)
            if not ok:
                check(False, f"{stem}: margin of {key}", f'heat map {got["margin"]}, check --json {o["margin"]}')
    check(n > 0 and n == len(cells), f"{stem}: heat map and check --json hold the same {n} outcomes",
          f"heat map {len(cells)}")
    # A row's worst point is its smallest margin (one unit along a row; a
    # limit may differ by point, e.g. a drain's flood capacity); rows rank by
    # that outcome's margin relative to its limit.
    worst = {}
    for (row, _), o in cells.items():
        if row not in worst or o["margin"] < worst[row]["margin"]:
            worst[row] = o
    rank = {row: (o["margin"] / abs(o["limit"]) if o["limit"] != 0 else o["margin"]) for row, o in worst.items()}
    order = specs["plot-margins"]["layer"][0]["encoding"]["y"]["sort"]
    ranks = [rank[r] for r in order if r in rank]
    check(ranks == sorted(ranks), f"{stem}: heat-map rows worst first")


with tempfile.TemporaryDirectory() as tmp:
    for stem in ("apu_test_cell", "gearbox_lube_skid", "turbo_test_stand"):
        case = os.path.join(SRC, "cases", stem + ".json")
        page, md = os.path.join(tmp, stem + ".html"), os.path.join(tmp, stem + ".md")
        r = subprocess.run([BIN, "report", case, "-o", page, "--md", md, "-q", "--run", "envelope"],
                           capture_output=True, text=True, timeout=600)
        check(r.returncode == 0, f"{stem}: report exits 0", r.stderr[-1500:])
        if r.returncode != 0:
            continue
        specs = embedded_specs(page)
        check_curves(stem, case, specs, tmp)
        check_margins(stem, case, specs, tmp)
        text = open(md, encoding="utf-8").read()
        check(re.search(r"\*\*(PASS|FAIL|NOT CONVERGED):", text) is not None, f"{stem}: the Markdown has the verdict")
        check("manufacturers' data" in text, f"{stem}: the Markdown has the cautions")
    # Scenario traces against simulate's own JSON.
    case = os.path.join(SRC, "cases", "turbo_test_stand.json")
    page = os.path.join(tmp, "scen.html")
    r = subprocess.run([BIN, "report", case, "-o", page, "-q", "--run", "scenarios"], capture_output=True, text=True,
                       timeout=600)
    specs = embedded_specs(page) if r.returncode == 0 else {}
    # Plot ids are the scenario ids with "-" for "_".
    scen = {k[len("plot-scenario-"):].replace("-", "_"): v for k, v in specs.items() if k.startswith("plot-scenario-")}
    check(sorted(scen) == ["cold_start_warmup", "hot_shutdown", "hot_shutdown_afterrun"],
          "scenario plots: one per scenario of the case", str(sorted(scen)))
    for sid, spec in scen.items():
        out = os.path.join(tmp, sid + ".json")
        subprocess.run([BIN, "simulate", case, "--scenario", sid, "--json", out, "-q"], capture_output=True, timeout=600)
        sim = json.load(open(out, encoding="utf-8"))
        panel = spec["vconcat"][0]["layer"]
        rows = panel[0]["data"]["values"]
        worst, n = 0.0, 0
        for mass, temps in sim["mass_temperature_K"].items():
            got = {row["time_s"]: row["y"] for row in rows if row["series"] == mass + " T"}
            for t, k in zip(sim["time_s"], temps):
                if t in got:
                    worst, n = max(worst, abs(got[t] + 273.15 - k)), n + 1
        check(n >= len(sim["time_s"]) and worst <= 1e-9, f"{sid}: the page's mass temperatures are simulate's",
              f"{n} values, worst {worst:.3g} K")
        rules = [row for layer in panel[1:] for row in layer["data"]["values"]]
        check(any(row["limit"] == "coking_temperature_max" and abs(row["y"] - 200.0) < 1e-9 for row in rules),
              f"{sid}: coking limit drawn at 200 degC", str(rules))
    spread_plots(tmp)
    # Bad input and a missing plot script: clear errors, nothing written.
    case = os.path.join(SRC, "cases", "gearbox_lube_skid.json")
    page = os.path.join(tmp, "bad.html")
    r = subprocess.run([BIN, "report", case, "-o", page, "--point", "no_such_point"], capture_output=True, text=True,
                       timeout=120)
    check(r.returncode == 2 and "no_such_point" in r.stderr and "cold_start" in r.stderr and not os.path.exists(page),
          "unknown --point: exit 2, the points listed, no page", r.stderr)
    env = dict(os.environ, LOOPWRIGHT_WEB_DIR=os.path.join(tmp, "nowhere"))
    r = subprocess.run([BIN, "report", case, "-o", page, "--run", "envelope", "-q"], capture_output=True, text=True,
                       timeout=300, env=env)
    check(r.returncode == 4 and "vega.min.js" in r.stderr and not os.path.exists(page),
          "missing plot scripts: exit 4 naming the file, no page", r.stderr)
    r = subprocess.run([BIN, "report", case, "-o", page, "--run", "envelope", "--units", "us", "-q"],
                       capture_output=True, text=True, timeout=300)
    specs = embedded_specs(page) if r.returncode == 0 else {}
    pump = next((v for k, v in specs.items() if k.startswith("plot-pump-")), None)
    row = pump["layer"][0]["data"]["values"][5] if pump else None
    # 1 US gal = 3.785411784e-3 m3 (NIST SP 811, B.8); 1 psi = 6894.757 Pa (NIST SP 811, B.8).
    check(row is not None and abs(row["flow"] - row["flow_m3_s"] * 60 / 3.785411784e-3) <= 1e-9 * abs(row["flow"]) + 1e-12
          and abs(row["rise"] - row["rise_Pa"] / 6894.757293168) <= 1e-6 * abs(row["rise"]) + 1e-9,
          "--units us: the plotted flow in gpm and rise in psi", str(row))
finish()
