#include "network/case/fluid_spec.h"

#include <cmath>
#include <optional>

#include <fmt/format.h>

#include "library/glycol.h"
#include "library/oil.h"
#include "library/table_fluid.h"
#include "library/water.h"

namespace loopwright {

using nlohmann::json;

namespace {

// The optional fields of an oil (density, expansion, cp, k, validity range);
// false if any is unreadable (reported).
bool ReadOilExtras(const json& j, const std::string& ptr, CaseContext& c, OilExtras* ex) {
  bool ok = true;
  auto opt = [&](const char* key, Dimension dim, double* out) {
    if (j.contains(key)) ok = c.ReadQuantity(j[key], ptr + "/" + key, dim, out) && ok;
  };
  opt("density_15C", Dimension::kDensity, &ex->rho15_kgm3);
  opt("expansion", Dimension::kInverseTemperature, &ex->alpha_per_K);
  opt("t_min", Dimension::kTemperature, &ex->T_min_K);
  opt("t_max", Dimension::kTemperature, &ex->T_max_K);
  auto optional = [&](const char* key, Dimension dim, std::optional<double>* out) {
    if (!j.contains(key)) return;
    double v = 0;
    if (c.ReadQuantity(j[key], ptr + "/" + key, dim, &v)) *out = v;
    else ok = false;
  };
  optional("specific_heat", Dimension::kSpecificHeat, &ex->cp_JkgK);
  optional("conductivity", Dimension::kThermalConductivity, &ex->k_WmK);
  return ok;
}

// "kv40" and "kv100" (NaN where absent), each possibly bound to an envelope
// variable (index, or -1).
struct OilKv {
  double kv40 = NAN, kv100 = NAN;
  int kv40_var = -1, kv100_var = -1;
  bool bound() const { return kv40_var >= 0 || kv100_var >= 0; }
};

// The oil builders below set *reported when they reported a problem
// themselves; otherwise a null oil is reported by the caller with *err.

// An oil by two points "viscosity": [[T, nu], [T, nu]].
std::shared_ptr<OilFluid> OilFromPoints(const json& v, const std::string& where, const OilExtras& ex, CaseContext& c,
                                        std::string* err, bool* reported) {
  *reported = true;
  if (!v.is_array() || v.size() != 2 || !v[0].is_array() || !v[1].is_array() || v[0].size() != 2 || v[1].size() != 2) {
    c.diag.Error("wrong-type", where, "expected two points [[temperature, kinematic viscosity], [temperature, kinematic viscosity]]");
    return nullptr;
  }
  double t1, n1, t2, n2;
  bool okp = c.ReadQuantity(v[0][0], where + "/0/0", Dimension::kTemperature, &t1);
  okp = c.ReadQuantity(v[0][1], where + "/0/1", Dimension::kKinematicViscosity, &n1) && okp;
  okp = c.ReadQuantity(v[1][0], where + "/1/0", Dimension::kTemperature, &t2) && okp;
  okp = c.ReadQuantity(v[1][1], where + "/1/1", Dimension::kKinematicViscosity, &n2) && okp;
  if (!okp) return nullptr;
  *reported = false;
  return OilFluid::FromTwoPoints(n1, t1, n2, t2, ex, err);
}

// An oil by "iso_vg" (with "kv100") or by "sae" (with "kv40" and "kv100").
std::shared_ptr<OilFluid> OilFromGrade(const json& j, const std::string& ptr, const OilKv& kv, const OilExtras& ex,
                                       CaseContext& c, std::string* err, bool* reported) {
  *reported = true;
  if (j.contains("iso_vg")) {
    if (!j["iso_vg"].is_number_integer()) {
      c.diag.Error("wrong-type", ptr + "/iso_vg", "expected an ISO 3448 grade number (2, 3, 5, 7, 10, 15, 22, 32, 46, 68, 100, ...)");
      return nullptr;
    }
    if (std::isnan(kv.kv100)) {
      c.diag.Error("missing-field", ptr, "an ISO VG grade fixes KV40 only: give \"kv100\" too");
      return nullptr;
    }
    *reported = false;
    return OilFluid::FromIsoVg(j["iso_vg"].get<int>(), kv.kv100, ex, err);
  }
  std::string g;
  if (!c.ReadString(j, "sae", ptr, &g, true)) return nullptr;
  if (std::isnan(kv.kv40) || std::isnan(kv.kv100)) {
    c.diag.Error("missing-field", ptr, "an SAE J300 grade needs \"kv40\" and \"kv100\" of the actual oil");
    return nullptr;
  }
  *reported = false;
  return OilFluid::FromSaeJ300(g, kv.kv40, kv.kv100, ex, err);
}

// An oil by "kv40" and "kv100"; with `binding`, the variables they follow.
std::shared_ptr<OilFluid> OilFromKv(const std::string& ptr, const OilKv& kv, const OilExtras& ex, CaseContext& c,
                                    FluidBinding* binding, std::string* err, bool* reported) {
  if (std::isnan(kv.kv40) || std::isnan(kv.kv100)) {
    c.diag.Error("missing-field", ptr,
                 "an oil needs its viscosity: \"kv40\" and \"kv100\", or \"viscosity\" (two points), or \"iso_vg\" with \"kv100\"");
    *reported = true;
    return nullptr;
  }
  auto oil = OilFluid::FromTwoPoints(kv.kv40, 313.15, kv.kv100, 373.15, ex, err);
  if (oil && binding && kv.bound()) {
    binding->oil = oil;
    binding->kv40 = kv.kv40;
    binding->kv100 = kv.kv100;
    binding->kv40_var = kv.kv40_var;
    binding->kv100_var = kv.kv100_var;
  }
  return oil;
}

// How the oil's viscosity is given; false (reported) if it may not follow
// envelope variables or is given more than one way.
bool CheckOilWays(const json& j, const std::string& ptr, const OilKv& kv, CaseContext& c) {
  if (kv.bound() && (j.contains("viscosity") || j.contains("iso_vg") || j.contains("sae"))) {
    c.diag.Error("not-bindable", ptr + (kv.kv40_var >= 0 ? "/kv40" : "/kv100"),
                 "only an oil given by \"kv40\" and \"kv100\" alone can follow envelope variables");
    return false;
  }
  const int ways = j.contains("viscosity") + j.contains("iso_vg") + j.contains("sae");
  if (ways > 1) {
    c.diag.Error("conflicting-fields", ptr, "give one of \"viscosity\", \"iso_vg\" or \"sae\" (or kv40 with kv100)");
    return false;
  }
  return true;
}

FluidPtr BuildOil(const json& j, const std::string& ptr, CaseContext& c, FluidBinding* binding) {
  c.UnknownKeys(j, ptr, {"kind", "kv40", "kv100", "viscosity", "iso_vg", "sae", "density_15C", "expansion",
                         "specific_heat", "conductivity", "t_min", "t_max", "source"});
  OilExtras ex;
  bool ok = ReadOilExtras(j, ptr, c, &ex);
  OilKv kv;
  auto visc = [&](const char* key, double* out, int* var) {
    if (j.contains(key)) ok = c.ReadQuantity(j[key], ptr + "/" + key, Dimension::kKinematicViscosity, out,
                                             binding ? var : nullptr) && ok;
  };
  visc("kv40", &kv.kv40, &kv.kv40_var);
  visc("kv100", &kv.kv100, &kv.kv100_var);
  if (!ok || !CheckOilWays(j, ptr, kv, c)) return nullptr;
  std::string err;
  std::shared_ptr<OilFluid> oil;
  std::string where = ptr;
  bool reported = false;
  if (j.contains("viscosity")) {
    where = ptr + "/viscosity";
    oil = OilFromPoints(j["viscosity"], where, ex, c, &err, &reported);
  } else if (j.contains("iso_vg") || j.contains("sae")) {
    where = ptr + (j.contains("iso_vg") ? "/iso_vg" : "/sae");
    oil = OilFromGrade(j, ptr, kv, ex, c, &err, &reported);
  } else {
    oil = OilFromKv(ptr, kv, ex, c, binding, &err, &reported);
  }
  if (!oil && !reported) c.diag.Error("bad-fluid", where, err.empty() ? "the oil definition is not physical" : err);
  return oil;
}

FluidPtr BuildTable(const json& j, const std::string& ptr, CaseContext& c) {
  c.UnknownKeys(j, ptr, {"kind", "rows", "viscosity", "source"});
  std::string visc = "kinematic";
  if (j.contains("viscosity")) c.ReadString(j, "viscosity", ptr, &visc, true);
  if (visc != "kinematic" && visc != "dynamic") {
    c.diag.Error("unknown-choice", ptr + "/viscosity", fmt::format("expected \"kinematic\" or \"dynamic\", got \"{}\"", visc));
    return nullptr;
  }
  if (!j.contains("rows") || !j["rows"].is_array()) {
    c.diag.Error("missing-field", ptr, "a table fluid needs \"rows\": [[temperature, viscosity, density, specific heat, conductivity], ...]");
    return nullptr;
  }
  const json& rows = j["rows"];
  if (rows.size() < 2 || rows.size() > 10000) {
    c.diag.Error("too-few-rows", ptr + "/rows", fmt::format("a table needs 2 to 10,000 rows, got {}", rows.size()));
    return nullptr;
  }
  TableFluidColumns cols;
  const Dimension vd = visc == "kinematic" ? Dimension::kKinematicViscosity : Dimension::kDynamicViscosity;
  const Dimension dims[5] = {Dimension::kTemperature, vd, Dimension::kDensity, Dimension::kSpecificHeat,
                             Dimension::kThermalConductivity};
  bool ok = true;
  for (size_t r = 0; r < rows.size(); ++r) {
    std::string rp = ptr + "/rows/" + std::to_string(r);
    if (!rows[r].is_array() || rows[r].size() != 5) {
      c.diag.Error("wrong-type", rp, "expected a row [temperature, viscosity, density, specific heat, conductivity]");
      ok = false;
      continue;
    }
    double v[5];
    for (int k = 0; k < 5; ++k) ok = c.ReadQuantity(rows[r][k], rp + "/" + std::to_string(k), dims[k], &v[k]) && ok;
    cols.T_K.push_back(v[0]);
    (visc == "kinematic" ? cols.nu_m2s : cols.mu_Pas).push_back(v[1]);
    cols.rho_kgm3.push_back(v[2]);
    cols.cp_JkgK.push_back(v[3]);
    cols.k_WmK.push_back(v[4]);
  }
  if (!ok) return nullptr;
  std::string err;
  auto f = TableFluid::Create(cols, &err);
  if (!f) c.diag.Error("bad-fluid", ptr + "/rows", err);
  return f;
}

}  // namespace

FluidPtr BuildFluid(const json& j, const std::string& ptr, CaseContext& c, FluidBinding* binding) {
  if (!j.is_object()) {
    c.diag.Error("wrong-type", ptr, "expected a fluid object {\"kind\": ...} or {\"part\": ...}, got " + TypeName(j));
    return nullptr;
  }
  if (j.contains("part")) {
    c.UnknownKeys(j, ptr, {"part"});
    std::string id;
    if (!c.ReadString(j, "part", ptr, &id, true)) return nullptr;
    const PartEntry* p = c.ResolvePart(id, ptr + "/part");
    if (!p) return nullptr;
    if (p->type != "fluid") {
      c.diag.Error("bad-part", ptr + "/part", fmt::format("part \"{}\" is a {}, not a fluid", id, p->type));
      return nullptr;
    }
    // Errors inside a library entry point at the reference.
    Diagnostics inner;
    CaseContext sub(inner, c.envelope);
    sub.ambient_pa = c.ambient_pa;
    sub.case_path = c.case_path;
    FluidPtr f = BuildFluid(p->params, "", sub);
    for (const auto& d : inner.items())
      c.diag.Error(d.id, ptr + "/part", fmt::format("in part \"{}\" ({}) at {}: {}", id, p->file,
                                                   d.pointer.empty() ? "/" : d.pointer, d.message));
    return f;
  }
  std::string kind;
  if (!c.ReadString(j, "kind", ptr, &kind, true)) return nullptr;
  if (kind == "oil") return BuildOil(j, ptr, c, binding);
  if (kind == "water") {
    c.UnknownKeys(j, ptr, {"kind", "source"});
    return std::make_shared<WaterFluid>();
  }
  if (kind == "glycol") {
    c.UnknownKeys(j, ptr, {"kind", "glycol", "mass_fraction", "source"});
    std::string g;
    double x = 0;
    bool ok = c.ReadString(j, "glycol", ptr, &g, true);
    if (ok && g != "ethylene" && g != "propylene") {
      c.diag.Error("unknown-choice", ptr + "/glycol",
                   fmt::format("unknown glycol \"{}\"; expected \"ethylene\" or \"propylene\"", g));
      ok = false;
    }
    if (!j.contains("mass_fraction")) {
      c.diag.Error("missing-field", ptr, "a glycol mixture needs \"mass_fraction\" (0 to 0.6)");
      return nullptr;
    }
    if (!c.ReadQuantity(j["mass_fraction"], ptr + "/mass_fraction", Dimension::kDimensionless, &x) || !ok) return nullptr;
    std::string err;
    auto f = GlycolWaterFluid::Create(g == "ethylene" ? Glycol::kEthylene : Glycol::kPropylene, x, &err);
    if (!f) c.diag.Error("out-of-range", ptr + "/mass_fraction", err);
    return f;
  }
  if (kind == "table") return BuildTable(j, ptr, c);
  std::vector<std::string> kinds = {"oil", "water", "glycol", "table"};
  std::string near = NearestName(kind, kinds);
  c.diag.Error("unknown-choice", ptr + "/kind",
               fmt::format("unknown fluid kind \"{}\"{}; expected one of: oil, water, glycol, table (or \"part\")", kind,
                           near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near)));
  return nullptr;
}

FluidPtr FluidFromPartParams(const json& params, std::string* error) {
  Diagnostics d;
  CaseContext c(d, nullptr);
  FluidPtr f = BuildFluid(params, "", c);
  if (!f && error) *error = d.Format("part");
  return f;
}

}  // namespace loopwright
