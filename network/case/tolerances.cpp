// Reading a case's "tolerances" (network/case/tolerances.h) and the
// distributions' arithmetic.
#include "network/case/tolerances.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "library/oil.h"
#include "network/case/case_context.h"

namespace loopwright {

using nlohmann::json;

const std::vector<std::string>& DistributionNames() {
  static const std::vector<std::string> names = {"normal", "uniform", "triangular", "lognormal"};
  return names;
}

double Tolerance::Mean() const {
  switch (dist) {
    case Distribution::kNormal: return a;
    case Distribution::kUniform: return 0.5 * (a + b);
    case Distribution::kTriangular: return (a + b + c) / 3.0;
    case Distribution::kLogNormal: return std::exp(a + 0.5 * b * b);
  }
  return a;
}

double Tolerance::StdDev() const {
  switch (dist) {
    case Distribution::kNormal: return b;
    case Distribution::kUniform: return (b - a) / std::sqrt(12.0);
    case Distribution::kTriangular: return std::sqrt((a * a + b * b + c * c - a * b - a * c - b * c) / 18.0);
    case Distribution::kLogNormal: return Mean() * std::sqrt(std::expm1(b * b));
  }
  return b;
}

double Tolerance::Quantile(double u) const {
  switch (dist) {
    case Distribution::kNormal: return a + b * NormalQuantile(u);
    case Distribution::kUniform: return a + (b - a) * u;
    case Distribution::kTriangular: {  // low a, mode b, high c
      const double fm = (b - a) / (c - a);
      return u < fm ? a + std::sqrt(u * (c - a) * (b - a)) : c - std::sqrt((1 - u) * (c - a) * (c - b));
    }
    case Distribution::kLogNormal: return std::exp(a + b * NormalQuantile(u));
  }
  return a;
}

double NormalCdf(double z) { return 0.5 * std::erfc(-z / std::sqrt(2.0)); }

double NormalQuantile(double p) {
  // Acklam (2003), "An algorithm for computing the inverse normal cumulative
  // distribution function" (relative error 1.15e-9), from memory; then one
  // Halley step on the exact CDF.
  static const double a[] = {-3.969683028665376e+01, 2.209460984245205e+02, -2.759285104469687e+02,
                             1.383577518672690e+02, -3.066479806614716e+01, 2.506628277459239e+00};
  static const double b[] = {-5.447609879822406e+01, 1.615858368580409e+02, -1.556989798598866e+02,
                             6.680131188771972e+01, -1.328068155288572e+01};
  static const double c[] = {-7.784894002430293e-03, -3.223964580411365e-01, -2.400758277161838e+00,
                             -2.549732539343734e+00, 4.374664141464968e+00, 2.938163982698783e+00};
  static const double d[] = {7.784695709041462e-03, 3.224671290700398e-01, 2.445134137142996e+00,
                             3.754408661907416e+00};
  if (!(p > 0)) return -INFINITY;
  if (!(p < 1)) return INFINITY;
  const double pl = 0.02425;
  double x;
  if (p < pl) {
    const double q = std::sqrt(-2 * std::log(p));
    x = (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
        ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  } else if (p <= 1 - pl) {
    const double q = p - 0.5, r = q * q;
    x = (((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q /
        (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1);
  } else {
    const double q = std::sqrt(-2 * std::log(1 - p));
    x = -(((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
        ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  }
  const double e = NormalCdf(x) - p;
  const double u = e * std::sqrt(2 * M_PI) * std::exp(0.5 * x * x);
  return x - u / (1 + 0.5 * x * u);
}

bool CholeskyLower(const std::vector<double>& a, size_t n, std::vector<double>* l) {
  l->assign(n * n, 0.0);
  for (size_t j = 0; j < n; ++j) {
    double s = a[j * n + j];
    for (size_t k = 0; k < j; ++k) s -= (*l)[j * n + k] * (*l)[j * n + k];
    if (!(s > 1e-12)) return false;
    (*l)[j * n + j] = std::sqrt(s);
    for (size_t i = j + 1; i < n; ++i) {
      double t = a[i * n + j];
      for (size_t k = 0; k < j; ++k) t -= (*l)[i * n + k] * (*l)[j * n + k];
      (*l)[i * n + j] = t / (*l)[j * n + j];
    }
  }
  return true;
}

namespace {

// "fluid.kv40" / "fluid.kv100" of an oil into t (a binding is added for an
// oil the envelope does not bind). False when `name` names no fluid.
bool ResolveFluidAnchor(const std::string& name, const std::string& ptr, CaseContext& c, Case& cs, Tolerance* t) {
  const size_t dot = name.rfind('.');
  if (dot == std::string::npos || !cs.fluids.count(name.substr(0, dot))) return false;
  const std::string fid = name.substr(0, dot), which = name.substr(dot + 1);
  auto oil = std::dynamic_pointer_cast<const OilFluid>(cs.fluids[fid]);
  if (which != "kv40" && which != "kv100") {
    c.diag.Error("unknown-reference", ptr, fmt::format("a fluid's tolerance is on \"{}.kv40\" or \"{}.kv100\", got \"{}\"",
                                                       fid, fid, name));
    return true;
  }
  if (!oil) {
    c.diag.Error("unknown-reference", ptr, fmt::format("fluid \"{}\" is no oil: only an oil's kv40 and kv100 may carry a tolerance", fid));
    return true;
  }
  t->anchor = which == "kv40" ? 0 : 1;
  for (size_t i = 0; i < cs.fluid_bindings.size(); ++i)
    if (cs.fluid_bindings[i].fluid_id == fid) t->fluid = static_cast<int>(i);
  if (t->fluid < 0) {
    FluidBinding fb;
    fb.fluid_id = fid;
    fb.oil = oil;
    fb.kv40 = oil->KinematicViscosity(313.15);
    fb.kv100 = oil->KinematicViscosity(373.15);
    cs.fluid_bindings.push_back(fb);
    t->fluid = static_cast<int>(cs.fluid_bindings.size()) - 1;
  }
  const FluidBinding& fb = cs.fluid_bindings[t->fluid];
  if ((t->anchor == 0 ? fb.kv40_var : fb.kv100_var) >= 0) {
    c.diag.Error("not-a-knob", ptr, fmt::format("\"{}\" is bound to an envelope variable; a tolerance needs a fixed value", name));
    t->fluid = -1;
    return true;
  }
  t->nominal = t->anchor == 0 ? fb.kv40 : fb.kv100;
  t->dim = Dimension::kKinematicViscosity;
  t->lo = 0;
  t->lo_exclusive = true;
  return true;
}

// A component parameter or coupling conductance into t; false (reported)
// when it cannot carry a tolerance.
bool ResolveParameter(const std::string& name, const std::string& ptr, CaseContext& c, const Case& cs, Tolerance* t) {
  KnobRef r;
  if (!ResolveKnobName(name, ptr, false, c, cs, &r)) return false;
  if (r.coupling >= 0) {
    t->coupling = r.coupling;
    t->dim = Dimension::kConductance;
    t->nominal = cs.couplings[r.coupling].conductance;
    t->lo = 0;
    t->lo_exclusive = true;
    return true;
  }
  if (r.param < 0) {
    c.diag.Error("unknown-reference", ptr, fmt::format("\"{}\" names a component; a tolerance is on one of its parameters "
                                                       "(\"{}.PARAMETER\")", name, name));
    return false;
  }
  const ComponentSpec& comp = cs.loops[r.loop].components[r.comp];
  const ParamSpec& ps = comp.type_info->params[r.param];
  for (const Binding& b : comp.bindings())
    if (b.param == r.param) {
      c.diag.Error("not-a-knob", ptr, fmt::format("\"{}\" is bound to an envelope variable; a tolerance needs a fixed value", name));
      return false;
    }
  if (ps.kind != ParamKind::kNumber || std::isnan(comp.model->params()[r.param])) {
    c.diag.Error("wrong-type", ptr, fmt::format("\"{}\" is {}; a tolerance is on a number the case gives", name,
                                                  ps.kind != ParamKind::kNumber ? "not a number" : "not given"));
    return false;
  }
  t->loop = r.loop;
  t->comp = r.comp;
  t->param = r.param;
  t->dim = ps.dim;
  t->nominal = comp.model->params()[r.param];
  t->lo = ps.min_si;
  t->hi = ps.max_si;
  t->lo_exclusive = ps.min_exclusive;
  return true;
}

// A field of a distribution: a quantity of the tolerance's dimension (a
// spread of a temperature reads as a difference), or a plain number.
bool Field(const json& o, const char* key, const std::string& ptr, Dimension dim, CaseContext& c, double* out,
           bool required = true) {
  if (!o.contains(key)) {
    if (required) c.diag.Error("missing-field", ptr, fmt::format("missing required field \"{}\"", key));
    return false;
  }
  return c.ReadQuantity(o[key], ptr + "/" + key, dim, out);
}

Dimension SpreadDim(Dimension d) {
  if (d == Dimension::kTemperature) return Dimension::kTemperatureDifference;
  if (d == Dimension::kPressure) return Dimension::kPressureDifference;
  return d;
}

bool ReadNormal(const json& o, const std::string& p, CaseContext& c, Tolerance* t) {
  c.UnknownKeys(o, p, {"distribution", "mean", "sd", "band", "coverage"});
  t->a = t->nominal;
  if (o.contains("mean") && !Field(o, "mean", p, t->dim, c, &t->a)) return false;
  if (o.contains("sd") == o.contains("band")) {
    c.diag.Error("missing-field", p, "a normal tolerance needs \"sd\", or \"band\" (the half-width of a +- band) with "
                                     "its \"coverage\" (e.g. 0.95)");
    return false;
  }
  if (o.contains("sd")) return Field(o, "sd", p, SpreadDim(t->dim), c, &t->b);
  double band = 0, coverage = 0;
  if (!Field(o, "band", p, SpreadDim(t->dim), c, &band)) return false;
  if (!Field(o, "coverage", p, Dimension::kDimensionless, c, &coverage)) return false;
  if (!(coverage > 0 && coverage < 1)) {
    c.diag.Error("out-of-range", p + "/coverage",
                 fmt::format("expected a fraction of parts inside the band, 0 < coverage < 1 (0.95, 0.9973), got {}", coverage));
    return false;
  }
  t->b = band / NormalQuantile(0.5 * (1 + coverage));
  return true;
}

bool ReadUniform(const json& o, const std::string& p, CaseContext& c, Tolerance* t) {
  c.UnknownKeys(o, p, {"distribution", "low", "high", "half_width"});
  if (o.contains("half_width")) {
    double h = 0;
    if (!Field(o, "half_width", p, SpreadDim(t->dim), c, &h)) return false;
    t->a = t->nominal - h;
    t->b = t->nominal + h;
    return true;
  }
  return Field(o, "low", p, t->dim, c, &t->a) & Field(o, "high", p, t->dim, c, &t->b);
}

bool ReadTriangular(const json& o, const std::string& p, CaseContext& c, Tolerance* t) {
  c.UnknownKeys(o, p, {"distribution", "low", "mode", "high"});
  t->b = t->nominal;
  if (o.contains("mode") && !Field(o, "mode", p, t->dim, c, &t->b)) return false;
  if (!(Field(o, "low", p, t->dim, c, &t->a) & Field(o, "high", p, t->dim, c, &t->c))) return false;
  if (!(t->a <= t->b && t->b <= t->c)) {
    const std::string u = SiUnit(t->dim);
    c.diag.Error("out-of-range", p,
                 fmt::format("a triangular tolerance needs low <= mode <= high; got low {:.6g} {}, mode {:.6g} {} ({}), "
                             "high {:.6g} {}", t->a, u, t->b, u, o.contains("mode") ? "given" : "the case's value",
                             t->c, u));
    return false;
  }
  return true;
}

bool ReadLogNormal(const json& o, const std::string& p, CaseContext& c, Tolerance* t) {
  c.UnknownKeys(o, p, {"distribution", "median", "sd_log"});
  double median = t->nominal;
  if (o.contains("median") && !Field(o, "median", p, t->dim, c, &median)) return false;
  if (!(median > 0)) {
    c.diag.Error("out-of-range", p + (o.contains("median") ? "/median" : ""),
                 fmt::format("a log-normal tolerance needs a positive median, got {}", median));
    return false;
  }
  t->a = std::log(median);
  return Field(o, "sd_log", p, Dimension::kDimensionless, c, &t->b);
}

// The spread must be positive and the values drawn (within 5 standard
// deviations for the unbounded ones) must lie in the parameter's range.
void CheckSpread(const std::string& p, CaseContext& c, Tolerance* t) {
  const bool two = t->dist == Distribution::kNormal || t->dist == Distribution::kLogNormal;
  const double width = two ? t->b : (t->dist == Distribution::kUniform ? t->b - t->a : t->c - t->a);
  if (!(width > 0)) {
    c.diag.Error("out-of-range", p, fmt::format("the {} tolerance of \"{}\" has no spread ({}); give a positive one",
                                                DistributionNames()[static_cast<int>(t->dist)], t->name,
                                                two ? "sd / sd_log" : "high - low"));
    return;
  }
  double lo = t->Quantile(0.0), hi = t->Quantile(1.0);
  if (two) {
    lo = t->Quantile(NormalCdf(-5));
    hi = t->Quantile(NormalCdf(5));
  }
  if (!t->Accepts(lo) || !t->Accepts(hi))
    c.diag.Error("out-of-range", p,
                 fmt::format("the tolerance of \"{}\" reaches {:.6g} ... {:.6g} (SI{}), outside what the parameter "
                             "accepts ({}{:.6g} ... {:.6g})", t->name, lo, hi, two ? ", 5 standard deviations" : "",
                             t->lo_exclusive ? "> " : "", t->lo, t->hi));
}

void ReadOne(const std::string& name, const json& o, const std::string& p, CaseContext& c, Case& cs) {
  Tolerance t;
  t.name = name;
  t.pointer = p;
  if (!ResolveFluidAnchor(name, p, c, cs, &t) && !ResolveParameter(name, p, c, cs, &t)) return;
  if (t.fluid < 0 && t.param < 0 && t.coupling < 0) return;  // a fluid reported already
  if (!o.is_object() || !o.contains("distribution") || !o["distribution"].is_string()) {
    c.diag.Error(o.is_object() ? "missing-field" : "wrong-type", p,
                 "expected {\"distribution\": \"normal\" | \"uniform\" | \"triangular\" | \"lognormal\", ...}");
    return;
  }
  const std::string d = o["distribution"].get<std::string>();
  const auto& names = DistributionNames();
  const auto it = std::find(names.begin(), names.end(), d);
  if (it == names.end()) {
    const std::string near = NearestName(d, names);
    c.diag.Error("unknown-choice", p + "/distribution",
                 fmt::format("unknown distribution \"{}\"{}; one of normal, uniform, triangular, lognormal", d,
                             near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near)));
    return;
  }
  t.dist = static_cast<Distribution>(it - names.begin());
  bool ok = false;
  switch (t.dist) {
    case Distribution::kNormal: ok = ReadNormal(o, p, c, &t); break;
    case Distribution::kUniform: ok = ReadUniform(o, p, c, &t); break;
    case Distribution::kTriangular: ok = ReadTriangular(o, p, c, &t); break;
    case Distribution::kLogNormal: ok = ReadLogNormal(o, p, c, &t); break;
  }
  if (!ok) return;
  CheckSpread(p, c, &t);
  cs.tolerances.items.push_back(t);
}

int FindTolerance(const ToleranceSet& set, const std::string& name) {
  for (size_t i = 0; i < set.items.size(); ++i)
    if (set.items[i].name == name) return static_cast<int>(i);
  return -1;
}

void ReadCorrelation(const json& e, const std::string& p, CaseContext& c, ToleranceSet* set) {
  if (!e.is_object()) {
    c.diag.Error("wrong-type", p, "expected {\"between\": [name, name], \"coefficient\": r}, got " + TypeName(e));
    return;
  }
  c.UnknownKeys(e, p, {"between", "coefficient"});
  if (!e.contains("between") || !e["between"].is_array() || e["between"].size() != 2 || !e["between"][0].is_string() ||
      !e["between"][1].is_string()) {
    c.diag.Error("wrong-type", p + "/between", "expected two tolerance names, [\"loop/component.parameter\", ...]");
    return;
  }
  int idx[2];
  std::vector<std::string> known;
  for (const Tolerance& t : set->items) known.push_back(t.name);
  for (int k = 0; k < 2; ++k) {
    const std::string n = e["between"][k].get<std::string>();
    idx[k] = FindTolerance(*set, n);
    if (idx[k] < 0) {
      const std::string near = NearestName(n, known);
      c.diag.Error("unknown-reference", p + "/between/" + std::to_string(k),
                   fmt::format("no tolerance \"{}\" in /tolerances/parameters{}", n,
                               near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
    }
  }
  double r = 0;
  if (!e.contains("coefficient") || !e["coefficient"].is_number()) {
    c.diag.Error("missing-field", p + "/coefficient", "expected a correlation coefficient, a number in (-1, 1)");
    return;
  }
  r = e["coefficient"].get<double>();
  if (!(r > -1 && r < 1)) {
    c.diag.Error("out-of-range", p + "/coefficient", fmt::format("expected -1 < coefficient < 1, got {}", r));
    return;
  }
  if (idx[0] < 0 || idx[1] < 0) return;
  if (idx[0] == idx[1]) {
    c.diag.Error("out-of-range", p + "/between", "a tolerance is not correlated with itself");
    return;
  }
  const size_t n = set->items.size();
  set->correlation[idx[0] * n + idx[1]] = set->correlation[idx[1] * n + idx[0]] = r;
}

}  // namespace

void ReadTolerances(const json& doc, CaseContext& c, Case& cs) {
  if (!doc.contains("tolerances")) return;
  const json& t = doc["tolerances"];
  if (!t.is_object() || !t.contains("parameters") || !t["parameters"].is_object()) {
    c.diag.Error("wrong-type", "/tolerances", "expected {\"parameters\": {name: distribution}, \"correlations\": [...]}");
    return;
  }
  c.UnknownKeys(t, "/tolerances", {"parameters", "correlations"});
  for (auto it = t["parameters"].begin(); it != t["parameters"].end(); ++it)
    ReadOne(it.key(), it.value(), "/tolerances/parameters/" + PointerToken(it.key()), c, cs);
  ToleranceSet& set = cs.tolerances;
  const size_t n = set.items.size();
  set.correlation.assign(n * n, 0.0);
  for (size_t i = 0; i < n; ++i) set.correlation[i * n + i] = 1.0;
  if (t.contains("correlations")) {
    const json& cj = t["correlations"];
    if (!cj.is_array()) {
      c.diag.Error("wrong-type", "/tolerances/correlations", "expected an array of {\"between\": [a, b], \"coefficient\": r}");
      return;
    }
    for (size_t i = 0; i < cj.size(); ++i) ReadCorrelation(cj[i], "/tolerances/correlations/" + std::to_string(i), c, &set);
  }
  if (!CholeskyLower(set.correlation, n, &set.cholesky))
    c.diag.Error("out-of-range", "/tolerances/correlations",
                 "the correlation coefficients do not make a valid correlation matrix (not positive definite): "
                 "weaken the largest ones");
}

}  // namespace loopwright
