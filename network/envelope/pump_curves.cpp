#include "network/envelope/pump_curves.h"

#include <algorithm>
#include <cmath>
#include <functional>

#include "components/registry.h"

namespace loopwright {

namespace {

// A root of f near x0: the bracket is widened from x0 by `step` (doubling,
// both ways) until f changes sign, then bisected to a relative width of
// 1e-13. NaN when no sign change is found within 40 doublings.
double BracketedRoot(const std::function<double(double)>& f, double x0, double step) {
  const double f0 = f(x0);
  if (f0 == 0) return x0;
  double a = x0, fa = f0, b = x0, fb = f0;
  bool found = false;
  for (int i = 0; i < 40 && !found; ++i, step *= 2) {
    for (double dir : {1.0, -1.0}) {
      const double x = x0 + dir * step, fx = f(x);
      if (std::isfinite(fx) && (fx > 0) != (f0 > 0)) {
        b = x;
        fb = fx;
        found = true;
        break;
      }
    }
  }
  if (!found || !std::isfinite(fb)) return NAN;
  for (int it = 0; it < 200 && std::abs(b - a) > 1e-13 * std::max(std::abs(a) + std::abs(b), 1e-30); ++it) {
    const double m = 0.5 * (a + b), fm = f(m);
    if (!std::isfinite(fm)) return NAN;
    if ((fm > 0) == (fa > 0)) {
      a = m;
      fa = fm;
    } else {
      b = m;
    }
  }
  return 0.5 * (a + b);
}

// The pump law of branch k at the point's fluid state: residual at flow q
// [m3/s] and rise [Pa] (rise = p(to) - p(from) = rho g dz - dp_law).
struct PumpLaw {
  const Component* model;
  double rho, mu, dz;
  double operator()(double q, double rise) const {
    double r[1 + kMaxInternal] = {0, 0, 0};
    model->Evaluate(rho * kGravity * dz - rise, rho * q, rho, mu, nullptr, r);
    return r[0];
  }
};

void AddPumpCurve(const PumpLaw& law, double q_op, double rise_op, int n, PumpSystemCurves* out) {
  const double q_max = 1.6 * q_op, y_lo = -0.2 * std::abs(rise_op), y_hi = 3.0 * std::abs(rise_op);
  const double dq = std::max(q_op, 1e-9) * 0.05, dy = std::max(std::abs(rise_op), 1e3) * 0.05;
  auto keep = [&](double q, double y) {
    if (std::isfinite(q) && std::isfinite(y) && q >= 0 && q <= q_max && y >= y_lo && y <= y_hi)
      out->pump.push_back({q, y});
  };
  for (int i = 0; i < n; ++i) {
    const double q = q_max * i / (n - 1);
    keep(q, BracketedRoot([&](double y) { return law(q, y); }, rise_op, dy));
    const double y = y_lo + (y_hi - y_lo) * i / (n - 1);
    keep(BracketedRoot([&](double qq) { return law(qq, y); }, q_op, dq), y);
  }
  std::sort(out->pump.begin(), out->pump.end(),
            [](const CurveSample& a, const CurveSample& b) { return a.flow_m3s < b.flow_m3s; });
}

// The flows of a system curve: 0 .. 1.6 q_op, and q_op with its +-0.5 %.
std::vector<double> SystemFlows(double q_op, int n) {
  std::vector<double> q;
  for (int i = 0; i < n; ++i) q.push_back(1.6 * q_op * i / (n - 1));
  for (double f : {0.995, 1.0, 1.005}) q.push_back(f * q_op);
  std::sort(q.begin(), q.end());
  return q;
}

// The system curve of branch k: the pump replaced by a fixed flow, the rest
// at the solved point's state (u0, T0), solved at each flow.
void AddSystemCurve(CaseSolver* s, const OperatingPoint& op, int k, const Eigen::VectorXd& u0,
                    const std::vector<double>& T0, int n, PumpSystemCurves* out) {
  const Branch& b = s->sys.branches()[k];
  const ComponentType* ff = FindComponentType("fixed_flow");
  PartCandidate part;
  part.id = "system-curve";
  part.type_info = ff;
  std::vector<ParamError> errors;
  part.model = ff->make(ParamValues{{out->op_flow_m3s, NAN}, {}}, &errors);
  s->overrides = {};
  s->overrides.SetPart(b.loop, b.comp, &part);
  Eigen::VectorXd u = u0;
  for (double q : SystemFlows(out->op_flow_m3s, n)) {
    s->overrides.SetParam(b.loop, b.comp, 0, q);
    s->Apply(op);
    if (s->IsThermal(op)) s->thermal->ApplyBranchFluids(T0, u0, &s->sys);
    const SolverSummary sum = s->solver.Solve(&u);
    if (!sum.converged()) {
      ++out->failed_samples;
      u = u0;
      continue;
    }
    out->system.push_back({q, s->sys.NodePressure(b.to_node, u) - s->sys.NodePressure(b.from_node, u)});
  }
  s->overrides = {};
}

}  // namespace

std::vector<PumpSystemCurves> PumpAndSystemCurves(const Case& cs, const OperatingPoint& op, int samples) {
  std::vector<PumpSystemCurves> out;
  CaseSolver s(cs);
  const PointResult r = s.Solve(op, false);
  if (!r.converged) return out;
  const Eigen::VectorXd u0 = s.u;
  const std::vector<double> T0 = s.T;
  std::vector<PumpSystemCurves> found;
  for (const BranchOutcome& bo : r.branches) {
    const ComponentSpec& spec = cs.loops[bo.loop].components[bo.comp];
    if (!(BranchType(cs, bo).roles & kRolePump) || bo.flow_m3s <= 0) continue;
    PumpSystemCurves c;
    c.loop = bo.loop;
    c.comp = bo.comp;
    c.where = cs.loops[bo.loop].id + "/" + spec.id;
    c.point = op.name;
    c.op_flow_m3s = bo.flow_m3s;
    const BranchResult st = BranchState(cs, r, bo);
    c.op_rise_pa = st.p_to - st.p_from;
    const int k = BranchOffsets(cs)[bo.loop] + bo.comp;
    const Component* model = s.sys.working_model(k);
    if (model->NumInternal() == 0) {
      const BranchFluid& f = s.sys.branch_fluid(k);
      AddPumpCurve(PumpLaw{model, f.rho, f.mu, s.sys.Dz(s.sys.branches()[k])}, c.op_flow_m3s, c.op_rise_pa, samples, &c);
    }
    found.push_back(std::move(c));
  }
  for (PumpSystemCurves& c : found) {
    AddSystemCurve(&s, op, BranchOffsets(cs)[c.loop] + c.comp, u0, T0, samples, &c);
    out.push_back(std::move(c));
  }
  return out;
}

}  // namespace loopwright
