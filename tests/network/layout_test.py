"""The layers point one way, and so do the stages inside network/.

Layers: cli -> network -> components -> library (DEVELOPERS.md, Layout).
Stages of network/ (network/README.md): tolerance -> design -> envelope -> point -> case.
A file may include its own layer or stage and those to the right, never one to
the left. Every stage folder has a README saying what it owns, and no source
file sits in network/ itself. The rule is the project's own (DEVELOPERS.md);
this test reads the include lines of every source file, so an upward include
added anywhere fails it.
"""
import os
import re
import sys

SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR",
                     os.path.join(os.path.dirname(__file__), "..", ".."))
LAYERS = ["cli", "network", "components", "library"]
STAGES = ["tolerance", "design", "envelope", "point", "case"]
INCLUDE = re.compile(r'^\s*#\s*include\s+"([a-z_]+)/(?:([a-z_]+)/)?[^"]*"', re.M)


def unit_of(path):
    """(layer index, stage index or None) of a repository-relative path."""
    parts = path.split("/")
    layer = LAYERS.index(parts[0])
    stage = STAGES.index(parts[1]) if parts[0] == "network" and parts[1] in STAGES else None
    return layer, stage


def problems():
    out = []
    for layer in LAYERS:
        for root, _, files in os.walk(os.path.join(SRC, layer)):
            for f in files:
                if not f.endswith((".h", ".cpp")):
                    continue
                rel = os.path.relpath(os.path.join(root, f), SRC)
                if layer == "network" and os.path.dirname(rel) == "network":
                    out.append(f"{rel}: a source file in network/ itself, outside every stage")
                    continue
                me_layer, me_stage = unit_of(rel)
                text = open(os.path.join(SRC, rel), encoding="utf-8").read()
                for inc_layer, inc_sub in INCLUDE.findall(text):
                    if inc_layer not in LAYERS:
                        continue
                    li = LAYERS.index(inc_layer)
                    if li < me_layer:
                        out.append(f"{rel}: includes {inc_layer}/, a layer above it")
                    elif li == me_layer == 1 and inc_sub in STAGES and me_stage is not None \
                            and STAGES.index(inc_sub) < me_stage:
                        out.append(f"{rel}: includes network/{inc_sub}/, a later stage")
    for stage in STAGES:
        if not os.path.isfile(os.path.join(SRC, "network", stage, "README.md")):
            out.append(f"network/{stage}/ has no README.md")
    return out


def main():
    # Positive control: the rule itself must reject an upward include.
    assert unit_of("network/point/run.cpp") == (1, STAGES.index("point"))
    assert STAGES.index("envelope") < unit_of("network/point/run.cpp")[1]
    found = problems()
    for p in found:
        print("FAIL", p)
    print(f"{'FAIL' if found else 'ok'}: {len(found)} layout problems")
    return 1 if found else 0


if __name__ == "__main__":
    sys.exit(main())
