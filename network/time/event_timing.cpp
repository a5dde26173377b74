#include "network/time/event_timing.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

namespace loopwright {

namespace {

// The scenario with event `name` at time t (events kept sorted by time) and
// `watched` among its watched quantities.
Scenario WithEventAt(const Scenario& sc, const std::string& name, double t, const std::string& watched) {
  Scenario s = sc;
  for (ScenarioEvent& e : s.events)
    if (e.name == name) e.at = t;
  std::stable_sort(s.events.begin(), s.events.end(), [](const ScenarioEvent& a, const ScenarioEvent& b) { return a.at < b.at; });
  if (!s.watch.empty() && std::find(s.watch.begin(), s.watch.end(), watched) == s.watch.end()) s.watch.push_back(watched);
  return s;
}

// One whole run with the event at t: the watched peak minus the limit [K].
struct Probe {
  const Case& cs;
  const Scenario& sc;
  const EventTimingQuestion& q;
  SimulateOptions opt;
  EventTimingAnswer* a;
  bool Run(double t, SimulationResult* r) {
    const Scenario s = WithEventAt(sc, q.event, t, q.watched);
    *r = Simulate(cs, s, opt);
    ++a->runs;
    if (!r->ok) a->failure = fmt::format("with the event \"{}\" at {:.6g} s: {}", q.event, t, r->failure);
    return r->ok;
  }
  bool Excess(double t, double* f) {
    SimulationResult r;
    if (!Run(t, &r)) return false;
    for (const PeakValue& p : r.peaks)
      if (p.what == q.watched && std::isfinite(p.value)) return *f = p.value - q.limit, true;
    a->failure = fmt::format("\"{}\" is neither a thermal mass nor a node", q.watched);
    return false;
  }
};

}  // namespace

std::string UnknownWatched(const Case& cs, const std::string& watched) {
  std::vector<std::string> names;
  for (const ThermalMass& m : cs.masses) names.push_back(m.id);
  for (const LoopSpec& l : cs.loops)
    for (const NodeSpec& n : l.nodes) names.push_back(l.id + "/" + n.id);
  if (std::find(names.begin(), names.end(), watched) != names.end()) return "";
  const std::string near = NearestName(watched, names);
  return fmt::format("\"{}\" is neither a thermal mass nor a node (\"loop/node\"){}", watched,
                     near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near));
}

EventTimingAnswer EarliestEventTime(const Case& cs, const Scenario& sc, const EventTimingQuestion& q,
                                    const SimulateOptions& opt) {
  EventTimingAnswer a;
  if (std::none_of(sc.events.begin(), sc.events.end(), [&](const ScenarioEvent& e) { return e.name == q.event; }))
    return a.failure = fmt::format("scenario \"{}\" has no event \"{}\"", sc.id, q.event), a;
  if (const std::string why = UnknownWatched(cs, q.watched); !why.empty()) return a.failure = why, a;
  Probe probe{cs, sc, q, opt, &a};
  probe.opt.progress = nullptr;
  double lo = q.lo, hi = q.hi, flo = 0, fhi = 0;
  if (!probe.Excess(hi, &fhi)) return a;
  if (fhi > 0)
    return a.failure = fmt::format("the event \"{}\" as late as {:.6g} s still lets \"{}\" reach {:.2f} K, {:.3g} K above the limit",
                                   q.event, hi, q.watched, fhi + q.limit, fhi), a;
  if (!probe.Excess(lo, &flo)) return a;
  if (flo <= 0) hi = lo;
  int side = 0;  // Illinois: which end was kept last (-1 lo, +1 hi)
  while (hi - lo > q.time_tolerance) {
    double t = lo + (hi - lo) * flo / (flo - fhi);
    t = std::clamp(t, lo + 0.01 * (hi - lo), hi - 0.01 * (hi - lo));
    double f = 0;
    if (!probe.Excess(t, &f)) return a;
    if (f > 0) {
      lo = t, flo = f;
      if (side == -1) fhi *= 0.5;
      side = -1;
    } else {
      hi = t, fhi = f;
      if (side == 1) flo *= 0.5;
      side = 1;
    }
  }
  a.time = hi;
  if (!probe.Run(hi, &a.verify)) return a;
  for (const PeakValue& p : a.verify.peaks)
    if (p.what == q.watched) a.peak = p.value, a.peak_time = p.time;
  a.ok = a.peak <= q.limit;
  if (!a.ok) a.failure = fmt::format("the verifying run reached {:.4f} K, above the limit", a.peak);
  return a;
}

}  // namespace loopwright
