// Seeded generator of physically sensible random loops for the campaign of
// tests/network/point/random_networks_test.cpp and `lw_bench --campaign N`.
//
// Each seed gives one case document (JSON, the same keys and unit strings a
// user writes), loaded by the caller through the normal loader
// (LoadCaseText). A case has one oil loop — a vented reservoir, a flooded
// suction line, a displacement pump (with its internal relief or an external
// relief valve) or a centrifugal pump, optionally a check valve, one filter
// or two in parallel, a cooler (optionally with a bypass valve across it),
// a riser to a header and a random series-parallel distribution to 1..8
// bearings (journal or jet-fed rolling) through feed lines, restrictor
// orifices and trim valves, draining to the reservoir or to bearing housings
// held at 0..2 bar g that drain to the reservoir — and, in some thermal
// cases, a water loop (centrifugal pump, the cold side of an oil-to-water
// coupling, a radiator). Pipes are then split in series until the case holds
// 3..40 of them.
//
// Ranges (common practice unless stated; each drawn uniformly):
//   oil ISO VG 22/32/46/68 with KV100 4.3/5.4/6.8/8.6 cSt (VI about 100),
//     both x 0.97..1.03; density at 15 degC 850..890 kg/m3;
//   isothermal points 10..100 degC; thermal cases start at 40..80 degC with
//     air at 10..45 degC, water loops at 20..45 degC;
//   journal bearings: D 25..150 mm, L/D 0.4..0.9, groove 10..20 % of L,
//     radial clearance 0.5..1.0 per mille of D, eccentricity 0.3..0.8,
//     surface speed <= 60 m/s, specific load 0.5..2.5 MPa;
//   jet-fed rolling bearings: jets 0.8..2.0 mm, 1..4 of them, losses 50..800 W;
//   feed pressure above the drain 0.8..3 bar; housings 0..2 bar g;
//   line velocities: suction 0.3..1.0 m/s (then widened until its drop at
//     the pump's flow is under 0.2 bar, so the inlet keeps 0.7 bar abs),
//     pressure lines 0.3..2.5 m/s; suction hoses 0.3..1.5 m;
//   line lengths 0.2..3 m, bores 3..80 mm, minor K 0..3;
//   displacement pumps 1000..3600 rpm, geometric flow 1.3..2.5 x the
//     bearings' demand, volumetric efficiency 0.85..0.97 at 10 bar, 30 mPa.s;
//   centrifugal pumps at 0.85..1.05 x 2900 rpm, shut-off 1.2..1.8 x the
//     design pressure; coolers sized for a 15..40 K approach.
#pragma once

#include <cstdint>
#include <string>

#include <nlohmann/json.hpp>

namespace loopwright::campaign {

struct GeneratedCase {
  nlohmann::json doc;
  bool thermal = false;
  bool water_loop = false;
  int pipes = 0;
  int components = 0;
};

GeneratedCase GenerateCase(uint64_t seed);

}  // namespace loopwright::campaign
