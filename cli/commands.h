#pragma once
namespace loopwright::cli {
int Main(int argc, char** argv);
}
