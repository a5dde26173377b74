#include "components/gravity_drain.h"

#include <fmt/format.h>

namespace loopwright {

namespace {

// Root of an increasing function on [lo, hi] (the caller brackets it; a
// root beyond an end gives that end), in log space when lo > 0 spans
// decades: regula falsi with the Anderson-Bjorck weighting, bisecting when
// a step leaves the bracket or two steps have not halved it, until the
// bracket is within 1e-13 of hi. It takes ~8 evaluations where bisection
// took ~45 (the fill's search nests the velocity's, so ~60 against ~2,000).
template <class F>
double Bisect(F f, double lo, double hi, bool log_space) {
  auto at = [&](double y) { return log_space ? std::exp(y) : y; };
  double a = log_space ? std::log(lo) : lo, b = log_space ? std::log(hi) : hi;
  double fa = f(lo), fb = f(hi);
  if (fa > 0) return lo;
  if (!(fb > 0)) return hi;
  double width = b - a, width_before = 2.0 * width;
  int side = 0;
  for (int i = 0; i < 200; ++i) {
    double y = (a * fb - b * fa) / (fb - fa);
    if (i % 2 == 0) {
      if (!(width <= 0.5 * width_before)) y = 0.5 * (a + b);
      width_before = width;
    }
    if (!(y > a && y < b)) y = 0.5 * (a + b);
    const double fy = f(at(y));
    if (fy > 0) {
      if (side > 0) fa *= 1.0 - fy / fb > 0 ? 1.0 - fy / fb : 0.5;
      b = y;
      fb = fy;
      side = 1;
    } else {
      if (side < 0 && fa < 0) fb *= 1.0 - fy / fa > 0 ? 1.0 - fy / fa : 0.5;
      a = y;
      fa = fy;
      side = -1;
    }
    width = b - a;
    if (at(b) - at(a) <= 1e-13 * at(b)) break;
  }
  return 0.5 * (at(a) + at(b));
}

}  // namespace

double GravityDrain::OpenChannelFlow(double fill, double rho, double mu) const {
  const double d = params_[kDiameter];
  const double theta = 2.0 * std::acos(1.0 - 2.0 * fill);                 // [1] Table 2-1
  const double area = d * d * (theta - std::sin(theta)) / 8.0, perimeter = d * theta / 2.0;
  const double dh = 4.0 * area / perimeter;                                // 4R
  const double drive = 2.0 * kGravity * Slope() * dh;                      // f V^2 = 8 g R S [2]
  const double rr = params_[kRoughness] / dh;
  // f V^2 = (f Re) mu V / (rho 4R) rises with V: bisect it against 8 g R S.
  auto excess = [&](double v) { return FReChurchill1977(rho * v * dh / mu, rr) * mu * v / (rho * dh) - drive; };
  const double v = Bisect(excess, 1e-12, 1e3, true);
  return area * v;
}

double GravityDrain::FloodCapacity(double rho, double mu) const {
  const double head = VentHead(rho);
  if (!(head > 0)) return 0.0;
  auto excess = [&](double q) { return FullBoreDrop(q, rho, mu) - head; };
  return Bisect(excess, 1e-15, 1e3 * Area(), true);
}

double GravityDrain::FillAt(double q, double rho, double mu) const {
  if (!(q > 0)) return 0.0;
  if (q > OpenChannelFlow(kFillOfMostFlow, rho, mu)) return std::nan("");
  return Bisect([&](double f) { return OpenChannelFlow(f, rho, mu) - q; }, 1e-6, kFillOfMostFlow, false);
}

LinearGuess GravityDrain::Linearize(double rho, double mu) const {
  LinearGuess g;  // the secant from zero to the flood capacity at the vent head
  const double head = std::max(VentHead(rho), 1.0), qf = FloodCapacity(rho, mu);
  const double d = params_[kDiameter];
  g.g = qf > 0 ? rho * qf / head : rho * M_PI * d * d * d * d / (128.0 * mu * params_[kLength]);
  return g;
}

void GravityDrain::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho, d = params_[kDiameter];
  const double design = OpenChannelFlow(params_[kDesignFill], b.rho, b.mu), flood = FloodCapacity(b.rho, b.mu);
  const bool floods = q > flood;
  out->items.push_back({"drain_flow", q, Dimension::kVolumeFlow, floods ? "flooding" : "part_full"});
  out->items.push_back({"design_capacity", design, Dimension::kVolumeFlow, ""});
  out->items.push_back({"flood_capacity", flood, Dimension::kVolumeFlow, ""});
  if (!b.for_checks_only) {  // the fill level is shown, never checked: its search is skipped for the checks alone
    const double fill = FillAt(q, b.rho, b.mu);
    out->items.push_back({"fill", std::isnan(fill) ? 1.0 : fill, Dimension::kDimensionless, std::isnan(fill) ? "full" : ""});
  }
  out->items.push_back({"cavity_backpressure", std::max(0.0, b.dp - VentHead(b.rho)), Dimension::kPressureDifference, ""});
  if (floods)
    out->warnings.push_back(fmt::format("housing floods: {:.3g} L/min arrive, the drain carries {:.3g} L/min running full "
                                        "(a larger bore, more fall or thinner oil)", q * 6e4, flood * 6e4));
  if (!(VentHead(b.rho) > 0))
    out->warnings.push_back("the cavity cannot drain by gravity (fall's head plus cavity pressure <= 0): use a scavenge_pump");
  const double dz = (b.dp - (b.p_from - b.p_to)) / (b.rho * kGravity), fall = params_[kFall];
  if (std::abs(dz - fall) > 0.05 * fall)
    out->warnings.push_back(fmt::format("the nodes' elevations differ by {:.3g} m but the drain falls {:.3g} m: the cavity "
                                        "pressure reads off by rho g times the difference (give the nodes the drain's fall)",
                                        dz, fall));
  if (params_[kLength] < 20 * d) out->warnings.push_back("drain shorter than 20 bores: the flow is not uniform (entry reach not modelled)");
  if (Slope() > 0.3) out->warnings.push_back("slope above 0.3: a steep drain runs as a wall film; the open-channel relation is extrapolated");
}

ComponentType GravityDrainType() {
  ComponentType t;
  t.name = "gravity_drain";
  t.summary = "drain from a bearing cavity to the reservoir running part full (open-channel capacity, floods beyond)";
  t.roles = kRoleDrain;
  t.params = {
      Positive("diameter", Dimension::kLength, "bore").Knob(),
      Positive("length", Dimension::kLength, "length along the pipe"),
      Positive("fall", Dimension::kLength, "vertical fall from the cavity outlet to the reservoir (give the nodes this difference)"),
      Num("roughness", Dimension::kLength, "absolute wall roughness", false, 45e-6).Range(0, 0.01),
      Num("design_fill", Dimension::kDimensionless, "design depth over bore (half full: common practice)", false, 0.5)
          .Range(0.05, GravityDrain::kFillOfMostFlow),
      Num("cavity_pressure", Dimension::kPressureDifference, "gas pressure in the cavity above the reservoir's", false, 0.0),
      Num("minor_k", Dimension::kDimensionless, "entry and exit loss coefficient of the full bore", false, 1.5).Range(0, 100),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using G = GravityDrain;
    if (!(v.values[G::kFall] < v.values[G::kLength])) e->push_back({"fall", "fall must be less than the drain's length"});
    if (!e->empty()) return nullptr;
    return std::make_unique<G>(v);
  };
  return t;
}

}  // namespace loopwright
