// lw_probe commands for the fluid models (library/water.h):
//   water T_K p_Pa -> {"rho", "cp", "mu", "k", "drho_dT", "dcp_dT", "dmu_dT",
//                      "dk_dT", "tsat", "psat", "in_range"}
// rho [kg/m3], cp [J/(kg.K)], mu [Pa.s], k [W/(m.K)] at (T, p) and their
// temperature derivatives (per K); tsat [K] is the IF97 saturation
// temperature at p, psat [Pa] the saturation pressure at T.
#include <nlohmann/json.hpp>

#include "library/water.h"
#include "tests/tools/probe.h"

namespace loopwright::probe {
namespace {

nlohmann::json Water(const Args& a) {
  const double T = ArgD(a, 0), p = ArgD(a, 1);
  WaterFluid w;
  const FluidProps f = w.Evaluate(T, p);
  nlohmann::json j;
  j["rho"] = f.rho;
  j["cp"] = f.cp;
  j["mu"] = f.mu;
  j["k"] = f.k;
  j["drho_dT"] = f.drho_dT;
  j["dcp_dT"] = f.dcp_dT;
  j["dmu_dT"] = f.dmu_dT;
  j["dk_dT"] = f.dk_dT;
  j["tsat"] = Iapws97SaturationTemperature(p);
  j["psat"] = Iapws97SaturationPressure(T);
  j["in_range"] = w.InRange(T, p).in_range;
  return j;
}

LW_PROBE_COMMAND("water", Water);

}  // namespace
}  // namespace loopwright::probe
