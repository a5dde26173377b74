#include "tests/tools/probe.h"

#include <cstdio>
#include <iostream>
#include <sstream>
#include <stdexcept>

namespace loopwright::probe {

std::map<std::string, Command>& Registry() {
  static std::map<std::string, Command> registry;
  return registry;
}

double ArgD(const Args& a, size_t i) {
  if (i >= a.size()) throw std::runtime_error("missing argument " + std::to_string(i));
  return std::stod(a[i]);
}

std::vector<double> ArgList(const Args& a, size_t i) {
  if (i >= a.size()) throw std::runtime_error("missing list argument " + std::to_string(i));
  std::vector<double> out;
  std::stringstream ss(a[i]);
  std::string item;
  while (std::getline(ss, item, ',')) {
    if (!item.empty()) out.push_back(std::stod(item));
  }
  return out;
}

}  // namespace loopwright::probe

int main(int argc, char** argv) {
  using namespace loopwright::probe;
  if (argc < 2 || Registry().count(argv[1]) == 0) {
    std::cerr << "usage: lw_probe COMMAND [ARGS...]; commands:";
    for (auto& [k, v] : Registry()) std::cerr << " " << k;
    std::cerr << "\n";
    return 2;
  }
  Args args(argv + 2, argv + argc);
  try {
    nlohmann::json out = Registry()[argv[1]](args);
    std::cout << out.dump() << "\n";
  } catch (const std::exception& e) {
    std::cerr << "lw_probe: " << e.what() << "\n";
    return 2;
  }
  return 0;
}
