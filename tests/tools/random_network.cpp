#include "tests/tools/random_network.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <vector>

#include <fmt/format.h>

#include "tests/tools/campaign_physics.h"

namespace loopwright::campaign {

using json = nlohmann::json;

namespace {

// splitmix64: the same stream on every platform and standard library.
class Rng {
 public:
  explicit Rng(uint64_t seed) : s_(seed * 0x9E3779B97F4A7C15ull + 0x632BE59BD9B4E019ull) {}
  uint64_t Next() {
    uint64_t z = (s_ += 0x9E3779B97F4A7C15ull);
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
    return z ^ (z >> 31);
  }
  double U(double a, double b) { return a + (b - a) * (Next() >> 11) * 0x1.0p-53; }
  int I(int a, int b) { return a + static_cast<int>(Next() % static_cast<uint64_t>(b - a + 1)); }
  bool P(double p) { return U(0, 1) < p; }

 private:
  uint64_t s_;
};

std::string Q(double v, const char* unit) { return fmt::format("{:.12g} {}", v, unit); }

struct Bearing {
  bool journal = true;
  double dp = 1e5;     // design feed pressure above the drain [Pa]
  double flow = 0;     // design flow [m3/s]
  double heat = 0;     // estimated heat [W]
  std::string drain;   // node id
  json spec;           // parameters
};

// One loop under construction: nodes, components and their elevations.
struct LoopBuilder {
  std::string id;
  json nodes = json::array(), comps = json::array();
  std::map<std::string, double> z;
  int n_nodes = 0, n_comps = 0;
  std::vector<size_t> pipe_index;  // positions in comps of pipes that may be split

  std::string Node(double elevation, json extra = json::object()) {
    std::string nid = fmt::format("n{}", n_nodes++);
    extra["id"] = nid;
    extra["elevation"] = Q(elevation, "m");
    nodes.push_back(extra);
    z[nid] = elevation;
    return nid;
  }
  json& Add(const std::string& type, const std::string& from, const std::string& to) {
    comps.push_back({{"id", fmt::format("{}_{}", type, n_comps++)}, {"type", type}, {"from", from}, {"to", to}});
    return comps.back();
  }
};

double BoreFor(double q, double v) { return std::clamp(std::sqrt(4.0 * q / (M_PI * v)), 3e-3, 80e-3); }

void AddPipe(Rng& r, LoopBuilder* lb, const std::string& a, const std::string& b, double q, double v, bool split) {
  static const char* kTypes[] = {"pipe", "tube", "hose"};
  static const double kRough[] = {45e-6, 1.5e-6, 5e-6};
  const int t = r.I(0, 2);
  json& c = lb->Add(kTypes[t], a, b);
  c["diameter"] = Q(BoreFor(q, v) * 1e3, "mm");
  c["length"] = Q(r.U(0.2, 3.0), "m");
  c["roughness"] = Q(kRough[t] * 1e6 * r.U(0.5, 2.0), "um");
  if (r.P(0.5)) c["minor_k"] = r.U(0.0, 3.0);
  if (split) lb->pipe_index.push_back(lb->comps.size() - 1);
}

// Suction line from a reservoir: short, and wide enough that its drop at
// the pump's flow stays under 0.2 bar at the design viscosity, so the pump
// inlet keeps 0.7 bar abs or more (common practice for gear pumps).
void AddSuction(Rng& r, LoopBuilder* lb, const std::string& a, const std::string& b, double q, double rho, double mu) {
  json& c = lb->Add("hose", a, b);
  const double len = r.U(0.3, 1.5), eps = 5e-6, k = r.U(0.5, 2.0);
  double d = BoreFor(q, r.U(0.3, 1.0));
  while (LineDp(q, len, d, eps, k, rho, mu) > 0.2e5) d *= 1.05;
  c["diameter"] = Q(d * 1e3, "mm");
  c["length"] = Q(len, "m");
  c["roughness"] = Q(eps * 1e6, "um");
  c["minor_k"] = k;
}

// Orifice diameter giving drop dp at flow q (turbulent sizing).
double OrificeBore(double q, double dp, double rho) {
  return std::sqrt(4.0 / M_PI * q / (0.61 * std::sqrt(2.0 * dp / rho)));
}

Bearing MakeBearing(Rng& r, const OilSpec& oil, double T) {
  Bearing b;
  const double mu = OilMu(oil, T), rho = OilRho(oil, T);
  b.dp = r.U(0.8e5, 3e5);
  b.journal = r.P(0.6);
  if (b.journal) {
    const double D = r.U(25e-3, 150e-3), L = D * r.U(0.4, 0.9), w = L * r.U(0.1, 0.2);
    const double ecc = r.U(0.3, 0.8), load = r.U(0.5e6, 2.5e6) * L * D, rise = r.U(10, 30);
    double c = D * r.U(0.5e-3, 1.0e-3), omega = std::min(r.U(1000, 12000) * M_PI / 30.0, 60.0 / (D / 2.0));
    // Petroff's film friction; the oil flow must carry it away with a rise
    // of 10..30 K (common practice): open the clearance up to 2.5 per mille
    // of D, then slow the shaft.
    auto heat = [&] { return 2 * M_PI * mu * omega * omega * std::pow(D / 2, 3) * L / (c * std::sqrt(1 - ecc * ecc)); };
    auto hot = [&] { return heat() > rise * rho * 1900.0 * JournalFlow(b.dp, D, L, w, c, ecc, mu); };
    while (hot() && c < 2.5e-3 * D) c *= 1.05;
    while (hot()) omega *= 0.95;
    b.flow = JournalFlow(b.dp, D, L, w, c, ecc, mu);
    b.heat = heat();
    b.spec = {{"type", "journal_bearing"},   {"diameter", Q(D * 1e3, "mm")},   {"length", Q(L * 1e3, "mm")},
              {"groove_width", Q(w * 1e3, "mm")}, {"radial_clearance", Q(c * 1e6, "um")}, {"eccentricity", ecc},
              {"speed", Q(omega * 30.0 / M_PI, "rpm")}, {"load", Q(load, "N")}};
  } else {
    const double d = r.U(0.8e-3, 2.0e-3);
    const int n = r.I(1, 4);
    b.flow = n * 0.61 * M_PI * d * d / 4 * std::sqrt(2 * b.dp / rho);
    b.heat = r.U(50, 800);
    b.spec = {{"type", "rolling_bearing"}, {"diameter", Q(d * 1e3, "mm")}, {"count", n}, {"loss_power", Q(b.heat, "W")}};
  }
  return b;
}

struct OilPlan {
  OilSpec oil;
  double T = 333.15, rho = 870, mu = 0.02;
  std::vector<Bearing> bearings;
  double demand = 0, heat = 0, p_max = 0;  // [m3/s], [W], highest design feed [Pa g]
  std::vector<std::string> housings;
};

void FeedPath(Rng& r, LoopBuilder* lb, const std::string& from, const Bearing& b, const OilPlan& plan) {
  std::string cur = from;
  const double zf = lb->z[from] - r.U(0.0, 0.3);
  if (r.P(0.8)) {
    std::string n = lb->Node(zf);
    AddPipe(r, lb, cur, n, b.flow, r.U(0.3, 2.5), true);
    cur = n;
  }
  if (r.P(0.3)) {
    std::string n = lb->Node(zf);
    json& o = lb->Add("orifice", cur, n);
    o["diameter"] = Q(OrificeBore(b.flow, r.U(0.2e5, 0.8e5), plan.rho) * 1e3, "mm");
    if (r.P(0.3)) o["cd"] = r.U(0.6, 0.7);
    cur = n;
  }
  if (r.P(0.15)) {
    std::string n = lb->Node(zf);
    const double opening = r.U(0.3, 1.0), dp = r.U(0.1e5, 0.5e5);
    const double kv = b.flow * 3600.0 / std::sqrt(dp / 1e5 / (plan.rho / kIecRho0));
    json& v = lb->Add("valve", cur, n);
    v["kvs"] = kv / opening;
    v["opening"] = opening;
    v["characteristic"] = "linear";
    cur = n;
  }
  json& c = lb->Add(b.spec["type"], cur, b.drain);
  for (auto& [k, val] : b.spec.items())
    if (k != "type") c[k] = val;
}

// A random series-parallel distribution of `idx` bearings from node h.
void Distribute(Rng& r, LoopBuilder* lb, const std::string& h, std::vector<int> idx, const OilPlan& plan) {
  if (idx.size() >= 2 && r.P(0.5)) {
    const size_t cut = 1 + r.Next() % (idx.size() - 1);
    std::vector<int> parts[2] = {std::vector<int>(idx.begin(), idx.begin() + cut), std::vector<int>(idx.begin() + cut, idx.end())};
    for (auto& g : parts) {
      if (g.size() == 1) {
        FeedPath(r, lb, h, plan.bearings[g[0]], plan);
        continue;
      }
      double q = 0;
      for (int i : g) q += plan.bearings[i].flow;
      std::string n = lb->Node(lb->z[h] + r.U(-0.3, 0.3));
      AddPipe(r, lb, h, n, q, r.U(0.5, 2.5), true);
      Distribute(r, lb, n, g, plan);
    }
    return;
  }
  for (int i : idx) FeedPath(r, lb, h, plan.bearings[i], plan);
}

OilSpec MakeOil(Rng& r) {
  static const double kv40[] = {22, 32, 46, 68}, kv100[] = {4.3, 5.4, 6.8, 8.6};
  const int g = r.I(0, 3);
  OilSpec o;
  o.kv40 = kv40[g] * 1e-6 * r.U(0.97, 1.03);
  o.kv100 = kv100[g] * 1e-6 * r.U(0.97, 1.03);
  o.rho15 = r.U(850, 890);
  return o;
}

OilPlan PlanOil(Rng& r, LoopBuilder* lb, const std::string& reservoir, bool thermal) {
  OilPlan p;
  p.oil = MakeOil(r);
  p.T = 273.15 + (thermal ? r.U(40, 80) : r.U(10, 100));
  p.rho = OilRho(p.oil, p.T);
  p.mu = OilMu(p.oil, p.T);
  const int nh = r.I(0, 2);
  for (int i = 0; i < nh; ++i) {
    json bnd = {{"kind", "pressure"}, {"pressure", Q(r.U(0, 2), "bar")}, {"drains_to", reservoir}};
    p.housings.push_back(lb->Node(r.U(0.2, 1.5), {{"boundary", bnd}}));
  }
  const int nb = r.I(1, 8);
  for (int i = 0; i < nb; ++i) {
    Bearing b = MakeBearing(r, p.oil, p.T);
    const int d = r.I(0, static_cast<int>(p.housings.size()));
    b.drain = d == 0 ? reservoir : p.housings[d - 1];
    double p_drain = 0;
    for (const auto& n : lb->nodes)
      if (n["id"] == b.drain && n.contains("boundary") && n["boundary"]["kind"] == "pressure")
        p_drain = std::stod(n["boundary"]["pressure"].get<std::string>()) * 1e5;
    p.p_max = std::max(p.p_max, p_drain + b.dp);
    p.demand += b.flow;
    p.heat += b.heat;
    p.bearings.push_back(std::move(b));
  }
  // Housings no bearing drains to are dropped (a node must be connected).
  for (const std::string& h : p.housings) {
    bool used = false;
    for (const Bearing& b : p.bearings) used |= b.drain == h;
    if (used) continue;
    for (size_t i = 0; i < lb->nodes.size(); ++i)
      if (lb->nodes[i]["id"] == h) lb->nodes.erase(i);
  }
  return p;
}

// Pump from s to out; returns its geometric (or rated) flow and, in *rise,
// the highest pressure rise it can work against (relief crack or shut-off).
double AddPump(Rng& r, LoopBuilder* lb, const std::string& s, const std::string& out, const std::string& res,
               const OilPlan& p, double* rise) {
  const double p_design = p.p_max + 1.0e5;
  if (r.P(0.65)) {
    const double n = r.U(1000, 3600), qg = p.demand * r.U(1.3, 2.5);
    const double eta_v = r.U(0.85, 0.97);
    json& c = lb->Add("displacement_pump", s, out);
    c["displacement"] = Q(qg / (n / 60.0) * 1e6, "cm3/rev");
    c["speed"] = Q(n, "rpm");
    c["slip"] = (1 - eta_v) * qg * 0.03 / 10e5;
    const double crack = p_design + r.U(2e5, 6e5);
    *rise = crack;
    if (r.P(0.5)) {
      c["relief_crack"] = Q(crack / 1e5, "bar");
    } else {
      json& rv = lb->Add("relief_valve", out, res);
      rv["crack"] = Q(crack / 1e5, "bar");
      rv["rated_flow"] = Q(qg * 6e4, "L/min");
    }
    return qg;
  }
  const double qr = p.demand * r.U(1.0, 2.0), h0 = p_design * r.U(1.2, 1.8) / (p.rho * kG);
  json& c = lb->Add("centrifugal_pump", s, out);
  *rise = p.rho * kG * h0;
  c["curve"] = json::array({json::array({0.0, h0}), json::array({qr, 0.85 * h0}), json::array({2 * qr, 0.4 * h0})});
  c["rated_speed"] = Q(2900, "rpm");
  c["speed"] = Q(2900 * r.U(0.85, 1.05), "rpm");
  return qr;
}

json RatedLoss(Rng& r, double q, double laminar_fraction, double nu, double rho) {
  return {{"rated_flow", Q(q * 6e4, "L/min")}, {"rated_dp", Q(r.U(0.1, 0.5), "bar")},
          {"laminar_fraction", laminar_fraction}, {"rated_viscosity", Q(nu * 1e6, "cSt")},
          {"rated_density", Q(rho, "kg/m3")}};
}

// A cooler passage from a to b (air cooler or the oil side of a coupling).
std::string AddCooler(Rng& r, LoopBuilder* lb, const std::string& a, const std::string& b, double q, double heat,
                      bool thermal, bool coupled, double air_c_ref) {
  const bool air = coupled ? false : (thermal || r.P(0.5));
  json& c = lb->Add(air ? "air_cooler" : "datasheet_loss", a, b);
  c.update(RatedLoss(r, q * r.U(1.0, 2.0), r.U(0.2, 0.8), r.U(10e-6, 40e-6), 870.0));
  if (air) {
    c["conductance"] = Q(std::max(heat, 200.0) / r.U(15, 40), "W/K");
    c["air_flow"] = Q(air_c_ref * r.U(1.5, 4.0) / 1006.0, "kg/s");
    c["air_inlet_temperature"] = Q(r.U(10, 45), "degC");
    if (r.P(0.1)) c["fan_on"] = 0;
  }
  return c["id"];
}

}  // namespace

}  // namespace loopwright::campaign

namespace loopwright::campaign {

namespace {

// Pump outlet to header: check valve, filter(s), cooler (with bypass), riser.
std::string Supply(Rng& r, LoopBuilder* lb, std::string cur, const OilPlan& p, double qp, bool thermal,
                   bool coupled, std::string* cooler_id) {
  const double z = lb->z[cur];
  if (r.P(0.2)) {
    std::string n = lb->Node(z);
    json& c = lb->Add("check_valve", cur, n);
    c["kv"] = qp * 3600.0 / std::sqrt(0.2 / (p.rho / 1000.0));
    c["crack"] = Q(r.U(0.2, 0.5), "bar");
    cur = n;
  }
  if (r.P(0.75)) {
    std::string n = lb->Node(z + r.U(0, 0.5));
    const int count = r.P(0.2) ? 2 : 1;
    for (int i = 0; i < count; ++i) {
      json& f = lb->Add("filter", cur, n);
      f["rated_flow"] = Q(qp * r.U(1.0, 2.0) / count * 6e4, "L/min");
      f["element_dp"] = Q(r.U(0.1, 0.5), "bar");
      f["rated_viscosity"] = Q(32 * r.U(0.5, 2.0), "cSt");
      f["housing_dp"] = Q(r.U(0.02, 0.1), "bar");
      f["clogging"] = r.U(1.0, 3.0);
      if (r.P(0.7)) f["bypass_crack"] = Q(r.U(1.5, 3.5), "bar");
    }
    cur = n;
  }
  if (thermal || r.P(0.6)) {
    std::string n = lb->Node(z + r.U(0, 0.5));
    const double c_oil = p.rho * qp * 2000.0;
    *cooler_id = AddCooler(r, lb, cur, n, qp, p.heat, thermal, coupled, c_oil);
    if (r.P(0.3)) {
      json& v = lb->Add("valve", cur, n);
      v["kvs"] = 0.3 * qp * 3600.0 / std::sqrt(1.0 / (p.rho / kIecRho0));
      v["opening"] = r.U(0.1, 1.0);
      v["characteristic"] = "linear";
    }
    cur = n;
  }
  std::string h = lb->Node(z + r.U(0.5, 2.0));
  AddPipe(r, lb, cur, h, qp, r.U(0.5, 2.5), true);
  return h;
}

void SplitPipe(Rng& r, LoopBuilder* lb) {
  const size_t k = lb->pipe_index[r.Next() % lb->pipe_index.size()];
  json c = lb->comps[k];
  const std::string a = c["from"], b = c["to"];
  const double len = std::stod(c["length"].get<std::string>());
  const double f = r.U(0.2, 0.8);
  std::string m = lb->Node((lb->z[a] + lb->z[b]) / 2.0);
  lb->comps[k]["to"] = m;
  lb->comps[k]["length"] = Q(len * f, "m");
  c["id"] = fmt::format("{}_{}", c["type"].get<std::string>(), lb->n_comps++);
  c["from"] = m;
  c["length"] = Q(len * (1 - f), "m");
  c.erase("minor_k");
  lb->comps.push_back(c);
  lb->pipe_index.push_back(lb->comps.size() - 1);
}

// A coolant loop: tank, centrifugal pump, coupling passage, radiator.
json WaterLoop(Rng& r, double heat, LoopBuilder* lb) {
  const double q = r.U(10, 60) / 6e4, rho = 995.0;
  json bnd = r.P(0.5) ? json{{"kind", "reservoir"}, {"pressure", "0 bar"}, {"level", Q(r.U(0.1, 0.5), "m")}}
                      : json{{"kind", "tank"}, {"pressure", Q(r.U(0.3, 1.5), "bar")}, {"level", Q(r.U(0.1, 0.5), "m")}};
  std::string w = lb->Node(0.0, {{"boundary", bnd}});
  std::string a = lb->Node(-0.2), b = lb->Node(0.0), c = lb->Node(0.5), d = lb->Node(0.5);
  json& hx = lb->Add("datasheet_loss", b, c);
  hx.update(RatedLoss(r, q * r.U(0.8, 1.5), 0.0, 1e-6, 998.0));
  json& rad = lb->Add("air_cooler", c, d);
  rad.update(RatedLoss(r, q * r.U(0.8, 1.5), 0.0, 1e-6, 998.0));
  rad["conductance"] = Q(std::max(heat, 200.0) / r.U(10, 25), "W/K");
  rad["air_flow"] = Q(rho * q * 4180.0 * r.U(1.5, 4.0) / 1006.0, "kg/s");
  rad["air_inlet_temperature"] = Q(r.U(10, 40), "degC");
  const double h0 = r.U(1.5e5, 3.0e5) / (rho * kG);
  json& pump = lb->Add("centrifugal_pump", w, a);
  pump["curve"] = json::array({json::array({0.0, h0}), json::array({q, 0.8 * h0}), json::array({2 * q, 0.35 * h0})});
  pump["rated_speed"] = Q(2900, "rpm");
  pump["speed"] = Q(2900 * r.U(0.9, 1.05), "rpm");
  AddPipe(r, lb, a, b, q, r.U(1.0, 2.0), false);
  AddPipe(r, lb, d, w, q, r.U(1.0, 2.0), false);
  return {{"id", "water"}, {"fluid", "water"}, {"temperature", Q(r.U(20, 45), "degC")},
          {"nodes", lb->nodes}, {"components", lb->comps}};
}

json OilFluidJson(const OilSpec& o) {
  return {{"kind", "oil"}, {"kv40", Q(o.kv40 * 1e6, "cSt")}, {"kv100", Q(o.kv100 * 1e6, "cSt")},
          {"density_15C", Q(o.rho15, "kg/m3")}};
}

}  // namespace

GeneratedCase GenerateCase(uint64_t seed) {
  Rng r(seed);
  GeneratedCase g;
  g.thermal = r.P(0.5);
  g.water_loop = g.thermal && r.P(0.35);
  LoopBuilder oil;
  json res = {{"kind", "reservoir"}, {"pressure", "0 bar"}, {"level", Q(r.U(0.1, 0.6), "m")}};
  if (g.thermal && r.P(0.5)) {
    res["loss_conductance"] = Q(r.U(1, 20), "W/K");
    res["ambient_temperature"] = Q(r.U(10, 40), "degC");
  }
  const std::string R = oil.Node(0.0, {{"boundary", res}});
  OilPlan plan = PlanOil(r, &oil, R, g.thermal);
  const std::string S = oil.Node(-r.U(0.0, 0.5)), P = oil.Node(oil.z[S]);
  double rise = 0;
  const double qp = AddPump(r, &oil, S, P, R, plan, &rise);
  AddSuction(r, &oil, R, S, qp, plan.rho, plan.mu);
  plan.heat += qp * rise / 0.85;  // shaft power at the worst case: all flow over the relief
  if (g.thermal && r.P(0.3)) {
    const double qn = r.U(100, 2000);
    oil.nodes[0]["heat"] = Q(qn, "W");
    plan.heat += qn;
  }
  std::string cooler;
  const std::string header = Supply(r, &oil, P, plan, qp, g.thermal, g.water_loop, &cooler);
  std::vector<int> idx(plan.bearings.size());
  for (size_t i = 0; i < idx.size(); ++i) idx[i] = static_cast<int>(i);
  Distribute(r, &oil, header, idx, plan);
  const int target = r.I(3, 40) - (g.water_loop ? 2 : 0);
  while (static_cast<int>(oil.pipe_index.size()) + 1 < target) SplitPipe(r, &oil);
  json fluids = {{"oil", OilFluidJson(plan.oil)}};
  json loops = json::array({{{"id", "oil"}, {"fluid", "oil"}, {"temperature", Q(plan.T - 273.15, "degC")},
                             {"nodes", oil.nodes}, {"components", oil.comps}}});
  json couplings = json::array();
  if (g.water_loop) {
    LoopBuilder wl;
    loops.push_back(WaterLoop(r, plan.heat, &wl));
    fluids["water"] = {{"kind", "water"}};
    static const char* kArr[] = {"counterflow", "parallel_flow", "shell_and_tube_1pass", "crossflow_unmixed"};
    couplings.push_back({{"id", "oil_to_water"}, {"type", "heat_exchanger"}, {"arrangement", kArr[r.I(0, 3)]},
                         {"hot", "oil/" + cooler}, {"cold", "water/datasheet_loss_0"},
                         {"conductance", Q(std::max(plan.heat, 200.0) / r.U(10, 30), "W/K")}});
  }
  g.doc = {{"name", fmt::format("campaign seed {}", seed)},
           {"description", "Generated by tests/tools/random_network.cpp (invented test data)."},
           {"thermal", g.thermal}, {"fluids", fluids}, {"loops", loops}, {"couplings", couplings}};
  for (const auto& l : loops)
    for (const auto& c : l["components"]) {
      ++g.components;
      const std::string t = c["type"];
      if (t == "pipe" || t == "tube" || t == "hose") ++g.pipes;
    }
  return g;
}

}  // namespace loopwright::campaign
