"""Synthetic supply headers (invented data, for tests and measurements only).

header_case(n)
    The layout of lw_bench's header case: a gear pump with its relief feeding
    a header of n segments, each node feeding a 0.5 m x 4 mm tube and a
    pressure-fed journal bearing to a housing drain.

supply_header_case(n, friction=...) / write_supply_header(out, n, ...)
    A 25 mm header of n segments (0.3 m each, commercial steel, roughness
    45 um) fed from a pressure boundary at 4 bar g with 60 degC oil (kv40
    32 cSt, kv100 5.4 cSt), each node feeding a 0.5 m x 6 mm branch line
    (drawn tube, 1.5 um) and a pressure-fed journal bearing (40 mm x 30 mm,
    radial clearance 50 + (i mod 7) um, eccentricity 0.5) draining into a
    housing at 0.2 bar g (housing_pressure: another value). Each bearing then takes about 8 cm3/s (0.5 L/min), so
    the feed segment reaches Re = 2300 near n = 100 (60 degC: about 16 cSt)
    and is turbulent above; beyond a few hundred segments the far end is fed
    through a long, mostly laminar header. friction is the friction method of
    every line: churchill_1977 (default) or laminar_colebrook (the hard 64/Re
    | Colebrook switch at Re = 2300).
    Ids: supply (boundary), n0 .. n{n-1} header nodes, f0 .. bearing feeds,
    housing (boundary); h0 (supply -> n0), h{i} (n{i-1} -> n{i}) segments,
    l{i} (n{i} -> f{i}) branch lines, b{i} (f{i} -> housing) bearings.
    write_supply_header streams compact JSON text (one object a line), so a
    case of 10^6 bearings (about 300 MB) is written without building it in
    memory.

Usage: python3 header_case.py N > case.json                   (header_case)
       python3 header_case.py --supply N [--friction METHOD] [--housing-pressure P] [-o FILE]
"""

import argparse
import io
import json
import math
import sys

FRICTION_METHODS = ("churchill_1977", "laminar_colebrook")


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


# The supply header's invented data, as written into the case (strings with
# units, read back by tests/tools/header_reference.py from the case file).
SUPPLY = {"supply_pressure": "4 bar", "housing_pressure": "0.2 bar", "temperature": "60 degC",
          "kv40": "32 cSt", "kv100": "5.4 cSt",
          "segment_length": "0.3 m", "segment_diameter": "25 mm", "segment_roughness": "45 um",
          "line_length": "0.5 m", "line_diameter": "6 mm", "line_roughness": "1.5 um",
          "bearing_diameter": "40 mm", "bearing_length": "30 mm", "eccentricity": 0.5}


def bearing_clearance_um(i):
    return 50 + i % 7


def write_supply_header(out, n, friction="churchill_1977", housing_pressure=None):
    """Writes the supply header case of n segments to the text stream out
    (housing_pressure: a value with its unit, e.g. "0.4 bar")."""
    if friction not in FRICTION_METHODS:
        raise ValueError(f"friction must be one of {FRICTION_METHODS}")
    s = SUPPLY
    d = json.dumps
    out.write('{"name": %s,\n"fluids": {"oil": {"kind": "oil", "kv40": %s, "kv100": %s}},\n'
              % (d(f"supply header {n} ({friction})"), d(s["kv40"]), d(s["kv100"])))
    out.write('"loops": [{"id": "oil", "fluid": "oil", "temperature": %s,\n"nodes": [\n' % d(s["temperature"]))
    out.write('{"id": "supply", "boundary": {"kind": "pressure", "pressure": %s}},\n' % d(s["supply_pressure"]))
    out.write('{"id": "housing", "boundary": {"kind": "pressure", "pressure": %s}}'
              % d(housing_pressure or s["housing_pressure"]))
    for i in range(n):
        out.write(',\n{"id":"n%d"},{"id":"f%d"}' % (i, i))
    out.write('\n],\n"components": [\n')
    seg = ('{"id":"h%%d","type":"pipe","from":"%%s","to":"n%%d","length":"%s","diameter":"%s","roughness":"%s",'
           '"friction":"%s"}' % (s["segment_length"], s["segment_diameter"], s["segment_roughness"], friction))
    line = ('{"id":"l%%d","type":"tube","from":"n%%d","to":"f%%d","length":"%s","diameter":"%s","roughness":"%s",'
            '"friction":"%s"}' % (s["line_length"], s["line_diameter"], s["line_roughness"], friction))
    brg = ('{"id":"b%%d","type":"journal_bearing","from":"f%%d","to":"housing","diameter":"%s","length":"%s",'
           '"radial_clearance":"%%d um","eccentricity":%s}' % (s["bearing_diameter"], s["bearing_length"],
                                                                s["eccentricity"]))
    for i in range(n):
        sep = "" if i == 0 else ",\n"
        out.write(sep + seg % (i, "supply" if i == 0 else f"n{i - 1}", i) + ",")
        out.write(line % (i, i, i) + "," + brg % (i, i, bearing_clearance_um(i)))
    out.write("\n]}]}\n")


def supply_header_case(n, friction="churchill_1977", housing_pressure=None):
    """The supply header case of n segments as a dict."""
    buf = io.StringIO()
    write_supply_header(buf, n, friction, housing_pressure)
    return json.loads(buf.getvalue())


def main(argv):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("n", type=int)
    ap.add_argument("--supply", action="store_true", help="the pressure-fed supply header")
    ap.add_argument("--friction", default="churchill_1977", choices=FRICTION_METHODS)
    ap.add_argument("--housing-pressure", help='housing (drain) pressure with its unit, e.g. "0.4 bar"')
    ap.add_argument("-o", "--output", help="file to write (default stdout)")
    a = ap.parse_args(argv)
    out = open(a.output, "w", encoding="utf-8") if a.output else sys.stdout
    try:
        if a.supply:
            write_supply_header(out, a.n, a.friction, a.housing_pressure)
        else:
            json.dump(header_case(a.n), out)
    finally:
        if a.output:
            out.close()


if __name__ == "__main__":
    main(sys.argv[1:])
