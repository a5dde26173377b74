// Bit-for-bit comparison of two solved points and their checks, for the
// tests whose property is equality between runs of our own code (1 against
// 2 sweep threads; a point solved again after another on the same solver).
// Every double is compared by its bits (memcmp), so -0.0 against 0.0 or two
// different NaNs count as different, and no tolerance hides a leak.
#pragma once

#include <doctest/doctest.h>

#include <cstring>
#include <string>
#include <vector>

#include "network/envelope/checks.h"
#include "network/point/run.h"

namespace loopwright::testing {

inline bool SameBits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

// Counts the differences between two lists of doubles (both sizes must
// agree): vectors or a model's parameters (ParamArray).
template <class ListA, class ListB>
int DiffBits(const ListA& a, const ListB& b) {
  if (a.size() != b.size()) return 1;
  int n = 0;
  for (size_t i = 0; i < a.size(); ++i) n += SameBits(a[i], b[i]) ? 0 : 1;
  return n;
}

// Every number a point reports, flattened in a fixed order: nodes, branches
// (state, report items, heats, flow, parameters in effect), closure figures,
// thermal report. The reports are made when read (BranchReport).
inline std::vector<double> PointNumbers(const Case& cs, const PointResult& p) {
  std::vector<double> v = {p.converged ? 1.0 : 0.0, double(p.summary.newton_iterations),
                           double(p.coupling_iterations), p.max_mass_imbalance_kg_s, p.max_mass_imbalance_rel,
                           double(p.mass_imbalance_node), double(p.nodes.size()), double(p.branches.size())};
  for (const NodeResult& n : p.nodes)
    v.insert(v.end(), {double(n.loop), double(n.node), n.pressure_pa, n.temperature_k, n.boiling_margin_k});
  for (const BranchOutcome& b : p.branches) {
    const BranchResult s = BranchState(cs, p, b);
    const ComponentReport r = BranchReport(cs, p, b);
    v.insert(v.end(), {s.dp, s.m, s.rho, s.mu, s.p_from, s.p_to, s.x[0], s.x[1], s.t_in, s.cp, s.heat, s.t_out,
                       b.flow_m3s, r.heat_W, r.shaft_power_W, double(r.items.size())});
    for (const ReportItem& it : r.items) v.push_back(it.value);
    v.insert(v.end(), b.params.begin(), b.params.end());
  }
  const ThermalReport& t = p.thermal_report;
  for (const auto* list : {&t.branch_heat, &t.branch_t_in, &t.branch_t_out, &t.coupling_duty, &t.loop_closure_W})
    v.insert(v.end(), list->begin(), list->end());
  return v;
}

inline std::vector<double> CheckNumbers(const std::vector<CheckOutcome>& checks) {
  std::vector<double> v = {double(checks.size())};
  for (const CheckOutcome& o : checks) v.insert(v.end(), {o.value, o.limit, o.margin, o.pass ? 1.0 : 0.0});
  return v;
}

// Texts of a point: warnings, report texts, the failure cause.
inline std::string PointTexts(const Case& cs, const PointResult& p) {
  std::string s = p.summary.cause + "|" + p.summary.message;
  for (const auto& w : p.warnings) s += "|" + w;
  for (const BranchOutcome& b : p.branches) {
    const ComponentReport r = BranchReport(cs, p, b);
    for (const ReportItem& it : r.items) s += "|" + it.key + "=" + it.text;
    for (const auto& w : r.warnings) s += "|" + w;
  }
  return s;
}

inline std::string CheckTexts(const std::vector<CheckOutcome>& checks) {
  std::string s;
  for (const CheckOutcome& o : checks) s += std::string(o.name()) + "@" + o.where + "|";
  return s;
}

}  // namespace loopwright::testing
