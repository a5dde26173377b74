// lw_probe: prints loopwright's correlations as JSON so that Python reference
// checks (tests/**/*_test.py, run with Debian's /usr/bin/python3) can compare
// them with python3-fluids / python3-iapws / scipy.
//
// Usage: lw_probe COMMAND [ARGS...]   -> one JSON document on stdout.
// Each tests/tools/probe_*.cpp registers its commands with LW_PROBE_COMMAND.
// Commands read their numeric arguments with ArgD(args, i).
#pragma once

#include <functional>
#include <map>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace loopwright::probe {

using Args = std::vector<std::string>;
using Command = std::function<nlohmann::json(const Args&)>;

std::map<std::string, Command>& Registry();

struct Registrar {
  Registrar(const std::string& name, Command cmd) { Registry()[name] = std::move(cmd); }
};

double ArgD(const Args& a, size_t i);
// A comma-separated list of numbers, argument i.
std::vector<double> ArgList(const Args& a, size_t i);

}  // namespace loopwright::probe

#define LW_PROBE_CAT2(a, b) a##b
#define LW_PROBE_CAT(a, b) LW_PROBE_CAT2(a, b)
#define LW_PROBE_COMMAND(name, fn) \
  static ::loopwright::probe::Registrar LW_PROBE_CAT(lw_probe_reg_, __LINE__)(name, fn)
