// Every bound parameter acts (issue 10, item 3).
//
// The network changes a component's parameters after it is built: an
// envelope binding ("$variable") or a design knob (sizing, fixes,
// sensitivities) writes the new SI value into params() before each point
// (network/point/run.cpp ApplyPoint). A model that derived coefficients from its
// parameters at construction and kept them silently ignored such changes
// (datasheet_loss rated_dp, air_cooler rated_heat, pipe minor_k).
//
// The property, for every registered component type and every bindable
// number parameter, driven by the registry (ComponentTypes() and each
// type's ParamSpec list) over the shared property list
// (tests/components/component_entries.h):
//   component A: built from the entry's values, then params()[i] = v'
//                (as the network sets a binding);
//   component B: built from the entry's values with v' written in place;
//   A and B give the same residuals (a grid of dp, m, rho, mu and internal
//   unknowns, including the cracking points), the same linearised guess, the
//   same heat (HeatAdded) and the same report (Describe items and warnings).
// The expected value is B, an independent construction from the written
// value, so the test fails for any model that caches a derived quantity.
// A second test checks coverage: every bindable number parameter of every
// type is present in some entry, and changing it changes the law, the heat
// or the report somewhere (except the listed limits read only by the
// network's checks), so a parameter can neither be missed nor be inert.
#include <doctest/doctest.h>

#include <cmath>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "components/component.h"
#include "components/registry.h"
#include "tests/components/component_entries.h"

namespace loopwright {
namespace {

using namespace component_entries;  // NOLINT: the shared property list

// Parameters the component only carries for the network's checks (read by
// network/envelope/checks.cpp from params()); they change no law, heat or report.
const std::map<std::string, std::string> kCheckOnly = {
    {"flow_min", "a limit for the bearing_flow_min check"},
    {"flow_max", "a limit for the bearing_flow_max check"},
};

// Everything a component tells the network, at a grid of states.
struct Observed {
  std::vector<double> values;
  std::vector<std::string> labels;
  void Add(double v, const std::string& label) {
    values.push_back(v);
    labels.push_back(label);
  }
};

Observed Observe(const Component& c, const Entry& e) {
  Observed o;
  std::vector<double> dps = {-2 * e.dp_nom, -e.dp_nom, -0.3 * e.dp_nom, 0.0, 0.3 * e.dp_nom, e.dp_nom, 2 * e.dp_nom};
  for (double d : e.dp_extra) dps.push_back(d);
  const std::vector<double> ms = {-e.m_nom, -0.1 * e.m_nom, 0.0, 0.1 * e.m_nom, e.m_nom, 2 * e.m_nom};
  for (double rho : {870.0, 1000.0}) {
    for (double mu : {1e-3, 0.03, 0.3}) {  // water-like (turbulent lines) to cold oil
      const LinearGuess g = c.Linearize(rho, mu);
      o.Add(g.g, "Linearize g");
      o.Add(g.m0, "Linearize m0");
      for (double dp : dps) {
        for (double m : ms) {
          for (double xv : {0.0, 0.4 * e.dp_nom, 1.5 * e.dp_nom}) {
            double x[kMaxInternal] = {xv, 0.0}, r[1 + kMaxInternal] = {0, 0, 0};
            c.Evaluate(dp, m, rho, mu, x, r);
            for (int k = 0; k <= c.NumInternal(); ++k) {
              std::ostringstream l;
              l << "residual " << k << " at dp=" << dp << " m=" << m << " rho=" << rho << " mu=" << mu << " x=" << xv;
              o.Add(r[k], l.str());
            }
            for (double p_out : e.p_out_extra) {  // a law that reads its outlet, at the entry's outlets
              c.EvaluateSensed(dp, p_out, m, rho, mu, x, r);
              std::ostringstream l;
              l << "residual 0 at dp=" << dp << " p_out=" << p_out << " m=" << m << " rho=" << rho << " mu=" << mu;
              o.Add(r[0], l.str());
            }
            if (c.NumInternal() == 0) break;
          }
          HeatInputs hin;
          hin.m = m;
          hin.dp = dp;
          hin.t_in = HeatJet(330.0, 0);
          hin.rho = HeatJet(rho);
          hin.cp = HeatJet(2000.0);
          hin.mu = HeatJet(mu);
          const HeatJet h = c.HeatAdded(hin);
          o.Add(h.a, "HeatAdded at dp=" + std::to_string(dp) + " m=" + std::to_string(m));
          o.Add(h.v[0], "dHeatAdded/dT at dp=" + std::to_string(dp) + " m=" + std::to_string(m));
        }
      }
      for (double m : {0.5 * e.m_nom, e.m_nom}) {
        BranchResult b;
        b.dp = e.dp_nom;
        b.m = m;
        b.rho = rho;
        b.mu = mu;
        b.p_from = 2 * e.dp_nom;
        b.p_to = e.dp_nom;
        b.x[0] = 0.5 * e.dp_nom;
        b.t_in = 330.0;
        b.cp = 2000.0;
        b.heat = 100.0;
        b.thermal = true;
        ComponentReport rep;
        c.Describe(b, &rep);
        for (const auto& it : rep.items) o.Add(it.value, "Describe " + it.key);
        o.Add(static_cast<double>(rep.warnings.size()), "Describe warning count");
        o.Add(rep.shaft_power_W, "Describe shaft power");
      }
    }
  }
  return o;
}

// Values to try for a parameter now at v: near it first, inside the spec's range.
std::vector<double> Candidates(const ParamSpec& s, double v) {
  std::vector<double> c;
  if (v != 0) {
    for (double f : {1.1, 0.9, 1.3, 0.7, 2.0, 0.5}) c.push_back(f * v);
  } else {
    for (double a : {1e-3, 0.1, 1.0, 100.0}) c.push_back(a);
  }
  std::vector<double> ok;
  for (double x : c) {
    const bool above = s.min_exclusive ? x > s.min_si : x >= s.min_si;
    if (above && x <= s.max_si) ok.push_back(x);
  }
  return ok;
}

std::unique_ptr<Component> MakeFrom(const ComponentType& t, const ParamValues& v) {
  std::vector<ParamError> errors;
  return t.make(v, &errors);
}

// Compares two observations; returns the first difference beyond rounding.
bool Same(const Observed& a, const Observed& b, std::string* where) {
  if (a.values.size() != b.values.size()) {
    *where = "different number of observed values (report items or internal unknowns differ)";
    return false;
  }
  for (size_t k = 0; k < a.values.size(); ++k) {
    const double x = a.values[k], y = b.values[k];
    if (std::isnan(x) && std::isnan(y)) continue;
    if (!(std::fabs(x - y) <= 1e-12 * std::max(std::fabs(x), std::fabs(y)) + 1e-300)) {
      std::ostringstream o;
      o.precision(15);
      o << a.labels[k] << ": through params() " << x << ", written " << y;
      *where = o.str();
      return false;
    }
  }
  return true;
}

struct ParamKey {
  std::string type, param;
  bool operator<(const ParamKey& o) const { return type != o.type ? type < o.type : param < o.param; }
};

TEST_CASE("a parameter changed through params() acts exactly as the same value written in the case") {
  std::map<ParamKey, bool> acts;  // seen present; acting somewhere
  int compared = 0;
  for (const auto& e : AllEntries()) {
    const ComponentType* t = FindComponentType(e.type);
    REQUIRE(t != nullptr);
    const ParamValues base = BuildValues(*t, e);
    const auto ref = MakeFrom(*t, base);
    REQUIRE_MESSAGE(ref != nullptr, e.label);
    const Observed before = Observe(*ref, e);
    for (size_t i = 0; i < t->params.size(); ++i) {
      const ParamSpec& s = t->params[i];
      if (s.kind != ParamKind::kNumber || !s.bindable || std::isnan(base.values[i])) continue;
      const ParamKey key{t->name, s.name};
      acts.emplace(key, false);
      bool tried = false;
      for (double v : Candidates(s, base.values[i])) {
        ParamValues written = base;
        written.values[i] = v;
        const auto b = MakeFrom(*t, written);
        if (!b) continue;  // the written case would be refused: try another value
        tried = true;
        auto a = Make(e);
        a->params()[i] = v;  // as network/point/run.cpp applies a binding
        const Observed through = Observe(*a, e), direct = Observe(*b, e);
        std::string where;
        INFO(e.label << ": parameter " << s.name << " " << base.values[i] << " -> " << v);
        CHECK_MESSAGE(Same(through, direct, &where), where);
        ++compared;
        std::string unused;
        if (!Same(before, direct, &unused)) acts[key] = true;
        break;
      }
      INFO(e.label << ": no accepted value near " << base.values[i] << " for " << s.name);
      CHECK(tried);
    }
  }
  MESSAGE(compared << " (entry, parameter) pairs compared through params() and as written");
  CHECK(compared > 100);

  // Coverage, driven by the registry: every bindable number parameter of
  // every type is present in some entry and acts somewhere.
  for (const auto& t : ComponentTypes()) {
    for (const auto& s : t.params) {
      if (s.kind != ParamKind::kNumber || !s.bindable) continue;
      const auto it = acts.find({t.name, s.name});
      CHECK_MESSAGE(it != acts.end(),
                    t.name << "." << s.name << ": no entry of tests/components/component_entries.h gives it a value");
      if (it == acts.end()) continue;
      if (kCheckOnly.count(s.name)) {
        INFO(t.name << "." << s.name << " is listed as check-only (" << kCheckOnly.at(s.name)
                    << ") yet changes the component's law, heat or report");
        CHECK_FALSE(it->second);
      } else {
        INFO(t.name << "." << s.name << ": changing it changes no residual, heat or report in any entry");
        CHECK(it->second);
      }
    }
  }
}

}  // namespace
}  // namespace loopwright
