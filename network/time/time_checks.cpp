#include "network/time/time_checks.h"

#include <algorithm>
#include <cmath>

#include "network/envelope/checks.h"

namespace loopwright {

namespace {

struct Ctx {
  const Case& cs;
  const Scenario& sc;
  const SimulationResult& r;
  std::vector<int> node_loop, branch_loop, branch_comp;  // per global node / branch
  std::vector<TimeCheck>* out;
};

// A row at `where`, judged against `own` (a place's limit) or else the case's.
void Add(Ctx& c, CheckId id, const std::string& where, double value, double time, double own = kNoValue) {
  const double limit = std::isnan(own) ? c.cs.checks[id] : own;
  if (std::isnan(limit)) return;
  TimeCheck t{id, where, value, limit, Check(id).Margin(value, limit), time, true};
  t.pass = t.margin >= 0;
  c.out->push_back(t);
}

// The limit written on global node g or its loop ("checks"), else the case's.
double NodeLimit(const Ctx& c, CheckId id, size_t g) {
  const int loop = c.node_loop[g];
  const std::string& name = c.r.node_names[g];
  const int node = c.cs.loops[loop].NodeIndex(name.substr(name.find('/') + 1));
  return LimitAt(c.cs, id, loop, -1, node).si;
}

const Fluid& LoopFluid(const Ctx& c, int loop) { return *c.cs.loops[loop].fluid; }

// Peaks of oil-wetted masses and of every node of an oil loop.
void Coking(Ctx& c) {
  for (size_t k = 0; k < c.cs.masses.size(); ++k) {
    const ThermalMass& m = c.cs.masses[k];
    if (std::none_of(m.fluid.begin(), m.fluid.end(), [&](const FluidLink& l) { return LoopFluid(c, l.loop).Kind() == "oil"; }))
      continue;
    double peak = -1, at = 0;
    for (const TimeSample& s : c.r.samples)
      if (s.mass_t[k] > peak) peak = s.mass_t[k], at = s.t;
    for (const PeakValue& p : c.r.peaks)
      if (p.what == m.id && p.value > peak) peak = p.value, at = p.time;  // between outputs
    Add(c, CheckId::kCokingTemperatureMax, m.id, peak, at, m.coking_limit);
  }
  for (size_t g = 0; g < c.r.node_names.size(); ++g) {
    if (LoopFluid(c, c.node_loop[g]).Kind() != "oil" || !c.r.node_free[g]) continue;
    double peak = -1, at = 0;
    for (const TimeSample& s : c.r.samples)
      if (s.node_t[g] > peak) peak = s.node_t[g], at = s.t;
    Add(c, CheckId::kCokingTemperatureMax, c.r.node_names[g], peak, at, NodeLimit(c, CheckId::kCokingTemperatureMax, g));
  }
}

void AfterBoil(Ctx& c) {
  for (size_t g = 0; g < c.r.node_names.size(); ++g) {
    const Fluid& f = LoopFluid(c, c.node_loop[g]);
    if (!c.r.node_free[g]) continue;
    double least = INFINITY, at = 0;
    for (const TimeSample& s : c.r.samples) {
      const auto tsat = f.SaturationTemperature(std::max(c.cs.ambient_pa + s.node_p[g], 612.0));
      if (!tsat) break;
      if (*tsat - s.node_t[g] < least) least = *tsat - s.node_t[g], at = s.t;
    }
    if (std::isfinite(least))
      Add(c, CheckId::kAfterBoilMarginMin, c.r.node_names[g], least, at, NodeLimit(c, CheckId::kAfterBoilMarginMin, g));
  }
}

double Interval(const SimulationResult& r) {
  return r.samples.size() > 1 ? r.samples[1].t - r.samples[0].t : 0.0;
}

// A cold start (uniform start below the warm-up temperature): the time each
// bearing's feed node first reaches it.
void Warmup(Ctx& c) {
  const double target = c.cs.checks[CheckId::kWarmupTemperature];
  if (std::isnan(c.sc.start_temperature) || !(c.sc.start_temperature < target)) return;
  for (size_t k = 0; k < c.r.branch_names.size(); ++k) {
    const ComponentSpec& comp = c.cs.loops[c.branch_loop[k]].components[c.branch_comp[k]];
    if (!comp.type_info || !(comp.type_info->roles & kRoleBearing)) continue;
    const int g = c.r.branch_from[k];
    double reached = c.sc.end;
    for (size_t i = 1; i < c.r.samples.size(); ++i) {
      const TimeSample &a = c.r.samples[i - 1], &b = c.r.samples[i];
      if (b.node_t[g] >= target && a.node_t[g] < target) {
        reached = a.t + (b.t - a.t) * (target - a.node_t[g]) / (b.node_t[g] - a.node_t[g]);
        break;
      }
    }
    Add(c, CheckId::kWarmupTimeMax, c.r.branch_names[k], reached, reached);
  }
}

// Total time open of the valves that must stay shut, from a uniform start.
void OpenTimes(Ctx& c) {
  if (std::isnan(c.sc.start_temperature)) return;
  const double dt = Interval(c.r);
  for (size_t k = 0; k < c.r.branch_names.size(); ++k) {
    const ComponentSpec& comp = c.cs.loops[c.branch_loop[k]].components[c.branch_comp[k]];
    if (!comp.type_info || !comp.model) continue;
    const bool relief = comp.type_info->roles & kRoleReliefValve;
    const int crack = comp.type_info->ParamIndex(relief ? "crack" : "bypass_crack");
    if (crack < 0 || !std::isfinite(comp.model->params()[crack])) continue;
    double open = 0, last = 0;
    for (const TimeSample& s : c.r.samples)
      if (s.node_p[c.r.branch_from[k]] - s.node_p[c.r.branch_to[k]] > comp.model->params()[crack]) open += dt, last = s.t;
    Add(c, relief ? CheckId::kReliefOpenTimeMax : CheckId::kBypassOpenTimeMax, c.r.branch_names[k], open, last);
  }
}

void Starved(Ctx& c) {
  const double dt = Interval(c.r);
  for (size_t k = 0; k < c.r.branch_names.size(); ++k) {
    bool any = false;
    double longest = 0, run = 0, at = 0;
    for (const TimeSample& s : c.r.samples) {
      if (std::isnan(s.flow_min[k])) {
        run = 0;
        continue;
      }
      any = true;
      run = std::abs(s.flow[k]) < s.flow_min[k] ? run + dt : 0;
      if (run > longest) longest = run, at = s.t;
    }
    if (any) Add(c, CheckId::kStarvedTimeMax, c.r.branch_names[k], longest, at);
  }
}

}  // namespace

std::vector<TimeCheck> EvaluateTimeChecks(const Case& cs, const Scenario& sc, const SimulationResult& r) {
  std::vector<TimeCheck> out;
  if (!r.ok || r.samples.empty()) return out;
  Ctx c{cs, sc, r, {}, {}, {}, &out};
  for (const std::string& n : r.node_names) {
    const std::string lid = n.substr(0, n.find('/'));
    for (size_t l = 0; l < cs.loops.size(); ++l)
      if (cs.loops[l].id == lid) c.node_loop.push_back(int(l));
  }
  for (const std::string& b : r.branch_names) {
    const std::string lid = b.substr(0, b.find('/'));
    for (size_t l = 0; l < cs.loops.size(); ++l)
      if (cs.loops[l].id == lid) {
        c.branch_loop.push_back(int(l));
        c.branch_comp.push_back(cs.loops[l].ComponentIndex(b.substr(b.find('/') + 1)));
      }
  }
  Coking(c);
  AfterBoil(c);
  Warmup(c);
  OpenTimes(c);
  Starved(c);
  return out;
}

}  // namespace loopwright
