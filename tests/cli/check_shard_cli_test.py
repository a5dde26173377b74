"""Drives `loopwright check --shard K/N` and `loopwright merge` (LOOPWRIGHT_BIN)
on the gearbox demo (cases/gearbox_lube_skid.json, invented data) with a
grid added to its envelope (226 points: 4 listed + 7 x 6 cold-start points +
5 x 6 x 6 running points), and checks:

- 1, 2 and 7 shards, merged (parts given in any order), give the document of
  an independent unsharded `check --json` run byte for byte (and with
  --json-detail summary), its CSV byte for byte, the same printed summary
  (stdout), the same lines for the points without a result (stderr) and
  the same exit code (3: with cooling water at 5 degC the thick oil starves
  the journal bearings, which overheat past the oil model's range);
- the shards run on 2 threads and the unsharded run on 1: before the sweep
  took a new solver per block, 1 shard merged differed from the unsharded
  document at the first thermal point after the cold grid (a point without
  a result whose warm start came from another block);
- a property of the case known by hand: the merged document has 4 + 42 +
  180 = 226 points, in envelope order, and a grid point's pump speed is the
  axis value converted by hand (1750 rpm = 1750 x 2 pi / 60 rad/s);
- each shard holds whole sweep blocks of 32 points (README, "Sharding and
  merging"): 226 points are 8 blocks; shard k of 7 holds blocks
  floor(8 (k - 1) / 7) ... floor(8 k / 7) - 1;
- the demo as shipped (4 points: one block) in 3 shards, two of them
  empty, merges to the unsharded document; the parts' case digest is the
  FNV-1a 64 of the file's bytes, recomputed here from the algorithm's
  definition;
- merged from another folder, `--case` finds the case and the document
  is the same bytes; without it the merge asks for --case (exit 2);
- refusals, exit 2 with the file named: a missing shard, a shard given
  twice, a spread part mixed with check parts, a part run with other
  settings (--no-fix), the case file changed after the shards ran, and a
  part that is not JSON of either kind;
- a malformed --shard ("0/3", "4/3", "x") is exit 2 naming --shard, and a
  shard without --json is exit 2;
- the scheduler variables pick the shard as for `spread` (GNU parallel's
  PARALLEL_SEQ with --shard-count; a Slurm array), and --no-shard ignores
  them.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import json
import math
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
DEMO = os.path.join(SRC, "cases", "gearbox_lube_skid.json")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402

COLD_T = ["0 degC", "5 degC", "10 degC", "15 degC", "20 degC", "25 degC", "30 degC"]
SPEEDS = ["1200 rpm", "1300 rpm", "1450 rpm", "1550 rpm", "1650 rpm", "1750 rpm"]
LOSSES = ["1.5 kW", "2 kW", "2.5 kW", "3 kW", "3.5 kW"]
WATER = ["5 degC", "12 degC", "18 degC", "24 degC", "30 degC", "35 degC"]
N_POINTS = 4 + len(COLD_T) * len(SPEEDS) + len(LOSSES) * len(WATER) * len(SPEEDS)  # 226


def run(args, env_extra=None, cwd=None):
    env = {k: v for k, v in os.environ.items()
           if not k.startswith(("SLURM_", "AWS_BATCH_", "PARALLEL_", "_CONDOR_", "LOOPWRIGHT_SHARD"))
           and k != "JOB_COMPLETION_INDEX"}
    env.update(env_extra or {})
    return subprocess.run([BIN] + args, capture_output=True, text=True, env=env, cwd=cwd)


def strip_comments(text):
    return "\n".join(line for line in text.splitlines() if not line.lstrip().startswith("//"))


def write_case(tmp):
    with open(DEMO) as f:
        case = json.loads(strip_comments(f.read()))
    case["$schema"] = os.path.join(SRC, "cases", "case.schema.json")
    case["envelope"]["grids"] = [
        {"name": "cold", "isothermal": True, "values": {"mesh_loss": "0 W", "water_inlet": "5 degC"},
         "axes": {"oil_temperature": COLD_T, "pump_speed": SPEEDS}},
        {"name": "run", "axes": {"mesh_loss": LOSSES, "water_inlet": WATER, "pump_speed": SPEEDS}},
    ]
    path = os.path.join(tmp, "gearbox_grid.json")
    with open(path, "w") as f:
        json.dump(case, f, indent=1)
    return "gearbox_grid.json"  # relative: run in tmp, as a user would


def shard_runs(tmp, case, count, extra=()):
    parts = []
    for k in range(1, count + 1):
        p = f"part{k}of{count}{''.join(extra).replace('-', '')}.json"
        r = run(["check", case, "--shard", f"{k}/{count}", "--json", p, "-q", "--threads", "2"] + list(extra), cwd=tmp)
        check(r.returncode == 0, f"shard {k}/{count} runs (exit 0 whatever the checks say)", r.stderr)
        parts.append(p)
    return parts


def identical(tmp, case):
    whole = run(["check", case, "--json", "whole.json", "--csv", "whole.csv"], cwd=tmp)
    check(whole.returncode == 3, "the unsharded run has points without a result (exit 3)", whole.stderr[-400:])
    doc_bytes = open(os.path.join(tmp, "whole.json"), "rb").read()
    doc = json.loads(doc_bytes)
    names = [p["name"] for p in doc["points"]]
    check(len(names) == N_POINTS == 226, "the document holds 4 + 42 + 180 = 226 points", str(len(names)))
    hot = next((p for p in doc["points"] if p["name"].startswith("run[") and "pump_speed=1750 rpm" in p["name"]), None)
    speed = hot and next((v for k, v in hot["values"].items() if k.startswith("pump_speed")), None)
    check(speed is not None and abs(speed - 1750 * 2 * math.pi / 60) < 1e-9 * speed,
          "a grid point's pump speed is 1750 rpm = 183.26 rad/s (by hand)", str(speed))
    failed = [p["name"] for p in doc["points"] if not p["converged"]]
    check(doc["verdict"] == "not-converged" and failed and all("water_inlet=5 degC" in n for n in failed)
          and doc["fixes"], "the points without a result are the coldest cooling water (thick oil starves the "
          "journal bearings); fixes are given (in the merge for shards)", str(failed[:3]))
    for count in (1, 2, 7):
        parts = shard_runs(tmp, case, count)
        r = run(["merge"] + parts[::-1] + ["-o", f"merged{count}.json", "--csv", f"merged{count}.csv"], cwd=tmp)
        check(r.returncode == 3, f"merge of {count} shard(s) exits as check does (3)", r.stderr[-400:])
        check(r.stderr == whole.stderr, f"{count} shard(s): merge names the points without a result as check does")
        same = open(os.path.join(tmp, f"merged{count}.json"), "rb").read() == doc_bytes
        check(same, f"{count} shard(s) merged = the unsharded check --json, byte for byte")
        check(open(os.path.join(tmp, f"merged{count}.csv"), "rb").read() ==
              open(os.path.join(tmp, "whole.csv"), "rb").read(), f"{count} shard(s): the same CSV")
        check(r.stdout == whole.stdout, f"{count} shard(s): merge prints check's summary",
              r.stdout[-300:] + " | " + whole.stdout[-300:])
        if count == 7:
            elsewhere = os.path.join(tmp, "elsewhere")
            os.makedirs(elsewhere, exist_ok=True)
            up = [os.path.join("..", p) for p in parts]
            r = run(["merge"] + up + ["-o", "m.json"], cwd=elsewhere)
            check(r.returncode == 2 and "pass --case FILE" in r.stderr,
                  "merged from another folder, the case path the shards were given is not found: exit 2", r.stderr)
            r = run(["merge"] + up + ["--case", os.path.join("..", case), "-o", "m.json"], cwd=elsewhere)
            check(r.returncode == 3 and open(os.path.join(elsewhere, "m.json"), "rb").read() == doc_bytes,
                  "merge --case from another folder: the same document (it names the case as the shards were given it)",
                  r.stderr[-300:])
            blocks = [json.load(open(os.path.join(tmp, p))) for p in parts]
            want = [(min(226, 32 * (8 * k // 7)), min(226, 32 * (8 * (k + 1) // 7))) for k in range(7)]
            got = [(b["first_point"], b["end_point"]) for b in blocks]
            check(got == want, "7 shards hold whole blocks of 32 points", f"{got} vs {want}")
    return parts


def summary_detail(tmp, case):
    r = run(["check", case, "--json", "whole_s.json", "--json-detail", "summary", "-q", "--no-fix"], cwd=tmp)
    parts = shard_runs(tmp, case, 3, ("--json-detail", "summary", "--no-fix"))
    r = run(["merge"] + parts + ["-o", "merged_s.json", "-q"], cwd=tmp)
    check(r.returncode == 3 and open(os.path.join(tmp, "merged_s.json"), "rb").read() ==
          open(os.path.join(tmp, "whole_s.json"), "rb").read(),
          "--json-detail summary --no-fix: 3 shards merged = the unsharded document", r.stderr)


def refusals(tmp, case, parts):
    def refused(args, words, what):
        r = run(["merge"] + args + ["-o", "refused.json"], cwd=tmp)
        check(r.returncode == 2 and all(w in r.stderr for w in words), what, r.stderr)

    refused(parts[1:], ["shard 1/7 is missing"], "a missing shard is refused")
    refused(parts + [parts[3]], [parts[3], "shard 4/7 is given twice"], "a shard given twice is refused, file named")
    other = shard_runs(tmp, case, 7, ("--no-fix",))
    refused(parts[:6] + [other[6]], [other[6], "belongs to another"], "a part with other settings is refused")
    sp = os.path.join(tmp, "spread_part.json")
    r = run(["spread", os.path.join(SRC, "cases", "apu_tolerances.json"), "--samples", "4", "--shard", "2/2",
             "--json", sp, "-q"])
    check(r.returncode == 0, "a spread part for the mix", r.stderr)
    refused(parts + [sp], [sp, "spread", "merge the parts of one run"], "a spread part among check parts is refused")
    with open(os.path.join(tmp, "junk.json"), "w") as f:
        f.write('{"kind": "something-else"}')
    refused(parts[:1] + ["junk.json"], ["junk.json", "not a partial result"], "a file of no known kind is refused")
    with open(os.path.join(tmp, case), "a") as f:
        f.write("\n// edited after the shards ran\n")
    refused(parts, [case, "is not the case file the shards solved"], "a changed case file is refused")


def options(tmp, case):
    for bad in ("0/3", "4/3", "x"):
        r = run(["check", case, "--shard", bad, "--json", "x.json"], cwd=tmp)
        check(r.returncode == 2 and "--shard" in r.stderr, f"--shard {bad} is exit 2", r.stderr)
    r = run(["check", case, "--shard", "1/2"], cwd=tmp)
    check(r.returncode == 2 and "--json FILE" in r.stderr, "a shard without --json is exit 2", r.stderr)
    r = run(["check", case, "--json", "p.json", "-q", "--shard-count", "7"], {"PARALLEL_SEQ": "3"}, cwd=tmp)
    part = json.load(open(os.path.join(tmp, "p.json"))) if r.returncode == 0 else {}
    check(part.get("shard") == 3 and part.get("shards") == 7, "GNU parallel's PARALLEL_SEQ=3 is shard 3/7", r.stderr)
    slurm = {"SLURM_ARRAY_TASK_ID": "4", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_MAX": "6",
             "SLURM_ARRAY_TASK_COUNT": "7"}
    r = run(["check", case, "--json", "p.json", "-q"], slurm, cwd=tmp)
    part = json.load(open(os.path.join(tmp, "p.json"))) if r.returncode == 0 else {}
    check(part.get("shard") == 5 and part.get("shards") == 7, "a Slurm array task 4 of 0-6 is shard 5/7", r.stderr)
    r = run(["check", case, "--json", "w.json", "-q", "--no-shard", "--no-fix"], slurm, cwd=tmp)
    check(r.returncode == 3 and "points" in json.load(open(os.path.join(tmp, "w.json"))),
          "--no-shard checks the whole envelope inside a Slurm array", r.stderr)


def fnv1a64(data):
    # FNV-1a, 64 bits: offset basis 14695981039346656037, prime 1099511628211
    # (Fowler, Noll, Vo; IETF draft "The FNV Non-Cryptographic Hash Algorithm").
    h = 14695981039346656037
    for byte in data:
        h = ((h ^ byte) * 1099511628211) % 2 ** 64
    return f"fnv1a64:{h:016x}"


def empty_shards(tmp):
    # The demo as shipped (comments and all): 4 points, one block; of 3
    # shards the first two hold no point.
    demo = os.path.join(tmp, "demo.json")
    with open(DEMO, "rb") as f:
        data = f.read()
    with open(demo, "wb") as f:
        f.write(data.replace(b'"case.schema.json"', json.dumps(os.path.join(SRC, "cases", "case.schema.json")).encode()))
    whole = run(["check", "demo.json", "--json", "dw.json"], cwd=tmp)
    parts = shard_runs(tmp, "demo.json", 3)
    heads = [json.load(open(os.path.join(tmp, p))) for p in parts]
    check([(h["first_point"], h["end_point"]) for h in heads] == [(0, 0), (0, 0), (0, 4)],
          "4 points in 3 shards: two empty parts, then the block", str([(h["first_point"], h["end_point"]) for h in heads]))
    check(heads[0]["header"]["case_digest"] == fnv1a64(open(demo, "rb").read()),
          "the part's case digest is the FNV-1a 64 of the file's bytes (recomputed here)", heads[0]["header"]["case_digest"])
    r = run(["merge"] + parts[::-1] + ["-o", "dm.json"], cwd=tmp)
    check(whole.returncode == 1 and r.returncode == 1 and r.stdout == whole.stdout and
          open(os.path.join(tmp, "dm.json"), "rb").read() == open(os.path.join(tmp, "dw.json"), "rb").read(),
          "the demo (FAIL at its cold start) merged from 3 shards, 2 empty = unsharded", r.stderr)


with tempfile.TemporaryDirectory() as tmp:
    empty_shards(tmp)
    case = write_case(tmp)
    parts = identical(tmp, case)
    summary_detail(tmp, case)
    options(tmp, case)
    refusals(tmp, case, parts)
finish()
