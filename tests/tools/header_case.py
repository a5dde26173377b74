"""A synthetic supply header of N segments, each node feeding a 0.5 m x 4 mm
tube and a pressure-fed journal bearing to a housing drain (the layout of
lw_bench's header case). Invented data, for tests and measurements only.
Usage: python3 header_case.py N > case.json
"""

import json
import math
import sys


def header_case(n):
    nodes = [{"id": "sump", "boundary": {"kind": "reservoir", "pressure": 0}}, {"id": "pump_out"},
             {"id": "housing", "boundary": {"kind": "pressure", "pressure": "0.5 bar"}}]
    comps = [{"id": "pump", "type": "displacement_pump", "from": "sump", "to": "pump_out",
              "displacement": f"{0.05 * n + 2} cm3/rev", "speed": "1450 rpm", "slip": 1.5e-13},
             {"id": "relief", "type": "relief_valve", "from": "pump_out", "to": "sump", "crack": "8 bar",
              "rated_flow": f"{0.05 * n * 1.45 + 5} L/min"},
             {"id": "h0", "type": "tube", "from": "pump_out", "to": "n0", "length": "1 m",
              "diameter": f"{10 + 0.2 * math.sqrt(n)} mm"}]
    for i in range(n):
        nodes += [{"id": f"n{i}"}, {"id": f"f{i}"}]
        if i + 1 < n:
            comps.append({"id": f"h{i + 1}", "type": "tube", "from": f"n{i}", "to": f"n{i + 1}", "length": "0.3 m",
                          "diameter": f"{10 + 0.2 * math.sqrt(n - i):.3f} mm"})
        comps.append({"id": f"l{i}", "type": "tube", "from": f"n{i}", "to": f"f{i}", "length": "0.5 m",
                      "diameter": "4 mm"})
        comps.append({"id": f"b{i}", "type": "journal_bearing", "from": f"f{i}", "to": "housing",
                      "diameter": "40 mm", "length": "30 mm", "radial_clearance": f"{40.0 + (i % 7):.1f} um",
                      "eccentricity": 0.5})
    return {"name": f"header {n}", "fluids": {"oil": {"kind": "oil", "kv40": "32 cSt", "kv100": "5.4 cSt"}},
            "loops": [{"id": "l", "fluid": "oil", "temperature": "60 degC", "nodes": nodes, "components": comps}]}


if __name__ == "__main__":
    json.dump(header_case(int(sys.argv[1])), sys.stdout)
