#include "cli/commands.h"
#include "network/point/library_logging.h"

int main(int argc, char** argv) {
  // No glog lines from Ceres on the user's terminal (network/point/library_logging.h).
  loopwright::SilenceLibraryLogging();
  return loopwright::cli::Main(argc, argv);
}
