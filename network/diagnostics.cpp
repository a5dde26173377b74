#include "network/diagnostics.h"

#include <fmt/format.h>

namespace loopwright {

std::string Diagnostics::Format(const std::string& file) const {
  std::string out;
  for (const auto& d : items_) {
    std::string where = file;
    if (d.line > 0) where += fmt::format(":{}:{}", d.line, d.column);
    out += fmt::format("{}[{}] {}{}{}: {}\n", d.warning ? "warning" : "error", d.id,
                       where, where.empty() ? "" : " ",
                       d.pointer.empty() ? "(document)" : d.pointer, d.message);
  }
  return out;
}

std::string PointerToken(const std::string& key) {
  std::string out;
  out.reserve(key.size());
  for (char c : key) {
    if (c == '~') out += "~0";
    else if (c == '/') out += "~1";
    else out += c;
  }
  return out;
}

}  // namespace loopwright
