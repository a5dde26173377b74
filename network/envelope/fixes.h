// What would fix a failing check: for each failing (or tight) check, the
// design parameter ("knob") that moves its margin most at the governing
// point, the value that restores the margin there, and whether that value
// passes the whole envelope or breaks another check.
//
// Knobs: the design parameters of network/envelope/sensitivity.h (DesignKnobs): the
// parameters a designer changes before buying parts and that are not bound
// to envelope variables — valve opening and kvs, relief valve crack, orifice
// and rolling-bearing jet diameter, displacement pump displacement and speed,
// centrifugal pump speed, air cooler and coupling conductance, line
// diameters, journal bearing clearance — less those the case holds (fixed,
// or not in its knobs.allow: network/case/knobs.h). Held knobs are ranked
// with the others; one more effective than the knob suggested is named in
// the note (and `skipped`), so the user knows it was passed over.
//
// A suggested line diameter (pipe, tube, hose) is then snapped to the next
// catalog size of its family and the envelope re-solved with it (`snap`);
// every other knob is continuous.
//
// Sensitivities d(margin)/d(knob) are exact tangents of the governing point
// (implicit function theorem on the coupled hydraulic-thermal equations; see
// network/envelope/sensitivity.h): one factorisation of the point's Jacobians serves
// every knob, and no point is re-solved to rank them. Knobs are ranked by the
// margin change per 1 % change of the knob. The restoring value is found by
// Newton's method on the margin at the governing point with the exact slope
// at each iterate (target: 2 % of the limit's magnitude above it, so the
// suggestion is not on the edge; for the open/closed checks relief_closed and
// filter_bypass_closed, whose margin is crack - pressure across the valve,
// closing_margin x crack, re-read at each iterate because the crack may be
// the knob), then the whole envelope is re-solved with it.
#pragma once

#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/envelope/checks.h"

namespace loopwright {

// A suggested line diameter snapped to the catalog: the next size of the
// line's family (library/parts lines.json: a tube to a tube size, a hose to
// a hose dash size, a pipe to a pipe schedule size) that meets the
// suggestion, in the direction it moves (the smallest bore at or above a
// larger suggestion, the largest at or below a smaller one), and the whole
// envelope re-solved with that bore.
struct CatalogSnap {
  std::string part;             // catalog part id ("" when no size meets the suggestion)
  double bore = kNoValue;       // its bore [m]
  bool envelope_passes_check = false;  // the check passes at every point with it
  std::vector<std::string> broken;     // other checks that fail with it (and did not before)
  double worst_margin = kNoValue;      // the check's smallest margin over the envelope with it (SI)
  std::string note;
};

struct FixSuggestion {
  CheckId id = CheckId::kCount;     // the check's row of the check table
  std::string check, where, point;  // the failing (or tight) check and its governing point
  bool tight = false;               // passes, with little to spare
  double margin = 0;                // its margin at the governing point (SI)
  double target = 0;                // the margin the suggested value gives there
  std::string knob;                 // "loop/component.param"
  Dimension dim = Dimension::kDimensionless;
  double current = 0, suggested = kNoValue;  // suggested: NaN when none is found
  double sensitivity_per_percent = 0;  // margin change for +1 % of the knob
  Dimension margin_dim = Dimension::kDimensionless;  // of the margin (a temperature margin is a difference)
  bool found = false;                  // a value restoring the margin at the point
  int newton_steps = 0;                // re-solves of the governing point to find it
  bool envelope_passes_check = false;  // the check passes at every point with it
  std::vector<std::string> broken;     // other checks that fail with it (and did not before)
  std::string note;
  // Knobs that move the margin more than the one suggested but that the
  // case holds (fixed, or not in knobs.allow), most effective first.
  struct Skipped {
    std::string knob, held;  // its name, and why the case holds it
    double per_percent = 0;  // its margin change for +1 %
  };
  std::vector<Skipped> skipped;
  bool snapped = false;  // the knob is a line diameter with a catalog family: `snap` holds it
  CatalogSnap snap;
  // When the suggested value leaves the check failing elsewhere or breaks
  // another check: the next free knob, among the three most effective, whose
  // value restores the margin, passes the check at every point and breaks
  // nothing (has_alternative false when none does).
  struct Alternative {
    std::string knob;
    Dimension dim = Dimension::kDimensionless;
    double current = 0, suggested = kNoValue, per_percent = 0;
    int newton_steps = 0;
  };
  bool has_alternative = false;
  Alternative alternative;
  std::vector<std::string> alternatives_tried;  // knobs tried for it without a clean value
};

// Suggestions for every failing summary check (at most `max_checks`: those
// with the least relative margin, MarginRank, in the summary's order), then
// for every tight one — passing with less than `tight_fraction` of its
// limit's magnitude to spare, or less than kTightTemperatureK for a
// temperature limit, or (open/closed checks) less than the larger of that
// fraction and closing_margin of the crack (at most `max_checks` more): the
// knob that moves its margin most, and the value that lifts the margin out of
// the tight band.
inline constexpr double kTightTemperatureK = 5.0;  // common practice: within the scatter of oil temperature estimates
// The band under which a passing check is tight: `fraction` of the limit's
// magnitude, for an open/closed check at least its closing margin below the
// crack; kTightTemperatureK for a temperature limit (measured on an
// arbitrary zero). A passing check with a limit is tight when its margin is
// below it.
double TightBand(const Case& cs, const CheckOutcome& o, double fraction);
std::vector<FixSuggestion> SuggestFixes(const Case& cs, const std::vector<CheckSummary>& summary, int max_checks = 8,
                                        double tight_fraction = 0.05);

}  // namespace loopwright
