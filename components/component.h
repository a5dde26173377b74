// Component: the interface between one physics model and the network.
//
// A component is a branch from node `from` to node `to` of one loop. The
// network gives its law the local state and the law returns residuals that
// vanish when the law holds:
//
//   dp   = p(from) - p(to) + rho*g*(z(from) - z(to))   [Pa]  piezometric drop
//   m    = mass flow, positive from -> to                [kg/s]
//   rho  = density, mu = dynamic viscosity of the fluid in the branch
//          (evaluated by the network at the branch temperature)
//   x[i] = the component's internal unknowns (NumInternal() of them), e.g. the
//          pressure drop across a filter element, in SI.
//
// The law is written once as a template on the scalar type T and instantiated
// for double (residuals) and for LocalJet (residuals with exact derivatives by
// forward-mode automatic differentiation; ceres::Jet). Derivative slots of a
// LocalJet: 0 = dp, 1 = m, 2 = rho, 3 = mu, 4.. = internal unknowns. The
// network chains these onto node pressures, temperatures and flows.
//
// Each residual has a kind (pressure in Pa, or volumetric flow in m3/s) so the
// network can judge convergence in physical units and scale its merit
// function. A law must be continuous, and smooth, in every argument, including
// m = 0 and flow reversal; |Q|-type terms use the smooth forms of
// components/correlations/smooth.h with a scale far below any design flow.
#pragma once

#include <ceres/jet.h>

#include <algorithm>
#include <limits>
#include <memory>
#include <mutex>
#include <new>
#include <string>
#include <string_view>
#include <type_traits>
#include <unordered_set>
#include <vector>

#include "components/param_array.h"
#include "library/fluid.h"
#include "library/units.h"

namespace loopwright {

inline constexpr int kMaxInternal = 2;
inline constexpr int kJetSlots = 4 + kMaxInternal;
using LocalJet = ceres::Jet<double, kJetSlots>;
// The Newton solve's jet: derivatives with respect to dp (slot 0), m (1) and
// the internal unknowns (2..) only; rho and mu enter as constants. Two slots
// fewer than LocalJet make every operation of the law cheaper.
inline constexpr int kFlowJetSlots = 2 + kMaxInternal;
using FlowJet = ceres::Jet<double, kFlowJetSlots>;
// The jets of a law with one row, no internal unknowns and no sensed outlet
// (Component::EvaluateWithSlopes): DropFlowJet carries dp (slot 0) and m (1);
// FlowSlopeJet carries m alone, for a law declared loss-minus-drop (below).
// Ceres' Jet arithmetic is the same double operations slot by slot, so each
// slot comes out with the same bits as FlowJet's.
using DropFlowJet = ceres::Jet<double, 2>;
using FlowSlopeJet = ceres::Jet<double, 1>;

enum class ResidualKind { kPressure, kVolumeFlow };

// Heat a component adds to its stream (thermal solve). The network computes
// the dissipation of the branch's pressure drop, Q*dp (which also carries a
// pump's hydraulic power), itself; HeatAdded returns the rest: shaft power
// for pumps, friction and heat soak for bearings, minus the heat a cooler
// rejects. Derivatives are carried with respect to the branch's inlet
// temperature only (slot 0). `fluid` (with p_abs, the pressure of the
// network's enthalpy, library/enthalpy.h) lets a heat exchanger use the
// stream's mean cp over its own temperature change; null means cp at the
// inlet. For a pump (role kRolePump) HeatAdded is its shaft power, all of it
// work: a case with "work_heat": false leaves it and every Q*dp out.
using HeatJet = ceres::Jet<double, 1>;
struct HeatInputs {
  double m = 0;     // mass flow [kg/s], from -> to
  double dp = 0;    // piezometric drop [Pa]
  HeatJet t_in;     // inlet (upstream) temperature [K]
  HeatJet rho, cp, mu;  // fluid at t_in
  const Fluid* fluid = nullptr;  // the stream's fluid (enthalpy); may be null
  double p_abs = 101325.0;       // pressure of its enthalpy [Pa]
};

// The stream through a branch as the thermal solve sees it between two
// hydraulic solves (FollowStream): its upstream temperature, mass flow
// (from -> to), the pressure of its properties and its fluid.
struct StreamState {
  double t_in = 0;      // [K]
  double m = 0;         // [kg/s]
  double p_abs = 101325.0;  // [Pa]
  const Fluid* fluid = nullptr;
};

// A word of a component's report (an item's key or its qualitative state)
// held without a copy, as one pointer: to a string literal, or to the one
// shared copy of a word made at run time (interned: a std::string is copied
// once per distinct text into a process-wide table). Words come from a
// model's fixed vocabulary ("laminar", "lifting"), never from numbers, so
// the table stays small. A const char* must point to static storage (a
// literal). Read as a std::string_view (its length counted when read).
class ReportWord {
 public:
  ReportWord() = default;
  ReportWord(const char* literal) : text_(literal) {}
  ReportWord(const std::string& word) : text_(Intern(word)) {}
  std::string_view view() const { return text_; }
  operator std::string_view() const { return text_; }
  bool empty() const { return *text_ == '\0'; }
  std::string str() const { return std::string(text_); }
  operator std::string() const { return str(); }
  friend bool operator==(const ReportWord& a, std::string_view b) { return a.view() == b; }
  friend bool operator==(std::string_view a, const ReportWord& b) { return a == b.view(); }
  friend bool operator==(const ReportWord& a, const char* b) { return a.view() == b; }
  friend bool operator==(const ReportWord& a, const std::string& b) { return a.view() == b; }
  friend bool operator==(const ReportWord& a, const ReportWord& b) { return a.view() == b.view(); }
  friend bool operator!=(const ReportWord& a, std::string_view b) { return a.view() != b; }
  friend bool operator!=(const ReportWord& a, const char* b) { return a.view() != b; }
  friend std::string operator+(const ReportWord& a, const std::string& b) { return a.str() + b; }
  friend std::string operator+(const std::string& a, const ReportWord& b) { return a + b.str(); }
  friend std::string operator+(const char* a, const ReportWord& b) { return a + b.str(); }
  friend std::string operator+(const ReportWord& a, const char* b) { return a.str() + b; }

 private:
  static const char* Intern(const std::string& word) {
    static std::mutex mutex;
    static std::unordered_set<std::string> words;  // nodes never move
    std::lock_guard<std::mutex> lock(mutex);
    return words.insert(word).first->c_str();
  }
  const char* text_ = "";
};

// A value reported after a solve (velocity, Reynolds number, bypass flow...).
// 32 bytes: keys and states are ReportWords (a pointer each), not strings.
struct ReportItem {
  ReportWord key;  // stable snake_case key, unit in the JSON key is added by the writer
  double value = 0;
  Dimension dim = Dimension::kDimensionless;
  ReportWord text;  // optional qualitative value ("laminar", "lifting")
};

// Everything known about a branch after a converged solve.
struct BranchResult {
  double dp = 0, m = 0, rho = 0, mu = 0;
  double p_from = 0, p_to = 0;  // gauge [Pa]
  double ambient_pa = 101325.0;
  double x[kMaxInternal] = {0, 0};
  // Thermal solve (zero when isothermal): inlet temperature [K], specific
  // heat at it [J/(kg.K)], total heat added to the stream [W], outlet
  // temperature [K] from the enthalpy balance h(t_out) = h(t_in) + heat/|m|
  // (library/enthalpy.h; t_in when the flow is stopped), and the fluid.
  // At an isothermal point of a solve (network/point/run.cpp) t_in = t_out
  // is the loop's temperature and fluid is set; cp and heat stay zero.
  double t_in = 0, cp = 0, heat = 0, t_out = 0;
  const Fluid* fluid = nullptr;
  bool thermal = false;
  // Only the checks will read this description (a tolerance study's
  // samples): a model may leave out report items that no check reads and
  // that cost a search (the gravity drain's fill level). Never set for an
  // answer that is shown or written.
  bool for_checks_only = false;
};

// A spring valve that must stay shut in running service — a relief valve, a
// displacement pump's internal relief, a filter's bypass — as its component's
// Describe reports it: the typed state the network's open/closed checks read
// (relief_closed, filter_bypass_closed), so no check depends on a display
// label; the labels ("lifting"/"closed", "open"/"closed") are derived from
// Open().
//
// One open/closed threshold for every such valve: it is open when the flow
// through it exceeds kValveOpenFraction = 1e-3 of its flow at full open (the
// relief valve's rated_flow, the pump relief's relief_flow, the bypass's
// bypass_flow). Why 1e-3: the pump relief and the filter bypass are softplus
// laws of width w = 0.02 (p_f - p_c) that pass w ln2/(p_f - p_c) = 1.4 % of
// full flow at the crack itself and a trace below it (a smoothing artefact,
// not a weep); 1e-3 of full flow is reached 0.06 (p_f - p_c) below the crack
// (ln(e^0.05 - 1) = -2.97 widths), inside the rounding and well inside the
// closing_margin band (5 % of crack, while p_f - p_c is 20-25 % of crack), so
// a valve called open is one whose pressure has reached its crack to within
// the model's rounding. The relief valve's law is exactly zero below crack
// and its C2 lift passes 1e-3 of rated flow just above crack. A smaller
// fraction (the relief's former 1e-6) would call the softplus valves open a
// fifth of their band below crack, on the smoothing tail alone; a larger one
// (1e-2) would miss a valve weeping a per cent of its capacity. (Common
// practice: a cracking pressure is the pressure at which a small specified
// flow is first measured.)
inline constexpr double kValveOpenFraction = 1e-3;

enum class ValveKind { kNone, kReliefValve, kInternalRelief, kFilterBypass };

struct ValveState {
  ValveKind kind = ValveKind::kNone;  // kNone: the component has no such valve
  double pressure = 0;   // the pressure its spring sees [Pa]: across a relief valve, a pump's rise, the element drop
  double crack = 0;      // its cracking pressure [Pa]
  double flow = 0;       // flow through it [m3/s]
  double full_flow = 0;  // its flow at full open [m3/s], the scale of the threshold
  bool Open() const { return IsOpen(flow, full_flow); }
  static bool IsOpen(double flow, double full_flow) { return flow > kValveOpenFraction * full_flow; }
};

struct ComponentReport {
  std::vector<ReportItem> items;
  ValveState valve;  // a valve that must stay shut, when the component has one
  std::vector<std::string> warnings;  // outside a model's range, relief lifting, ...
  double shaft_power_W = 0;           // power taken from a shaft (pumps)
  double heat_W = 0;                  // heat added to the stream
};

// A linearised law m = g*dp + m0 used to build the cold starting guess:
// g [kg/(s.Pa)] and m0 [kg/s] at the given fluid state and a nominal flow.
struct LinearGuess {
  double g = 0;
  double m0 = 0;
  bool fixes_flow = false;  // the component imposes m = m0 regardless of dp
};

class Component {
 public:
  Component() = default;
  // A copy or a moved-to model is never placed (it lives where its maker
  // put it) and owns its parameters.
  Component(const Component& o) : params_(o.params_) {}
  Component(Component&& o) noexcept : params_(std::move(o.params_)) {}
  Component& operator=(const Component& o) {
    params_ = o.params_;
    return *this;
  }
  virtual ~Component() = default;
  virtual std::unique_ptr<Component> Clone() const = 0;
  // The concrete model's size and alignment, and a move of it into raw
  // storage of that size at `place` (a case's model arena,
  // components/model_arena.h); this object is left moved-from.
  virtual size_t Footprint() const = 0;
  virtual size_t FootprintAlign() const = 0;
  virtual Component* MoveTo(void* place) = 0;

  virtual int NumInternal() const { return 0; }
  virtual ResidualKind Kind(int residual) const = 0;
  // Whether a solver may evaluate the case's own model, shared by every
  // solver thread, until it needs a working copy (a parameter written at a
  // point): true for a model whose const methods write nothing. A model with
  // mutable members (a cache) returns false and gets a copy per solver.
  virtual bool Shareable() const { return true; }

  // Residuals r[0 .. NumInternal()].
  virtual void Evaluate(double dp, double m, double rho, double mu,
                        const double* x, double* r) const = 0;
  virtual void Evaluate(const LocalJet& dp, const LocalJet& m,
                        const LocalJet& rho, const LocalJet& mu,
                        const LocalJet* x, LocalJet* r) const = 0;
  // The law with the solve's jet (FlowJet: slots dp, m, internal unknowns).
  virtual void Evaluate(const FlowJet& dp, const FlowJet& m, double rho, double mu,
                        const FlowJet* x, FlowJet* r) const = 0;

  // A law that reads its outlet port's gauge pressure p_out besides the drop
  // (a pressure-reducing valve, which holds its outlet): SensesOutlet() is
  // true, the network calls EvaluateSensed with p_out = the gauge pressure
  // of node `to` [Pa], and Evaluate(dp, ...) is that law at the type's
  // ReferenceOutletPressure(). Such a law is not a function of dp alone, so it
  // is not reciprocal: the node-pressure Newton and the co-content fallback
  // treat it apart (network/point/system.cpp, nodal.cpp). Jets: p_out's
  // derivative slot is the first after the internal unknowns (FlowJet
  // 2 + NumInternal(), LocalJet 4 + NumInternal()), so a sensing law has
  // fewer than kMaxInternal internal unknowns. Every other law keeps the
  // defaults below and is called as before (one flag per branch).
  virtual bool SensesOutlet() const { return false; }
  virtual double ReferenceOutletPressure() const { return 0.0; }
  virtual void EvaluateSensed(double dp, double p_out, double m, double rho, double mu, const double* x,
                              double* r) const {
    (void)p_out;
    Evaluate(dp, m, rho, mu, x, r);
  }
  virtual void EvaluateSensed(const LocalJet& dp, const LocalJet& p_out, const LocalJet& m, const LocalJet& rho,
                              const LocalJet& mu, const LocalJet* x, LocalJet* r) const {
    (void)p_out;
    Evaluate(dp, m, rho, mu, x, r);
  }
  virtual void EvaluateSensed(const FlowJet& dp, const FlowJet& p_out, const FlowJet& m, double rho, double mu,
                              const FlowJet* x, FlowJet* r) const {
    (void)p_out;
    Evaluate(dp, m, rho, mu, x, r);
  }

  // A law with one row, no internal unknowns and no sensed outlet: its
  // residual, with dr/d(dp) in *a_dp and dr/dm in *a_m (the Newton sweep's
  // local derivatives, the same bits as Evaluate on FlowJet). Default: the
  // FlowJet law; ComponentWithLaw evaluates on a smaller jet.
  virtual double EvaluateWithSlopes(double dp, double m, double rho, double mu, double* a_dp, double* a_m) const {
    FlowJet r[1 + kMaxInternal];
    Evaluate(FlowJet(dp, 0), FlowJet(m, 1), rho, mu, nullptr, r);
    *a_dp = r[0].v[0];
    *a_m = r[0].v[1];
    return r[0].a;
  }

  // True for a law declared r = loss(m) - dp (DeclaresLossMinusDrop below):
  // EvaluateWithSlopes then gives dr/d(dp) = -1 without computing it.
  virtual bool LossMinusDrop() const { return false; }

  // Linearised law for the starting guess.
  virtual LinearGuess Linearize(double rho, double mu) const = 0;
  // Whether Linearize may ever say fixes_flow: true only for the laws that
  // can impose their flow (a fixed flow; a displacement pump without slip).
  // The physical-state test linearises no other model.
  virtual bool MayFixFlow() const { return false; }
  // Starting values of internal unknowns given a guessed dp and m.
  virtual void GuessInternal(double dp, double m, double rho, double mu,
                             double* x) const {
    (void)dp; (void)m; (void)rho; (void)mu; (void)x;
  }
  // Heat added to the stream beyond Q*dp [W] (see HeatInputs).
  virtual HeatJet HeatAdded(const HeatInputs& in) const {
    (void)in;
    return HeatJet(0.0);
  }
  // A law with a point-level state that follows its stream's temperature
  // beyond rho and mu (a journal bearing's film temperature, from which its
  // eccentricity follows): the thermal solve calls this with the branch's
  // stream before each hydraulic solve of a pass (ThermalSystem::
  // ApplyBranchFluids), and the model writes the state into its own slots of
  // params() (reset with the parameters at every point). Default: nothing.
  virtual void FollowStream(const StreamState& s) { (void)s; }
  // True for a model that overrides FollowStream. The network skips the
  // others (a header's pipes: a copy and a compare per component per point
  // spared).
  virtual bool FollowsStream() const { return false; }
  // Derived values and warnings after a converged solve.
  virtual void Describe(const BranchResult& b, ComponentReport* out) const = 0;

  // Parameter values in SI, in the order of the type's ParamSpec list; the
  // network overwrites entries bound to envelope variables before each point.
  ParamArray& params() { return params_; }
  const ParamArray& params() const { return params_; }
  // True for a model placed in a case's arena (components/model_arena.h):
  // ModelDeleter then runs its destructor and frees nothing.
  bool placed() const { return placed_; }

 protected:
  // The values read followed by `slots` - values.size() state slots (NaN
  // until the model writes them), in one allocation of exactly that size.
  void SetParamsWithSlots(const std::vector<double>& values, size_t slots) { params_.AssignWithSlots(values, slots); }
  ParamArray params_;

 private:
  friend class ModelArena;
  bool placed_ = false;
};

// Deletes a model where it was made: a placed one is destroyed in place (its
// arena frees the storage), any other deleted. Converts from
// std::default_delete, so a factory's std::unique_ptr<Component> moves into
// a ModelPtr.
struct ModelDeleter {
  ModelDeleter() = default;
  template <class U>
  ModelDeleter(const std::default_delete<U>&) {}
  void operator()(const Component* c) const {
    if (c && c->placed()) {
      c->~Component();
    } else {
      delete c;
    }
  }
};
using ModelPtr = std::unique_ptr<const Component, ModelDeleter>;

// The copies of a concrete model: a clone on the heap, and a move into a
// case's arena (Component::MoveTo).
template <class Model>
class ModelCopies : public Component {
 public:
  std::unique_ptr<Component> Clone() const override {
    return std::make_unique<Model>(static_cast<const Model&>(*this));
  }
  size_t Footprint() const override { return sizeof(Model); }
  size_t FootprintAlign() const override { return alignof(Model); }
  Component* MoveTo(void* place) override { return new (place) Model(std::move(static_cast<Model&>(*this))); }
};

// A model whose law is r = loss(m; rho, mu, parameters) - dp (one row, no
// internal unknowns: a line, an orifice, a valve's drop) declares
//   static constexpr bool kLossMinusDrop = true;
// Its dr/d(dp) is then -1 exactly, and the Newton sweep carries only dr/dm
// (on FlowSlopeJet). tests/components/component_properties_test.cpp checks
// the declaration of every registered type on LocalJets.
template <class Model, class = void>
struct DeclaresLossMinusDrop : std::false_type {};
template <class Model>
struct DeclaresLossMinusDrop<Model, std::void_t<decltype(Model::kLossMinusDrop)>>
    : std::bool_constant<Model::kLossMinusDrop> {};

// Adapter: a concrete model implements
//   template <class T> void Law(const T& dp, const T& m, const T& rho,
//                               const T& mu, const T* x, T* r) const;
// and derives from ComponentWithLaw<Model> to get both instantiations.
template <class Model>
class ComponentWithLaw : public ModelCopies<Model> {
 public:
  bool LossMinusDrop() const override { return DeclaresLossMinusDrop<Model>::value; }
  void Evaluate(double dp, double m, double rho, double mu, const double* x,
                double* r) const override {
    static_cast<const Model*>(this)->Law(dp, m, rho, mu, x, r);
  }
  void Evaluate(const LocalJet& dp, const LocalJet& m, const LocalJet& rho,
                const LocalJet& mu, const LocalJet* x,
                LocalJet* r) const override {
    static_cast<const Model*>(this)->Law(dp, m, rho, mu, x, r);
  }
  void Evaluate(const FlowJet& dp, const FlowJet& m, double rho, double mu, const FlowJet* x,
                FlowJet* r) const override {
    static_cast<const Model*>(this)->Law(dp, m, FlowJet(rho), FlowJet(mu), x, r);
  }
  double EvaluateWithSlopes(double dp, double m, double rho, double mu, double* a_dp, double* a_m) const override {
    if constexpr (DeclaresLossMinusDrop<Model>::value) {
      FlowSlopeJet r;  // loss(m) - dp with dp a constant: the m slot as FlowJet's, dr/d(dp) = -1
      static_cast<const Model*>(this)->Law(FlowSlopeJet(dp), FlowSlopeJet(m, 0), FlowSlopeJet(rho),
                                           FlowSlopeJet(mu), static_cast<const FlowSlopeJet*>(nullptr), &r);
      *a_dp = -1.0;
      *a_m = r.v[0];
      return r.a;
    } else {
      DropFlowJet r;
      static_cast<const Model*>(this)->Law(DropFlowJet(dp, 0), DropFlowJet(m, 1), DropFlowJet(rho),
                                           DropFlowJet(mu), static_cast<const DropFlowJet*>(nullptr), &r);
      *a_dp = r.v[0];
      *a_m = r.v[1];
      return r.a;
    }
  }
};

// Adapter for a law that reads its outlet's gauge pressure: the model
// implements
//   template <class T> void Law(const T& dp, const T& p_out, const T& m,
//                               const T& rho, const T& mu, const T* x, T* r) const;
//   double ReferenceOutletPressure() const override;
// and gets every instantiation, the drop-only ones at the reference outlet.
template <class Model>
class ComponentWithSensedLaw : public ModelCopies<Model> {
 public:
  bool SensesOutlet() const override { return true; }
  void Evaluate(double dp, double m, double rho, double mu, const double* x, double* r) const override {
    Self().Law(dp, this->ReferenceOutletPressure(), m, rho, mu, x, r);
  }
  void Evaluate(const LocalJet& dp, const LocalJet& m, const LocalJet& rho, const LocalJet& mu, const LocalJet* x,
                LocalJet* r) const override {
    Self().Law(dp, LocalJet(this->ReferenceOutletPressure()), m, rho, mu, x, r);
  }
  void Evaluate(const FlowJet& dp, const FlowJet& m, double rho, double mu, const FlowJet* x,
                FlowJet* r) const override {
    Self().Law(dp, FlowJet(this->ReferenceOutletPressure()), m, FlowJet(rho), FlowJet(mu), x, r);
  }
  void EvaluateSensed(double dp, double p_out, double m, double rho, double mu, const double* x,
                      double* r) const override {
    Self().Law(dp, p_out, m, rho, mu, x, r);
  }
  void EvaluateSensed(const LocalJet& dp, const LocalJet& p_out, const LocalJet& m, const LocalJet& rho,
                      const LocalJet& mu, const LocalJet* x, LocalJet* r) const override {
    Self().Law(dp, p_out, m, rho, mu, x, r);
  }
  void EvaluateSensed(const FlowJet& dp, const FlowJet& p_out, const FlowJet& m, double rho, double mu,
                      const FlowJet* x, FlowJet* r) const override {
    Self().Law(dp, p_out, m, FlowJet(rho), FlowJet(mu), x, r);
  }

 private:
  const Model& Self() const { return static_cast<const Model&>(*this); }
};

}  // namespace loopwright
