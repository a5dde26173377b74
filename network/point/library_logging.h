// Keeps the logging of third-party libraries off the user's terminal.
//
// Ceres logs through glog: a LOG(WARNING) or LOG(ERROR) inside the solver
// (an invalid option set, a rank-deficient covariance, a failed function
// evaluation) would print a glog line ("W1202 10:49:08.123 solver.cc:...")
// to stderr between loopwright's own output. loopwright reports every
// outcome itself (solver summaries, not-converged causes), so those lines are
// noise at best and alarming at worst. Every Ceres options set also says
// logging_type = SILENT and minimizer_progress_to_stdout = false (the
// default); this closes the rest.
#pragma once

namespace loopwright {

// Raises glog's minimum level to FATAL (a FATAL is a crash and still says
// why) and never copies messages to stderr. Call once at program start,
// before any solve; idempotent. glog is not initialised, so it writes no log
// files either.
void SilenceLibraryLogging();

}  // namespace loopwright
