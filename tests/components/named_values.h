// Test helper: a component type's parameter values from its spec defaults
// and a few named SI values (the way a case writes them, without units).
#pragma once

#include <doctest/doctest.h>

#include <map>
#include <string>

#include "components/registry.h"

namespace loopwright {

inline ParamValues NamedValues(const ComponentType& t, const std::map<std::string, double>& values) {
  ParamValues v;
  v.values.assign(t.params.size(), kNoValue);
  v.tables.assign(t.params.size(), {});
  for (size_t i = 0; i < t.params.size(); ++i) v.values[i] = t.params[i].default_si;
  for (const auto& [name, x] : values) {
    const int i = t.ParamIndex(name);
    REQUIRE_MESSAGE(i >= 0, name);
    v.values[i] = x;
  }
  return v;
}

}  // namespace loopwright
