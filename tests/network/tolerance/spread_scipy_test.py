"""Drives `loopwright spread` and `loopwright merge` (LOOPWRIGHT_BIN) on
tests/network/tolerance/spread_cases.json (data invented) and checks the
tolerance study against closed forms computed here with scipy.stats:

- a linear margin (bearing_flow_min of a bearing fed by a metering pump, the
  flow normal): the first-order probability equals the normal CDF
  Phi((0.85 - 1.0) / 0.1) to 1e-6, and the sampled one (Monte Carlo and Latin
  hypercube) agrees with it within 4 standard errors;
- a strongly nonlinear margin (velocity_pressure_max of a tube whose bore is
  log-normal): the sampled probability matches the exact
  P(D < D0 sqrt(v0 / v_max)) = Phi(ln(sqrt(v0 / v_max)) / sd_log) within 4
  standard errors; the first-order one matches the first-order formula
  recomputed here by hand (slope 2 v0 / D0 of v = 4 Q / (pi D^2), the
  log-normal's mean and standard deviation) and differs from the sampled one,
  and the output flags it as unreliable;
- 1, 2 and 7 shards, merged, give the unsharded JSON byte for byte, on 1 or 2
  threads; each scheduler's index variables pick the documented shard;
- a tolerance on an oil's KV40: its first-order slopes against central
  differences of re-solved `check` runs (the APU demo, cold and hot points);
- the samples' thermostats settled to 1e-6 K (the default) give the same
  failures as at 2e-9 K on the same seed of the APU demo;
- the drawn samples (--samples-csv): the correlation 0.7 between two
  correlated tolerances within 4 standard errors ((1 - r^2) / sqrt(n)), and
  each marginal passes a Kolmogorov-Smirnov test against its scipy.stats
  distribution.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import csv
import json
import math
import os
import subprocess
import sys
import tempfile

from scipy import stats

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", "..", ".."))
CASE = os.path.join(SRC, "tests", "network", "tolerance", "spread_cases.json")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "tools"))
from tally import check, finish  # noqa: E402

V_MAX = 2.5      # velocity_pressure_max default [m/s] (README "Checks", common practice)
V0 = 1.5         # the case's velocity at the nominal bore [m/s]
SD_LOG = 0.25    # the bore's log-normal sd_log
D0 = 0.010       # nominal bore [m]


def run(args, env_extra=None):
    env = {k: v for k, v in os.environ.items()
           if not k.startswith(("SLURM_", "AWS_BATCH_", "PARALLEL_", "_CONDOR_", "LOOPWRIGHT_SHARD"))
           and k != "JOB_COMPLETION_INDEX"}
    env.update(env_extra or {})
    return subprocess.run([BIN] + args, capture_output=True, text=True, env=env)


def find(doc, name, where):
    for c in doc["checks"]:
        if c["name"] == name and c["where"] == where:
            return c
    raise KeyError((name, where))


def within(p_sampled, p_exact, n, k=4.0):
    se = math.sqrt(p_exact * (1 - p_exact) / n)
    return abs(p_sampled - p_exact) <= k * se


def estimates(tmp):
    n = 4000
    for method in ("mc", "lhs"):
        out = os.path.join(tmp, f"{method}.json")
        r = run(["spread", CASE, "--samples", str(n), "--method", method, "--seed", "7", "--json", out, "-q"])
        check(r.returncode == 0, f"spread --method {method} runs", r.stderr)
        if r.returncode:
            continue
        doc = json.load(open(out))
        lin = find(doc, "bearing_flow_min", "metered/bearing")
        exact = stats.norm.cdf((0.85 - 1.0) / 0.1)
        fo = lin["first_order"]["probability"]
        check(abs(fo - exact) < 1e-6, f"{method}: linear first order = Phi(-1.5)", f"{fo} vs {exact}")
        check(lin["first_order"]["contributors"][0]["tolerance"] == "metered/meter.flow",
              f"{method}: the flow's tolerance drives the linear margin", json.dumps(lin["first_order"]))
        ps = lin["sampled"]["probability"]
        check(within(ps, exact, n), f"{method}: linear sampled within 4 SE of Phi(-1.5)", f"{ps} vs {exact}")
        check(lin["first_order_reliable"] is True, f"{method}: linear first order not flagged", lin["note"])
        ci = stats.binomtest(lin["sampled"]["failures"], lin["sampled"]["solved"]).proportion_ci(0.95, method="wilson")
        iv = lin["sampled"]["interval"]
        check(iv["method"] == "Wilson score" and abs(iv["low"] - ci.low) < 1e-12 and abs(iv["high"] - ci.high) < 1e-12,
              f"{method}: the 95 % Wilson interval = scipy's", f"{iv} vs {ci}")
        jet = [t for t in doc["tolerances"] if t["name"] == "line/jet.diameter"][0]
        sd = 0.2e-3 / stats.norm.ppf(0.975)
        check(abs(jet["sd"] - sd) < 1e-12 * sd, f"{method}: a +-0.2 mm band at 95 % is sd 0.2 mm / z(0.975)",
              f"{jet['sd']} vs {sd}")

        nl = find(doc, "velocity_pressure_max", "line/tube")
        exact_nl = stats.norm.cdf(math.log(math.sqrt(V0 / V_MAX)) / SD_LOG)
        psn = nl["sampled"]["probability"]
        check(within(psn, exact_nl, n), f"{method}: nonlinear sampled within 4 SE of the exact probability",
              f"{psn} vs {exact_nl}")
        mean_d = D0 * math.exp(SD_LOG ** 2 / 2)
        sd_d = mean_d * math.sqrt(math.expm1(SD_LOG ** 2))
        slope = 2 * V0 / D0
        fo_hand = stats.norm.cdf(-((V_MAX - V0) + slope * (mean_d - D0)) / (slope * sd_d))
        fon = nl["first_order"]["probability"]
        check(abs(fon - fo_hand) < 1e-4 * fo_hand, f"{method}: nonlinear first order = the FOSM formula by hand",
              f"{fon} vs {fo_hand}")
        check(abs(fon - psn) > 0.04, f"{method}: nonlinear first order differs from sampled", f"{fon} vs {psn}")
        check(nl["first_order_reliable"] is False and "unreliable" in nl["note"],
              f"{method}: nonlinear first order flagged", nl["note"])


def shards(tmp):
    n, base = 2000, os.path.join(tmp, "whole.json")
    r = run(["spread", CASE, "--samples", str(n), "--seed", "3", "--threads", "1", "--json", base, "-q"])
    check(r.returncode == 0, "unsharded spread runs", r.stderr)
    whole = open(base, "rb").read()
    r = run(["spread", CASE, "--samples", str(n), "--seed", "3", "--threads", "2", "--json", base + "2", "-q"])
    check(open(base + "2", "rb").read() == whole, "2 threads give the 1-thread JSON byte for byte")
    for count in (1, 2, 7):
        parts = []
        for k in range(1, count + 1):
            p = os.path.join(tmp, f"part{k}of{count}.json")
            r = run(["spread", CASE, "--samples", str(n), "--seed", "3", "--threads", "2", "--shard", f"{k}/{count}",
                     "--json", p, "-q"])
            check(r.returncode == 0, f"shard {k}/{count} runs", r.stderr)
            parts.append(p)
        merged = os.path.join(tmp, f"merged{count}.json")
        r = run(["merge"] + parts[::-1] + ["-o", merged, "-q"])
        check(r.returncode == 0, f"merge of {count} shards", r.stderr)
        check(r.returncode == 0 and open(merged, "rb").read() == whole,
              f"{count} shards merged = the unsharded JSON, byte for byte")
    if count == 7:
        r = run(["merge"] + parts[1:] + ["-o", merged])
        check(r.returncode == 2 and "shard 1/7 is missing" in r.stderr, "merge names a missing shard", r.stderr)


def schedulers(tmp):
    # (environment, expected shard K (1-based) of N) as each engine documents its variables.
    cases = [
        ({"SLURM_ARRAY_TASK_ID": "5", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_MAX": "7",
          "SLURM_ARRAY_TASK_COUNT": "7"}, [], 5, 7),
        ({"SLURM_ARRAY_TASK_ID": "8", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_MAX": "12",
          "SLURM_ARRAY_TASK_COUNT": "4", "SLURM_ARRAY_TASK_STEP": "4"}, [], 3, 4),
        ({"JOB_COMPLETION_INDEX": "0"}, ["--shard-count", "3"], 1, 3),
        ({"AWS_BATCH_JOB_ARRAY_INDEX": "2", "AWS_BATCH_JOB_ARRAY_SIZE": "3"}, [], 3, 3),
        ({"_CONDOR_PROCNO": "1", "_CONDOR_NPROCS": "2"}, [], 2, 2),
        ({"PARALLEL_SEQ": "2", "LOOPWRIGHT_SHARD_COUNT": "2"}, [], 2, 2),
        ({"LOOPWRIGHT_SHARD_INDEX": "0", "LOOPWRIGHT_SHARD_COUNT": "4"}, [], 1, 4),
    ]
    for env, extra, k, count in cases:
        p = os.path.join(tmp, "sched.json")
        r = run(["spread", CASE, "--samples", "1024", "--json", p, "-q"] + extra, env)
        ok = r.returncode == 0
        part = json.load(open(p)) if ok else {}
        check(ok and part.get("shard") == k and part.get("shards") == count,
              f"{sorted(env)} reads as shard {k}/{count}", r.stderr + json.dumps({x: part.get(x) for x in ("shard", "shards")}))
    r = run(["spread", CASE, "--samples", "100", "--json", os.path.join(tmp, "x.json")], {"JOB_COMPLETION_INDEX": "1"})
    check(r.returncode == 2 and "--shard-count" in r.stderr, "Kubernetes without a count asks for --shard-count", r.stderr)
    r = run(["spread", CASE, "--samples", "100", "--json", os.path.join(tmp, "x.json")],
            {"SLURM_ARRAY_TASK_ID": "3", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_MAX": "9",
             "SLURM_ARRAY_TASK_COUNT": "4"})
    check(r.returncode == 2 and "not one range" in r.stderr, "a Slurm array with gaps is refused", r.stderr)


def draws(tmp):
    n = 20000
    out = os.path.join(tmp, "draws.csv")
    r = run(["spread", CASE, "--samples", str(n), "--method", "mc", "--seed", "11", "--samples-csv", out, "-q"])
    check(r.returncode == 0, "spread --samples-csv runs", r.stderr)
    rows = list(csv.reader(open(out)))
    head, data = rows[0], [[float(x) for x in row] for row in rows[1:]]
    col = {h.split(" [")[0]: i for i, h in enumerate(head)}
    x = [row[col["line/jet.diameter"]] for row in data]
    y = [row[col["metered/bearing.radial_clearance"]] for row in data]
    r_xy = stats.pearsonr(x, y)[0]
    check(len(data) == n and abs(r_xy - 0.7) < 4 * (1 - 0.49) / math.sqrt(n), "correlation 0.7 within 4 SE",
          f"{r_xy} from {len(data)} samples")
    dists = {
        "metered/meter.flow": stats.norm(loc=1.0e-3 / 60, scale=0.1e-3 / 60),
        "line/tube.diameter": stats.lognorm(s=SD_LOG, scale=D0),
        "line/jet.diameter": stats.norm(loc=6e-3, scale=0.2e-3 / stats.norm.ppf(0.975)),
        "metered/bearing.radial_clearance": stats.norm(loc=40e-6, scale=2e-6),
        "metered/bearing.length": stats.uniform(loc=29e-3, scale=2.5e-3),
        "line/jet.cd": stats.triang(c=(0.61 - 0.58) / 0.04, loc=0.58, scale=0.04),
    }
    for name, d in dists.items():
        p = stats.kstest([row[col[name]] for row in data], d.cdf).pvalue
        check(p > 1e-3, f"{name} drawn from its distribution (KS p = {p:.3g})")


def oil_slope(tmp):
    """The first-order slope of a margin to an oil's KV40 (a tolerance on a fluid) against the central
    difference of two `check` runs with KV40 moved by +-1 %, at a cold (isothermal) and a hot (thermal,
    thermostatic) point of the APU demo with tolerances."""
    src = open(os.path.join(SRC, "cases", "apu_tolerances.json"), encoding="utf-8").read()
    out = os.path.join(tmp, "apu.json")
    r = run(["spread", os.path.join(SRC, "cases", "apu_tolerances.json"), "--samples", "1", "--json", out, "-q"])
    check(r.returncode == 0, "spread of the APU demo runs", r.stderr)
    if r.returncode:
        return
    doc = json.load(open(out))
    start, end = src.index('"tolerances"'), src.index('"checks":')
    plain = src[:start] + src[end:]

    def margin(kv40, point, name, where):
        case = os.path.join(tmp, "kv.json")
        with open(case, "w", encoding="utf-8") as f:
            f.write(plain.replace('"apu_oil": {"part": "oil-synthetic-5cst"}',
                                  '"apu_oil": {"kind": "oil", "kv40": "%.12g cSt", "kv100": "5.0 cSt", '
                                  '"density_15C": "1000 kg/m3"}' % kv40))
        res = os.path.join(tmp, "kv_out.json")
        run(["check", case, "--no-fix", "--json", res, "-q"])
        d = json.load(open(res))
        return [c["margin"] for p in d["points"] if p["name"] == point for c in p["checks"]
                if c["name"] == name and c["where"] == where][0]

    for name, where, point in (("bearing_flow_min", "oil/front_bearing", "cold_start"),
                               ("feed_pressure_margin", "oil/rear_bearing", "hot_corner")):
        c = find(doc, name, where)
        slope = [k for k in c["first_order"]["contributors"] if k["tolerance"] == "apu_oil.kv40"][0]["slope"]
        h = 0.25  # cSt, 1 % of the oil's 25 cSt
        fd = (margin(25 + h, point, name, where) - margin(25 - h, point, name, where)) / (2 * h * 1e-6)
        check(c["nominal"]["point"] == point and abs(slope - fd) < 2e-3 * abs(fd),
              f"slope of {name} at {where} to KV40 = re-solved difference at {point}", f"{slope} vs {fd}")


def settle(tmp):
    """The samples' thermostats settled to 1e-6 K (spread's default) against
    2e-9 K (what `check` uses), on the same seed of the APU demo: every
    check's failures are the same count, and the margins' mean, standard
    deviation and worst samples move by under 1e-4 of the margin's standard
    deviation. At least one check has failing and passing samples, so a
    count that moved would show."""
    apu = os.path.join(SRC, "cases", "apu_tolerances.json")
    docs = []
    for settle_k in ("2e-9", "1e-6"):
        out = os.path.join(tmp, f"settle_{settle_k}.json")
        r = run(["spread", apu, "--samples", "60", "--seed", "3", "--settle", settle_k, "--json", out, "-q"])
        check(r.returncode == 0, f"spread --settle {settle_k} runs", r.stderr)
        if r.returncode:
            return
        docs.append(json.load(open(out)))
    tight, loose = docs
    mixed = [c for c in tight["checks"] if 0 < c["sampled"]["failures"] < c["sampled"]["solved"]]
    check(len(mixed) > 0, "the APU demo has a check with failing and passing samples", "none")
    for a, b in zip(tight["checks"], loose["checks"]):
        sa, sb = a["sampled"], b["sampled"]
        what = f'{a["name"]} at {a["where"]}'
        check(sa["failures"] == sb["failures"] and sa["solved"] == sb["solved"],
              f"{what}: the same failures at 1e-6 K as at 2e-9 K", f'{sa["failures"]} vs {sb["failures"]}')
        sd = max(sa["margin_sd"], 1e-300)
        moved = max([abs(sa[k] - sb[k]) / sd for k in ("margin_mean", "margin_sd")] +
                    [abs(x["margin"] - y["margin"]) / sd for x, y in zip(sa["worst"], sb["worst"])])
        check(moved < 1e-4, f"{what}: margins move by under 1e-4 sd", f"{moved:.3g} sd")


def malformed():
    r = run(["spread", os.path.join(SRC, "cases", "apu_test_cell.json"), "--samples", "10"])
    check(r.returncode == 2 and "tolerances" in r.stderr, "a case without tolerances is exit 2", r.stderr)


with tempfile.TemporaryDirectory() as tmp:
    estimates(tmp)
    shards(tmp)
    schedulers(tmp)
    draws(tmp)
    oil_slope(tmp)
    settle(tmp)
    malformed()
finish()
