#include "tests/tools/network_verifier.h"

#include <chrono>
#include <cmath>
#include <map>
#include <stdexcept>

#include <fmt/format.h>

#include "network/case/case.h"
#include "network/envelope/results.h"
#include "network/point/run.h"
#include "tests/tools/campaign_physics.h"
#include "tests/tools/random_network.h"

namespace loopwright::campaign {

using json = nlohmann::json;

namespace {

// A case value in SI: a number, or "value unit" with the units the
// generator writes (factors: NIST SP 811).
double Si(const json& v, double fallback = NAN) {
  if (v.is_null()) return fallback;
  if (v.is_number()) return v.get<double>();
  const std::string s = v.get<std::string>();
  size_t pos = 0;
  const double x = std::stod(s, &pos);
  std::string u = s.substr(pos);
  u.erase(0, u.find_first_not_of(' '));
  if (u == "degC") return x + 273.15;
  static const std::map<std::string, double> kFactor = {
      {"", 1},         {"m", 1},           {"mm", 1e-3},     {"um", 1e-6},         {"bar", 1e5}, {"L/min", 1.0 / 60000.0},
      {"cSt", 1e-6},   {"rpm", M_PI / 30}, {"kg/m3", 1},     {"W", 1},             {"W/K", 1},   {"kg/s", 1},
      {"N", 1},        {"cm3/rev", 1e-6}};
  auto it = kFactor.find(u);
  if (it == kFactor.end()) throw std::runtime_error("verifier: unit \"" + u + "\" not in its table");
  return x * it->second;
}
double Par(const json& c, const char* key, double fallback = NAN) { return Si(c.contains(key) ? c[key] : json(), fallback); }

struct NodeState {
  double p = 0, p_abs = 0, T = 0, z = 0;
  bool boundary = false;
  json spec;
};

struct LoopView {
  std::string id;
  bool oil = false;
  OilSpec spec;
  double t_nominal = 0;
  std::map<std::string, NodeState> nodes;
  std::map<std::string, json> comps;  // case spec by id
  std::vector<json> results;          // reported components of this loop
  double m_max = 0;
};

// The state a law sees: flow, density, viscosity, piezometric drop.
struct Flow {
  double q = 0, m = 0, rho = 0, mu = NAN, dpz = 0;
};

struct Law {
  bool checked = false;
  double got = 0, want = 0, tol = 0;
  std::string what;
};

Law Within(double got, double want, double rel, double abs_tol, const std::string& what) {
  return {true, got, want, rel * std::max(std::abs(got), std::abs(want)) + abs_tol, what};
}

Law FilterLaw(const json& c, const Flow& f) {
  if (f.q < 0) return {};
  const double qr = Par(c, "rated_flow"), rho_r = Par(c, "rated_density", 870.0);
  const double a = Par(c, "element_dp") / (Par(c, "rated_viscosity") * rho_r * qr);
  const double b = Par(c, "housing_dp", 0.0) / (rho_r * qr * qr);
  const double clog = Par(c, "clogging", 1.0), pc = Par(c, "bypass_crack", NAN);
  const double pf = Par(c, "bypass_full", 1.25 * pc), qbf = Par(c, "bypass_flow", qr);
  auto flow_at = [&](double x) {
    double q = x / (a * f.mu * clog);
    if (!std::isnan(pc)) q += qbf / (pf - pc) * SoftRamp(x - pc, 0.02 * (pf - pc));
    return q;
  };
  double lo = 0, hi = a * f.mu * clog * f.q * 1.01 + 1.0;  // flow_at is increasing; flow_at(hi) >= q
  for (int i = 0; i < 200 && hi - lo > 1e-12 * hi; ++i) (flow_at(0.5 * (lo + hi)) < f.q ? lo : hi) = 0.5 * (lo + hi);
  return Within(f.dpz, b * f.rho * f.q * std::abs(f.q) + 0.5 * (lo + hi), 1e-6, 1e-4, "filter housing + element/bypass");
}

Law RatedLossLaw(const json& c, const Flow& f) {
  const double qr = Par(c, "rated_flow"), dpr = Par(c, "rated_dp"), lf = Par(c, "laminar_fraction", 0.5);
  const double rho_r = Par(c, "rated_density", 870.0);
  const double b = (1 - lf) * dpr / (rho_r * qr * qr);
  double want = b * f.rho * f.q * std::abs(f.q);
  if (lf > 0) {
    if (std::isnan(f.mu)) return {};
    want += lf * dpr / (Par(c, "rated_viscosity") * rho_r * qr) * f.mu * f.q;
  }
  return Within(f.dpz, want, 1e-6, 1e-4, "a mu Q + b rho Q|Q|");
}

Law DisplacementPumpLaw(const json& c, const Flow& f) {
  const double qg = Par(c, "displacement") * Par(c, "speed") / (2 * M_PI), rise = -f.dpz;
  double want = qg - Par(c, "slip", 0.0) * rise / f.mu;
  const double pc = Par(c, "relief_crack");
  if (!std::isnan(pc)) {
    const double pf = Par(c, "relief_full", 1.2 * pc), qrf = Par(c, "relief_flow", qg);
    want -= qrf / (pf - pc) * SoftRamp(rise - pc, 0.02 * (pf - pc));
  }
  return Within(f.q, want, 1e-8, 1e-10 * qg, "geometric flow - slip - internal relief");
}

// Relief valve (components/relief_valve.h, Merritt 1967 from memory): shut
// below its crack; lift exactly t = (dp - p_c)/(p_f - p_c) between 10 % and
// 90 % of the band and full beyond full open, the seat an orifice:
// Q = Q_r y sqrt(dp/p_f) sqrt(rho_r/rho). The two rounded corners of the
// lift line (0 < t < 0.1, 0.9 < t < 1) are not checked.
Law ReliefValveLaw(const json& c, const Flow& f) {
  const double pc = Par(c, "crack"), pf = Par(c, "full_open", 1.15 * pc), qr = Par(c, "rated_flow");
  const double t = (f.dpz - pc) / (pf - pc);
  if (t <= 0) return Within(f.q, 0.0, 0.0, 1e-12 * qr, "shut below its crack");
  const double y = t >= 1 ? 1.0 : (t >= 0.1 && t <= 0.9 ? t : -1.0);
  if (y < 0) return {};
  return Within(f.q, qr * y * std::sqrt(f.dpz / pf) * std::sqrt(Par(c, "rated_density", 870.0) / f.rho), 1e-7, 1e-12 * qr,
                "Q_r y sqrt(dp/p_f) sqrt(rho_r/rho)");
}

Law CentrifugalPumpLaw(const json& c, const Flow& f) {
  const json& rows = c["curve"];
  double x[3], y[3];
  for (int i = 0; i < 3; ++i) x[i] = Si(rows[i][0]), y[i] = Si(rows[i][1]);
  const double s = Par(c, "speed") / Par(c, "rated_speed"), q = f.q / s;
  double h = 0;  // Lagrange quadratic through the three curve points
  for (int i = 0; i < 3; ++i) {
    double l = y[i];
    for (int j = 0; j < 3; ++j)
      if (j != i) l *= (q - x[j]) / (x[i] - x[j]);
    h += l;
  }
  return Within(-f.dpz, f.rho * kG * s * s * h, 1e-7, 1e-4, "rho g s^2 H(Q/s)");
}

Law ComponentLaw(const json& c, const Flow& f) {
  const std::string t = c["type"];
  const bool viscous = !std::isnan(f.mu);
  if ((t == "pipe" || t == "tube" || t == "hose") && viscous)
    return Within(f.dpz, LineDp(f.q, Par(c, "length"), Par(c, "diameter"), Par(c, "roughness"), Par(c, "minor_k", 0.0), f.rho, f.mu),
                  1e-6, 1e-4, "Darcy-Weisbach, Churchill f");
  if ((t == "orifice" || t == "rolling_bearing") && viscous && !c.contains("pipe_diameter"))
    return Within(f.dpz, OrificeDp(f.q, Par(c, "diameter"), Par(c, "cd", 0.61), Par(c, "low_re_delta", kSampsonDelta), Par(c, "count", 1.0), f.rho, f.mu),
                  1e-6, 1e-4, "orifice Cd blend");
  if (t == "valve" && !c.contains("size") && c.value("characteristic", "linear") == "linear") {
    const double leak = Par(c, "leakage", 1e-4);
    const double kv = Par(c, "kvs") * (leak + (1 - leak) * Par(c, "opening", 1.0));
    return Within(f.dpz, KvDp(f.q, kv, f.rho), 1e-5, 1e-4, "Kv relation");
  }
  if (t == "journal_bearing" && viscous)
    return Within(f.q, JournalFlow(f.dpz, Par(c, "diameter"), Par(c, "length"), Par(c, "groove_width", 0.0),
                                   Par(c, "radial_clearance"), Par(c, "eccentricity", 0.5), f.mu),
                  1e-7, 1e-15, "side flow pi p r c^3 (1 + 1.5 e^2) / (3 mu l')");
  if (t == "filter" && viscous) return FilterLaw(c, f);
  if ((t == "datasheet_loss" || t == "air_cooler") && !c.contains("points")) return RatedLossLaw(c, f);
  if (t == "displacement_pump" && viscous && !c.contains("volumetric_efficiency")) return DisplacementPumpLaw(c, f);
  if (t == "centrifugal_pump" && c["curve"].size() == 3) return CentrifugalPumpLaw(c, f);
  if (t == "relief_valve") return ReliefValveLaw(c, f);
  return {};
}

}  // namespace

}  // namespace loopwright::campaign

namespace loopwright::campaign {

namespace {

std::vector<LoopView> BuildViews(const json& doc, const json& point) {
  std::vector<LoopView> views;
  for (const json& l : doc["loops"]) {
    LoopView v;
    v.id = l["id"];
    const json& fl = doc["fluids"][l["fluid"].get<std::string>()];
    v.oil = fl.value("kind", "") == "oil";
    if (v.oil) v.spec = {Si(fl["kv40"]), Si(fl["kv100"]), Par(fl, "density_15C", 870.0)};
    v.t_nominal = Si(l["temperature"]);
    for (const json& n : l["nodes"]) v.nodes[n["id"]] = {0, 0, 0, Par(n, "elevation", 0.0), n.contains("boundary"), n};
    for (const json& c : l["components"]) v.comps[c["id"]] = c;
    views.push_back(std::move(v));
  }
  for (LoopView& v : views) {
    for (const json& n : point["nodes"])
      if (n["loop"] == v.id) {
        NodeState& s = v.nodes.at(n["id"]);
        s.p = n["pressure_Pa"];
        s.p_abs = n["pressure_abs_Pa"];
        s.T = n["temperature_K"];
      }
    for (const json& c : point["components"])
      if (c["loop"] == v.id) {
        v.results.push_back(c);
        v.m_max = std::max(v.m_max, std::abs(c["mass_flow_kg_s"].get<double>()));
      }
  }
  return views;
}

double UpstreamT(const LoopView& v, const json& c) {
  const bool fwd = c["mass_flow_kg_s"].get<double>() >= 0;
  return v.nodes.at(c[fwd ? "from" : "to"].get<std::string>()).T;
}

void CheckMass(const LoopView& v, PointCheck* out) {
  std::map<std::string, double> net;
  for (const json& c : v.results) {
    const double m = c["mass_flow_kg_s"];
    net[c["from"]] -= m;
    net[c["to"]] += m;
  }
  for (const auto& [id, n] : v.nodes) {
    if (n.boundary) continue;
    ++out->nodes_checked;
    if (!(std::abs(net[id]) <= 1e-9 * v.m_max + 1e-15))
      out->failures.push_back(fmt::format("{}/{}: mass balance {:.3g} kg/s (largest flow {:.3g})", v.id, id, net[id], v.m_max));
  }
}

void CheckPressures(const LoopView& v, const json& point, PointCheck* out) {
  for (const auto& [id, n] : v.nodes) {
    const double limit = v.oil ? 0.0 : WaterSaturationPressure(std::clamp(n.T, 273.16, 647.0));
    if (!(n.p_abs > limit))
      out->failures.push_back(fmt::format("{}/{}: {:.6g} Pa abs at {:.2f} K is below {} ({:.4g} Pa), reported as converged",
                                          v.id, id, n.p_abs, n.T, v.oil ? "zero absolute" : "the saturation pressure", limit));
    // Valid ranges: oil -40..200 degC (library/oil.h), water 0..150 degC
    // (library/water.h); outside them the node must be named in a warning.
    const bool outside = v.oil ? (n.T < 233.15 || n.T > 473.15) : (n.T < 273.15 || n.T > 423.15);
    bool named = false;
    for (const json& w : point["warnings"]) {
      const std::string text = w.get<std::string>();
      named |= text.find("loop " + v.id + ":") != std::string::npos && text.find("node " + id + ":") != std::string::npos;
    }
    if (outside && !named)
      out->failures.push_back(fmt::format("{}/{}: liquid at {:.1f} degC, outside its valid range, with no warning naming the node", v.id, id, n.T - 273.15));
    if (!v.oil || !n.boundary || n.spec["boundary"].value("kind", "") == "pressure") continue;
    const json& b = n.spec["boundary"];
    const double want = Si(b["pressure"]) + OilRho(v.spec, v.t_nominal) * kG * Par(b, "level", 0.0);
    if (!(std::abs(n.p - want) <= 1e-9 * std::abs(want) + 1e-6))
      out->failures.push_back(fmt::format("{}/{}: boundary pressure {:.9g} Pa, expected surface + rho g level = {:.9g} Pa", v.id, id, n.p, want));
  }
}

void CheckLaws(const LoopView& v, PointCheck* out) {
  for (const json& r : v.results) {
    const json& c = v.comps.at(r["id"]);
    Flow f;
    f.m = r["mass_flow_kg_s"];
    f.q = r["flow_m3_s"];
    const bool tiny = std::abs(f.m) < 1e-6 * v.m_max;
    if (v.oil) {
      const double T = UpstreamT(v, r);
      f.rho = OilRho(v.spec, T);
      f.mu = OilMu(v.spec, T);
      if (!tiny && !(std::abs(f.m / f.q - f.rho) <= 1e-8 * f.rho))
        out->failures.push_back(fmt::format("{}/{}: m/Q = {:.10g} kg/m3, oil density at {:.3f} K is {:.10g}", v.id, r["id"].get<std::string>(), f.m / f.q, T, f.rho));
    } else {
      f.rho = f.q != 0 ? f.m / f.q : 995.0;
    }
    const NodeState &a = v.nodes.at(c["from"]), &b = v.nodes.at(c["to"]);
    f.dpz = a.p - b.p + f.rho * kG * (a.z - b.z);
    Law law = ComponentLaw(c, f);
    if (!law.checked) {
      ++out->laws_skipped;
      continue;
    }
    ++out->laws_checked;
    if (!(std::abs(law.got - law.want) <= law.tol))
      out->failures.push_back(fmt::format("{}/{} ({}): {} gives {:.10g}, reported {:.10g} (tolerance {:.3g}); Q = {:.6g} m3/s, dp = {:.6g} Pa",
                                          v.id, r["id"].get<std::string>(), c["type"].get<std::string>(), law.what,
                                          law.want, law.got, law.tol, f.q, f.dpz));
  }
}

// Heat into each component's stream, with the coupling duties added.
std::map<std::string, double> StreamHeats(const LoopView& v, const json& doc, const json& point) {
  std::map<std::string, double> heat;
  for (const json& r : v.results) heat[r["id"]] = r["heat_W"];
  const json& cps = doc["couplings"];
  for (size_t i = 0; i < cps.size() && point.contains("couplings"); ++i) {
    const double q = point["couplings"][i]["duty_W"];
    for (const char* side : {"hot", "cold"}) {
      const std::string ref = cps[i][side];
      if (ref.substr(0, ref.find('/')) == v.id) heat[ref.substr(ref.find('/') + 1)] += side[0] == 'h' ? -q : q;
    }
  }
  return heat;
}

void CheckLoopEnergy(const LoopView& v, const std::map<std::string, double>& heat, PointCheck* out) {
  double sum = 0, gross = 0;
  for (const auto& [id, h] : heat) sum += h, gross += std::abs(h);
  for (const auto& [id, n] : v.nodes) {
    const double qn = Par(n.spec, "heat", 0.0);
    double loss = 0;
    if (n.boundary && n.spec["boundary"].contains("loss_conductance"))
      loss = Si(n.spec["boundary"]["loss_conductance"]) * (n.T - Par(n.spec["boundary"], "ambient_temperature", 298.15));
    sum += qn - loss;
    gross += std::abs(qn) + std::abs(loss);
  }
  ++out->energy_checked;
  if (!(std::abs(sum) <= 1e-6 * gross + 1e-3))
    out->failures.push_back(fmt::format("{}: heat in - heat out = {:.6g} W of {:.6g} W gross", v.id, sum, gross));
}

void CheckNodeEnergy(const LoopView& v, const std::map<std::string, double>& heat, PointCheck* out) {
  for (const auto& [id, n] : v.nodes) {
    if (n.boundary) continue;
    double sum = Par(n.spec, "heat", 0.0), gross = std::abs(sum);
    bool tiny = false;
    for (const json& r : v.results) {
      const double m = r["mass_flow_kg_s"];
      const bool in = (m > 0 && r["to"] == id) || (m < 0 && r["from"] == id);
      if (r["to"] != id && r["from"] != id) continue;
      tiny |= std::abs(m) < 1e-6 * v.m_max;
      if (!in) continue;
      const double t_up = UpstreamT(v, r);
      const double e = std::abs(m) * (OilEnthalpy(v.spec, t_up) - OilEnthalpy(v.spec, n.T)) + heat.at(r["id"]);
      sum += e;
      gross += std::abs(m * OilEnthalpy(v.spec, t_up)) + std::abs(heat.at(r["id"]));
    }
    if (tiny) continue;
    ++out->energy_checked;
    if (!(std::abs(sum) <= 1e-6 * gross + 1e-3))
      out->failures.push_back(fmt::format("{}/{}: node enthalpy balance {:.6g} W (Cragoe cp), gross {:.6g} W", v.id, id, sum, gross));
  }
}

}  // namespace

PointCheck VerifyConverged(const json& doc, const json& point, double ambient_pa) {
  (void)ambient_pa;
  PointCheck out;
  const bool thermal = point.contains("energy");
  for (const LoopView& v : BuildViews(doc, point)) {
    CheckMass(v, &out);
    CheckPressures(v, point, &out);
    CheckLaws(v, &out);
    if (!thermal) continue;
    const auto heat = StreamHeats(v, doc, point);
    CheckLoopEnergy(v, heat, &out);
    if (v.oil) CheckNodeEnergy(v, heat, &out);
  }
  return out;
}

namespace {

// The tally key of a point that is not a result: its termination and the
// cause classifier's stable kind (network/point/failure_causes.h).
std::string CauseClass(const SolverSummary& s) {
  return std::string(TerminationName(s.termination)) + (s.cause_kind.empty() ? "" : ": " + s.cause_kind);
}

void SolveAndVerify(const Case& cs, const json& doc, CaseOutcome* o) {
  CaseSolver solver(cs);
  o->converged = true;
  for (const OperatingPoint& op : cs.envelope.points) {
    PointResult r = solver.Solve(op, false);
    if (!r.converged) {
      o->converged = false;
      o->cause = CauseClass(r.summary);
      o->detail = r.summary.Report();
      if (r.summary.cause.empty()) o->silent = true;
      else if (r.summary.worst.empty() || r.summary.place.empty()) o->unplaced = true;
      continue;
    }
    PointCheck pc = VerifyConverged(doc, PointJson(cs, r), cs.ambient_pa);
    for (const auto& f : pc.failures) o->detail += op.name + ": " + f + "\n";
    o->silent |= !pc.failures.empty();
    o->check.laws_checked += pc.laws_checked;
    o->check.laws_skipped += pc.laws_skipped;
    o->check.nodes_checked += pc.nodes_checked;
    o->check.energy_checked += pc.energy_checked;
    o->check.failures.insert(o->check.failures.end(), pc.failures.begin(), pc.failures.end());
  }
}

}  // namespace

CaseOutcome RunCaseDocument(const json& doc, const std::string& name) {
  CaseOutcome o;
  o.name = name;
  const auto t0 = std::chrono::steady_clock::now();
  LoadResult lr = LoadCaseText(doc.dump(), name, DefaultLibraryDir());
  if (!lr.value) {
    o.detail = lr.diagnostics.Format(name);
    o.silent = true;  // the generator must only write valid cases
  } else {
    o.loaded = true;
    SolveAndVerify(*lr.value, doc, &o);
  }
  o.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return o;
}

CaseOutcome RunCampaignSeed(uint64_t seed) {
  GeneratedCase g = GenerateCase(seed);
  CaseOutcome o = RunCaseDocument(g.doc, fmt::format("campaign_seed_{}.json", seed));
  o.thermal = g.thermal;
  o.water_loop = g.water_loop;
  o.pipes = g.pipes;
  o.components = g.components;
  return o;
}

}  // namespace loopwright::campaign
