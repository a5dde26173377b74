// `loopwright fit` — see fit_command.h.
#include "cli/fit_command.h"

#include <cmath>
#include <fstream>
#include <iostream>
#include <sstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "cli/output.h"
#include "network/design/fit.h"

namespace loopwright::cli {

namespace {

constexpr int kExitOk = 0;
constexpr int kExitInvalid = 2;
constexpr int kExitInternal = 4;

std::string Stem(const std::string& path) {
  const size_t slash = path.find_last_of('/');
  std::string s = slash == std::string::npos ? path : path.substr(slash + 1);
  const size_t dot = s.find_last_of('.');
  return dot == std::string::npos || dot == 0 ? s : s.substr(0, dot);
}

std::string Num(double v) { return std::isfinite(v) ? fmt::format("{:.6g}", v) : std::string("n/a"); }

nlohmann::json JsonNum(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr); }

std::string Report(const FitResult& r, const FitData& d) {
  std::string s = fmt::format("fit {} to {} ({} point{} used)\n\n", r.model, d.file, r.used, r.used == 1 ? "" : "s");
  s += "parameters (SI)        value           std. error\n";
  for (const auto& p : r.params) {
    std::string flag = p.fixed ? "  (held, not fitted)" : (p.at_bound ? "  (at its bound)" : "");
    s += fmt::format("  {:<20} {:>14} {:>14}  {}{}\n", p.name, Num(p.value), Num(p.std_error), p.unit, flag);
  }
  s += fmt::format("\npoints: measured and fitted {} [{}]\n", r.measured, r.measured_unit);
  s += "  where                         measured         fitted   residual\n";
  for (const auto& p : r.points)
    s += fmt::format("  {:<26} {:>14} {:>14} {:>+9.3f} %{}\n", d.Where(p.row), Num(p.measured), Num(p.fitted),
                     100 * p.residual_relative, p.excluded ? "  (excluded)" : "");
  s += fmt::format("\nRMS relative error {:.4g} %, R^2 {:.6f}\n", 100 * r.rms_relative, r.r_squared);
  s += "data range:\n";
  for (const auto& l : r.ranges) s += "  " + l + "\n";
  for (const auto& n : r.notes) s += "note: " + n + "\n";
  for (const auto& w : r.warnings) s += "warning: " + w + "\n";
  return s;
}

nlohmann::json ReportJson(const FitResult& r, const FitData& d, const nlohmann::json& part) {
  nlohmann::json params = nlohmann::json::array();
  for (const auto& p : r.params)
    params.push_back({{"name", p.name}, {"value", JsonNum(p.value)}, {"standard_error", JsonNum(p.std_error)},
                      {"unit", p.unit}, {"fixed", p.fixed}, {"at_bound", p.at_bound}});
  nlohmann::json points = nlohmann::json::array();
  for (const auto& p : r.points)
    points.push_back({{"line", p.line}, {"row", p.row}, {"measured", p.measured}, {"fitted", p.fitted},
                      {"residual_relative", p.residual_relative}, {"excluded", p.excluded}});
  nlohmann::json conditions = nlohmann::json::object();
  for (const auto& [k, v] : d.condition_text) conditions[k] = v;
  return {{"tool", "loopwright"},
          {"version", LOOPWRIGHT_VERSION},
          {"command", "fit"},
          {"model", r.model},
          {"data", d.file},
          {"conditions", conditions},
          {"measured", r.measured},
          {"measured_unit", r.measured_unit},
          {"points_used", r.used},
          {"parameters", params},
          {"points", points},
          {"rms_relative_error", r.rms_relative},
          {"r_squared", r.r_squared},
          {"data_range", r.range_json},
          {"warnings", r.warnings},
          {"notes", r.notes},
          {"part", part}};
}

int Run(const std::string& data_path, const std::string& model, const std::string& json_out,
        const std::string& part_out, const std::string& part_id, bool quiet) {
  const FitModelSpec* spec = FindFitModel(model);
  if (spec == nullptr) {
    std::string names;
    for (const auto& m : FitModels()) names += (names.empty() ? "" : ", ") + m.name;
    std::cerr << fmt::format("error: unknown model \"{}\"; models: {}\n", model, names);
    return kExitInvalid;
  }
  std::ifstream in(data_path, std::ios::binary);
  if (!in) {
    std::cerr << fmt::format("error: {}: cannot read the data file\n", data_path);
    return kExitInvalid;
  }
  std::ostringstream text;
  text << in.rdbuf();
  FitData data;
  std::string err;
  if (!ParseFitData(data_path, text.str(), *spec, &data, &err)) {
    std::cerr << "error: " << err << "\n";
    return kExitInvalid;
  }
  FitResult r;
  const FitStatus st = FitModel(data, model, &r, &err);
  if (st != FitStatus::kOk) {
    std::cerr << (st == FitStatus::kInternal ? "internal error: " : "error: ") << err << "\n";
    return st == FitStatus::kInternal ? kExitInternal : kExitInvalid;
  }
  const std::string id = part_id.empty() ? "fit-" + Stem(data_path) : part_id;
  const nlohmann::json part = FitPartEntry(r, id, Stem(data_path) + (data.json ? ".json" : ".csv"));
  if (quiet) {
    std::string ps;
    for (const auto& p : r.params) ps += fmt::format(" {}={}", p.name, Num(p.value));
    std::cout << fmt::format("fit {}:{} (RMS {:.3g} %)\n", model, ps, 100 * r.rms_relative);
  } else {
    std::cout << Report(r, data);
    std::cout << "\npart entry:\n" << part.dump(2) << "\n";
  }
  if (!json_out.empty() && !WriteFileAtomic(json_out, ReportJson(r, data, part).dump(2) + "\n", &err)) {
    std::cerr << "error: " << err << "\n";
    return kExitInternal;
  }
  if (!part_out.empty()) {
    nlohmann::json file = {{"//", "written by loopwright fit; check the fitted part against the data range before use"},
                           {"parts", nlohmann::json::array({part})}};
    if (!WriteFileAtomic(part_out, file.dump(2) + "\n", &err)) {
      std::cerr << "error: " << err << "\n";
      return kExitInternal;
    }
  }
  return kExitOk;
}

}  // namespace

int FitMain(const std::string& data_path, const std::string& model, const std::string& json_out,
            const std::string& part_out, const std::string& part_id, bool quiet) {
  try {
    return Run(data_path, model, json_out, part_out, part_id, quiet);
  } catch (const std::exception& e) {
    std::cerr << "internal error: " << e.what() << "\n";
    return kExitInternal;
  } catch (...) {
    std::cerr << "internal error: unknown exception\n";
    return kExitInternal;
  }
}

}  // namespace loopwright::cli
