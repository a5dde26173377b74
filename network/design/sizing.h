// Answering a case's design questions ("design": [...]) across its whole
// envelope: every answer must pass every check at every point, not only at a
// design point.
//
// Question kinds (component = "loop/component"):
//   cooler_conductance   smallest UA of an air_cooler (given by conductance)
//                        that passes every check; bounded by min/max
//   cooler_size          smallest of `candidates` (parts of the same type)
//                        that passes every check
//   bypass_opening       the window of valve openings in [min, max] that pass
//                        every check; with target (a bearing feed pressure at
//                        `point`, "loop/bearing" in `target_at`... see README)
//                        also the opening that puts it there
//   relief_setting       the lowest relief cracking pressure that keeps the
//                        relief closed at every running point
//   restrictor_diameter  the orifice (or jet) diameter that gives `target`
//                        flow through it at `point`, checked over the envelope
//   pump_displacement,   smallest displacement / speed of a pump that passes
//   pump_speed           every check
//   pump_choice          every candidate pump part that passes every check,
//                        ranked by shaft power at the governing point
//   line_size            smallest-bore candidate line part that passes every
//                        check (velocity and pressure-drop limits included)
// Scalar answers: a scan brackets the smallest passing value; the check that
// fails just below it is then driven to its limit at its governing point by a
// Ceres root whose derivative is the exact tangent of the re-solved point
// (network/envelope/sensitivity.h), and the answer is re-verified over the envelope
// (bisection for open/closed checks such as relief lifting, and whenever the
// root cannot settle). A target flow (restrictor_diameter) is a Ceres root
// of flow - target at its point with the same exact derivatives.
// A question may move only a knob the case does not hold (fixed, or not in
// its knobs.allow: network/case/knobs.h); one that would is refused at load.
// Questions are typed at load (DesignQuestion in network/case/case.h); knob
// values and part candidates are held in each solver's DesignOverrides
// (network/point/point_state.h): the case is never changed, re-parsed or
// re-read from disk.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/envelope/checks.h"

namespace loopwright {

// A candidate part that did not pass: the check it fails worst (smallest
// relative margin), where, at which point and by how much; or why it could
// not be tried (reason).
struct Rejection {
  std::string candidate, check, where, point, reason;
  double margin = kNoValue;  // SI, in the check's own dimension
  Dimension dim = Dimension::kDimensionless;
};

// The check that fails just beyond an edge of a scalar answer: a value on
// the `side` ("smaller" or "larger") of the answer makes it fail.
struct EdgeCheck {
  std::string check, where, point, side, param;
};

struct SizingAnswer {
  std::string question, kind;
  bool feasible = false;
  double value = kNoValue;        // SI
  std::string value_text;         // part id, or window "a .. b"
  Dimension dim = Dimension::kDimensionless;
  std::string binding_check, binding_where, point;
  double margin = kNoValue;       // of the binding check with the answer (SI)
  Dimension margin_dim = Dimension::kDimensionless;  // of that margin (a temperature margin is a difference)
  std::vector<Rejection> rejected;   // candidates that fail (pump_choice, line_size, cooler_size)
  std::vector<EdgeCheck> edges;      // what sets each edge of a scalar answer or window
  std::vector<std::string> reasons;  // why the binding check binds, in words
  double range_lo = kNoValue, range_hi = kNoValue;  // the range searched, when no value in it passes (SI)
  std::vector<std::string> ranking;  // pump_choice: "id: shaft power W at point"
  std::string note;
  double seconds = 0;
  std::string loop_prefix;  // "loop/": the binding check is sought in the question's loop first
  std::string method;       // how the value was settled ("Ceres root of ...", "bisection", "secant")
  int root_iterations = 0;  // Ceres iterations spent on roots
  std::vector<std::string> warnings;  // model-range and other warnings at the answer (first 8)
};

std::vector<SizingAnswer> AnswerDesignQuestions(const Case& cs);

// A scalar question's sized parameter swept over the range it is searched in
// (the answer's binding check followed at every value): for plotting margin
// against the parameter with the answer and its window marked.
struct SizingScanSample {
  double value = kNoValue;        // the parameter (SI)
  bool converged = false;         // every envelope point converged
  bool pass = false;              // every check passes at every point
  double margin = kNoValue;       // the binding check's worst margin over the envelope (SI)
  std::string point;              // where that margin is worst
};
struct SizingScan {
  std::string question, param, check, where;  // param "loop/component.param"
  Dimension dim = Dimension::kDimensionless, margin_dim = Dimension::kDimensionless;
  bool geometric = false;                     // log-spaced values (a factor-of-20 search)
  std::vector<SizingScanSample> samples;
};
// Scalar kinds (cooler_conductance, pump_displacement, pump_speed,
// relief_setting, bypass_opening, restrictor_diameter) with a movable knob;
// nullopt for part choices, a held knob or an answer without a binding
// check. `n` values, evenly (bypass: linearly; else geometrically) spread
// over the range the answer was searched in (restrictor: a factor of 3 about
// the answer); every value is a whole envelope solve.
std::optional<SizingScan> ScanDesignQuestion(const Case& cs, const DesignQuestion& q, const SizingAnswer& a, int n);
nlohmann::json AnswersJson(const std::vector<SizingAnswer>& a);

}  // namespace loopwright
