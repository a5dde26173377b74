// A parameter bound to an envelope variable solves exactly as the same value
// written in the case (issue 10, item 3), end to end through the loader and
// the solver: two cases differ only in one parameter, "$x" at a point that
// sets x = v against v written in place, and their solved flows and
// pressures must agree to solver tolerance. Before the fix a datasheet_loss
// with rated_dp bound to 1 bar passed a different flow than one with 1 bar
// written (the coefficients were fixed at load with the variable's default).
// Every bindable parameter of every type is covered at the component level
// by tests/components/component_binding_test.cpp; this test checks the path
// the network takes (network/point/run.cpp ApplyPoint) for the parameters the
// audit found cached and for the pump speed whose slip now stays fixed.
// The networks are invented test rigs.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <string>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/point/run.h"

namespace loopwright {
namespace {

using nlohmann::json;

std::string LibraryDir() {
  const char* src = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  return src ? std::string(src) + "/library" : DefaultLibraryDir();
}

// One loop of oil from a 3 bar boundary to a 0 bar boundary through `comps`
// (ids a -> ... -> b), with a variable x of dimension `dim` that the single
// point sets to `value`.
std::string CaseText(const json& comps, const json& nodes, const std::string& dim, const std::string& value) {
  json doc = {{"name", "bound parameter rig (invented)"},
              {"fluids", {{"oil", {{"kind", "oil"}, {"kv40", "32 cSt"}, {"kv100", "5.4 cSt"}}}}},
              {"envelope",
               {{"variables", {{"x", {{"dimension", dim}, {"default", value}}}}},
                {"points", {{{"name", "p"}, {"values", {{"x", value}}}}}}}},
              {"loops", {{{"id", "oil"}, {"fluid", "oil"}, {"temperature", "50 degC"}, {"nodes", nodes},
                          {"components", comps}}}}};
  return doc.dump(2);
}

// The case with the parameter bound: the variable's default differs from
// the point's value, so a model that kept its load-time value shows it.
std::string BoundText(json comps, const json& nodes, size_t comp, const std::string& param, const std::string& dim,
                      const std::string& load_value, const std::string& point_value) {
  comps[comp][param] = "$x";
  json doc = json::parse(CaseText(comps, nodes, dim, point_value));
  doc["envelope"]["variables"]["x"]["default"] = load_value;
  return doc.dump(2);
}

PointResult Solve(const std::string& text, std::unique_ptr<Case>* keep) {
  LoadResult lr = LoadCaseText(text, "bound_case.json", LibraryDir());
  INFO(lr.diagnostics.Format("bound_case.json"));
  REQUIRE(lr.value != nullptr);
  *keep = std::move(lr.value);
  CaseSolver solver(**keep);
  PointResult r = solver.Solve((*keep)->envelope.points[0], false);
  REQUIRE(r.converged);
  return r;
}

void CompareBoundWithWritten(const json& comps, const json& nodes, size_t comp, const std::string& param,
                             const std::string& dim, const std::string& load_value, const std::string& point_value) {
  json written = comps;
  written[comp][param] = point_value;
  std::unique_ptr<Case> a, b;
  const PointResult bound = Solve(BoundText(comps, nodes, comp, param, dim, load_value, point_value), &a);
  const PointResult direct = Solve(CaseText(written, nodes, dim, point_value), &b);
  REQUIRE(bound.branches.size() == direct.branches.size());
  for (size_t i = 0; i < bound.branches.size(); ++i) {
    const double qa = bound.branches[i].flow_m3s, qb = direct.branches[i].flow_m3s;
    INFO(comps[comp]["type"].get<std::string>() << "." << param << " bound (" << load_value << " at load, "
                                                << point_value << " at the point) vs written: branch " << i
                                                << " flow " << qa * 6e4 << " vs " << qb * 6e4 << " L/min");
    CHECK(std::fabs(qa - qb) <= 1e-8 * std::fabs(qb) + 1e-12);
  }
  for (size_t i = 0; i < bound.nodes.size(); ++i)
    CHECK(std::fabs(bound.nodes[i].pressure_pa - direct.nodes[i].pressure_pa) <= 1e-6 * 3e5);
  MESSAGE(comps[comp]["type"].get<std::string>() << "." << param << ": flow " << bound.branches[comp].flow_m3s * 6e4
                                                 << " L/min bound, " << direct.branches[comp].flow_m3s * 6e4
                                                 << " L/min written");
}

json Node(const std::string& id, const char* pressure = nullptr) {
  json n = {{"id", id}};
  if (pressure) n["boundary"] = {{"kind", "pressure"}, {"pressure", pressure}};
  return n;
}

json Comp(const std::string& id, const std::string& type, const std::string& from, const std::string& to, json p) {
  json c = {{"id", id}, {"type", type}, {"from", from}, {"to", to}};
  for (auto it = p.begin(); it != p.end(); ++it) c[it.key()] = it.value();
  return c;
}

TEST_CASE("datasheet_loss rated_dp and pipe minor_k bound to a variable act as written") {
  const json nodes = {Node("a", "3 bar"), Node("m"), Node("b", "0 bar")};
  const json comps = {Comp("d", "datasheet_loss", "a", "m",
                           {{"rated_flow", "10 L/min"}, {"rated_dp", "1 bar"}, {"rated_viscosity", "32 cSt"}}),
                      Comp("line", "pipe", "m", "b", {{"length", "2 m"}, {"diameter", "8 mm"}, {"minor_k", 2.0}})};
  CompareBoundWithWritten(comps, nodes, 0, "rated_dp", "pressure_difference", "0.5 bar", "1 bar");
  CompareBoundWithWritten(comps, nodes, 1, "minor_k", "dimensionless", "0", "12");
}

TEST_CASE("relief_valve crack and rated_density bound to a variable act as written") {
  const json nodes = {Node("a", "6 bar"), Node("b", "0 bar")};
  const json comps = {Comp("rv", "relief_valve", "a", "b",
                           {{"crack", "5 bar"}, {"full_open", "6.5 bar"}, {"rated_flow", "20 L/min"}})};
  CompareBoundWithWritten(comps, nodes, 0, "crack", "pressure_difference", "4 bar", "5.5 bar");
  CompareBoundWithWritten(comps, nodes, 0, "rated_density", "density", "870 kg/m3", "998 kg/m3");
}

TEST_CASE("displacement_pump speed bound to a variable acts as written; its slip stays that of the rated point") {
  const json nodes = {Node("a", "0 bar"), Node("out"), Node("b", "0 bar")};
  const json comps = {Comp("pump", "displacement_pump", "a", "out",
                           {{"displacement", "8 cm3/rev"}, {"speed", "1450 rpm"}, {"volumetric_efficiency", 0.9},
                            {"rated_pressure_rise", "5 bar"}, {"rated_viscosity", "20 cP"}, {"rated_speed", "1450 rpm"}}),
                      Comp("jet", "orifice", "out", "b", {{"diameter", "2 mm"}})};
  CompareBoundWithWritten(comps, nodes, 0, "speed", "rotational_speed", "1450 rpm", "2900 rpm");
}

}  // namespace
}  // namespace loopwright
