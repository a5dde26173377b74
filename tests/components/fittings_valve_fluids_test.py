#!/usr/bin/python3
"""Reference check: fittings, IEC 60534 valve relation and orifice against
python3-fluids (Debian package, 1.0.22).

Run by Debian's /usr/bin/python3; the probe binary is found through the
environment variable LOOPWRIGHT_PROBE. Worst relative error printed per check.

Fittings (fluids/fittings.py):
  1. our Hooper 2-K table entries == fluids `Hooper` dict (Hooper 1981
     table as copied there), our Darby 3-K entries == fluids `Darby`
     dict (Darby 1999/2001 table); constant K entrance_sharp ==
     entrance_sharp(method='Crane'), exit == exit_normal().
  2. Hooper 2-K K(Re, D) == fluids.fittings.Hooper2K(Di [inch, actual inside
     diameter], Re, name=...) for every table entry, D 0.5..24 in,
     Re 10..1e7.
  3. Darby 3-K K(Re, D) == fluids.fittings.Darby3K(NPS [inch, nominal], Re,
     name=...) likewise.
  4. FittingDp(V) == K * rho V|V| / 2 with K from fluids Hooper2K.
  5. Cv -> Kv == fluids.fittings.Cv_to_Kv.
Valve, IEC 60534-2-1 (fluids/control_valve.py):
  6. turbulent, non-choked, non-cavitating: our dp(Q) at a given Kv, fed to
     fluids.control_valve.size_control_valve_l as P2 = P1 - dp, sizes that
     same Kv (d = D1 = D2 so no piping factor; Rev > 1e4).
  7. viscous and transitional flow: our dp(Q) satisfies the IEC relation
     Kv = Q/(N1 F_R) sqrt((rho/rho0)/dp) with F_R and Rev computed by fluids'
     Reynolds_valve and Reynolds_factor at our Kv (full and reduced trim,
     Rev 0.1..1e4). size_control_valve_l is not used here: in viscous flow it
     runs the standard's sizing iteration, which raises C in 30 % steps
     (Ci = 1.3 C) and stops at the first sufficient Ci, so it returns a
     bracket, not the solution of the relation.
     Also: the smooth-F_R dp stays within 0.76 % of the standard-F_R dp
     outside Rev 10..20 (twice the 0.375 % F_R bound; dp ~ 1/F_R^2).
  8. F_R (standard form) == min(1, fluids Reynolds_factor) on a Rev grid;
     Rev == fluids Reynolds_valve.
Orifice (fluids/flow_meter.py):
  9. Reader-Harris/Gallagher C (ISO 5167-2:2003 Eq. 4) == fluids
     C_Reader_Harris_Gallagher for corner, flange and D-D/2 taps,
     D 50..300 mm, beta 0.1..0.75, Re_D 5e3..1e7 (ISO range; fluids' low-Re
     extensions are inactive there).
 10. OrificeDp with its low-Re blend on (the default delta, oil
     viscosities, bore Reynolds numbers 1e-2 .. 1e5): fluids.flow_meter.
     flow_meter_discharge (ISO 5167-1 flow equation, expansibility 1) at the
     discharge coefficient of the published blend
     1/Cd^2 = 1/Cd_inf^2 + 1/(delta^2 Re_d) (Wuest 1954; Merritt 1967),
     computed here, maps our dp back to the same mass flow.
 11. permanent-loss ratio == fluids dP_orifice / (P1 - P2) (ISO 5167-2 5.4).
 12. the orifice component (registry defaults, jet into a cavity) in
     creeping flow (Re_d 1e-5 .. 1e-3) == Sampson's (1891) exact solution for
     a hole in a thin plate, dp = 24 mu Q / d^3, computed here.
 13. the in-line orifice component (pipe_diameter given) at high Re charges
     fluids dP_orifice (ISO 5167-2 5.4 permanent loss) of the differential
     that the orifice equation at C = 0.61 gives for its flow; the jet
     (no pipe_diameter) charges the whole differential.
rho0: ours 999.1026 kg/m3 (IAPWS-95, 15 degC), fluids 999.10329: Kv and dp
differ by ~3.5e-7 / 7e-7 relative from that alone; tolerances 5e-6 there,
1e-12 where both sides evaluate the same closed form.
"""
import json
import math
import os
import subprocess
import sys

import fluids.control_valve as cv
import fluids.fittings as ft
import fluids.flow_meter as fm
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from refcheck import check, csv, probe, probe_missing, rel, summary  # noqa: E402

INCH = 0.0254














HOOPER_NAMES = {
    "elbow_90_standard_threaded": "Elbow, 90°, Standard (R/D = 1), Screwed",
    "elbow_90_standard_flanged": "Elbow, 90°, Standard (R/D = 1), Flanged/welded",
    "elbow_90_long_radius": "Elbow, 90°, Long-radius (R/D = 1.5), All types",
    "elbow_45_standard": "Elbow, 45°, Standard (R/D = 1), All types",
    "elbow_45_long_radius": "Elbow, 45°, Long-radius (R/D 1.5), All types",
    "elbow_180_standard_flanged": "Elbow, 180°, Standard (R/D = 1), Flanged/welded",
    "tee_through_branch_threaded": "Elbow, Used as, Standard, Screwed",
    "tee_through_branch_flanged": "Elbow, Elbow, Standard, Flanged/welded",
    "tee_through_run_threaded": "Tee, Run, Screwed",
    "tee_through_run_flanged": "Tee, Through, Flanged or welded",
    "gate_valve_open": ft.HOOPER_GATE_FULL_LINE_SIZE_VALVE,
    "ball_valve_reduced_trim": ft.HOOPER_BALL_REDUCED_TRIM_VALVE,
    "plug_valve_reduced_trim": ft.HOOPER_PLUG_REDUCED_TRIM_VALVE,
    "globe_valve_standard": ft.HOOPER_GLOBE_STANDARD_VALVE,
    "globe_valve_angle": ft.HOOPER_GLOBE_ANGLED_OR_Y_VALVE,
    "diaphragm_valve": ft.HOOPER_DIAPHRAGM_DAM_VALVE,
    "butterfly_valve": ft.HOOPER_BUTTERFLY_VALVE,
    "check_valve_lift": ft.HOOPER_CHECK_VALVE_LIFT,
    "check_valve_swing": ft.HOOPER_CHECK_VALVE_SWING,
    "check_valve_tilting_disc": ft.HOOPER_CHECK_VALVE_TILTING_DISK,
}
DARBY_NAMES = {
    "elbow_90_standard_threaded": "Elbow, 90°, threaded, standard, (r/D = 1)",
    "elbow_90_long_radius": "Elbow, 90°, threaded, long radius, (r/D = 1.5)",
    "elbow_90_standard_flanged": "Elbow, 90°, flanged, welded, bends, (r/D = 1)",
    "elbow_90_r_d_2": "Elbow, 90°, (r/D = 2)",
    "elbow_90_r_d_4": "Elbow, 90°, (r/D = 4)",
    "elbow_45_standard": "Elbow, 45°, threaded standard, (r/D = 1)",
    "elbow_45_long_radius": "Elbow, 45°, long radius, (r/D = 1.5)",
    "elbow_180_standard_flanged": "Elbow, 180°, flanged, (r/D = 1)",
    "elbow_180_threaded": "Elbow, 180°, threaded, close-return bend, (r/D = 1)",
    "tee_through_branch_threaded": "Tee, Through-branch, (as elbow), threaded, (r/D = 1)",
    "tee_through_branch_flanged": "Tee, Through-branch, (as elbow), flanged, (r/D = 1)",
    "tee_through_run_threaded": "Tee, Run-through, threaded, (r/D = 1)",
    "tee_through_run_flanged": "Tee, Run-through, flanged, (r/D = 1)",
    "gate_valve_open": ft.DARBY_GATE_VALVE,
    "ball_valve_open": ft.DARBY_BALL_VALVE,
    "globe_valve_standard": ft.DARBY_GLOBE_FULL_VALVE,
    "angle_valve_45": ft.DARBY_ANGLE_45DEG_FULL_VALVE,
    "angle_valve_90": ft.DARBY_ANGLE_90DEG_FULL_VALVE,
    "plug_valve_straight": ft.DARBY_PLUG_VALVE_STRAIGHT_THROUGH,
    "diaphragm_valve": ft.DARBY_DIAPHRAGM_DAM_VALVE,
    "check_valve_swing": ft.DARBY_SWING_CHECK_VALVE,
    "check_valve_lift": ft.DARBY_LIFT_CHECK_VALVE,
}

D_INCH = [0.5, 1.0, 2.0, 6.0, 24.0]
RE_GRID = [10 ** (1 + 6 * i / 24) for i in range(25)]  # 10 .. 1e7


def mapped_pairs(entries, names, refs, method, fields):
    """Our table entries against fluids' dict `refs` (names mapped by `names`):
    fields = [(our key, label), ...] in the order of fluids' tuple."""
    pairs = []
    for e in entries:
        key = names.get(e["name"])
        ref = refs.get(key) if key else None
        if ref is None:
            pairs.append((None, 1.0, f"{method} {e['name']}: no mapping to fluids"))
            continue
        pairs += [(e[f], ref[k], f"{method} {e['name']} {label}") for k, (f, label) in enumerate(fields)]
    return pairs


def fittings_checks():
    table = probe("corr.fittings_table")
    pairs = mapped_pairs(table["hooper"], HOOPER_NAMES, ft.Hooper, "hooper", [("k1", "K1"), ("k_inf", "Kinf")])
    pairs += mapped_pairs(table["darby"], DARBY_NAMES, ft.Darby, "darby",
                          [("k1", "K1"), ("k_i", "Ki"), ("k_d", "Kd")])
    const = {e["name"]: e["k"] for e in table["constant_k"]}
    pairs += [(const.get("entrance_sharp"), ft.entrance_sharp(method="Crane"), "entrance_sharp"),
              (const.get("exit"), ft.exit_normal(), "exit")]
    check("fitting tables == fluids Hooper/Darby dicts, Crane entrance/exit", pairs, 0.0)

    # 2: Hooper 2-K by name
    d_all = [d * INCH for d in D_INCH for _ in RE_GRID]
    re_all = [re for _ in D_INCH for re in RE_GRID]
    pairs = []
    for e in table["hooper"]:
        k = probe("corr.hooper2k", e["k1"], e["k_inf"], csv(d_all), csv(re_all))["k"]
        key = HOOPER_NAMES[e["name"]]
        for i, (dm, re) in enumerate(zip(d_all, re_all)):
            pairs.append((k[i], ft.Hooper2K(Di=dm / INCH, Re=re, name=key),
                          f"{e['name']} D={dm / INCH:g}in Re={re:.3g}"))
    check("Hooper2K vs fluids Hooper2K(Di in inches, name)", pairs, 1e-12)

    # 3: Darby 3-K by name
    pairs = []
    for e in table["darby"]:
        k = probe("corr.darby3k", e["k1"], e["k_i"], e["k_d"], csv(d_all), csv(re_all))["k"]
        key = DARBY_NAMES[e["name"]]
        for i, (dm, re) in enumerate(zip(d_all, re_all)):
            pairs.append((k[i], ft.Darby3K(NPS=dm / INCH, Re=re, name=key),
                          f"{e['name']} NPS={dm / INCH:g}in Re={re:.3g}"))
    check("Darby3K vs fluids Darby3K(NPS in inches, name)", pairs, 1e-12)

    # 4: FittingDp == K rho V|V|/2 (oil, 20 mm line)
    rho, mu, dm = 850.0, 0.03, 0.02
    k1, kinf = ft.Hooper[HOOPER_NAMES["elbow_90_standard_threaded"]]
    kprime = kinf * (1.0 + INCH / dm)
    vs = [-5.0, -0.7, -0.01, 1e-5, 1e-3, 0.05, 0.4, 2.0, 9.0]
    dp = probe("corr.fitting_dp", k1, kprime, rho, mu, dm, csv(vs))["dp"]
    pairs = []
    for v, ours in zip(vs, dp):
        re = rho * abs(v) * dm / mu
        k = ft.Hooper2K(Di=dm / INCH, Re=re, K1=k1, Kinfty=kinf)
        pairs.append((ours, k * rho * v * abs(v) / 2.0, f"V={v:g}"))
    check("FittingDp vs K(fluids Hooper2K) rho V|V|/2", pairs, 1e-12)

    # 5: Cv -> Kv
    cvs = [0.01, 1.0, 12.5, 300.0]
    kv = probe("corr.cv_to_kv", csv(cvs))["kv"]
    check("CvToKv vs fluids Cv_to_Kv", [(k, ft.Cv_to_Kv(c), f"Cv={c:g}") for k, c in zip(kv, cvs)],
          1e-13)


def valve_checks():
    # 6: turbulent sizing round trip (water at 20 degC, and a light oil at
    # high flow); P1 = 10 bar abs, Psat small, dp well below choking.
    cases = [  # rho, mu, Psat, Pc, Kv, d, FL, Fd, Q list
        (998.2, 1.0e-3, 2.34e3, 22.064e6, 10.0, 0.025, 0.9, 0.46, [1e-3, 2e-3, 3e-3]),
        (998.2, 1.0e-3, 2.34e3, 22.064e6, 40.0, 0.05, 0.8, 1.0, [4e-3, 8e-3, 1.2e-2]),
        (820.0, 820.0 * 4e-6, 1e2, 2e6, 25.0, 0.04, 0.9, 0.7, [3e-3, 6e-3]),
    ]
    pairs = []
    p1 = 1e6
    for rho, mu, psat, pc, kv, d, fl, fd, qs in cases:
        out = probe("corr.iec_dp", rho, mu, kv, d, d, fl, fd, 1, csv(qs))
        for q, dp, rev in zip(qs, out["dp"], out["rev"]):
            r = cv.size_control_valve_l(rho, psat, pc, mu, p1, p1 - dp, q, d, d, d, fl, fd,
                                        full_output=True)
            label = f"Kv={kv:g} Q={q:g} Rev={rev:.3g} dp={dp:.4g}"
            if r["choked"] or r["laminar"]:
                pairs.append((None, kv, label + " (fluids: choked or laminar: bad case)"))
            else:
                pairs.append((r["Kv"], kv, label))
    check("IEC turbulent: fluids size_control_valve_l(our dp) sizes our Kv", pairs, 5e-6)

    # 7: viscous/transitional relation with fluids' Reynolds_valve/_factor.
    rho, mu = 860.0, 860.0 * 46e-6  # ISO VG 46 oil at 40 degC (nominal)
    nu = mu / rho
    pairs, pairs_rev, pairs_smooth = [], [], []
    for kv, d, full, fl, fd in [(1.0, 0.015, 1, 0.9, 0.7), (0.3, 0.015, 1, 0.95, 1.0),
                                (4.0, 0.015, 0, 0.9, 0.7), (10.0, 0.025, 0, 0.8, 0.5)]:
        qs = [10 ** (-9 + 6 * i / 30) for i in range(31)]
        out = probe("corr.iec_dp", rho, mu, kv, d, d, fl, fd, full, csv(qs))
        for q, dp, dps, rev in zip(qs, out["dp"], out["dp_standard"], out["rev"]):
            q_h = q * 3600.0
            rev_f = cv.Reynolds_valve(nu=nu, Q=q_h, D1=d * 1000, FL=fl, Fd=fd, C=kv)
            pairs_rev.append((rev, rev_f, f"Kv={kv:g} Q={q:g}"))
            if rev_f < 10.0 or rev_f > 20.0:
                pairs_smooth.append((dp, dps, f"Kv={kv:g} full={full} Q={q:g} Rev={rev_f:.3g}"))
            if rev_f > 1e4:
                continue
            fr = min(1.0, cv.Reynolds_factor(FL=fl, C=kv, d=d * 1000, Rev=rev_f,
                                             full_trim=bool(full)))
            c_turb = q_h / cv.N1 * math.sqrt(rho / cv.rho0 / (dps / 1000.0))
            pairs.append((c_turb / fr, kv, f"Kv={kv:g} full={full} Q={q:g} Rev={rev_f:.3g}"))
    check("IEC viscous: our standard-F_R dp gives Kv = C_turb/F_R(fluids)", pairs, 5e-6)
    check("IEC Rev vs fluids Reynolds_valve", pairs_rev, 1e-12)
    # The solver's smooth F_R: dp within 2 x 0.375 % of the standard's outside
    # Rev 10..20 (dp ~ 1/F_R^2; documented in valve_iec60534.h).
    check("IEC smooth dp vs standard dp outside Rev 10..20", pairs_smooth, 7.6e-3)

    # 8: F_R on a grid.
    pairs = []
    for kv, d, fl, full in [(0.05, 0.015, 0.9, 1), (2.0, 0.025, 0.7, 1), (5.0, 0.015, 0.95, 0),
                            (0.015483, 0.015, 0.98, 0)]:
        revs = [10 ** (-1 + 5 * i / 50) for i in range(51)]
        fr = probe("corr.iec_fr", kv, d, fl, full, csv(revs))["fr_standard"]
        for rv, ours in zip(revs, fr):
            ref = min(1.0, cv.Reynolds_factor(FL=fl, C=kv, d=d * 1000, Rev=rv,
                                              full_trim=bool(full)))
            pairs.append((ours, ref, f"Kv={kv:g} full={full} Rev={rv:.3g}"))
    check("IEC F_R (standard) vs min(1, fluids Reynolds_factor)", pairs, 1e-12)


def orifice_checks():
    # 9: RHG C.
    pairs = []
    mu, rho = 1e-3, 1000.0
    for taps, name in [("corner", "corner"), ("flange", "flange"), ("D", "D")]:
        for dpipe in [0.05, 0.1, 0.3]:
            for beta in [0.1, 0.2, 0.4, 0.56, 0.65, 0.75]:
                lo = max(5e3, 16000 * beta**2 if beta > 0.56 else 0.0)
                if taps == "flange":
                    lo = max(lo, 170000 * beta**2 * dpipe)
                res = [lo * (1e7 / lo) ** (i / 20) for i in range(21)]
                c = probe("corr.rhg", dpipe, beta * dpipe, taps, csv(res))["c"]
                for re, ours in zip(res, c):
                    m = re * math.pi * dpipe * mu / 4.0
                    ref = fm.C_Reader_Harris_Gallagher(D=dpipe, Do=beta * dpipe, rho=rho, mu=mu,
                                                       m=m, taps=name)
                    pairs.append((ours, ref, f"{taps} D={dpipe} beta={beta} Re_D={re:.3g}"))
    check("Reader-Harris/Gallagher C vs fluids C_Reader_Harris_Gallagher", pairs, 1e-12)

    # 10: OrificeDp with the low-Re blend on vs flow_meter_discharge at the
    # blend's Cd. Default delta: Sampson's (12 pi)^-1/2.
    pairs = []
    rho, cd_inf, delta = 860.0, 0.61, (12 * math.pi) ** -0.5
    for d, dpipe in [(1.5e-3, 6e-3), (4e-3, 10e-3), (1e-2, 5e-2)]:
        for mu in [0.003, 0.03, 0.3]:
            res = [1e-2, 1.0, 30.0, 300.0, 3e3, 1e5]
            qs = [re * math.pi * d * mu / (4 * rho) for re in res]
            dp = probe("corr.orifice_dp", rho, mu, d, dpipe, cd_inf, delta, csv(qs))["dp"]
            for re, q, ours in zip(res, qs, dp):
                cd = (1 / cd_inf**2 + 1 / (delta**2 * re)) ** -0.5
                m = fm.flow_meter_discharge(D=dpipe, Do=d, P1=2 * ours, P2=ours, rho=rho, C=cd)
                pairs.append((m, rho * q, f"d={d} D={dpipe} mu={mu} Re_d={re:g}"))
    check("OrificeDp (low-Re blend on) vs fluids flow_meter_discharge at the blend's Cd", pairs, 1e-12)

    # 11: pressure-loss ratio.
    pairs = []
    for beta in [0.2, 0.5, 0.7]:
        cs = [0.6, 0.61512, 0.62]
        ratio = probe("corr.orifice_loss_ratio", beta, csv(cs))["ratio"]
        for c, ours in zip(cs, ratio):
            ref = fm.dP_orifice(D=0.1, Do=0.1 * beta, P1=2e5, P2=1.8e5, C=c) / 2e4
            pairs.append((ours, ref, f"beta={beta} C={c}"))
    check("orifice permanent-loss ratio vs fluids dP_orifice", pairs, 1e-12)

    # 12: creeping flow through the orifice component vs Sampson (1891).
    pairs = []
    rho, mu = 870.0, 0.05
    for d in [0.5e-3, 1e-3, 3e-3]:
        res = [1e-5, 1e-4, 1e-3]
        ms = [rho * re * math.pi * d * mu / (4 * rho) for re in res]
        r = probe("component.eval", "orifice", json.dumps({"diameter": d}), rho, mu, csv([0] * len(ms)), csv(ms))["r"]
        for re, m, loss in zip(res, ms, r):
            q = m / rho
            pairs.append((loss, 24 * mu * q / d**3, f"d={d} Re_d={re:g}"))
    # The law's inertial share at Re_d 1e-3 is delta^2 Re / Cd_inf^2 = 7.13e-5.
    check("orifice component in creeping flow vs Sampson dp = 24 mu Q / d^3", pairs,
          1.01 * 1e-3 / (12 * math.pi * 0.61**2))

    # 13: in-line plate: permanent loss of fluids dP_orifice; jet: the whole differential.
    pairs = []
    rho, mu, cd = 998.0, 1e-12, 0.61  # viscous share below 2e-11
    for d, dpipe in [(2e-3, 8e-3), (5e-3, 10e-3), (1.5e-2, 2.5e-2)]:
        beta = d / dpipe
        a0 = math.pi * d * d / 4
        qs = [1e-5, 1e-4, 1e-3]
        ms = [rho * q for q in qs]
        inline = probe("component.eval", "orifice", json.dumps({"diameter": d, "pipe_diameter": dpipe}),
                       rho, mu, csv([0] * 3), csv(ms))["r"]
        jet = probe("component.eval", "orifice", json.dumps({"diameter": d}), rho, mu, csv([0] * 3), csv(ms))["r"]
        for q, ours_inline, ours_jet in zip(qs, inline, jet):
            # Orifice equation (ISO 5167-1): differential for this flow at C.
            diff = (q * math.sqrt(1 - beta**4) / (cd * a0)) ** 2 * rho / 2
            perm = fm.dP_orifice(D=dpipe, Do=d, P1=1e7, P2=1e7 - diff, C=cd)
            pairs.append((ours_inline, perm, f"in-line d={d} D={dpipe} Q={q:g}"))
            pairs.append((ours_jet, (q / (cd * a0)) ** 2 * rho / 2, f"jet d={d} Q={q:g}"))
    check("orifice component: in-line permanent loss vs fluids dP_orifice; jet the whole drop", pairs, 1e-9)


def main():
    if probe_missing():
        return 1
    fittings_checks()
    valve_checks()
    orifice_checks()
    return summary()


if __name__ == "__main__":
    sys.exit(main())
