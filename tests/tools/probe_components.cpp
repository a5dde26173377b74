// lw_probe commands for whole component models built through the registry
// (components/registry.h), so Python reference checks exercise the law the
// network uses, defaults included.
//
//   component.eval TYPE PARAMS_JSON RHO MU DP_LIST M_LIST -> {r}
//       PARAMS_JSON: {"name": SI number, ...} (other parameters take their
//       defaults); r[i] = residual 0 of the law at (DP_LIST[i], M_LIST[i]),
//       internal unknowns 0. For a pressure-kind law r = loss(m) - dp, so
//       r at dp = 0 is the loss; for a flow-kind law r = m/rho - Q(dp).
//   component.describe TYPE PARAMS_JSON RHO MU DP M -> {items: {key: value}, warnings}
//       the component's reported values (Describe) at a branch state with
//       p(from) - p(to) = DP (nodes at one elevation).
#include <stdexcept>
#include <sstream>
#include <string>
#include <vector>

#include "components/registry.h"
#include "tests/tools/probe.h"

namespace loopwright::probe {
namespace {

using nlohmann::json;

std::unique_ptr<Component> MakeComponent(const Args& a) {
  const ComponentType* t = FindComponentType(a[0]);
  if (!t) throw std::runtime_error("unknown component type " + a[0]);
  ParamValues v;
  v.values.assign(t->params.size(), kNoValue);
  v.tables.assign(t->params.size(), {});
  for (size_t i = 0; i < t->params.size(); ++i) v.values[i] = t->params[i].default_si;
  const json given = json::parse(a[1]);
  for (const auto& [name, x] : given.items()) {
    const int i = t->ParamIndex(name);
    if (i < 0 || t->params[i].kind != ParamKind::kNumber) throw std::runtime_error("not a number parameter: " + name);
    v.values[i] = x.get<double>();
  }
  std::vector<ParamError> errors;
  auto c = t->make(v, &errors);
  if (!c) throw std::runtime_error("the factory refused the parameters");
  return c;
}

json ComponentEval(const Args& a) {
  if (a.size() < 6) throw std::runtime_error("component.eval TYPE PARAMS_JSON RHO MU DP_LIST M_LIST");
  auto c = MakeComponent(a);
  const double rho = ArgD(a, 2), mu = ArgD(a, 3);
  const auto dps = ArgList(a, 4), ms = ArgList(a, 5);
  if (dps.size() != ms.size()) throw std::runtime_error("DP_LIST and M_LIST differ in length");
  json r = json::array();
  for (size_t i = 0; i < dps.size(); ++i) {
    double x[kMaxInternal] = {0, 0}, res[1 + kMaxInternal] = {0, 0, 0};
    c->Evaluate(dps[i], ms[i], rho, mu, x, res);
    r.push_back(res[0]);
  }
  return {{"r", r}};
}

json ComponentDescribe(const Args& a) {
  if (a.size() < 6) throw std::runtime_error("component.describe TYPE PARAMS_JSON RHO MU DP M");
  auto c = MakeComponent(a);
  BranchResult b;
  b.rho = ArgD(a, 2);
  b.mu = ArgD(a, 3);
  b.dp = ArgD(a, 4);
  b.m = ArgD(a, 5);
  b.p_from = b.dp;
  ComponentReport rep;
  c->Describe(b, &rep);
  json items = json::object();
  for (const auto& it : rep.items) items[it.key] = it.value;
  return {{"items", items}, {"warnings", rep.warnings}};
}

}  // namespace

LW_PROBE_COMMAND("component.eval", ComponentEval);
LW_PROBE_COMMAND("component.describe", ComponentDescribe);

}  // namespace loopwright::probe
