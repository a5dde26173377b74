// Component::FollowsStream says whether a model's FollowStream can change
// it: the network skips FollowStream on a model that says no. A model that
// says no must stay the same under any stream, and the film bearings, whose
// film state follows the stream's viscosity, must say yes and change. Run on
// every component of the shipped cases (and a journal bearing of given
// eccentricity, which says no), with the stream at 40 and 110 °C of
// the loop's own fluid. The property under test is between our own methods
// (FollowsStream against FollowStream), a guard against an override that
// forgets its flag.
#include <doctest/doctest.h>

#include <cstring>
#include <string>

#include "components/journal_bearing.h"
#include "network/case/case.h"
#include "tests/tools/source_dir.h"

namespace loopwright {
namespace {

bool SameParams(const Component& a, const Component& b) {
  const ParamArray &pa = a.params(), &pb = b.params();
  return pa.size() == pb.size() && (pa.empty() || std::memcmp(pa.data(), pb.data(), pa.size() * sizeof(double)) == 0);
}

TEST_CASE("a model that does not follow its stream is not changed by one; the film bearings are") {
  size_t followers = 0, changed = 0, others = 0;
  for (const char* file : {"/cases/apu_test_cell.json", "/cases/gearbox_lube_skid.json", "/cases/turbo_test_stand.json"}) {
    CAPTURE(file);
    LoadResult lr = LoadCaseFile(testing::SourceDir() + file, DefaultLibraryDir());
    REQUIRE(lr.value);
    for (const auto& loop : lr.value->loops)
      for (const auto& c : loop.components) {
        CAPTURE(c.id);
        bool any_change = false;
        for (double t : {313.15, 383.15}) {
          std::unique_ptr<Component> copy = c.model->Clone();
          copy->FollowStream({t, 0.05, 2e5, loop.fluid.get()});
          any_change = any_change || !SameParams(*copy, *c.model);
        }
        if (c.model->FollowsStream()) {
          ++followers;
          changed += any_change;
        } else {
          ++others;
          CHECK_FALSE(any_change);
        }
        // A journal bearing follows its stream when its eccentricity follows
        // from load (with a given eccentricity its film has no state).
        const bool from_load = c.type() == "journal_bearing" &&
                               c.model->params()[JournalBearing::kEccentricityMethod] >= 0.5;
        if (from_load || c.type() == "floating_ring_bearing") CHECK(c.model->FollowsStream());
      }
  }
  CHECK(followers > 0);
  CHECK(changed > 0);  // at least one bearing's film state moved with the stream
  CHECK(others > 10);
}

}  // namespace
}  // namespace loopwright
