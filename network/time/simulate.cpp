#include "network/time/simulate.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <memory>

#include <cvode/cvode.h>
#include <nvector/nvector_serial.h>
#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

#include <fmt/format.h>

#include "network/point/run.h"
#include "network/time/transient_model.h"

namespace loopwright {

const Scenario* FindScenario(const Case& cs, const std::string& id) {
  for (const Scenario& s : cs.scenarios)
    if (s.id == id) return &s;
  return nullptr;
}

namespace {

// The SUNDIALS objects of one run, released together.
struct Cvode {
  SUNContext ctx = nullptr;
  N_Vector y = nullptr, work = nullptr;
  SUNMatrix a = nullptr;
  SUNLinearSolver ls = nullptr;
  void* mem = nullptr;
  ~Cvode() {
    if (mem) CVodeFree(&mem);
    if (ls) SUNLinSolFree(ls);
    if (a) SUNMatDestroy(a);
    if (y) N_VDestroy(y);
    if (work) N_VDestroy(work);
    if (ctx) SUNContext_Free(&ctx);
  }
};

int Rhs(realtype t, N_Vector y, N_Vector ydot, void* data) {
  auto* m = static_cast<TransientModel*>(data);
  return m->Derivatives(t, N_VGetArrayPointer(y), N_VGetArrayPointer(ydot)) ? 0 : 1;  // 1: recoverable
}

// CVODE's own messages stay off the terminal: the run reports its outcome.
void QuietErrors(int, const char*, const char*, char*, void*) {}

bool SetUp(TransientModel& model, const SimulateOptions& opt, double t0, const std::vector<double>& y0, Cvode* cv,
           std::string* error) {
  const int n = model.size();
  if (SUNContext_Create(nullptr, &cv->ctx) != 0) return *error = "SUNDIALS context", false;
  cv->y = N_VNew_Serial(n, cv->ctx);
  cv->work = N_VNew_Serial(n, cv->ctx);
  std::copy(y0.begin(), y0.end(), N_VGetArrayPointer(cv->y));
  cv->mem = CVodeCreate(CV_BDF, cv->ctx);
  cv->a = SUNDenseMatrix(n, n, cv->ctx);
  cv->ls = SUNLinSol_Dense(cv->y, cv->a, cv->ctx);
  if (!cv->mem || !cv->a || !cv->ls) return *error = "CVODE could not be created", false;
  CVodeSetErrHandlerFn(cv->mem, QuietErrors, nullptr);
  if (CVodeInit(cv->mem, Rhs, t0, cv->y) != CV_SUCCESS ||
      CVodeSStolerances(cv->mem, opt.rtol, opt.atol_k) != CV_SUCCESS ||
      CVodeSetUserData(cv->mem, &model) != CV_SUCCESS ||
      CVodeSetLinearSolver(cv->mem, cv->ls, cv->a) != CV_SUCCESS ||
      CVodeSetMaxNumSteps(cv->mem, opt.max_steps) != CV_SUCCESS)
    return *error = "CVODE could not be set up", false;
  return true;
}

std::string CvodeFailure(int flag, double t, const TransientModel& model) {
  const char* what = flag == CV_TOO_MUCH_WORK ? "too many steps"
                     : flag == CV_ERR_FAILURE  ? "repeated error-test failures"
                     : flag == CV_CONV_FAILURE ? "repeated Newton convergence failures"
                     : flag == CV_RHSFUNC_FAIL || flag == CV_REPTD_RHSFUNC_ERR || flag == CV_UNREC_RHSFUNC_ERR
                         ? "the right-hand side failed"
                         : "integrator failure";
  std::string s = fmt::format("the integration stopped at t = {:.6g} s: {} (CVODE flag {})", t, what, flag);
  if (!model.last_failure().empty()) s += "; " + model.last_failure();
  return s;
}

// The times the integration stops at: 0, every event's start and ramp end,
// the end; sorted, unique, within [0, end].
std::vector<double> StopTimes(const Scenario& sc) {
  std::vector<double> t = {0.0, sc.end};
  for (const ScenarioEvent& e : sc.events) {
    t.push_back(e.at);
    if (e.ramp > 0) t.push_back(std::min(sc.end, e.at + e.ramp));
  }
  std::sort(t.begin(), t.end());
  t.erase(std::unique(t.begin(), t.end()), t.end());
  return t;
}

// Settles a steady start with thermal masses at the start inputs (time
// before t = 0) until no temperature changes faster than the options' rate.
bool Settle(TransientModel& model, const SimulateOptions& opt, std::vector<double>* y, SimulationResult* res) {
  if (model.num_masses() == 0) return true;
  model.SetSegment(-opt.settle_time_s);
  Cvode cv;
  if (!SetUp(model, opt, -opt.settle_time_s, *y, &cv, &res->failure)) return false;
  CVodeSetStopTime(cv.mem, 0.0);
  std::vector<double> ydot(y->size());
  realtype t = -opt.settle_time_s;
  for (long step = 0; t < 0 && step < opt.settle_max_steps; ++step) {
    const int flag = CVode(cv.mem, 0.0, cv.y, &t, CV_ONE_STEP);
    if (flag < 0) return res->failure = "settling the start: " + CvodeFailure(flag, t, model), false;
    std::copy_n(N_VGetArrayPointer(cv.y), y->size(), y->begin());
    if (!model.Derivatives(t, y->data(), ydot.data())) continue;
    double rate = 0;
    for (double d : ydot) rate = std::max(rate, std::abs(d));
    res->settle_rate = rate;
    if (rate < opt.settle_rate_k_s) break;
  }
  res->settle_time = t + opt.settle_time_s;
  return true;
}

// The wording of a warning without its numbers (digits and decimal points).
std::string Wording(const std::string& text) {
  std::string w;
  for (char c : text)
    if (!std::isdigit(static_cast<unsigned char>(c)) && c != '.') w += c;
  return w;
}

// Records each component warning at output instant t: a new entry, or the
// later end of one with the same place and wording.
void NoteWarnings(TransientModel& model, double t, SimulationResult* res) {
  for (const auto& [where, text] : model.ComponentWarnings()) {
    auto it = std::find_if(res->warnings.begin(), res->warnings.end(), [&](const RunWarning& w) {
      return w.where == where && Wording(w.text) == Wording(text);
    });
    if (it == res->warnings.end()) res->warnings.push_back({where, text, t, t});
    else it->to = t;
  }
}

// A maximum of state i inside the last step [a, b]: where its slope on
// CVODE's interpolating polynomial (CVodeGetDky, k = 1) turns from rising
// to falling, located by bisection to 1e-9 of the step; its value there
// (k = 0) raises the peak p if higher.
void PeakInStep(void* mem, int i, double a, double b, N_Vector w, PeakValue* p) {
  auto slope = [&](double t) {
    CVodeGetDky(mem, t, 1, w);
    return N_VGetArrayPointer(w)[i];
  };
  if (!(slope(a) > 0 && slope(b) < 0)) return;
  const double width = b - a;
  for (int k = 0; k < 100 && b - a > 1e-9 * width; ++k) {
    const double mid = 0.5 * (a + b);
    (slope(mid) > 0 ? a : b) = mid;
  }
  const double t = 0.5 * (a + b);
  CVodeGetDky(mem, t, 0, w);
  if (N_VGetArrayPointer(w)[i] > p->value) p->value = N_VGetArrayPointer(w)[i], p->time = t;
}

// Peaks at the end of each internal step, and of a watched state between
// its ends (PeakInStep).
void TrackPeaks(const TransientModel& model, void* mem, double t, const double* y, N_Vector w, SimulationResult* res) {
  double h = 0;
  CVodeGetLastStep(mem, &h);
  for (PeakValue& p : res->peaks) {
    const double v = model.Watched(p.what, y);
    if (v > p.value) p.value = v, p.time = t;
    const int i = model.WatchedState(p.what);
    if (i >= 0 && h > 0) PeakInStep(mem, i, t - h, t, w, &p);
  }
}

// Integrates segment [a, b] (no input steps inside), recording outputs at
// the grid times in (a, b] and tracking peaks at every internal step.
bool Segment(TransientModel& model, Cvode& cv, double a, double b, const std::vector<double>& grid, size_t* next_out,
             double end, const SimulateOptions& opt, SimulationResult* res) {
  model.SetSegment(a);
  CVodeReInit(cv.mem, a, cv.y);
  CVodeSetStopTime(cv.mem, b);
  realtype t = a;
  std::vector<double> yi(model.size());
  N_Vector yo = N_VClone(cv.y);
  bool ok = true;
  while (t < b) {
    const int flag = CVode(cv.mem, b, cv.y, &t, CV_ONE_STEP);
    if (flag < 0) {
      res->failure = CvodeFailure(flag, t, model);
      ok = false;
      break;
    }
    TrackPeaks(model, cv.mem, t, N_VGetArrayPointer(cv.y), yo, res);
    while (*next_out < grid.size() && grid[*next_out] <= t) {
      CVodeGetDky(cv.mem, grid[*next_out], 0, yo);
      res->samples.push_back(model.Sample(grid[*next_out], N_VGetArrayPointer(yo)));
      NoteWarnings(model, grid[*next_out], res);
      ++*next_out;
    }
    if (opt.progress) opt.progress(std::min(1.0, t / end));
  }
  N_VDestroy(yo);
  return ok;
}

std::vector<double> OutputGrid(const Scenario& sc, const SimulateOptions& opt) {
  double dt = std::isnan(opt.output_interval) ? sc.output_interval : opt.output_interval;
  if (std::isnan(dt) || !(dt > 0)) dt = sc.end / 200;
  std::vector<double> g;
  const long n = static_cast<long>(std::floor(sc.end / dt * (1 + 1e-12)));
  for (long k = 1; k <= n; ++k) g.push_back(k * dt);
  if (g.empty() || g.back() < sc.end * (1 - 1e-12)) g.push_back(sc.end);
  return g;
}

}  // namespace

SimulationResult Simulate(const Case& cs, const Scenario& sc, const SimulateOptions& opt) {
  SimulationResult res;
  TransientModel model(cs, sc);
  std::vector<double> y;
  if (!model.Start(&y, &res.failure)) return res;
  if (std::isnan(sc.start_temperature) && !Settle(model, opt, &y, &res)) return res;
  model.Names(&res.node_names, &res.mass_names, &res.branch_names);
  model.BranchEnds(&res.branch_from, &res.branch_to);
  res.node_free = model.FreeNodes();
  for (const std::string& w : model.WatchList()) res.peaks.push_back({w, model.Watched(w, y.data()), 0.0, 0.0});
  for (PeakValue& p : res.peaks) p.start = p.value;
  model.SetSegment(0.0);
  res.samples.push_back(model.Sample(0.0, y.data()));
  NoteWarnings(model, 0.0, &res);
  Cvode cv;
  if (!SetUp(model, opt, 0.0, y, &cv, &res.failure)) return res;
  const std::vector<double> stops = StopTimes(sc), grid = OutputGrid(sc, opt);
  size_t next_out = 0;
  for (size_t i = 0; i + 1 < stops.size(); ++i)
    if (!Segment(model, cv, stops[i], stops[i + 1], grid, &next_out, sc.end, opt, &res)) return res;
  long v = 0;
  CVodeGetNumSteps(cv.mem, &v), res.steps = v;
  CVodeGetNumRhsEvals(cv.mem, &v), res.rhs_evals = v;
  CVodeGetNumJacEvals(cv.mem, &v), res.jac_evals = v;
  CVodeGetNumErrTestFails(cv.mem, &v), res.error_test_fails = v;
  res.hydraulic_solves = model.hydraulic_solves();
  res.ok = true;
  return res;
}

}  // namespace loopwright
