// relief_valve — spring-loaded relief or pressure-regulating (back-pressure)
// valve: closed below its cracking pressure, its lift rising in a straight
// line to full lift at the full-open pressure.
//
// Purpose. The valve that limits the pump's outlet pressure or, set lower,
// holds the feed header at a regulated pressure by spilling the pump's excess
// flow back to the sump. The poppet's lift grows in proportion to the
// pressure above cracking (spring rate and flow forces lumped into one
// straight-line lift characteristic, [1]); the open seat is an orifice whose
// area grows with lift, so the flow is that of an orifice, Q ~ sqrt(dp/rho),
// at every lift [1, 3]; beyond full open it is the fixed orifice of the
// full-lift area.
//
// Equation (residual in m3/s):
//   r = Q - Q_r y(t) sqrt(dp / p_f) sqrt(rho_r / rho)   for dp > p_c, else r = Q
//   t = (dp - p_c) / (p_f - p_c)     fraction of the band from crack to full open
//   y = LinearRampC2(t, 0.1)         lift fraction: 0 below crack, exactly t
//                                    for 0.1 <= t <= 0.9, 1 beyond full open
// (components/correlations/smooth.h). The two corners of the straight line
// are rounded over 10 % of the band each so the characteristic is C2 (the
// network's Newton solve needs a smooth law, DESIGN.md section 4); there the
// lift departs from the straight line by at most 16/81 x 0.1 = 0.020 of full
// lift (below it just above crack, above it just below full open), and the
// flow is exact elsewhere: at a quarter of the band it is 0.25 Q_r
// sqrt(dp/p_f). Q = Q_r at dp = p_f and rho = rho_r; the flow scales with
// rho^(-1/2) as an orifice's (a Kv relation at fixed lift).
//
// Sign convention: from = the pressure side it protects, to = where it spills
// (sump, pump inlet); Q > 0 spills; one-way: no flow for dp <= p_c.
// Inputs (SI): crack p_c [Pa] > 0; full_open p_f [Pa] >= 1.01 p_c (default
// 1.15 p_c — a common practice override/accumulation figure; use the maker's
// curve); rated_flow Q_r [m3/s] at p_f; rated_density rho_r [kg/m3] of the
// fluid Q_r was rated with (default 870, mineral oil, common practice). All
// are read at every evaluation: a crack bound to an envelope variable or
// moved by a design knob acts exactly as the same value written in the case.
// A given full_open stays where it is written; when a bound or re-sized crack
// comes within 1 % of it, the valve opens over a 1 % band above crack
// instead (a warning says so; give the maker's full-open pressure for the
// new setting).
// Open/closed (ComponentReport::valve, read by the relief_closed check):
// open ("lifting") when Q > kValveOpenFraction Q_r, the one threshold of every
// valve that must stay shut (components/component.h says why 1e-3); the law
// passes exactly nothing below p_c, so this is just above crack.
// Validity: p_c < dp up to ~2 p_f (beyond that the fixed-orifice continuation
// is an extrapolation: warning); turbulent flow through the seat (the
// viscous case passes less; a warning is given above 200 cSt).
// References
// [1] H. E. Merritt, "Hydraulic Control Systems", Wiley, 1967, §9 (relief
//     valve static characteristic: cracking, override, full flow; lift
//     proportional to pressure over cracking for a spring-loaded poppet;
//     from memory).
// [2] ISO 4411:2019, "Hydraulic fluid power — Valves — Determination of
//     differential pressure/flow characteristics" (how the curve is measured).
// [3] IEC 60534-2-1:2011, Eq. (1): Q = Kv sqrt(dp / (rho / rho_0)) at a given
//     opening (the density dependence of a liquid's flow through a fixed
//     restriction).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class ReliefValve : public ComponentWithLaw<ReliefValve> {
 public:
  enum Param { kCrack, kFullOpen, kRatedFlow, kRatedDensity, kNumParams };
  // Rounded share of the band at each corner of the straight lift line.
  static constexpr double kCornerBand = 0.1;
  // Narrowest band from crack to full open, as a fraction of crack.
  static constexpr double kMinBand = 0.01;
  explicit ReliefValve(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }
  double FullOpen() const {
    const double pc = params_[kCrack];
    if (std::isnan(params_[kFullOpen])) return 1.15 * pc;
    return std::max(params_[kFullOpen], (1.0 + kMinBand) * pc);
  }
  // Lift fraction y at drop dp [Pa].
  template <class T>
  T Lift(const T& dp) const {
    const double pc = params_[kCrack], pf = FullOpen();
    return LinearRampC2(T((dp - pc) / (pf - pc)), kCornerBand);
  }

  template <class T>
  T Flow(const T& dp, const T& rho) const {
    using std::sqrt;
    const double pc = params_[kCrack], pf = FullOpen();
    if (ScalarPart(dp) <= pc) return T(0.0);
    return params_[kRatedFlow] * Lift(dp) * sqrt(dp / pf * (params_[kRatedDensity] / rho));
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)mu; (void)x;
    r[0] = m / rho - Flow(dp, rho);
  }

  LinearGuess Linearize(double rho, double mu) const override {
    (void)mu;
    LinearGuess g;  // closed: a tiny conductance keeps the guess well posed
    g.g = 1e-6 * rho * params_[kRatedFlow] / FullOpen();
    return g;
  }
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType ReliefValveType();

}  // namespace loopwright
