// The results document (JSON, SI values with the unit in the key name), as
// described in DESIGN.md section 5 and the README.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"

namespace loopwright {

// "_Pa", "_m3_s", ... for a dimension ("" for dimensionless).
std::string SiKeySuffix(Dimension dim);

// The SI unit of a dimension as the JSON's "unit" fields name it ("Pa",
// "m3_s", ...; "1" for dimensionless).
std::string SiUnitName(Dimension dim);

// One check outcome: name, where, value, limit, margin (SI), unit, pass and
// limit_source ("default", "case" or "component": where its limit came
// from, network/case/check_table.h).
nlohmann::json CheckOutcomeJson(const CheckOutcome& o);

// The cautions every report carries.
const char* SafetyCautions();

nlohmann::json PointJson(const Case& cs, const PointResult& p);
nlohmann::json ResultsJson(const Case& cs, const std::vector<PointResult>& points, const std::string& verdict);

}  // namespace loopwright
