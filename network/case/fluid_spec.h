// Builds a Fluid from its case-file (or parts-library) definition.
//
//   {"kind": "oil", "kv40": "46 cSt", "kv100": "6.8 cSt"}
//   {"kind": "oil", "viscosity": [["20 degC", "120 cSt"], ["90 degC", "9 cSt"]]}
//   {"kind": "oil", "iso_vg": 32, "kv100": "5.4 cSt"}
//   {"kind": "oil", "sae": "30", "kv40": ..., "kv100": ...}
//     oil options: density_15C, expansion (1/K), specific_heat, conductivity,
//     t_min, t_max (validity range)
//   {"kind": "water"}
//   {"kind": "glycol", "glycol": "ethylene" | "propylene", "mass_fraction": 0.4}
//   {"kind": "table", "rows": [[T, nu, rho, cp, k], ...]}
//   {"part": "oil-vg32-turbine"}   a fluid entry of the parts library
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "library/fluid.h"
#include "network/case/case.h"
#include "network/case/case_context.h"

namespace loopwright {

// For an oil given by "kv40" and "kv100", either may be "$variable" (an
// oil grade swept over the envelope) when `binding` is given: the variables
// are reported there, with the oil to re-anchor at each point.
FluidPtr BuildFluid(const nlohmann::json& j, const std::string& ptr, CaseContext& c,
                    FluidBinding* binding = nullptr);

// The fluid of a parts-library fluid entry's "params" (for `library show`);
// nullptr, with the problems in *error, when it does not build.
FluidPtr FluidFromPartParams(const nlohmann::json& params, std::string* error);

}  // namespace loopwright
