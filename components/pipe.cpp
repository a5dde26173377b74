#include "components/pipe.h"

#include <algorithm>
#include <set>

#include <fmt/format.h>

#include "components/correlations/fittings.h"

namespace loopwright {

namespace {

std::vector<std::string> FittingNames() {
  std::set<std::string> names;
  for (const auto& e : kHooperFittings) names.insert(e.name);
  for (const auto& e : kDarbyFittings) names.insert(e.name);
  for (const auto& e : kConstantKFittings) names.insert(e.name);
  return {names.begin(), names.end()};
}

}  // namespace

Pipe::Pipe(const ParamValues& v) {
  params_ = v.values;
  method_ = static_cast<FrictionMethod>(static_cast<int>(params_[kFriction]));
  // Inertial K split by how it depends on the bore, so a diameter changed
  // after construction (an envelope binding, a design knob) acts at once:
  // Hooper K_inf (1 + 1 in / D), Darby K_i (1 + K_d / D_in^0.3). minor_k
  // (bindable) is read from params_ by InertialK, not folded in here.
  auto hooper = [&](double count, double k1, double k_inf) {
    k1_sum_ += count * k1;
    k_constant_ += count * k_inf;
    k_hooper_ += count * k_inf;
  };
  auto darby = [&](double count, double k1, double k_i, double k_d) {
    k1_sum_ += count * k1;
    k_constant_ += count * k_i;
    k_darby_ += count * k_i * k_d;
  };
  for (const auto& row : v.tables[kHooper]) hooper(row[0], row[1], row[2]);
  for (const auto& row : v.tables[kDarby]) darby(row[0], row[1], row[2], row[3]);
  static const std::vector<std::string> names = FittingNames();
  const bool use_darby = params_[kFittingMethod] == 1.0;
  for (const auto& row : v.tables[kFittings]) {
    const std::string& name = names[static_cast<size_t>(row[0])];
    if (const auto* c = FindConstantKFitting(name)) {
      k_constant_ += c->k;
    } else if (use_darby) {
      const auto* d = FindDarbyFitting(name);
      darby(1.0, d->k1, d->k_i, d->k_d);
    } else {
      const auto* h = FindHooperFitting(name);
      hooper(1.0, h->k1, h->k_inf);
    }
  }
}

LinearGuess Pipe::Linearize(double rho, double mu) const {
  // Hagen-Poiseuille: m = rho pi D^4 / (128 mu L) dp, with the K1 terms as
  // extra length.
  const double L = params_[kLength], D = params_[kDiameter];
  const double l_eq = L + k1_sum_ * D / 64.0;
  LinearGuess g;
  g.g = rho * M_PI * std::pow(D, 4) / (128.0 * mu * l_eq);
  return g;
}

void Pipe::Describe(const BranchResult& b, ComponentReport* out) const {
  const double L = params_[kLength], D = params_[kDiameter];
  const double area = 0.25 * M_PI * D * D;
  const double v = b.m / (b.rho * area);
  const double re = b.rho * std::abs(v) * D / b.mu;
  const double f = re > 0 ? FrictionFactor(method_, re, params_[kRoughness] / D, params_[kDarcyF]) : 0.0;
  const bool at_switch = method_ == FrictionMethod::kLaminarColebrook && AtLaminarColebrookSwitch(re);
  std::string regime = at_switch ? "at_switch" : re < 2300 ? "laminar" : re < 4000 ? "transitional" : "turbulent";
  out->items.push_back({"velocity", v, Dimension::kVelocity, ""});
  out->items.push_back({"reynolds", re, Dimension::kDimensionless, regime});
  out->items.push_back({"darcy_friction_factor", f, Dimension::kDimensionless, FrictionMethodName(method_)});
  if (L / D < 10)
    out->warnings.push_back(fmt::format("L/D = {:.3g} is below 10: entrance effects are not modelled", L / D));
  if (method_ == FrictionMethod::kColebrook && re < 2300 && re > 0)
    out->warnings.push_back(fmt::format("Re = {:.0f}: Colebrook-White is a turbulent law, used here below Re 2300", re));
  if (at_switch)
    out->warnings.push_back(
        "Re = 2300: on the laminar/turbulent switch; the line carries the switch flow and its drop lies "
        "between the laminar and the turbulent value (the switch's filled graph)");
  else if (method_ == FrictionMethod::kLaminarColebrook && re >= 2300 && re < 4000)
    out->warnings.push_back(fmt::format("Re = {:.0f} is transitional: the friction factor there is a convention", re));
  if (params_[kRoughness] / D > 0.05)
    out->warnings.push_back("relative roughness above 0.05 is outside the friction correlations' range");
}

ComponentType PipeType(const std::string& name, double default_roughness, const std::string& summary) {
  ComponentType t;
  t.name = name;
  t.summary = summary;
  t.roles = kRoleLine;
  t.params = {
      Positive("length", Dimension::kLength, "line length"),
      Positive("diameter", Dimension::kLength, "inside bore diameter").Knob(),
      Num("roughness", Dimension::kLength, "absolute wall roughness", false, default_roughness).Min(0),
      Choice("friction", {"churchill_1977", "colebrook_1939", "laminar_colebrook", "fixed"},
             "Darcy friction factor method", 0),
      Num("darcy_f", Dimension::kDimensionless, "fixed Darcy friction factor (friction = fixed)", false, 0.02).Min(0, true),
      Num("minor_k", Dimension::kDimensionless, "sum of constant loss coefficients K", false, 0.0).Min(0),
      NameList("fittings", FittingNames(), "standard fittings by name (constants from Hooper 1981 / Darby 2001)"),
      Choice("fitting_method", {"hooper_2k", "darby_3k"}, "method for named fittings", 0),
      Table("hooper_fittings", {{"count", Dimension::kDimensionless}, {"k1", Dimension::kDimensionless},
                                {"k_inf", Dimension::kDimensionless}},
            1, "2-K fittings (Hooper 1981): rows [count, K1, K_inf]", false),
      Table("darby_fittings", {{"count", Dimension::kDimensionless}, {"k1", Dimension::kDimensionless},
                               {"k_i", Dimension::kDimensionless}, {"k_d", Dimension::kDimensionless}},
            1, "3-K fittings (Darby 2001): rows [count, K1, K_i, K_d]", false),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* errors) -> std::unique_ptr<Component> {
    const double D = v.values[Pipe::kDiameter];
    if (v.values[Pipe::kRoughness] >= D)
      errors->push_back({"roughness", "roughness must be smaller than the diameter"});
    if (v.values[Pipe::kFittingMethod] == 1.0) {
      static const std::vector<std::string> names = FittingNames();
      for (size_t i = 0; i < v.tables[Pipe::kFittings].size(); ++i) {
        const std::string& n = names[static_cast<size_t>(v.tables[Pipe::kFittings][i][0])];
        if (!FindDarbyFitting(n) && !FindConstantKFitting(n))
          errors->push_back({"fittings/" + std::to_string(i), fmt::format("\"{}\" has no Darby 3-K constants; use fitting_method hooper_2k", n)});
      }
    } else {
      static const std::vector<std::string> names = FittingNames();
      for (size_t i = 0; i < v.tables[Pipe::kFittings].size(); ++i) {
        const std::string& n = names[static_cast<size_t>(v.tables[Pipe::kFittings][i][0])];
        if (!FindHooperFitting(n) && !FindConstantKFitting(n))
          errors->push_back({"fittings/" + std::to_string(i), fmt::format("\"{}\" has no Hooper 2-K constants; use fitting_method darby_3k", n)});
      }
    }
    if (!errors->empty()) return nullptr;
    return std::make_unique<Pipe>(v);
  };
  return t;
}

}  // namespace loopwright
