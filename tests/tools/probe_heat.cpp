// lw_probe commands for the heat-exchanger relations
// (components/correlations/heat_exchanger.h). Lists are one comma-separated
// argument; outputs are JSON arrays in the same order.
//
//   hx.eps ARR NTU_LIST CR_LIST  -> {eps}
//   hx.ntu ARR EPS_LIST CR_LIST  -> {ntu}   (null where unattainable)
// ARR: counterflow | parallel | shell_tube | crossflow_unmixed |
//      crossflow_cmax_mixed | crossflow_cmin_mixed
#include <cmath>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "components/correlations/heat_exchanger.h"
#include "tests/tools/probe.h"

namespace loopwright::probe {
namespace {

using nlohmann::json;

HxArrangement ParseArrangement(const Args& a) {
  if (a.empty()) throw std::runtime_error("missing arrangement");
  const std::string& s = a[0];
  if (s == "counterflow") return HxArrangement::kCounterflow;
  if (s == "parallel") return HxArrangement::kParallelFlow;
  if (s == "shell_tube") return HxArrangement::kShellAndTube1Pass;
  if (s == "crossflow_unmixed") return HxArrangement::kCrossflowUnmixed;
  if (s == "crossflow_cmax_mixed") return HxArrangement::kCrossflowCmaxMixed;
  if (s == "crossflow_cmin_mixed") return HxArrangement::kCrossflowCminMixed;
  throw std::runtime_error("unknown arrangement " + s);
}

json Map(const Args& a, double (*f)(HxArrangement, double, double), const char* key) {
  const HxArrangement arr = ParseArrangement(a);
  const auto x = ArgList(a, 1), cr = ArgList(a, 2);
  if (x.size() != cr.size()) throw std::runtime_error("lists differ in length");
  json out = json::array();
  for (size_t i = 0; i < x.size(); ++i) {
    const double v = f(arr, x[i], cr[i]);
    out.push_back(std::isfinite(v) ? json(v) : json(nullptr));
  }
  return json{{key, out}};
}

double Eps(HxArrangement a, double n, double c) { return Effectiveness(a, n, c); }
double Ntu(HxArrangement a, double e, double c) { return NtuFromEffectiveness(a, e, c); }

LW_PROBE_COMMAND("hx.eps", [](const Args& a) { return Map(a, &Eps, "eps"); });
LW_PROBE_COMMAND("hx.ntu", [](const Args& a) { return Map(a, &Ntu, "ntu"); });

}  // namespace
}  // namespace loopwright::probe
