// lw_probe commands for the hydraulic correlations (components/correlations).
// Lists of numbers are passed as one comma-separated argument so that one
// probe call evaluates a whole grid; outputs are JSON arrays in the same order.
//
//   corr.friction METHOD RE_LIST RR_LIST [FIXED_F]  -> {f, fre, dfre_dre}
//                                        (dfre_dre: d(f*Re)/dRe on a Jet)
//   corr.fittings_table                             -> {hooper, darby, constant_k}
//   corr.hooper2k K1 KINF D_LIST RE_LIST            -> {k, k_re}
//   corr.darby3k K1 KI KD D_LIST RE_LIST            -> {k, k_re}
//   corr.fitting_dp K1 KPRIME RHO MU D V_LIST       -> {dp}
//   corr.iec_dp RHO MU KV d D FL FD FULL Q_LIST     -> {dp, dp_standard, rev}
//   corr.iec_fr KV d FL FULL REV_LIST               -> {fr, fr_standard}
//   corr.cv_to_kv CV_LIST                           -> {kv}
//   corr.rhg D d TAPS RE_LIST  (TAPS corner|flange|D)  -> {c}
//   corr.orifice_dp RHO MU d D CDINF DELTA Q_LIST    -> {dp}
//   corr.orifice_loss_ratio BETA C_LIST             -> {ratio}
//   corr.journal_film METHOD L_OVER_D S_LIST  (METHOD ocvirk_1952|raimondi_boyd_1958)
//                                                   -> {eps, attitude_rad, deps_ds, range}
#include <ceres/jet.h>

#include <cmath>
#include <limits>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "components/correlations/fittings.h"
#include "components/correlations/friction.h"
#include "components/correlations/journal_film.h"
#include "components/correlations/orifice.h"
#include "components/correlations/valve_iec60534.h"
#include "tests/tools/probe.h"

namespace loopwright::probe {
namespace {

using nlohmann::json;

std::string ArgS(const Args& a, size_t i) {
  if (i >= a.size()) throw std::runtime_error("missing argument " + std::to_string(i));
  return a[i];
}

// JSON has no infinity: non-finite values are written as null.
json Num(double x) { return std::isfinite(x) ? json(x) : json(nullptr); }

json Friction(const Args& a) {
  const auto method = ParseFrictionMethod(ArgS(a, 0));
  if (!method) throw std::runtime_error("unknown friction method " + a[0]);
  const auto re = ArgList(a, 1), rr = ArgList(a, 2);
  const double fixed_f = a.size() > 3 ? ArgD(a, 3) : 0.02;
  if (re.size() != rr.size()) throw std::runtime_error("RE_LIST and RR_LIST differ in length");
  json f = json::array(), fre = json::array(), dfre = json::array();
  using ReJet = ceres::Jet<double, 1>;
  for (size_t i = 0; i < re.size(); ++i) {
    f.push_back(Num(FrictionFactor(*method, re[i], rr[i], fixed_f)));
    fre.push_back(Num(FrictionFactorTimesRe(*method, re[i], rr[i], fixed_f)));
    dfre.push_back(Num(FrictionFactorTimesRe(*method, ReJet(re[i], 0), ReJet(rr[i]), fixed_f).v[0]));
  }
  return {{"f", f}, {"fre", fre}, {"dfre_dre", dfre}};
}

json FittingsTable(const Args&) {
  json h = json::array(), d = json::array(), c = json::array();
  for (const auto& e : kHooperFittings)
    h.push_back({{"name", e.name}, {"k1", e.k1}, {"k_inf", e.k_inf}});
  for (const auto& e : kDarbyFittings)
    d.push_back({{"name", e.name}, {"k1", e.k1}, {"k_i", e.k_i}, {"k_d", e.k_d}});
  for (const auto& e : kConstantKFittings) c.push_back({{"name", e.name}, {"k", e.k}});
  return {{"hooper", h}, {"darby", d}, {"constant_k", c}};
}

json Hooper(const Args& a) {
  const double k1 = ArgD(a, 0), kinf = ArgD(a, 1);
  const auto dm = ArgList(a, 2), re = ArgList(a, 3);
  json k = json::array(), kre = json::array();
  for (size_t i = 0; i < re.size(); ++i) {
    k.push_back(Num(Hooper2K(re[i], dm[i], k1, kinf)));
    kre.push_back(Num(Hooper2KTimesRe(re[i], dm[i], k1, kinf)));
  }
  return {{"k", k}, {"k_re", kre}};
}

json Darby(const Args& a) {
  const double k1 = ArgD(a, 0), ki = ArgD(a, 1), kd = ArgD(a, 2);
  const auto dm = ArgList(a, 3), re = ArgList(a, 4);
  json k = json::array(), kre = json::array();
  for (size_t i = 0; i < re.size(); ++i) {
    k.push_back(Num(Darby3K(re[i], dm[i], k1, ki, kd)));
    kre.push_back(Num(Darby3KTimesRe(re[i], dm[i], k1, ki, kd)));
  }
  return {{"k", k}, {"k_re", kre}};
}

json FittingDpCmd(const Args& a) {
  const double k1 = ArgD(a, 0), kp = ArgD(a, 1), rho = ArgD(a, 2), mu = ArgD(a, 3), d = ArgD(a, 4);
  json dp = json::array();
  for (double v : ArgList(a, 5)) dp.push_back(Num(FittingDp(v, rho, mu, d, k1, kp, 0.0)));
  return {{"dp", dp}};
}

json IecDp(const Args& a) {
  const double rho = ArgD(a, 0), mu = ArgD(a, 1), kv = ArgD(a, 2);
  // IecValveGeometry{d, D, FL, Fd, full_trim}
  const IecValveGeometry g{ArgD(a, 3), ArgD(a, 4), ArgD(a, 5), ArgD(a, 6), ArgD(a, 7) != 0.0};
  json dp = json::array(), dps = json::array(), rev = json::array();
  for (double q : ArgList(a, 8)) {
    dp.push_back(Num(IecValveDp(q, kv, rho, mu, g)));
    dps.push_back(Num(IecValveDpStandard(q, kv, rho, mu, g)));
    rev.push_back(Num(g.valve_diameter_m > 0 ? IecValveReynolds(q, kv, mu / rho, g) : 0.0));
  }
  return {{"dp", dp}, {"dp_standard", dps}, {"rev", rev}};
}

json IecFr(const Args& a) {
  const double kv = ArgD(a, 0);
  const IecValveGeometry g{ArgD(a, 1), 0.0, ArgD(a, 2), 1.0, ArgD(a, 3) != 0.0};
  json fr = json::array(), frs = json::array();
  for (double rev : ArgList(a, 4)) {
    fr.push_back(Num(IecReynoldsFactor(rev, kv, g)));
    frs.push_back(Num(IecReynoldsFactorStandard(rev, kv, g)));
  }
  return {{"fr", fr}, {"fr_standard", frs}};
}

json CvToKvCmd(const Args& a) {
  json kv = json::array();
  for (double cv : ArgList(a, 0)) kv.push_back(Num(CvToKv(cv)));
  return {{"kv", kv}};
}

json Rhg(const Args& a) {
  const double dpipe = ArgD(a, 0), d = ArgD(a, 1);
  const std::string t = ArgS(a, 2);
  OrificeTaps taps = OrificeTaps::kCorner;
  if (t == "flange")
    taps = OrificeTaps::kFlange;
  else if (t == "D")
    taps = OrificeTaps::kDAndDOver2;
  else if (t != "corner")
    throw std::runtime_error("taps: corner|flange|D");
  json c = json::array();
  for (double re : ArgList(a, 3)) c.push_back(Num(ReaderHarrisGallagherC(re, dpipe, d, taps)));
  return {{"c", c}};
}

json OrificeDpCmd(const Args& a) {
  const double rho = ArgD(a, 0), mu = ArgD(a, 1), d = ArgD(a, 2), dpipe = ArgD(a, 3),
               cd = ArgD(a, 4), delta = ArgD(a, 5);
  json dp = json::array();
  for (double q : ArgList(a, 6)) dp.push_back(Num(OrificeDp(q, rho, mu, d, dpipe, cd, delta)));
  return {{"dp", dp}};
}

json OrificeLossRatio(const Args& a) {
  const double beta = ArgD(a, 0);
  json r = json::array();
  for (double c : ArgList(a, 1)) r.push_back(Num(OrificePressureLossRatio(beta, c)));
  return {{"ratio", r}};
}

json JournalFilm(const Args& a) {
  const std::string method = ArgS(a, 0);
  if (method != "ocvirk_1952" && method != "raimondi_boyd_1958") throw std::runtime_error("unknown film method " + method);
  const double ld = ArgD(a, 1);
  json eps = json::array(), phi = json::array(), slope = json::array(), range = json::array();
  for (double s : ArgList(a, 2)) {
    const FilmSolution f = method == "ocvirk_1952" ? OcvirkFilm(s, ld) : RaimondiBoydFilm(s, ld);
    eps.push_back(Num(f.eps));
    phi.push_back(Num(f.attitude_rad));
    slope.push_back(Num(f.deps_ds));
    range.push_back(f.range);
  }
  return {{"eps", eps}, {"attitude_rad", phi}, {"deps_ds", slope}, {"range", range}};
}

LW_PROBE_COMMAND("corr.friction", Friction);
LW_PROBE_COMMAND("corr.journal_film", JournalFilm);
LW_PROBE_COMMAND("corr.fittings_table", FittingsTable);
LW_PROBE_COMMAND("corr.hooper2k", Hooper);
LW_PROBE_COMMAND("corr.darby3k", Darby);
LW_PROBE_COMMAND("corr.fitting_dp", FittingDpCmd);
LW_PROBE_COMMAND("corr.iec_dp", IecDp);
LW_PROBE_COMMAND("corr.iec_fr", IecFr);
LW_PROBE_COMMAND("corr.cv_to_kv", CvToKvCmd);
LW_PROBE_COMMAND("corr.rhg", Rhg);
LW_PROBE_COMMAND("corr.orifice_dp", OrificeDpCmd);
LW_PROBE_COMMAND("corr.orifice_loss_ratio", OrificeLossRatio);

}  // namespace
}  // namespace loopwright::probe
