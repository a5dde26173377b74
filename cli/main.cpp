#include "cli/commands.h"

int main(int argc, char** argv) { return loopwright::cli::Main(argc, argv); }
