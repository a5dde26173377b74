#include "network/point/library_logging.h"

#include <glog/logging.h>

namespace loopwright {

void SilenceLibraryLogging() {
  FLAGS_minloglevel = google::GLOG_FATAL;
  FLAGS_stderrthreshold = google::GLOG_FATAL;
  FLAGS_logtostderr = false;
  FLAGS_alsologtostderr = false;
}

}  // namespace loopwright
