// The limits the envelope checks use, each with its default from common
// practice and its dimension. A case overrides any of them under "checks".
// Every default here is a rule of thumb of the trade (common practice), not a
// standard's requirement: confirm against the machine and part makers' data.
#pragma once

#include <string>
#include <vector>

#include "library/units.h"

namespace loopwright {

struct CheckLimit {
  std::string key;
  Dimension dim;
  double default_si;  // NaN: no default, the check runs only when the case sets it
  std::string description;
  std::string basis;  // where the default comes from
  // The default is an absolute pressure [Pa abs]: CheckLimitValue converts it
  // to gauge with the case's ambient pressure, so altitude matters.
  bool default_absolute = false;
};

const std::vector<CheckLimit>& CheckLimits();
const CheckLimit* FindCheckLimit(const std::string& key);

}  // namespace loopwright
