#!/usr/bin/python3
"""Supply-header benchmark against outside solvers in the same run (not a
test: run by hand, never by CTest; speed and memory are measured here only).

For N = 10, 100, 1,000, 10,000, 100,000 (and 1,000,000 with --million) it
writes the supply header of tests/tools/header_case.py (a 25 mm header of N
segments fed at 4 bar g with 60 degC oil, each node feeding a 0.5 m x 6 mm
branch line and a pressure-fed journal bearing to a housing drain) and times
on that same network, one after another on the same machine:

- loopwright, the whole process: `loopwright solve CASE --json OUT
  --json-detail summary -q --max-case-size 4GiB` (wall time, peak RSS);
- loopwright by parts: `lw_bench --case CASE --json OUT` (load, solve,
  checks, write of the compact JSON, each timed alone; peak RSS);
- the independent scipy sparse Newton reference (tests/tools/
  header_reference.py: nodal Newton with the co-content line search), its
  solve alone and its whole process (Python start, case read, solve);
- EPANET 2.2 (public-domain water-network solver) from the `epanet-js` npm
  package, pinned by tests/benchmarks/epanet/package-lock.json and installed
  by this script with `npm ci` into BUILD/header-bench/epanet (nodejs and npm
  from Debian: `apt-get install -y nodejs npm` when missing, as root): EN_solveH
  alone and the whole `node` process (module load, network read, solve, every
  link flow and node head written out).

EPANET network (an .inp in US units, CFS, so that no rounded unit factor of
EPANET enters): Darcy-Weisbach head loss; the oil as a relative kinematic
viscosity (nu / 1.1e-5 ft2/s, EPANET's water reference, from its source, from
memory) and a specific gravity (rho / 999.97 kg/m3, water at 4 degC); heads
H = p / (rho g_E) with EPANET's g_E = 32.2 ft/s2, so that rho g_E H is the
pressure. Header segments and branch lines are pipes with the case's lengths,
bores and roughness. Each bearing (Q = K dp / mu, Shigley Eq. 12-22) is an
equivalent laminar pipe of 2 mm bore and length L = pi D^4 / (128 K): its
Hagen-Poiseuille law Q = pi D^4 dp / (128 mu L) is the bearing's law exactly
while it stays laminar (Re < 2000 in EPANET, checked: about 400 at most
here). EPANET's own friction differs from Churchill's in transition (64/Re
below Re 2000, a cubic interpolation to Swamee-Jain at 4000, Swamee-Jain's
approximation of Colebrook above), so its feed flow differs slightly; the
table gives that difference. ACCURACY 1e-8 (sum of flow changes over total
flow), TRIALS 500.

The oil's density and viscosity at the loop temperature are loopwright's
(lw_probe solve of a one-bearing loop), for the scipy reference and EPANET.

Usage: header_bench.py [--build BUILD] [--max-n N] [--million] [--sizes N,N] [--scipy-max N]
                       [--friction churchill_1977|laminar_colebrook] [--repeat R]
                       [--no-epanet] [--json FILE] [--markdown [JSON ...]]
Prints one table row per N and, with --json, writes every number; --markdown
prints the README's table (from earlier --json files when given).
"""
import argparse
import json
import math
import os
import shutil
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
SRC = os.path.normpath(os.path.join(HERE, "..", ".."))
sys.path.insert(0, os.path.join(SRC, "tests", "tools"))
import header_case as hc  # noqa: E402
import header_reference as ref  # noqa: E402

FT = 0.3048  # m, exact
G_EPANET = 32.2 * FT  # EPANET's g [m/s2]
NU_EPANET_WATER = 1.1e-5 * FT ** 2  # EPANET's reference viscosity [m2/s]
BEARING_PIPE_BORE = 0.002  # m: the equivalent laminar pipe of each bearing


# ------------------------------------------------------------------ running


def run(cmd, out_path):
    """Runs cmd with stdout into out_path: (wall seconds, peak RSS kB, exit code, stdout text)."""
    with open(out_path, "w") as out:
        t0 = time.perf_counter()
        p = subprocess.Popen(cmd, stdout=out, stderr=subprocess.PIPE, text=True)
        _, status, ru = os.wait4(p.pid, 0)
        wall = time.perf_counter() - t0
        p.returncode = os.waitstatus_to_exitcode(status)
        err = p.stderr.read()
    with open(out_path) as f:
        text = f.read()
    if p.returncode != 0:
        print(f"  {os.path.basename(cmd[0])} exit {p.returncode}: {err.strip()[:300]}", file=sys.stderr)
    return wall, ru.ru_maxrss, p.returncode, text


def best(runs):
    """The run with the least wall time (for timings repeated at small N)."""
    return min(runs, key=lambda r: r[0])


def json_line(text):
    lines = [ln for ln in text.splitlines() if ln.startswith("{")]
    return json.loads(lines[-1]) if lines else None


# ------------------------------------------------------------------ EPANET


def ensure_epanet(build):
    """epanet-js installed by `npm ci` into BUILD/header-bench/epanet; the runner's path or None."""
    dest = os.path.join(build, "header-bench", "epanet")
    runner = os.path.join(dest, "epanet_run.mjs")
    os.makedirs(dest, exist_ok=True)
    for f in ("package.json", "package-lock.json", "epanet_run.mjs"):
        shutil.copy(os.path.join(HERE, "epanet", f), dest)
    if not shutil.which("npm") or not shutil.which("node"):
        if os.geteuid() == 0 and shutil.which("apt-get"):
            print("installing nodejs and npm (Debian packages) for the EPANET reference", file=sys.stderr)
            subprocess.run(["apt-get", "install", "-y", "nodejs", "npm"], check=False)
        if not shutil.which("npm"):
            print("no npm: EPANET left out", file=sys.stderr)
            return None
    if not os.path.exists(os.path.join(dest, "node_modules", "epanet-js", "package.json")):
        r = subprocess.run(["npm", "ci", "--ignore-scripts", "--no-audit", "--no-fund"], cwd=dest)
        if r.returncode != 0:
            print("npm ci failed: EPANET left out", file=sys.stderr)
            return None
    return runner


def bearing_k(i):
    """K of bearing i [m^3] (Q = K dp / mu), from the case's data."""
    s = hc.SUPPLY
    return ref.bearing_coefficient({"diameter": s["bearing_diameter"], "length": s["bearing_length"],
                                    "radial_clearance": f"{hc.bearing_clearance_um(i)} um",
                                    "eccentricity": s["eccentricity"]})


def write_epanet_inp(path, n, rho, mu, housing_pa, friction):
    """The supply header as an EPANET network (see the module note)."""
    if friction != "churchill_1977":
        print("  (EPANET has its own transition friction whatever the case's method)", file=sys.stderr)
    s = hc.SUPPLY
    q = ref.quantity
    head_ft = lambda p: p / (rho * G_EPANET) / FT  # noqa: E731
    ks = [bearing_k(i) for i in range(7)]
    lb_ft = [math.pi * BEARING_PIPE_BORE ** 4 / (128 * k) / FT for k in ks]
    seg = (q(s["segment_length"]) / FT, q(s["segment_diameter"]) / FT * 12, q(s["segment_roughness"]) / FT * 1e3)
    line = (q(s["line_length"]) / FT, q(s["line_diameter"]) / FT * 12, q(s["line_roughness"]) / FT * 1e3)
    bore_in = BEARING_PIPE_BORE / FT * 12
    with open(path, "w") as f:
        f.write(f"[TITLE]\nsupply header {n}\n[JUNCTIONS]\n")
        for i in range(n):
            f.write(f"n{i} 0 0\nf{i} 0 0\n")
        f.write(f"[RESERVOIRS]\nsupply {head_ft(q(s['supply_pressure'])):.17g}\n"
                f"housing {head_ft(housing_pa):.17g}\n[PIPES]\n")
        for i in range(n):
            up = "supply" if i == 0 else f"n{i - 1}"
            f.write("h%d %s n%d %.17g %.17g %.17g 0 Open\n" % (i, up, i, *seg))
            f.write("l%d n%d f%d %.17g %.17g %.17g 0 Open\n" % (i, i, i, *line))
            f.write("b%d f%d housing %.17g %.17g 1e-6 0 Open\n" % (i, i, lb_ft[i % 7], bore_in))
        f.write("[OPTIONS]\nUNITS CFS\nHEADLOSS D-W\n"
                f"SPECIFIC GRAVITY {rho / 999.97:.9f}\nVISCOSITY {mu / rho / NU_EPANET_WATER:.17g}\n"
                "TRIALS 500\nACCURACY 0.00000001\nUNBALANCED STOP\n[TIMES]\nDURATION 0\n"
                "[REPORT]\nSTATUS NO\nSUMMARY NO\n[END]\n")


# ---------------------------------------------------------------- one size


def bench_one(n, a, tools, rho, mu, work):
    case = os.path.join(work, f"header_{n}.json")
    with open(case, "w") as f:
        hc.write_supply_header(f, n, a.friction)
    row = {"n": n, "case_MB": os.path.getsize(case) / 1e6}
    reps = a.repeat if n <= 10000 else 1
    out_json = os.path.join(work, "results.json")
    log = os.path.join(work, "stdout.txt")
    # loopwright: the whole process, then by parts.
    w = best([run([tools["loopwright"], "solve", case, "--json", out_json, "--json-detail", "summary", "-q",
                   "--max-case-size", "4GiB"], log) for _ in range(reps)])
    row.update(lw_whole_s=w[0], lw_whole_rss_MB=w[1] / 1024, lw_exit=w[2], results_MB=os.path.getsize(out_json) / 1e6
               if os.path.exists(out_json) else None)
    parts = [run([tools["lw_bench"], "--case", case, "--json", out_json, "--max-case-size", "4GiB"], log)
             for _ in range(reps)]
    p = min((json_line(r[3]) or {"solve_s": math.inf} for r in parts), key=lambda j: j["load_s"] + j["solve_s"])
    row.update(lw_load_s=p.get("load_s"), lw_solve_s=p.get("solve_s"), lw_checks_s=p.get("checks_s"),
               lw_write_s=p.get("write_s"), lw_rss_MB=p.get("peak_rss_kB", 0) / 1024, lw_converged=p.get("converged"),
               lw_iterations=p.get("newton_iterations"), lw_feed=p.get("flow_m3_s"))
    # The scipy reference.
    if n <= a.scipy_max:
        s = best([run([sys.executable, tools["reference"], case, "--rho", repr(rho), "--mu", repr(mu), "--brief"],
                      log) for _ in range(reps)])
        j = json_line(s[3]) or {}
        row.update(scipy_solve_s=j.get("seconds", {}).get("solve"), scipy_whole_s=s[0], scipy_rss_MB=s[1] / 1024,
                   scipy_iterations=j.get("iterations"), scipy_feed=j.get("feed_flow_m3_s"),
                   scipy_on_switch=[o["id"] for o in j.get("on_switch", [])])
    # EPANET.
    if tools.get("epanet"):
        inp = os.path.join(work, f"header_{n}.inp")
        write_epanet_inp(inp, n, rho, mu, ref.quantity(hc.SUPPLY["housing_pressure"]), a.friction)
        e = best([run(["node", tools["epanet"], inp, os.path.join(work, "epanet_out.json"), "h0"], log)
                  for _ in range(reps)])
        j = json_line(e[3]) or {}
        row.update(epanet_solve_s=j.get("solve_s"), epanet_whole_s=e[0], epanet_rss_MB=e[1] / 1024,
                   epanet_iterations=j.get("iterations"),
                   epanet_feed=None if j.get("feed_flow") is None else j["feed_flow"] * FT ** 3,  # CFS
                   epanet_relative_error=j.get("relative_error"))
        os.remove(inp)
    for f in (case, out_json, os.path.join(work, "epanet_out.json")):
        if os.path.exists(f):
            os.remove(f)
    return row


# ------------------------------------------------------------------- table


def fmt(v, spec):
    return "—" if v is None else format(v, spec)


def ratio(a, b):
    return None if a is None or b is None or b == 0 else a / b


def rel(a, b):
    return None if a is None or b is None else abs(a - b) / abs(b)


def print_row(r, header=False):
    cols = [("N", 9), ("load s", 8), ("solve s", 8), ("write s", 8), ("RSS MB", 7), ("whole s", 8),
            ("scipy s", 8), ("EPANET solve/whole s", 21), ("solve lw/EP", 11), ("whole lw/EP", 11),
            ("solve lw/scipy", 14), ("feed lw m3/s", 14), ("vs scipy", 9), ("vs EPANET", 9)]
    if header:
        print("  ".join(name.rjust(w) for name, w in cols))
        return
    write = None if r.get("lw_write_s") is None else r["lw_write_s"] + (r.get("lw_checks_s") or 0)
    vals = [f"{r['n']:,}", fmt(r.get("lw_load_s"), ".3f"), fmt(r.get("lw_solve_s"), ".4f"), fmt(write, ".3f"),
            fmt(r.get("lw_rss_MB"), ".0f"), fmt(r.get("lw_whole_s"), ".3f"), fmt(r.get("scipy_solve_s"), ".3f"),
            f"{fmt(r.get('epanet_solve_s'), '.4f')} / {fmt(r.get('epanet_whole_s'), '.3f')}",
            fmt(ratio(r.get("lw_solve_s"), r.get("epanet_solve_s")), ".2f"),
            fmt(ratio(r.get("lw_whole_s"), r.get("epanet_whole_s")), ".2f"),
            fmt(ratio(r.get("lw_solve_s"), r.get("scipy_solve_s")), ".3f"),
            fmt(r.get("lw_feed"), ".10e") if r.get("lw_converged") else "not converged",
            fmt(rel(r.get("lw_feed"), r.get("scipy_feed")), ".1e"),
            fmt(rel(r.get("lw_feed"), r.get("epanet_feed")), ".1e")]
    print("  ".join(v.rjust(w) for v, (_, w) in zip(vals, cols)), flush=True)


def markdown(rows):
    """The rows as the README's Markdown table."""
    print("\n| N | load s | solve s | write s | RSS MB | whole s | scipy solve s | EPANET solve / whole s (RSS MB) "
          "| solve lw/EPANET | whole lw/EPANET | solve lw/scipy | feed flow (loopwright) m³/s | vs scipy | vs EPANET |")
    print("|" + "---|" * 14)
    for r in rows:
        write = None if r.get("lw_write_s") is None else r["lw_write_s"] + (r.get("lw_checks_s") or 0)
        feed = fmt(r.get("lw_feed"), ".10e") if r.get("lw_converged") else "not converged"
        print(f"| {r['n']:,} | {fmt(r.get('lw_load_s'), '.3g')} | {fmt(r.get('lw_solve_s'), '.3g')} "
              f"| {fmt(write, '.3g')} | {fmt(r.get('lw_rss_MB'), '.0f')} | {fmt(r.get('lw_whole_s'), '.3g')} "
              f"| {fmt(r.get('scipy_solve_s'), '.3g')} | {fmt(r.get('epanet_solve_s'), '.3g')} / "
              f"{fmt(r.get('epanet_whole_s'), '.3g')} ({fmt(r.get('epanet_rss_MB'), '.0f')}) "
              f"| {fmt(ratio(r.get('lw_solve_s'), r.get('epanet_solve_s')), '.2f')} "
              f"| {fmt(ratio(r.get('lw_whole_s'), r.get('epanet_whole_s')), '.2f')} "
              f"| {fmt(ratio(r.get('lw_solve_s'), r.get('scipy_solve_s')), '.2f')} | {feed} "
              f"| {fmt(rel(r.get('lw_feed'), r.get('scipy_feed')), '.1e')} "
              f"| {fmt(rel(r.get('lw_feed'), r.get('epanet_feed')), '.1e')} |")


def main(argv):
    ap = argparse.ArgumentParser(description="supply-header benchmark (see the module note)")
    ap.add_argument("--build", default=os.path.join(SRC, "build"))
    ap.add_argument("--max-n", type=int, default=100000)
    ap.add_argument("--million", action="store_true", help="also N = 1,000,000")
    ap.add_argument("--sizes", help="comma-separated N to run instead (e.g. 1000000)")
    ap.add_argument("--scipy-max", type=int, default=100000, help="largest N for the scipy reference")
    ap.add_argument("--friction", default="churchill_1977", choices=hc.FRICTION_METHODS)
    ap.add_argument("--repeat", type=int, default=3, help="runs per tool up to N = 10,000 (the fastest is kept)")
    ap.add_argument("--no-epanet", action="store_true")
    ap.add_argument("--json", help="write every measured number here")
    ap.add_argument("--markdown", nargs="*", metavar="JSON",
                    help="print the table in Markdown at the end; with files (written by --json), "
                         "only print theirs, measuring nothing")
    a = ap.parse_args(argv)
    if a.markdown:
        rows = []
        for path in a.markdown:
            with open(path) as f:
                rows += json.load(f)["rows"]
        markdown(rows)
        return
    tools = {"loopwright": os.path.join(a.build, "loopwright"),
             "lw_bench": os.path.join(a.build, "tests", "benchmarks", "lw_bench"),
             "probe": os.path.join(a.build, "tests", "lw_probe"),
             "reference": os.path.join(SRC, "tests", "tools", "header_reference.py")}
    for k in ("loopwright", "lw_bench", "probe"):
        if not os.path.exists(tools[k]):
            sys.exit(f"{tools[k]} is missing: build it first (cmake --build {a.build} --target {os.path.basename(tools[k])})")
    if not a.no_epanet:
        tools["epanet"] = ensure_epanet(a.build)
    work = os.path.join(a.build, "header-bench")
    os.makedirs(work, exist_ok=True)
    rho, mu = ref.fluid_state(hc.supply_header_case(1, a.friction), tools["probe"])
    sizes = [n for n in (10, 100, 1000, 10000, 100000) if n <= a.max_n] + ([1000000] if a.million else [])
    if a.sizes:
        sizes = [int(v) for v in a.sizes.split(",")]
    print(f"supply header, friction {a.friction}, oil at 60 degC: rho {rho:.6g} kg/m3, mu {mu:.6g} Pa s; "
          f"{os.cpu_count()} cores; {time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}")
    print("loopwright: load, solve, write (checks + compact JSON), RSS: lw_bench --case; whole: loopwright solve "
          "--json --json-detail summary. scipy: solve alone. EPANET: EN_solveH alone / whole node process.")
    print_row(None, header=True)
    rows = []
    for n in sizes:
        rows.append(bench_one(n, a, tools, rho, mu, work))
        print_row(rows[-1])
    if a.json:
        with open(a.json, "w") as f:
            json.dump({"friction": a.friction, "rho": rho, "mu": mu, "cores": os.cpu_count(),
                       "date": time.strftime("%Y-%m-%d", time.gmtime()), "rows": rows}, f, indent=1)
    if a.markdown is not None:
        markdown(rows)


if __name__ == "__main__":
    main(sys.argv[1:])
