// air_cooler — liquid-to-air radiator (oil cooler or coolant radiator):
// hydraulic side by its datasheet drop, heat rejection by the e-NTU method.
//
// Hydraulics (residual in Pa): as datasheet_loss,
//   r = a mu Q + b rho Q|Q| - dp.
// Heat (used by the thermal solve): the heat the liquid gives to the air,
//   Qdot = eps(NTU, Cr) C_min (T_liquid,in - T_air,in),
//   NTU = UA / C_min, Cr = C_min / C_max, C = m cp of each stream [1, 2]
//   (the liquid's C = m (h_in - h_out)/(T_in - T_out), its mean cp over its
//   own temperature change, so that the duty and the outlet temperature obey
//   the same enthalpy balance as the network's nodes; implicit in the duty,
//   solved by HeatExchangedImplicit; air: cp constant),
// with eps for crossflow: both fluids unmixed (Kays & London's series
// approximation, Incropera Eq. 11.32), liquid mixed, or air mixed
// (Incropera Eqs. 11.33a-11.34a; numbers from memory). UA is given directly (conductance), or scaled
// from one datasheet rating point — heat rejected rated_heat at initial
// temperature difference rated_itd, liquid flow rated_liquid_flow and air
// mass flow rated_air_flow — by power laws in the two flows:
//   UA = UA_r (m_liq / m_liq,r)^n_l (m_air / m_air,r)^n_a
// (n_l = 0.3, n_a = 0.6 defaults: common practice for finned tube cores in
// laminar oil flow and turbulent air; fit them to two or more datasheet
// points where possible). UA_r follows the rating parameters (one e-NTU
// inversion, redone only when one of them has changed), so a bound or sized
// rated_heat acts; a rating point that no exchanger can reach at some
// operating point rejects no heat there and Describe warns. With the fan off the air flow is
// fan_off_fraction x air_flow (natural convection and ram air), default 0.1.
//
// Sign convention: Q > 0 from -> to (liquid inlet -> outlet); heat is
// removed from the liquid (heat_W < 0 in results).
// Inputs (SI): the datasheet_loss inputs; conductance [W/K] or the rating
// point (rated_heat [W], rated_itd [K], rated_liquid_flow [m3/s],
// rated_air_flow [kg/s]); air_flow [kg/s]; air_inlet_temperature [K];
// fan_on (1 or 0; bindable); fan_off_fraction; arrangement.
// Validity: eps-NTU assumes constant properties through the core (a varying
// cp enters through its mean over the stream's change, above); the UA
// power law holds near the rating point (a warning when the flows are more
// than a factor 3 from it).
// References
// [1] W. M. Kays, A. L. London, "Compact Heat Exchangers", 3rd ed.,
//     McGraw-Hill, 1984, ch. 2 (e-NTU relations).
// [2] F. P. Incropera, D. P. DeWitt et al., "Fundamentals of Heat and Mass
//     Transfer", 6th ed., Wiley, 2007, Table 11.3 (Eqs. 11.28-11.35).
#pragma once

#include "components/correlations/heat_exchanger.h"
#include "components/datasheet_loss.h"
#include "library/enthalpy.h"

namespace loopwright {

class AirCooler : public ComponentWithLaw<AirCooler> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param {
    kConductance = DatasheetLoss::kNumParams, kRatedHeat, kRatedItd, kRatedLiquidFlow, kRatedAirFlow,
    kExpLiquid, kExpAir, kAirFlow, kAirInletTemperature, kFanOn, kFanOffFraction, kArrangement, kRatedCp, kNumParams
  };
  // Specific heat of air at 300 K and 1 atm [J/(kg.K)]: 1007 (Incropera,
  // 6th ed., Table A.4).
  static constexpr double kAirCp = 1007.0;

  AirCooler(const ParamValues& v, const DatasheetLoss& hyd) : hyd_(hyd) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    r[0] = hyd_.Loss(params_.data(), m / rho, rho, mu) - dp;
  }
  LinearGuess Linearize(double rho, double mu) const override { return hyd_.LinearizeWith(params_.data(), rho, mu); }
  void Describe(const BranchResult& b, ComponentReport* out) const override;

  double AirFlow() const {
    const double on = params_[kFanOn];
    const double base = std::isnan(params_[kAirFlow]) ? (std::isnan(params_[kRatedAirFlow]) ? 0.0 : params_[kRatedAirFlow])
                                                      : params_[kAirFlow];
    return base * (on + (1.0 - on) * params_[kFanOffFraction]);
  }
  HxArrangement Arrangement(bool liquid_is_cmin) const {
    const int a = static_cast<int>(params_[kArrangement]);
    if (a == 0) return HxArrangement::kCrossflowUnmixed;
    return CrossflowMixedSide(/*hot (liquid) mixed=*/a == 1, liquid_is_cmin);
  }
  // UA at liquid mass flow m [kg/s] and the current air flow.
  double Conductance(double m) const {
    if (!std::isnan(params_[kConductance])) return params_[kConductance];
    const double ml_r = params_[kRatedLiquidFlow] * params_[DatasheetLoss::kRatedDensity];
    const double ma_r = params_[kRatedAirFlow];
    return ScaledConductance(RatedUa(), std::abs(m) / ml_r, AirFlow() / ma_r, params_[kExpLiquid], params_[kExpAir]);
  }
  // The UA power law UA_r (m_liq/m_liq,r)^n_l (m_air/m_air,r)^n_a from the
  // two flow ratios; templated so that the fitter (network/design/fit.cpp)
  // differentiates this same law in UA_r, n_l and n_a.
  template <class T>
  static T ScaledConductance(const T& ua_r, double liquid_ratio, double air_ratio, const T& n_l, const T& n_a) {
    using std::pow;
    return ua_r * pow(T(liquid_ratio), n_l) * pow(T(air_ratio), n_a);
  }
  // Capacity rate of the liquid [W/K] giving up duty q: |m| times its mean cp
  // over its own temperature change (library/enthalpy.h), or |m| cp at the
  // inlet when no fluid is given.
  template <class T>
  T LiquidCapacity(double m, const T& t_in, const T& cp, const T& q, const Fluid* fluid, double p_abs) const {
    if (!fluid || m == 0.0) return std::abs(m) * cp;
    return MeanCapacityRate(*fluid, m, t_in, T(-q / std::abs(m)), p_abs);
  }
  // Heat rejected to the air [W]: e-NTU with the liquid's mean-cp capacity
  // rate, implicit in the duty (HeatExchangedImplicit).
  template <class T>
  T Duty(double m, const T& t_in, const T& cp, const Fluid* fluid, double p_abs) const {
    const T c_air = T(AirFlow() * kAirCp);
    return HeatExchangedImplicit([&](bool liquid_is_cmin) { return Arrangement(liquid_is_cmin); }, T(Conductance(m)),
                                 [&](const T& q) { return LiquidCapacity(m, t_in, cp, q, fluid, p_abs); },
                                 [&](const T&) { return c_air; }, t_in, T(params_[kAirInletTemperature]));
  }
  HeatJet HeatAdded(const HeatInputs& in) const override { return -Duty(in.m, in.t_in, in.cp, in.fluid, in.p_abs); }

  // UA of the datasheet rating point from its heat rejection (e-NTU inverted),
  // from parameter values p (kNumParams of them); 0 with *error when the
  // rating point is impossible.
  static double RatedConductance(const double* p, std::string* error);

 private:
  // UA of the rating point at the current parameters: recomputed (one e-NTU
  // inversion) only when a rating parameter has changed since the last call,
  // so a bound or re-sized rated_heat acts at once. Each solver owns its
  // copy of the model (not Shareable), so the cache is never shared between threads.
  double RatedUa() const;
  bool Shareable() const override { return false; }  // the cache below
  static constexpr int kRatingKeys = 7;
  DatasheetLoss hyd_;
  mutable double rating_key_[kRatingKeys] = {};
  mutable double ua_rated_ = -1;
};

ComponentType AirCoolerType();

}  // namespace loopwright
