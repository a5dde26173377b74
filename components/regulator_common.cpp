#include "components/regulator_common.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

namespace loopwright {

std::vector<ParamSpec> RegulatorParams(const std::string& set_what, const std::string& band_what) {
  return {
      Positive("set_pressure", Dimension::kPressureDifference, set_what).Knob(),
      Positive("proportional_band", Dimension::kPressureDifference,
               band_what + " (droop; default 0.1 x set_pressure)", false),
      Positive("kv_max", Dimension::kFlowCoefficientKv, "flow coefficient wide open"),
      Positive("kv_min", Dimension::kFlowCoefficientKv, "flow coefficient closed (seat leakage; default 1e-4 x kv_max)", false),
  };
}

void CheckRegulatorParams(const ParamValues& v, const std::string& band_note, std::vector<ParamError>* e) {
  const double set = v.values[0], band = v.values[1], kv_max = v.values[2], kv_min = v.values[3];
  if (!std::isnan(band) && !(band <= 2.0 * set))
    e->push_back({"proportional_band", "proportional_band must be at most 2 x set_pressure (" + band_note + ")"});
  if (!std::isnan(kv_min) && !(kv_min < kv_max)) e->push_back({"kv_min", "kv_min must be below kv_max"});
}

void ReportRegulator(double q, double y, double held, double kv_min, double kv_max, ComponentReport* out) {
  const char* state = y <= 0.0 ? "closed" : y >= 1.0 ? "wide_open" : "regulating";
  out->items.push_back({"regulated_flow", q, Dimension::kVolumeFlow, state});
  out->items.push_back({"travel", y, Dimension::kDimensionless, ""});
  out->items.push_back({"authority", std::min(y, 1.0 - y), Dimension::kDimensionless, ""});
  out->items.push_back({"held_pressure", held, Dimension::kPressureDifference, ""});
  out->items.push_back({"kv", kv_min + (kv_max - kv_min) * y, Dimension::kFlowCoefficientKv, ""});
}

void WarnViscousPort(const BranchResult& b, bool open, const std::string& port, ComponentReport* out) {
  const double nu = b.mu / b.rho;
  if (open && nu > 200e-6)
    out->warnings.push_back(fmt::format("viscosity {:.0f} cSt: {} passes less than modelled", nu * 1e6, port));
}

}  // namespace loopwright
