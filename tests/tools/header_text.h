// The text of a synthetic supply header case (invented test data), shared by
// the tests that count what loading and solving cost per bearing
// (tests/cases/load_linear_test.cpp, tests/network/point/memory_per_bearing_test.cpp).
#pragma once

#include <string>

#include <fmt/format.h>

namespace loopwright::test {

// A supply header (invented test data): pump and relief valve, then N header
// tubes, each node feeding a branch tube and a journal bearing to a housing.
// One component per line: the pump on line 3, the relief valve on 4, then
// header tube i on line 5 + 3 i, its branch on 6 + 3 i, its bearing on 7 + 3 i.
inline std::string HeaderText(int n) {
  std::string nodes = R"({"id": "sump", "boundary": {"kind": "reservoir", "pressure": 0}}, {"id": "pump_out"}, )"
                      R"({"id": "housing", "boundary": {"kind": "pressure", "pressure": "0.5 bar"}})";
  std::string comps = fmt::format(
      R"(  {{"id": "pump", "type": "displacement_pump", "from": "sump", "to": "pump_out", "displacement": "{} cm3/rev", "speed": "1450 rpm"}},
  {{"id": "relief", "type": "relief_valve", "from": "pump_out", "to": "sump", "crack": "8 bar", "rated_flow": "{} L/min"}})",
      0.05 * n + 2, 0.08 * n + 5);
  for (int i = 0; i < n; ++i) {
    nodes += fmt::format(R"(, {{"id": "n{}"}}, {{"id": "f{}"}})", i, i);
    comps += fmt::format(R"(,
  {{"id": "h{}", "type": "tube", "from": "{}", "to": "n{}", "length": "0.3 m", "diameter": "25 mm"}},
  {{"id": "l{}", "type": "tube", "from": "n{}", "to": "f{}", "length": "0.5 m", "diameter": "6 mm"}},
  {{"id": "b{}", "type": "journal_bearing", "from": "f{}", "to": "housing", "diameter": "40 mm", "length": "30 mm", "radial_clearance": "40 um", "eccentricity": 0.5}})",
                         i, i == 0 ? std::string("pump_out") : fmt::format("n{}", i - 1), i, i, i, i, i, i);
  }
  return fmt::format(R"({{"name": "header {}", "fluids": {{"oil": {{"kind": "oil", "kv40": "32 cSt", "kv100": "5.4 cSt"}}}},
"loops": [{{"id": "l", "fluid": "oil", "temperature": "60 degC", "nodes": [{}], "components": [
{}
]}}]}})",
                     n, nodes, comps);
}

}  // namespace loopwright::test
