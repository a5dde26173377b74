// fit — calibrating a component model from datasheet or test points.
//
// Purpose. `loopwright fit DATA --model M` reads a table of measured or
// datasheet points (CSV or JSON, every column with its unit), fits the
// parameters of one component model by bounded least squares (Ceres), and
// returns the parameters with their standard errors, every point's residual,
// the RMS relative error, R^2, the data range, warnings where the data do not
// cover what the model will be used for, and a parts-library entry that loads
// as a component of that type.
//
// Models (residual of point i: (model_i - measured_i) / |measured_i|, the
// relative error; parameters internally scaled to order one):
//   centrifugal_pump  H = a0 + a1 Q + a2 Q^2 at the condition speed (the
//                     centrifugal_pump component's curve law). Constraints:
//                     a0 > 0 and dH/dQ <= 0 at the largest data flow (so the
//                     head never rises past its peak inside the data range),
//                     imposed by fitting s = a1 + 2 a2 Q_max <= 0 instead of a1.
//                     Data whose head rises past the peak by more than 3 % of
//                     the peak head (ISO 9906 grade 1 head tolerance, from
//                     memory) are refused; smaller rises are test scatter.
//   displacement_pump Q = D n/(2 pi) - C_s dP/mu, D > 0, C_s >= 0 (the
//                     displacement_pump law without its relief); points with
//                     dP above the condition relief_crack are excluded.
//   filter            dp = a mu Q + b rho Q^2, a, b >= 0 (the filter law with
//                     the bypass closed): element (Darcy) + housing loss.
//   air_cooler        q = eps(NTU, Cr) C_min ITD, crossflow both unmixed
//                     (HeatExchanged), UA = UA_r (m_l/m_l,r)^n_l
//                     (m_a/m_a,r)^n_a, n_l, n_a in [0, 1.5]; the rating point
//                     (m_l,r, m_a,r) is the data point with the largest heat.
//                     Optional dp column: the liquid-side drop fitted as
//                     dp = a mu Q + b rho Q^2 (as datasheet_loss).
//   valve             Kv = Kvs phi(x; R) (RelativeKv), characteristic from
//                     the condition `characteristic` (default
//                     equal_percentage; R fitted only for it).
// Each model is evaluated through its component, never restated here: the
// curve by CentrifugalPump::CurveHead, the UA power law by
// AirCooler::ScaledConductance (static templates the components' laws call,
// differentiated exactly), the displacement pump, filter and datasheet_loss
// (the cooler's liquid side) by components built through the registry whose
// parameters the fit sets through params(), as a binding does (their laws are
// linear in the fitted parameters: central differences are exact to
// rounding). The data are read by fit_data.cpp.
// Standard errors: ceres::Covariance gives (J^T J)^-1 for unit-variance
// residuals; it is scaled by s^2 = sum r^2 / (n - p), the residual variance
// estimate (the usual nonlinear least-squares practice, e.g. Bates & Watts,
// "Nonlinear Regression Analysis and Its Applications", Wiley, 1988, ch. 2,
// from memory). With n = p they are not estimable (reported as NaN).
#pragma once

#include <map>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "library/units.h"

namespace loopwright {

// One column or condition a model knows.
struct FitQuantity {
  std::string name;
  Dimension dim = Dimension::kDimensionless;
  std::string description;
  bool text = false;  // condition given as a word (valve characteristic)
};

struct FitModelSpec {
  std::string name;
  std::string summary;
  std::vector<FitQuantity> columns;     // known column names
  std::vector<FitQuantity> conditions;  // known condition names
};

// The specs of every model, and one by name (nullptr when unknown).
const std::vector<FitModelSpec>& FitModels();
const FitModelSpec* FindFitModel(const std::string& name);

// Parsed data: SI values per row, in the file's column order.
struct FitData {
  std::string file;
  bool json = false;
  std::vector<std::string> columns;  // canonical names
  std::vector<std::string> units;    // unit text as written ("" = bare)
  std::vector<std::vector<double>> rows;
  std::vector<int> lines;            // text line (1-based) of each row, CSV or JSON; 0 when unknown
  std::map<std::string, double> conditions;            // SI
  std::map<std::string, std::string> condition_text;   // as written
  std::map<std::string, int> condition_lines;          // text line of each condition (0 when unknown)
  int Column(const std::string& name) const;           // -1 when absent
  // Where row i came from, for messages: "file:LINE" (CSV) or
  // "file:LINE (rows[i])" (JSON).
  std::string Where(size_t row) const;
  // Where condition `name` was set: "file:LINE", or "file" when unknown.
  std::string WhereCondition(const std::string& name) const;
};

// Parses CSV (header `name [unit]`, `#` comments, `# name = value` conditions)
// or JSON ({"columns": [...], "rows": [[...]], "conditions": {...}}, with //
// comments) text for `spec`. False, with *error naming file, line and column,
// on bad input. Every numeric condition is a positive physical quantity
// (speed, density, viscosity, specific heat, cracking pressure); a condition
// set twice, or set both as a condition and as a column, is an error.
bool ParseFitData(const std::string& file, const std::string& text, const FitModelSpec& spec, FitData* out,
                  std::string* error);

struct FitParameter {
  std::string name;
  double value = 0;
  double std_error = 0;  // NaN when not estimable
  Dimension dim = Dimension::kDimensionless;
  std::string unit;      // SI unit of value ("m", "m3/rev", ...)
  bool fixed = false;    // held at a default (not fitted)
  bool at_bound = false;
};

struct FitPointResult {
  size_t row = 0;
  int line = 0;
  double measured = 0;
  double fitted = 0;
  double residual_relative = 0;  // (fitted - measured) / |measured|
  bool excluded = false;
};

enum class FitStatus { kOk, kInvalidData, kInternal };

struct FitResult {
  std::string model;
  std::string measured;       // name of the fitted quantity ("head", ...)
  std::string measured_unit;  // its SI unit
  std::vector<FitParameter> params;
  std::vector<FitPointResult> points;
  size_t used = 0;
  double rms_relative = 0;
  double r_squared = 0;
  std::vector<std::string> ranges;  // readable data range lines
  nlohmann::json range_json = nlohmann::json::object();  // name -> {min, max, unit (SI)}
  std::vector<std::string> warnings;
  std::vector<std::string> notes;
  // Parts-library entry pieces.
  std::string category, type, description;
  nlohmann::json part_params = nlohmann::json::object();
  const FitParameter* Find(const std::string& name) const;
};

// Fits `data` with the model `data` was parsed for. kInvalidData with
// *error for data the model cannot be fitted to (too few points, non-monotone
// where the model needs it, negative flows, missing conditions).
FitStatus FitModel(const FitData& data, const std::string& model, FitResult* out, std::string* error);

// {"id","category","type","source","description","params"} for the result.
nlohmann::json FitPartEntry(const FitResult& r, const std::string& id, const std::string& data_file);

}  // namespace loopwright
