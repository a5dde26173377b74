// Sizing answers are verified by re-solving the demo case with them: the
// answer passes every check at every point, and a value just beyond it (or
// the next smaller candidate) does not — the binding check sits at its limit.
#include <doctest/doctest.h>

#include <cstdlib>
#include <string>

#include "network/case.h"
#include "network/checks.h"
#include "network/run.h"
#include "network/sizing.h"

using namespace loopwright;

namespace {

std::unique_ptr<Case> Demo() {
  const char* src = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  REQUIRE(src != nullptr);
  LoadResult r = LoadCaseFile(std::string(src) + "/cases/apu_test_cell.json", std::string(src) + "/library");
  REQUIRE(r.value);
  return std::move(r.value);
}

bool EnvelopePasses(const Case& cs) {
  CaseSolver solver(cs);
  std::vector<std::vector<CheckOutcome>> per;
  std::vector<std::string> names;
  for (const auto& op : cs.envelope.points) {
    PointResult r = solver.Solve(op, false);
    if (!r.converged) return false;
    std::vector<CheckWarning> w;
    per.push_back(EvaluateChecks(cs, op, r, &w));
    names.push_back(op.name);
  }
  for (const auto& s : SummariseChecks(per, names))
    if (!s.worst.pass) return false;
  return true;
}

double& Param(const Case& cs, const std::string& loop, const std::string& comp, const std::string& name) {
  for (const auto& l : cs.loops)
    if (l.id == loop) {
      const ComponentSpec& c = l.components[l.ComponentIndex(comp)];
      return c.model->params()[c.type_info->ParamIndex(name)];
    }
  FAIL("no such component");
  static double dummy;
  return dummy;
}

const SizingAnswer& Find(const std::vector<SizingAnswer>& a, const std::string& id) {
  for (const auto& x : a)
    if (x.question == id) return x;
  FAIL("no answer " << id);
  return a.front();
}

}  // namespace

TEST_CASE("cooler conductance: the answer passes and 2 % less fails") {
  auto cs = Demo();
  auto answers = AnswerDesignQuestions(*cs);
  const SizingAnswer& a = Find(answers, "oil_cooler_ua");
  REQUIRE(a.feasible);
  double& ua = Param(*cs, "jacket", "radiator", "conductance");
  const double keep = ua;
  ua = a.value;
  CHECK(EnvelopePasses(*cs));
  ua = a.value * 0.98;
  CHECK_FALSE(EnvelopePasses(*cs));
  ua = keep;
  CHECK(a.margin >= 0);
  CHECK(a.binding_check == "boiling_margin_min");
}

TEST_CASE("bypass window: its edges pass and just outside fails") {
  auto cs = Demo();
  auto answers = AnswerDesignQuestions(*cs);
  const SizingAnswer& a = Find(answers, "bypass_window");
  REQUIRE(a.feasible);
  double lo = 0, hi = 0;
  REQUIRE(std::sscanf(a.value_text.c_str(), "%lf .. %lf", &lo, &hi) == 2);
  REQUIRE(lo < hi);
  double& x = Param(*cs, "oil", "bypass", "opening");
  for (double v : {lo + 1e-3, 0.5 * (lo + hi), hi - 1e-3}) {
    x = v;
    CHECK_MESSAGE(EnvelopePasses(*cs), "opening " << v);
  }
  if (lo > 0.01) {
    x = lo - 0.01;
    CHECK_FALSE(EnvelopePasses(*cs));
  }
  if (hi < 0.99) {
    x = hi + 0.01;
    CHECK_FALSE(EnvelopePasses(*cs));
  }
}

TEST_CASE("line size and pump choice: the answer is the smallest passing candidate") {
  auto cs = Demo();
  auto answers = AnswerDesignQuestions(*cs);
  const SizingAnswer& line = Find(answers, "supply_line");
  REQUIRE(line.feasible);
  CHECK(line.value_text == line.ranking.front());
  // The next smaller bore (tube-12x1.5, 9 mm) fails: the supply velocity limit.
  double& d = Param(*cs, "oil", "supply", "diameter");
  const double keep = d;
  d = 9e-3;
  CHECK_FALSE(EnvelopePasses(*cs));
  d = keep;
  const SizingAnswer& pump = Find(answers, "oil_pump");
  REQUIRE(pump.feasible);
  CHECK_FALSE(pump.ranking.empty());
}
