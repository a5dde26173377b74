// The scenario-trace hook of the report (cli/report_plots.h ScenarioPlot):
// series grouped in one panel per dimension, values in the units printed,
// each watched limit drawn in its dimension's panel. Unit factors: 0 degC =
// 273.15 K (SI Brochure, 9th ed., 2.3.1) and 1 L = 1e-3 m3 (SI Brochure,
// table 8); nothing else is taken from the code under test.
#include <doctest/doctest.h>

#include <set>

#include "cli/report_plots.h"

using namespace loopwright;
using namespace loopwright::cli;

TEST_CASE("ScenarioPlot: one panel per dimension, values and limits in the printed units") {
  TimeSeriesPlot t;
  t.id = "shutdown";
  t.title = "Hot shutdown";
  t.times_s = {0, 60, 120};
  t.series = {{"oil/housing T", Dimension::kTemperature, {363.15, 383.15, 393.15}},
              {"oil/feed T", Dimension::kTemperature, {353.15, 358.15, 360.15}},
              {"oil/pump flow", Dimension::kVolumeFlow, {1e-4, 5e-5, 0}}};
  t.limits = {{"drain_temperature_max at oil/housing", Dimension::kTemperature, 393.15}};
  const ReportPlot p = ScenarioPlot(t, UnitSystem::kSI);
  CHECK(p.id == "plot-scenario-shutdown");
  const auto& panels = p.spec.at("vconcat");
  REQUIRE(panels.size() == 2);
  int temperature_panels = 0, rules = 0;
  for (const auto& panel : panels) {
    const auto& lines = panel.at("layer").at(0).at("data").at("values");
    std::set<std::string> names;
    for (const auto& r : lines) names.insert(r.at("series").get<std::string>());
    if (names.count("oil/housing T")) {
      ++temperature_panels;
      CHECK(names.size() == 2);
      CHECK(lines.size() == 6);
      for (const auto& r : lines)
        if (r.at("series") == "oil/housing T" && r.at("time_s") == 60) CHECK(r.at("y").get<double>() == doctest::Approx(110.0));
      REQUIRE(panel.at("layer").size() == 2);
      const auto& rule = panel.at("layer").at(1).at("data").at("values").at(0);
      CHECK(rule.at("y").get<double>() == doctest::Approx(120.0));
      ++rules;
    } else {
      CHECK(names == std::set<std::string>{"oil/pump flow"});
      CHECK(panel.at("layer").size() == 1);  // no limit of this dimension
      CHECK(lines.at(0).at("y").get<double>() == doctest::Approx(6.0));  // 1e-4 m3/s = 6 L/min
    }
  }
  CHECK(temperature_panels == 1);
  CHECK(rules == 1);
}
