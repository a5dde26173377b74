#!/usr/bin/python3
"""The supply header with the hard 64/Re | Colebrook switch, against an
independent re-solve.

Cases: tests/tools/header_case.py's supply header (a 25 mm header of N
segments of 0.3 m fed at 4 bar g with 60 degC oil, each node feeding a
0.5 m x 6 mm branch line and a pressure-fed journal bearing to a housing
drain; invented data) at N = 100, 500, 1,000 and 2,000 with friction
laminar_colebrook, and at N = 1,000 with churchill_1977. The housing pressure
of each hard-switch case (invented data) is one for which the reference finds
a header segment ON the switch: its flow pinned at Re = 2300 while its drop
lies between the laminar and the turbulent drop there (chosen by scanning the
housing pressure with the reference; asserted below, so the case cannot
silently lose that property). Where no segment sits on the switch the laws
are smooth at the answer and the switch is not exercised.

Each case is solved by `loopwright solve --json` (the command a user runs) and
re-solved here by tests/tools/header_reference.py: a sparse Newton method in
node pressures with a co-content line search (Collins et al. 1978, from
memory), the nodal step of Todini & Pilati (1988), and the switch's filled
graph as the law. The reference takes from loopwright only the case file and
the oil's density and viscosity at the loop temperature (lw_probe solve of a
one-bearing loop with the same oil, so the network alone is compared; checked
here to be the density the results imply, mass flow over volume flow).

Asserted per case: loopwright converged; the reference converged (largest
node residual <= 1e-11 of the largest flow: the rounding floor of the
pressure differences in the nodal form is 1e-13 to 3e-12 of it here); the feed flow agrees to 1e-9
relative and every bearing flow to 1e-8 relative; every segment the
reference finds on the switch is reported with details.reynolds_state ==
"at_switch" and no other segment is. The reference's own friction pieces are
checked against python3-fluids: its Churchill (1977) f against
fluids.friction.Churchill_1977 and its closed-form Colebrook flow against
fluids.friction.Colebrook(..., tol=0) (mpmath's exact Lambert-W solution) on
the solved segments, and the switch's turbulent f at Re = 2300 likewise.
Prints "N passed, M failed" and exits non-zero on any failure.
"""
import json
import math
import os
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "tools"))
import refcheck  # noqa: E402
from refcheck import check, rel  # noqa: E402
import header_reference as ref  # noqa: E402
from header_case import supply_header_case  # noqa: E402
from fluids.friction import Churchill_1977, Colebrook  # noqa: E402
import numpy as np  # noqa: E402

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
# (N, friction, housing pressure): see the module note for the choice.
CASES = [(100, "laminar_colebrook", "0.4 bar"), (500, "laminar_colebrook", "0.2 bar"),
         (1000, "laminar_colebrook", "0.17 bar"), (2000, "laminar_colebrook", "0.2 bar"),
         (1000, "churchill_1977", "0.2 bar")]
FEED_TOL, BEARING_TOL = 1e-9, 1e-8


def record(name, ok, detail=""):
    refcheck.RESULTS.append(bool(ok))
    print(f"{'PASS' if ok else 'FAIL'} {name}{': ' + detail if detail else ''}")


def run_loopwright(case, tmp):
    path = os.path.join(tmp, "case.json")
    out = os.path.join(tmp, "results.json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump(case, f)
    r = subprocess.run([BIN, "solve", path, "--json", out, "-q"], capture_output=True, text=True, timeout=300)
    if not os.path.exists(out):
        return r, None
    with open(out, encoding="utf-8") as f:
        return r, json.load(f)["points"][0]


def check_friction_pieces(tag, case, answer, rho, mu):
    """The reference's friction laws against python3-fluids at its solved segments."""
    comps = {c["id"]: c for c in case["loops"][0]["components"]}
    pairs_ch, pairs_cb = [], []
    for cid, q in answer["flows"].items():
        c = comps[cid]
        if c["type"] not in ("pipe", "tube") or q == 0:
            continue
        D, L, eps = (ref.quantity(c[k]) for k in ("diameter", "length", "roughness"))
        v = abs(q) / (math.pi * D * D / 4)
        re = rho * v * D / mu
        if c["friction"] == "churchill_1977":
            f_ours = 2 * D * ref.churchill_dp(abs(q), L, D, eps, rho, mu) / (L * rho * v * v)
            pairs_ch.append((f_ours, Churchill_1977(re, eps / D), cid))
        elif re > ref.RE_SWITCH * (1 + 1e-12):
            dp = abs(answer["drops"][cid])
            pairs_cb.append((dp, Colebrook(re, eps / D, tol=0) * L / D * rho * v * v / 2, cid))
    if pairs_ch:
        check(f"{tag}: reference Churchill f = fluids.friction.Churchill_1977 at its {len(pairs_ch)} lines",
              pairs_ch, 1e-13)
    if pairs_cb:
        check(f"{tag}: reference Colebrook flow reproduces fluids.friction.Colebrook(tol=0) drops",
              pairs_cb, 1e-12)
    h0 = comps["h0"]
    if h0["friction"] == "laminar_colebrook":
        L, D, eps = (np.array([ref.quantity(h0[k])]) for k in ("length", "diameter", "roughness"))
        lim = ref.SwitchLimits(L, D, eps, rho, mu)
        check(f"{tag}: reference turbulent f at Re 2300 = fluids.friction.Colebrook(2300, tol=0)",
              [(lim.f_turb[0], Colebrook(ref.RE_SWITCH, eps[0] / D[0], tol=0), "h0")], 1e-14)


def one_case(n, friction, housing, tmp):
    tag = f"N={n} {friction} (housing {housing})"
    case = supply_header_case(n, friction, housing)
    proc, point = run_loopwright(case, tmp)
    ok = point is not None and point.get("converged") and proc.returncode == 0
    record(f"{tag}: loopwright converged", ok, "" if ok else f"exit {proc.returncode}: {proc.stderr.strip()[:600]}")
    rho, mu = ref.fluid_state(case, refcheck.PROBE)
    ans = ref.solve_case(case, rho, mu)
    res = ans["relative_residuals"][-1]
    record(f"{tag}: reference converged in {ans['iterations']} Newton steps (residual {res:.1e} of the largest flow)",
           res <= 1e-11)
    net = ref.Network(case)
    check_friction_pieces(tag, case, ans, rho, mu)
    on = {o["id"] for o in ans["on_switch"]}
    if friction == "laminar_colebrook":
        inside = ", ".join(f"{o['id']} at {o['inside']:.2f} of the gap" for o in ans["on_switch"])
        record(f"{tag}: the reference finds a segment on the switch ({inside or 'none'})", len(on) > 0)
    if not ok:
        return
    comps = {c["id"]: c for c in point["components"]}
    m, q = comps["h0"]["mass_flow_kg_s"], comps["h0"]["flow_m3_s"]
    record(f"{tag}: the oil density given to the reference is loopwright's (mass over volume flow)",
           rel(m / q, rho) <= 1e-14)
    check(f"{tag}: feed flow", [(comps[f]["flow_m3_s"], ans["flows"][f], f) for f in ans["feeds"]], FEED_TOL)
    check(f"{tag}: every bearing flow", [(comps[b]["flow_m3_s"], ans["flows"][b], b) for b in net.bearing_ids],
          BEARING_TOL)
    reported = {c["id"] for c in point["components"]
                if c["type"] in ("pipe", "tube") and c["details"].get("reynolds_state") == "at_switch"}
    record(f"{tag}: loopwright reports at_switch exactly on the reference's segments {sorted(on)}",
           reported == on, f"loopwright: {sorted(reported)}")


def main():
    if refcheck.probe_missing():
        return 1
    with tempfile.TemporaryDirectory() as tmp:
        for n, friction, housing in CASES:
            try:
                one_case(n, friction, housing, tmp)
            except Exception as e:  # a failure of this case, not of the others
                record(f"N={n} {friction}: ran", False, repr(e))
    return refcheck.summary()


if __name__ == "__main__":
    sys.exit(main())
