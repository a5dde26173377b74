#include "network/case/diagnostics.h"

#include <fmt/format.h>
#include <nlohmann/json.hpp>

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

std::string Diagnostics::ToJson(const std::string& file) const {
  nlohmann::json problems = nlohmann::json::array();
  for (const auto& d : items_) {
    nlohmann::json p = {{"severity", d.warning ? "warning" : "error"},
                        {"id", d.id},
                        {"pointer", d.pointer},
                        {"message", d.message}};
    if (d.line > 0) {
      p["line"] = d.line;
      p["column"] = d.column;
    }
    problems.push_back(std::move(p));
  }
  const size_t errors = ErrorCount();
  const nlohmann::json j = {{"file", file},
                            {"valid", errors == 0},
                            {"errors", errors},
                            {"warnings", items_.size() - errors},
                            {"problems", std::move(problems)}};
  // Replacement of invalid UTF-8 (messages quote what the case gave).
  return j.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) + "\n";
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
