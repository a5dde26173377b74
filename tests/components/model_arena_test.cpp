// A loaded case's models in their loop's arena (components/model_arena.h):
// alike parameter lists stored once, every placed model reading its own
// values (a line's laminar drop against Hagen-Poiseuille), and a write never
// reaching another model's values (a copy owns its values; a lent array is
// copied before it is written).

#include <doctest/doctest.h>

#include <cmath>
#include <memory>
#include <string>
#include <tuple>
#include <utility>
#include <vector>

#include "components/param_array.h"
#include "components/pipe.h"
#include "network/case/case.h"
#include "tests/tools/header_text.h"

namespace {

using loopwright::Component;
using loopwright::ComponentSpec;
using loopwright::LoopSpec;
using loopwright::Pipe;

const ComponentSpec& Named(const LoopSpec& loop, const std::string& id) {
  const int i = loop.ComponentIndex(id);
  REQUIRE(i >= 0);
  return loop.components[i];
}

// The line's law r = loss(m) - dp at dp = 0: its loss [Pa] at mass flow m.
double Loss(const Component& line, double m, double rho, double mu) {
  double r = 0;
  line.Evaluate(0.0, m, rho, mu, nullptr, &r);
  return r;
}

// Hagen-Poiseuille (fully developed laminar flow in a round tube):
// dp = 128 mu L Q / (pi D^4).
double HagenPoiseuille(double mu, double length, double diameter, double q) {
  return 128.0 * mu * length * q / (M_PI * std::pow(diameter, 4));
}

}  // namespace

TEST_CASE("a header's alike lines and bearings share one parameter list each in the loop's arena") {
  const std::string text = loopwright::test::HeaderText(40);
  loopwright::LoadResult r = loopwright::LoadCaseText(text, "header", loopwright::DefaultLibraryDir(), text.size());
  INFO(r.diagnostics.Format("header"));
  REQUIRE(r.value != nullptr);
  const LoopSpec& loop = r.value->loops[0];
  const ComponentSpec &l3 = Named(loop, "l3"), &l17 = Named(loop, "l17"), &h5 = Named(loop, "h5");
  const ComponentSpec &b3 = Named(loop, "b3"), &b17 = Named(loop, "b17");
  CHECK(l3.model->placed());
  CHECK(l3.model->params().lent());
  CHECK(l3.model->params().data() == l17.model->params().data());
  CHECK(b3.model->params().data() == b17.model->params().data());
  // A header tube (0.3 m x 25 mm) is not a branch line (0.5 m x 6 mm).
  CHECK(h5.model->params().data() != l3.model->params().data());
  CHECK(loop.models.used_bytes() > 0);

  // Each reads its own geometry: the branch line's (0.5 m x 6 mm, the
  // header's text) and the header tube's (0.3 m x 25 mm) laminar drop at
  // Re = 100, where Churchill's friction factor is 64/Re to within 1e-6
  // (its turbulent term is 5e-6 of the laminar one there, under the 12th root).
  const double rho = 850.0, mu = 0.02;
  for (const auto& [line, length, diameter] :
       {std::tuple{&l3, 0.5, 6e-3}, std::tuple{&h5, 0.3, 25e-3}}) {
    const double q = 100.0 * mu * M_PI * diameter / (4.0 * rho);  // Re = 4 rho Q / (pi D mu) = 100
    CHECK(Loss(*line->model, rho * q, rho, mu) ==
          doctest::Approx(HagenPoiseuille(mu, length, diameter, q)).epsilon(1e-5));
  }

  // A copy owns its values: a longer copy drops twice as much, the case's
  // lines that shared the list are unchanged.
  const double q = 100.0 * mu * M_PI * 6e-3 / (4.0 * rho);
  std::unique_ptr<Component> copy = l3.model->Clone();
  CHECK_FALSE(copy->placed());
  CHECK_FALSE(static_cast<const Component&>(*copy).params().lent());
  copy->params()[Pipe::kLength] = 1.0;
  CHECK(Loss(*copy, rho * q, rho, mu) == doctest::Approx(HagenPoiseuille(mu, 1.0, 6e-3, q)).epsilon(1e-5));
  CHECK(Loss(*l17.model, rho * q, rho, mu) == doctest::Approx(HagenPoiseuille(mu, 0.5, 6e-3, q)).epsilon(1e-5));
  CHECK(l17.model->params()[Pipe::kLength] == 0.5);
}

TEST_CASE("a lent parameter array is copied before a write through it") {
  const double shared[3] = {1.0, 2.0, 3.0};
  loopwright::ParamArray a;
  a.Lend(shared, 3);
  CHECK(a.lent());
  CHECK(std::as_const(a).data() == shared);
  a[1] = 7.0;  // the non-const accessor: a copy first
  CHECK_FALSE(a.lent());
  CHECK(shared[1] == 2.0);
  CHECK(a[0] == 1.0);
  CHECK(a[1] == 7.0);
  CHECK(a[2] == 3.0);
  // Assigning a list of another length gives an owned array of that length.
  a = std::vector<double>{4.0, 5.0};
  CHECK(a.size() == 2);
  CHECK(a[1] == 5.0);
}
