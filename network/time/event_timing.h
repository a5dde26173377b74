// Sizing in time: the earliest time an event of a scenario may come (the
// shortest after-run: the event that stops the after-run pump) that keeps a
// watched mass or node at or below a limit through the whole scenario.
//
// The peak P(t_e) of the watched quantity over the scenario, as a function
// of the event's time t_e, is found by whole runs of Simulate. Bracket: the
// event's time `hi` must keep the peak at or below the limit (else: no
// answer in the range, said so), `lo` (default 0) answers at once when it
// does too. Between them the edge P(t_e) = limit is found by the Illinois
// variant of regula falsi (Dowell & Jarratt, BIT 11, 1971: the retained
// end's value halved after two steps on the same side, superlinear on a
// smooth P), kept inside the bracket, to `time_tolerance` [s]. The answer
// is the bracket's passing end, re-verified by one more full run whose peak
// and peak time are reported. Assumes P falls as the event comes later (a
// longer after-run cools more); a bracket whose ends do not straddle the
// limit is refused with both peaks named.
#pragma once

#include <string>

#include "network/time/simulate.h"

namespace loopwright {

struct EventTimingQuestion {
  std::string event;       // the event's name in the scenario
  std::string watched;     // mass id or "loop/node"
  double limit = 0;        // [K]
  double lo = 0, hi = 0;   // [s] the event's time range searched (hi <= the scenario's end)
  double time_tolerance = 1.0;  // [s]
};

struct EventTimingAnswer {
  bool ok = false;
  std::string failure;     // why there is no answer
  double time = 0;         // [s] the earliest event time that keeps the peak at or below the limit
  double peak = 0, peak_time = 0;  // [K], [s] of the verifying run
  int runs = 0;            // whole simulations, the verifying run included
  SimulationResult verify; // the verifying run
};

// "" when `watched` names a thermal mass or a node ("loop/node"); else the
// reason, with the nearest name when one is close.
std::string UnknownWatched(const Case& cs, const std::string& watched);

EventTimingAnswer EarliestEventTime(const Case& cs, const Scenario& sc, const EventTimingQuestion& q,
                                    const SimulateOptions& opt);

}  // namespace loopwright
