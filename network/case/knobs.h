// Which design parameters ("knobs") the fix search and sizing may move, and
// the catalog line sizes that a suggested line diameter is snapped to.
//
// A case marks parameters fixed — a bought rotor's clearance, a pump already
// on the bench — on the component:
//   {"id": "bearing", ..., "fixed": ["radial_clearance"]}   those parameters
//   {"id": "pump", ..., "fixed": true}                       every parameter
// and/or, at the top level, lists the knobs that may move (every other knob
// is then held) and more fixed ones, by the names the fix search prints:
//   "knobs": {"allow": ["oil/supply_line.diameter", "oil/relief"],
//             "fixed": ["oil_cooler.conductance"]}
// A name is "loop/component.parameter", "loop/component" (each of its
// knobs) or "coupling.conductance" (a liquid coupling's UA; "coupling" alone
// reads the same). Read and checked at load (network/case/knobs.cpp): an
// unknown name is an error at its JSON Pointer with the nearest valid name;
// an allowed parameter must be a knob of its type and not bound to an
// envelope variable; a design question on a held parameter is an error at
// the question's component. Sensitivities still differentiate every knob
// (network/envelope/sensitivity.h DesignKnob::held says why one is held); the
// fix search and sizing skip held ones.
#pragma once

#include <string>
#include <vector>

namespace loopwright {

// One component parameter (param -1: every parameter of the component), or
// a coupling's conductance (coupling >= 0).
struct KnobRef {
  int loop = -1, comp = -1, param = -1;
  int coupling = -1;
  std::string pointer;  // where the case says so (JSON Pointer)
  bool Covers(int l, int c, int p, int cp) const {
    if (coupling >= 0 || cp >= 0) return coupling == cp;
    return loop == l && comp == c && (param < 0 || param == p);
  }
};

// A catalog line size (library/parts, category "line"): the part id, its
// component type (the family: pipe, tube, hose) and its bore [m].
struct CatalogLine {
  std::string id, type;
  double bore = 0;
};

struct KnobPolicy {
  bool has_allow = false;       // "knobs": {"allow": [...]} given: only those move
  std::vector<KnobRef> allow;
  std::vector<KnobRef> fixed;   // component "fixed" and "knobs": {"fixed": [...]}
  std::vector<CatalogLine> lines;  // every catalog line size, by family then bore

  // Why the knob may not move ("" when it may): "fixed at POINTER" or "not
  // in /knobs/allow".
  std::string Held(int loop, int comp, int param, int coupling) const;
};

}  // namespace loopwright
