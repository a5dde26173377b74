#include "cli/commands.h"
#include "library/process_memory.h"
#include "network/point/library_logging.h"

int main(int argc, char** argv) {
  // Memory freed by one phase (the parsed case file) reused by the next
  // without new page faults (library/process_memory.h).
  loopwright::KeepFreedMemory();
  // No glog lines from Ceres on the user's terminal (network/point/library_logging.h).
  loopwright::SilenceLibraryLogging();
  return loopwright::cli::Main(argc, argv);
}
