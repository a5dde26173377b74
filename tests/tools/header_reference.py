#!/usr/bin/python3
"""Independent re-solve of a pipe-and-bearing network (the supply header of
tests/tools/header_case.py) by a sparse Newton method in node pressures.

Written for the cross-checks and the benchmark, apart from loopwright's code:
only the case file (its topology and its invented data) and, optionally, the
oil's density and viscosity at the loop temperature (as loopwright used them,
so that the network alone is compared) are taken from loopwright.

Formulation (nodal, Todini & Pilati 1988 [1]). The unknowns are the pressures
of the free nodes. Every branch b passes a flow Q_b(dp_b) that is a
non-decreasing function of its pressure drop dp_b = p_from - p_to (the
elevations are zero). The node residual is the net outflow,
    r_i(p) = sum_{b from i} Q_b - sum_{b into i} Q_b,
and the Newton step solves H d = -r with the sparse symmetric nodal Jacobian
H = A^T diag(dQ_b/ddp_b) A (A the node-branch incidence of the free nodes),
positive definite here because every node reaches the housing through a
bearing of positive conductance. Factorised by SuperLU (scipy.sparse.linalg.
splu, symmetric mode, minimum-degree ordering of A^T + A).

Globalisation (co-content, Collins et al. 1978 [2], from memory). With the
co-content of a branch G_b(x) = int_0^x Q_b(s) ds (convex, since Q_b is
non-decreasing), the network co-content Phi(p) = sum_b G_b(dp_b(p)) is a
convex function of the free pressures whose gradient is r(p). Along the
Newton direction d (a descent direction: d . r = -d.H.d < 0), phi(t) =
Phi(p + t d) is convex with phi'(t) = r(p + t d) . d, non-decreasing in t.
The step is t = 1 when phi'(1) <= 0 (Phi still falls at the full step);
otherwise t is the minimiser of Phi along d, the root of phi'(t) in (0, 1),
found by the Illinois variant of regula falsi. Each step therefore lowers
Phi, and Phi is bounded below (its minimiser is the solution), so the
iteration cannot stall at a non-solution [2].

Branch laws, each with its flow as a function of its drop (inner solves are
monotone scalar solves, vectorised over all branches):
  pipe, churchill_1977: Darcy-Weisbach dp = f (L/D) rho V|V|/2, V = Q/A, with
      Churchill's all-regime f [3]; Q(dp) by safeguarded Newton on the
      increasing dp(Q) inside [0, Q_laminar(dp)] (Churchill's f >= 64/Re),
      with the slope by complex-step differentiation (exact to rounding).
  pipe, laminar_colebrook: f = 64/Re for Re < 2300, Colebrook-White [4] for
      Re >= 2300: a law that jumps up at the switch flow Q_s (Re = 2300). Its
      filled graph is taken as the law: Q = Q_s (the segment "on the switch")
      for every drop between dp_lam(Q_s) = 32 mu L V_s / D^2 and
      dp_turb(Q_s) = f_C(2300) (L/D) rho V_s^2/2, slope zero there. Laminar
      flow below: Q = pi D^4 dp / (128 mu L) (Hagen-Poiseuille). Above, the
      Colebrook equation solved for the flow in closed form: with
      s = sqrt(2 D dp / (rho L)) = V sqrt(f), 1/sqrt(f) = -2 log10(eps/(3.7 D)
      + 2.51 mu / (rho D s)) and V = s / sqrt(f) (the Swamee-Jain form of the
      flow equation [5], exact for Colebrook).
  journal bearing (pressure-fed, circumferential groove): the side flow out
      of the two lands, Q = pi dp r c^3 (1 + 1.5 eps^2) / (3 mu l'), r = D/2,
      l' = (L - w)/2 the land length, eps the eccentricity ratio (Shigley's
      Mechanical Engineering Design, 9th ed., Eq. 12-22 [6], from memory;
      the 1 + 1.5 eps^2 being the circumferential mean of (h/c)^3 for
      h = c (1 + eps cos theta)).

Start: the laminar network (every pipe Hagen-Poiseuille), one sparse solve.
Converged when every node residual is below rtol (default 1e-14) times the
largest branch flow or below 8 times its rounding floor (the residual that
rounding of the pressure differences alone leaves: eps max|p| times the
branch conductances; about 1e-12 of the flow on a laminar header, where
drops of tens of Pa are differences of pressures of 4 bar).

References
[1] E. Todini, S. Pilati, "A gradient algorithm for the analysis of pipe
    networks", in Computer Applications in Water Supply, vol. 1, Research
    Studies Press, 1988, pp. 1-20.
[2] M. Collins, L. Cooper, R. Helgason, J. Kennington, L. LeBlanc, 1978:
    the content/co-content minimisation of pipe networks ("Solution of
    large-scale pipe networks by improved algorithms"; also given as
    "Solving the pipe network analysis problem using optimization
    techniques", Management Science 24(7):747-760). From memory: the title
    and the page numbers are not checked.
[3] S. W. Churchill, "Friction-factor equation spans all fluid-flow regimes",
    Chem. Eng. 84(24):91-92, 1977 (also fluids.friction.Churchill_1977).
[4] C. F. Colebrook, J. Inst. Civil Eng. 11:133-156, 1939 (also
    fluids.friction.Colebrook).
[5] P. K. Swamee, A. K. Jain, J. Hydraulics Div. ASCE 102(HY5):657-664, 1976.
[6] R. G. Budynas, J. K. Nisbett, Shigley's Mechanical Engineering Design,
    9th ed., McGraw-Hill, 2011, section 12-9.

Usage: header_reference.py CASE (--rho R --mu MU | --probe LW_PROBE) [--json OUT]
prints (or writes) {"feed_flow_m3_s", "flows": {id: Q}, "pressures": {id: p}, "drops": {pipe id: dp},
"on_switch": [...], "iterations", "seconds": {"read", "solve"}, ...}.
"""

import argparse
import json
import math
import os
import subprocess
import sys
import tempfile
import time

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import splu

RE_SWITCH = 2300.0  # laminar limit of the hard switch (common practice)
LN10 = math.log(10.0)

# Units the generated cases use, to SI.
_UNITS = {"m": 1.0, "mm": 1e-3, "um": 1e-6, "bar": 1e5, "Pa": 1.0, "kPa": 1e3}


def quantity(v):
    """A case value in SI: a bare number, or "number unit" with a unit of _UNITS."""
    if isinstance(v, (int, float)):
        return float(v)
    num, unit = v.split()
    if unit not in _UNITS:
        raise ValueError(f"unit {unit!r} of {v!r} is not read by this reference")
    return float(num) * _UNITS[unit]


# ------------------------------------------------------------------ network


class Network:
    """Arrays of a one-loop network of pipes and journal bearings."""

    def __init__(self, case):
        if len(case["loops"]) != 1:
            raise ValueError("one loop expected")
        loop = case["loops"][0]
        self.free, self.fixed = {}, {}
        for nd in loop["nodes"]:
            if "elevation" in nd:
                raise ValueError(f"node {nd['id']}: elevations are not read by this reference")
            if "boundary" in nd:
                if nd["boundary"]["kind"] != "pressure":
                    raise ValueError(f"node {nd['id']}: only pressure boundaries are read")
                self.fixed[nd["id"]] = quantity(nd["boundary"]["pressure"])
            else:
                self.free[nd["id"]] = len(self.free)
        self.free_ids = list(self.free)
        pipes, bearings = [], []
        for c in loop["components"]:
            if c["type"] in ("pipe", "tube"):
                pipes.append(c)
            elif c["type"] == "journal_bearing":
                bearings.append(c)
            else:
                raise ValueError(f"component {c['id']}: type {c['type']} is not read by this reference")
        self.pipe_ids = [c["id"] for c in pipes]
        self.bearing_ids = [c["id"] for c in bearings]
        self.L = np.array([quantity(c["length"]) for c in pipes])
        self.D = np.array([quantity(c["diameter"]) for c in pipes])
        self.eps = np.array([quantity(c["roughness"]) for c in pipes])
        methods = {c.get("friction", "churchill_1977") for c in pipes}
        for m in methods - {"churchill_1977", "laminar_colebrook"}:
            raise ValueError(f"friction {m} is not read by this reference")
        self.switch = np.array([c.get("friction", "churchill_1977") == "laminar_colebrook" for c in pipes])
        self.K = np.array([bearing_coefficient(c) for c in bearings])  # Q = K dp / mu
        self.ends = [self._ends(pipes), self._ends(bearings)]

    def _ends(self, comps):
        """(from index, to index, from fixed p, to fixed p); index -1 at a boundary."""
        out = []
        for key in ("from", "to"):
            names = [c[key] for c in comps]
            out.append(np.array([self.free.get(n, -1) for n in names], dtype=np.int64))
        for key in ("from", "to"):
            out.append(np.array([self.fixed.get(c[key], 0.0) for c in comps]))
        return out


def bearing_coefficient(c):
    """pi r c^3 (1 + 1.5 eps^2) / (3 l')  [m^3]: Q = this * dp / mu (Shigley Eq. 12-22)."""
    r = quantity(c["diameter"]) / 2
    land = (quantity(c["length"]) - quantity(c.get("groove_width", 0.0))) / 2
    cl = quantity(c["radial_clearance"])
    e = float(c.get("eccentricity", 0.5))
    return math.pi * r * cl ** 3 * (1 + 1.5 * e * e) / (3 * land)


# --------------------------------------------------------------- pipe laws


def churchill_dp(q, L, D, eps, rho, mu):
    """Drop [Pa] at flow q >= 0 (real or complex, for the complex step)."""
    area = math.pi / 4 * D * D
    v = q / area
    re = rho * v * D / mu
    # Below Re = 100 the turbulent term (A + B)^-1.5 is under 1e-48 of
    # (8/Re)^12 (B alone exceeds (37530/100)^16): f = 64/Re to the last bit,
    # taken so, since B overflows as Re -> 0.
    lam = np.real(re) < 100.0
    rc = np.where(lam, 100.0, re)
    a = (-2.457 * np.log((7.0 / rc) ** 0.9 + 0.27 * eps / D)) ** 16
    b = (37530.0 / rc) ** 16
    f = np.where(lam, 64.0 / re, 8.0 * ((8.0 / rc) ** 12 + (a + b) ** -1.5) ** (1.0 / 12.0))
    return f * L / D * rho * v * v / 2


def laminar_conductance(L, D, mu):
    """Q / dp of Hagen-Poiseuille flow [m^3/(s Pa)]."""
    return math.pi * D ** 4 / (128 * mu * L)


def churchill_flow(dp, L, D, eps, rho, mu):
    """Q(dp) and dQ/ddp for dp >= 0 (arrays): safeguarded Newton on dp(Q)."""
    glam = laminar_conductance(L, D, mu)
    lo, hi = np.zeros_like(dp), dp * glam  # Churchill's f >= 64/Re: Q <= Q_laminar
    q = hi.copy()
    h = 1e-30
    active = dp > 0
    for _ in range(100):
        if not active.any():
            break
        qa = q[active]
        z = churchill_dp(qa + 1j * h * np.maximum(qa, 1e-300), L[active], D[active], eps[active], rho, mu)
        g = z.real - dp[active]
        slope = z.imag / (h * np.maximum(qa, 1e-300))
        la, ha = lo[active], hi[active]
        la = np.where(g < 0, qa, la)
        ha = np.where(g > 0, qa, ha)
        qn = np.where(g == 0, qa, qa - g / slope)
        bad = ~((qn >= la) & (qn <= ha))  # Newton left the bracket: bisect
        qn = np.where(bad, 0.5 * (la + ha), qn)
        done = (np.abs(g) <= 2e-15 * dp[active]) | (np.abs(qn - qa) <= 2e-15 * qa) | (ha - la <= 2e-15 * ha)
        qn = np.where(done & (np.abs(g) <= 2e-15 * dp[active]), qa, qn)
        lo[active], hi[active], q[active] = la, ha, qn
        idx = np.flatnonzero(active)
        active[idx[done]] = False
    else:
        raise RuntimeError("Churchill inversion did not converge")
    qs = np.maximum(q, 1e-300)
    z = churchill_dp(qs + 1j * h * qs, L, D, eps, rho, mu)
    dq = np.where(dp > 0, h * qs / np.where(z.imag > 0, z.imag, 1.0), glam)
    return np.where(dp > 0, q, 0.0), dq


def colebrook_x(re, rr):
    """1/sqrt(f) of Colebrook-White at Re (array), by Newton on the implicit form."""
    a, b = rr / 3.7, 2.51 / re
    x = np.full_like(re, 5.0)
    for _ in range(60):
        g = x + 2 * np.log10(a + b * x)
        dg = 1 + 2 * b / ((a + b * x) * LN10)
        xn = x - g / dg
        if np.all(np.abs(xn - x) <= 4e-16 * xn):
            return xn
        x = xn
    return x


def colebrook_velocity(dp, L, D, eps, rho, mu):
    """V(dp) of Colebrook-White flow in closed form (real or complex dp > 0)."""
    s = np.sqrt(2 * D * dp / (rho * L))  # V sqrt(f)
    x = -2 * np.log10(eps / (3.7 * D) + 2.51 * mu / (rho * D * s))
    return s * x


class SwitchLimits:
    """The switch flow and the two drops of the filled graph at it (per pipe)."""

    def __init__(self, L, D, eps, rho, mu):
        area = math.pi / 4 * D * D
        self.v = RE_SWITCH * mu / (rho * D)
        self.q = self.v * area
        self.dp_lam = 32 * mu * L * self.v / D ** 2
        x = colebrook_x(np.full_like(D, RE_SWITCH), eps / D)
        self.f_turb = 1 / (x * x)
        self.dp_turb = self.f_turb * L / D * rho * self.v ** 2 / 2


def switch_flow(dp, L, D, eps, rho, mu, lim, tau=0.0):
    """Q(dp), dQ/ddp of the filled 64/Re | Colebrook graph, dp >= 0; and the
    on-switch mask. With tau > 0 the graph's vertical part is tilted: the
    flow rises in a straight line from (1 - tau) Q_s at the laminar drop of
    that flow to Q_s at dp_turb(Q_s) (a strictly increasing law; tau = 0 is
    the filled graph itself)."""
    area = math.pi / 4 * D * D
    glam = laminar_conductance(L, D, mu)
    qa, dpa = (1 - tau) * lim.q, (1 - tau) * lim.dp_lam
    ramp = tau * lim.q / (lim.dp_turb - dpa)
    q = np.where(dp < dpa, dp * glam, qa + ramp * (dp - dpa))
    dq = np.where(dp < dpa, glam, ramp)
    turb = dp > lim.dp_turb
    if turb.any():
        d, h = dp[turb], 1e-20 * dp[turb]
        vz = colebrook_velocity(d + 1j * h, L[turb], D[turb], eps[turb], rho, mu)
        q[turb] = vz.real * area[turb]
        dq[turb] = vz.imag / h * area[turb]
    on = (dp >= lim.dp_lam) & (dp <= lim.dp_turb)
    return q, dq, on


# ------------------------------------------------------------------- solver


class Solver:
    def __init__(self, net, rho, mu):
        self.net, self.rho, self.mu = net, rho, mu
        n = net
        self.sw = n.switch
        self.lim = SwitchLimits(n.L[self.sw], n.D[self.sw], n.eps[self.sw], rho, mu)
        self.gb = n.K / mu  # bearing conductance
        self.nfree = len(n.free)
        self.tau = 0.0  # tilt of the switch's vertical part (0: the filled graph)

    def drops(self, p, ends):
        i, j, pi, pj = ends
        a = np.where(i >= 0, p[np.maximum(i, 0)], pi)
        b = np.where(j >= 0, p[np.maximum(j, 0)], pj)
        return a - b

    def pipe_flows(self, dp):
        """Flows, slopes and the on-switch mask of every pipe (odd in dp)."""
        n, rho, mu = self.net, self.rho, self.mu
        s, x = np.sign(dp), np.abs(dp)
        q, dq = np.empty_like(x), np.empty_like(x)
        on = np.zeros(x.shape, dtype=bool)
        c = ~self.sw
        if c.any():
            q[c], dq[c] = churchill_flow(x[c], n.L[c], n.D[c], n.eps[c], rho, mu)
        if self.sw.any():
            q[self.sw], dq[self.sw], on[self.sw] = switch_flow(x[self.sw], n.L[self.sw], n.D[self.sw],
                                                                n.eps[self.sw], rho, mu, self.lim, self.tau)
        return s * q, dq, on

    def state(self, p):
        """Branch flows, slopes and the node residuals (net outflow) at p."""
        n = self.net
        dpp, dpb = self.drops(p, n.ends[0]), self.drops(p, n.ends[1])
        qp, gp, on = self.pipe_flows(dpp)
        qb = self.gb * dpb
        r = self.accumulate(qp, qb)
        return dict(dpp=dpp, dpb=dpb, qp=qp, gp=gp, qb=qb, on=on, r=r)

    def accumulate(self, qp, qb):
        r = np.zeros(self.nfree)
        for (i, j, _, _), q in zip(self.net.ends, (qp, qb)):
            np.add.at(r, i[i >= 0], q[i >= 0])
            np.subtract.at(r, j[j >= 0], q[j >= 0])
        return r

    def jacobian(self, gp):
        rows, cols, vals = [], [], []
        for (i, j, _, _), g in zip(self.net.ends, (gp, np.broadcast_to(self.gb, self.net.K.shape))):
            for a, b, sgn in ((i, i, 1.0), (j, j, 1.0), (i, j, -1.0), (j, i, -1.0)):
                m = (a >= 0) & (b >= 0)
                rows.append(a[m])
                cols.append(b[m])
                vals.append(sgn * g[m])
        return sp.csc_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                             shape=(self.nfree, self.nfree))

    def factor_solve(self, H, rhs):
        lu = splu(H, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0, options={"SymmetricMode": True})
        return lu.solve(rhs)

    def start(self):
        """Pressures of the laminar network (every pipe Hagen-Poiseuille)."""
        n = self.net
        glam = laminar_conductance(n.L, n.D, self.mu)
        p0 = np.zeros(self.nfree)
        r0 = self.accumulate(glam * self.drops(p0, n.ends[0]), self.gb * self.drops(p0, n.ends[1]))
        return p0 - self.factor_solve(self.jacobian(glam), r0)

    def line_search(self, p, d, slope0):
        """Step length: 1, or the minimiser of the co-content along d (root of r . d)."""
        st1 = self.state(p + d)
        f1 = st1["r"] @ d
        if f1 <= 0:
            return 1.0, st1, 0
        a, fa, b, fb = 0.0, slope0, 1.0, f1
        side, k = 0, 0
        for k in range(1, 60):
            t = (a * fb - b * fa) / (fb - fa)
            st = self.state(p + t * d)
            ft = st["r"] @ d
            if abs(ft) <= 1e-3 * abs(slope0) or b - a <= 1e-12:
                return t, st, k
            if ft < 0:
                a, fa = t, ft
                if side == -1:
                    fb *= 0.5
                side = -1
            else:
                b, fb = t, ft
                if side == 1:
                    fa *= 0.5
                side = 1
        return t, st, k

    def rounding_floor(self, p, st):
        """Per node, what rounding alone leaves in its residual: the drops
        p_from - p_to carry an error of about eps max(|p_from|, |p_to|),
        times each branch's conductance, plus eps of each flow summed."""
        eps = np.finfo(float).eps
        out = np.zeros(self.nfree)
        for (i, j, pi, pj), g, q in zip(self.net.ends, (st["gp"], np.broadcast_to(self.gb, self.net.K.shape)),
                                        (st["qp"], st["qb"])):
            a = np.abs(np.where(i >= 0, p[np.maximum(i, 0)], pi))
            b = np.abs(np.where(j >= 0, p[np.maximum(j, 0)], pj))
            e = eps * (g * np.maximum(a, b) + np.abs(q))
            np.add.at(out, i[i >= 0], e[i >= 0])
            np.add.at(out, j[j >= 0], e[j >= 0])
        return out

    def newton(self, p, rtol, max_iter):
        """Newton steps until every node residual is below rtol times the
        largest flow, or below 8 times its rounding floor."""
        st = self.state(p)
        history = []
        for it in range(max_iter):
            qmax = max(np.max(np.abs(st["qp"]), initial=0), np.max(np.abs(st["qb"]), initial=0))
            history.append(np.max(np.abs(st["r"])) / qmax)
            if np.all(np.abs(st["r"]) <= np.maximum(rtol * qmax, 8 * self.rounding_floor(p, st))):
                return p, st, it, history
            d = self.factor_solve(self.jacobian(st["gp"]), -st["r"])
            t, st, _ = self.line_search(p, d, st["r"] @ d)
            p = p + t * d
        raise RuntimeError(f"no convergence in {max_iter} iterations (tilt {self.tau:g}); "
                           f"relative residuals {history[-5:]}")

    def solve(self, rtol=1e-14, max_iter=200):
        """Newton from the laminar network; with switch laws, a continuation
        in the tilt tau = 0.1, 0.01, 0.001, 0 (each solve starts from the
        last), since with tau = 0 a run of segments on their flat part has no
        conductance in the Newton model and leaves it one segment a step."""
        p, iters, history = self.start(), 0, []
        for tau in ((0.1, 0.01, 0.001, 0.0) if self.sw.any() else (0.0,)):
            self.tau = tau
            p, st, it, h = self.newton(p, rtol if tau == 0 else 1e-9, max_iter)
            iters += it
            history += h
        return p, st, iters, history


# ------------------------------------------------------------ fluid state


def fluid_state(case, probe):
    """Density and viscosity loopwright uses for the case's loop (lw_probe solve
    of a one-bearing loop with the same fluid and loop temperature)."""
    loop = case["loops"][0]
    tiny = {"name": "fluid state", "fluids": case["fluids"],
            "loops": [{"id": loop["id"], "fluid": loop["fluid"], "temperature": loop["temperature"],
                       "nodes": [{"id": "a", "boundary": {"kind": "pressure", "pressure": "1 bar"}},
                                 {"id": "b", "boundary": {"kind": "pressure", "pressure": "0 bar"}}],
                       "components": [{"id": "j", "type": "journal_bearing", "from": "a", "to": "b",
                                       "diameter": "40 mm", "length": "30 mm", "radial_clearance": "50 um"}]}]}
    with tempfile.NamedTemporaryFile("w", suffix=".json", delete=False) as f:
        json.dump(tiny, f)
    try:
        out = subprocess.run([probe, "solve", f.name], capture_output=True, text=True, timeout=120)
    finally:
        os.unlink(f.name)
    if out.returncode != 0:
        raise RuntimeError(f"lw_probe solve failed: {out.stderr.strip()}")
    s = json.loads(out.stdout)["fluid_states"][0]["loops"][0]
    return s["rho_kg_m3"], s["mu_Pa_s"]


def solve_case(case, rho, mu, rtol=1e-14):
    """The reference answer of a case dict (see the module note)."""
    t0 = time.perf_counter()
    net = Network(case)
    t1 = time.perf_counter()
    solver = Solver(net, rho, mu)
    p, st, iters, history = solver.solve(rtol)
    t2 = time.perf_counter()
    feeds = [k for k, (i, j) in enumerate(zip(net.ends[0][0], net.ends[0][1])) if i < 0]
    switch_idx = np.flatnonzero(net.switch)
    on_switch = []
    for k in np.flatnonzero(st["on"]):
        m = int(np.searchsorted(switch_idx, k))
        lo, hi = solver.lim.dp_lam[m], solver.lim.dp_turb[m]
        on_switch.append({"id": net.pipe_ids[k], "flow_m3_s": float(st["qp"][k]), "dp_Pa": float(st["dpp"][k]),
                          "dp_laminar_Pa": float(lo), "dp_turbulent_Pa": float(hi),
                          "inside": float((abs(st["dpp"][k]) - lo) / (hi - lo))})
    # The pipe whose drop is nearest to an end of its switch interval (how
    # clear-cut the on/off-switch verdict is), as a fraction of the interval.
    edge = None
    if switch_idx.size:
        x = np.abs(st["dpp"][switch_idx])
        lim = solver.lim
        dist = np.minimum(np.abs(x - lim.dp_lam), np.abs(x - lim.dp_turb)) / (lim.dp_turb - lim.dp_lam)
        m = int(np.argmin(dist))
        edge = {"id": net.pipe_ids[switch_idx[m]], "fraction": float(dist[m])}
    flows = dict(zip(net.pipe_ids, st["qp"].tolist()))
    flows.update(zip(net.bearing_ids, st["qb"].tolist()))
    return {"feed_flow_m3_s": float(sum(st["qp"][k] for k in feeds)), "feeds": [net.pipe_ids[k] for k in feeds],
            "rho_kg_m3": rho, "mu_Pa_s": mu, "flows": flows, "pressures": dict(zip(net.free_ids, p.tolist())),
            "drops": dict(zip(net.pipe_ids, st["dpp"].tolist())),
            "on_switch": on_switch, "nearest_switch_edge": edge, "iterations": iters,
            "relative_residuals": history, "unknowns": solver.nfree,
            "seconds": {"read": t1 - t0, "solve": t2 - t1}}


def main(argv):
    ap = argparse.ArgumentParser(description="independent sparse nodal Newton re-solve of a header case")
    ap.add_argument("case")
    ap.add_argument("--rho", type=float, help="oil density [kg/m3]")
    ap.add_argument("--mu", type=float, help="oil dynamic viscosity [Pa s]")
    ap.add_argument("--probe", default=os.environ.get("LOOPWRIGHT_PROBE"), help="lw_probe (for rho, mu)")
    ap.add_argument("--json", help="write the answer here (default: stdout)")
    ap.add_argument("--brief", action="store_true", help="leave out the per-component flows and pressures")
    a = ap.parse_args(argv)
    t0 = time.perf_counter()
    with open(a.case, encoding="utf-8") as f:
        case = json.load(f)
    t_parse = time.perf_counter() - t0
    if a.rho is None or a.mu is None:
        if not a.probe:
            ap.error("give --rho and --mu, or --probe (or LOOPWRIGHT_PROBE)")
        a.rho, a.mu = fluid_state(case, a.probe)
    ans = solve_case(case, a.rho, a.mu)
    ans["seconds"]["parse"] = t_parse
    if a.brief:
        del ans["flows"], ans["pressures"], ans["drops"]
    text = json.dumps(ans)
    if a.json:
        with open(a.json, "w", encoding="utf-8") as f:
            f.write(text)
    else:
        print(text)


if __name__ == "__main__":
    main(sys.argv[1:])
