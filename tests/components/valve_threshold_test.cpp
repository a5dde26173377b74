// One open/closed threshold for every valve that must stay shut (a relief
// valve, a displacement pump's internal relief, a filter's bypass):
// components/component.h documents it as 1e-3 of the valve's flow at full
// open (kValveOpenFraction). Each component is driven through its own law to
// the pressure at which its valve passes 1e-3 of the full-open flow given in
// its parameters (the scale comes from the test, not from the code), then
// described just below and just above that pressure (1e-4 of the crack-to-
// full-open band either side: the flow moves by about 0.5 %, so a threshold
// off by more than that, or on another scale such as the total flow, fails):
// closed below and open above, for all three, in the typed state the checks
// read and in the labels people read. Parameter values are invented.
#include <doctest/doctest.h>

#include <cmath>
#include <functional>
#include <map>
#include <memory>
#include <string>

#include "components/component.h"
#include "components/registry.h"

namespace loopwright {
namespace {

constexpr double kLpm = 1.0 / 60000.0;  // 1 L/min [m3/s]
constexpr double kRho = 870.0, kMu = 0.028;  // an oil state [kg/m3], [Pa s]

std::unique_ptr<Component> Build(const std::string& type, const std::map<std::string, double>& given) {
  const ComponentType* t = FindComponentType(type);
  REQUIRE(t != nullptr);
  ParamValues v;
  v.tables.assign(t->params.size(), {});
  for (const auto& p : t->params) v.values.push_back(p.default_si);
  for (const auto& [name, x] : given) {
    const int i = t->ParamIndex(name);
    REQUIRE_MESSAGE(i >= 0, name);
    v.values[i] = x;
  }
  std::vector<ParamError> errors;
  auto c = t->make(v, &errors);
  REQUIRE(c != nullptr);
  return c;
}

// One valve: its component, the flow through the valve at a pressure its
// spring sees (through the law's residuals), the branch state Describe gets
// at that pressure, and the report item carrying its label.
struct ValveCase {
  std::string label;
  std::unique_ptr<Component> c;
  double crack, full_open, full_flow;  // as given in the parameters
  std::function<double(const Component&, double)> flow;
  std::function<BranchResult(double)> state;
  std::string item;      // the report item with the label
  std::string open_text;  // its label when open
};

double ReliefFlowOfLaw(const Component& c, double p) {
  double r = 0;
  c.Evaluate(p, 0.0, kRho, kMu, nullptr, &r);  // r = Q - Q_valve at Q = 0
  return -r;
}

double PumpReliefOfLaw(const Component& c, double geometric, double rise) {
  double r = 0;
  c.Evaluate(-rise, 0.0, kRho, kMu, nullptr, &r);  // r = -(Q_g - Q_relief), no slip
  return geometric + r;
}

double BypassOfLaw(const Component& c, double x) {
  // r1 = Q - x/(a mu c) - Q_b(x) at Q = 0; at mu and 2 mu the element term
  // halves, so r1(mu) - 2 r1(2 mu) = Q_b(x).
  double r[2], r2[2];
  c.Evaluate(x, 0.0, kRho, kMu, &x, r);
  c.Evaluate(x, 0.0, kRho, 2 * kMu, &x, r2);
  return r[1] - 2 * r2[1];
}

std::vector<ValveCase> Valves() {
  std::vector<ValveCase> v;
  {
    ValveCase k{"relief_valve", Build("relief_valve", {{"crack", 6e5}, {"full_open", 7e5}, {"rated_flow", 40 * kLpm}}),
                6e5, 7e5, 40 * kLpm};
    k.flow = ReliefFlowOfLaw;
    const Component* c = k.c.get();
    k.state = [c](double p) {
      BranchResult b;
      b.dp = p;
      b.rho = kRho;
      b.mu = kMu;
      b.m = kRho * ReliefFlowOfLaw(*c, p);
      return b;
    };
    k.item = "relief_flow";
    k.open_text = "lifting";
    v.push_back(std::move(k));
  }
  {
    const double geometric = 16e-6 * 1450 / 60;  // 16 cm3/rev at 1450 rpm [m3/s]
    ValveCase k{"displacement_pump internal relief",
                Build("displacement_pump", {{"displacement", 16e-6}, {"speed", 1450 * 2 * M_PI / 60},
                                            {"relief_crack", 8e5}, {"relief_full", 9.6e5}, {"relief_flow", 25 * kLpm}}),
                8e5, 9.6e5, 25 * kLpm};
    k.flow = [geometric](const Component& c, double rise) { return PumpReliefOfLaw(c, geometric, rise); };
    k.state = [geometric](double rise) {
      BranchResult b;
      b.dp = -rise;
      b.rho = kRho;
      b.mu = kMu;
      b.m = kRho * geometric;
      return b;
    };
    k.item = "relief_flow";
    k.open_text = "lifting";
    v.push_back(std::move(k));
  }
  {
    ValveCase k{"filter bypass",
                Build("filter", {{"rated_flow", 60 * kLpm}, {"element_dp", 0.3e5}, {"rated_viscosity", 32e-6},
                                 {"bypass_crack", 1.7e5}, {"bypass_full", 2.2e5}, {"bypass_flow", 30 * kLpm}}),
                1.7e5, 2.2e5, 30 * kLpm};
    k.flow = BypassOfLaw;
    k.state = [](double x) {
      BranchResult b;
      b.dp = x;  // no housing loss
      b.x[0] = x;
      b.rho = kRho;
      b.mu = kMu;
      b.m = kRho * 300 * kLpm;  // a total flow ten times the bypass's full-open flow
      return b;
    };
    k.item = "bypass_fraction";
    k.open_text = "open";
    v.push_back(std::move(k));
  }
  return v;
}

const ReportItem* ItemOf(const ComponentReport& r, const std::string& key) {
  for (const auto& it : r.items)
    if (it.key == key) return &it;
  return nullptr;
}

TEST_CASE("one open/closed threshold: relief valve, pump internal relief and filter bypass agree") {
  CHECK(kValveOpenFraction == 1e-3);  // the value components/component.h and DEVELOPERS.md document
  for (ValveCase& k : Valves()) {
    CAPTURE(k.label);
    // Bisection on the law's valve flow for 1e-3 of the full-open flow.
    const double target = 1e-3 * k.full_flow;
    double lo = 0.5 * k.crack, hi = k.full_open;
    REQUIRE(k.flow(*k.c, lo) < target);
    REQUIRE(k.flow(*k.c, hi) > target);
    for (int i = 0; i < 200; ++i) {
      const double mid = 0.5 * (lo + hi);
      (k.flow(*k.c, mid) < target ? lo : hi) = mid;
    }
    const double at = 0.5 * (lo + hi), step = 1e-4 * (k.full_open - k.crack);
    for (const double p : {at - step, at + step}) {
      const bool above = p > at;
      CAPTURE(p);
      ComponentReport rep;
      k.c->Describe(k.state(p), &rep);
      CHECK(rep.valve.kind != ValveKind::kNone);
      CHECK(rep.valve.pressure == p);
      CHECK(rep.valve.crack == k.crack);
      CHECK(rep.valve.full_flow == k.full_flow);
      CHECK(rep.valve.Open() == above);
      const ReportItem* item = ItemOf(rep, k.item);
      REQUIRE(item != nullptr);
      CHECK(item->text == (above ? k.open_text : std::string("closed")));
    }
  }
}

}  // namespace
}  // namespace loopwright
