#include "cli/commands.h"
#include "network/library_logging.h"

int main(int argc, char** argv) {
  // No glog lines from Ceres on the user's terminal (network/library_logging.h).
  loopwright::SilenceLibraryLogging();
  return loopwright::cli::Main(argc, argv);
}
