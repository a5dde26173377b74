// Pieces shared by the proportional pressure regulators
// (back_pressure_regulator, pressure_reducing_valve) and the thermostatic
// valve: their common parameters, load-time checks and report items. Each
// valve's header states its own law; see those headers for the equations
// and references.
#pragma once

#include <string>
#include <vector>

#include "components/component.h"
#include "components/registry.h"

namespace loopwright {

// set_pressure, proportional_band, kv_max, kv_min, in that order (the
// regulators' Param enums follow it); the texts say what set and band mean.
std::vector<ParamSpec> RegulatorParams(const std::string& set_what, const std::string& band_what);

// Load-time checks of a regulator's parameters: band at most 2 x set (why:
// `band_note`), kv_min below kv_max.
void CheckRegulatorParams(const ParamValues& v, const std::string& band_note, std::vector<ParamError>* e);

// Report items: regulated_flow (with closed / wide_open / regulating),
// travel, authority = min(y, 1 - y), held_pressure, kv.
void ReportRegulator(double q, double y, double held, double kv_min, double kv_max, ComponentReport* out);

// A warning when an open port passes viscous oil (above 200 cSt the IEC
// turbulent form over-predicts its flow); `port` names it ("the plug's flow
// ... the valve", "the port's flow ... the path").
void WarnViscousPort(const BranchResult& b, bool open, const std::string& port, ComponentReport* out);

}  // namespace loopwright
