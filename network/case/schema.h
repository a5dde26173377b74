// The JSON Schema (draft 2020-12) of case files, generated from the component
// registry, the check limits and the loader's vocabularies, so the schema and
// the loader cannot drift apart. `loopwright schema` prints it; the shipped
// cases/case.schema.json is its output, and a test keeps the two equal.
#pragma once

#include <nlohmann/json.hpp>

namespace loopwright {

nlohmann::json CaseSchema();

}  // namespace loopwright
