// fixed_flow — a branch that imposes its flow: a metering pump, a known
// consumer, a measured leak, or a test-stand flow setting.
//
// Equation (residual in m3/s): r = Q - Q_set, with Q_set = flow, or
// mass_flow / rho when a mass flow is given. Independent of dp.
// Sign convention: Q > 0 from -> to. Inputs (SI): flow [m3/s] or mass_flow
// [kg/s] (exactly one; either may be negative for a flow to -> from).
// Validity: any; the network must give the branch's end nodes a pressure
// path elsewhere (a fixed flow between two otherwise unconnected nodes
// leaves their pressures undetermined: the solve reports a singular system).
#pragma once

#include "components/component.h"
#include "components/registry.h"

namespace loopwright {

class FixedFlow : public ComponentWithLaw<FixedFlow> {
 public:
  enum Param { kFlow, kMassFlow, kNumParams };
  explicit FixedFlow(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)dp; (void)mu; (void)x;
    if (!std::isnan(params_[kFlow])) r[0] = m / rho - params_[kFlow];
    else r[0] = (m - params_[kMassFlow]) / rho;
  }
  bool MayFixFlow() const override { return true; }
  LinearGuess Linearize(double rho, double mu) const override {
    (void)mu;
    LinearGuess g;
    g.fixes_flow = true;
    g.m0 = !std::isnan(params_[kFlow]) ? rho * params_[kFlow] : params_[kMassFlow];
    return g;
  }
  void Describe(const BranchResult& b, ComponentReport* out) const override {
    out->items.push_back({"imposed_flow", b.m / b.rho, Dimension::kVolumeFlow, ""});
  }
};

inline ComponentType FixedFlowType() {
  ComponentType t;
  t.name = "fixed_flow";
  t.summary = "imposed flow: metering pump, known consumer or leak";
  t.roles = kRoleBoundaryFlow;
  t.params = {Num("flow", Dimension::kVolumeFlow, "imposed volumetric flow", false),
              Num("mass_flow", Dimension::kMassFlow, "imposed mass flow", false)};
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    bool a = !std::isnan(v.values[0]), b = !std::isnan(v.values[1]);
    if (a == b) e->push_back({"", "give exactly one of flow and mass_flow"});
    if (!e->empty()) return nullptr;
    return std::make_unique<FixedFlow>(v);
  };
  return t;
}

}  // namespace loopwright
