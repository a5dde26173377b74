#include "library/parts.h"

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <sstream>

namespace loopwright {

const PartEntry* PartsCatalog::Find(const std::string& id) const {
  for (const auto& p : parts)
    if (p.id == id) return &p;
  return nullptr;
}

std::vector<std::string> PartsCatalog::Ids() const {
  std::vector<std::string> ids;
  ids.reserve(parts.size());
  for (const auto& p : parts) ids.push_back(p.id);
  return ids;
}

bool LoadPartsFile(const std::string& path, PartsCatalog* into) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    into->errors.push_back(path + ": cannot be read");
    return false;
  }
  std::stringstream ss;
  ss << in.rdbuf();
  nlohmann::json j = nlohmann::json::parse(ss.str(), nullptr, false, true);
  if (j.is_discarded() || !j.is_object() || !j.contains("parts") || !j["parts"].is_array()) {
    into->errors.push_back(path + ": not a parts file (expected {\"parts\": [...]})");
    return false;
  }
  bool ok = true;
  for (size_t i = 0; i < j["parts"].size(); ++i) {
    const auto& e = j["parts"][i];
    auto str = [&](const char* k) {
      return e.is_object() && e.contains(k) && e[k].is_string() ? e[k].get<std::string>() : std::string();
    };
    PartEntry p;
    p.id = str("id");
    p.category = str("category");
    p.type = str("type");
    p.source = str("source");
    p.description = str("description");
    p.file = std::filesystem::path(path).filename().string();
    if (e.is_object() && e.contains("params") && e["params"].is_object()) p.params = e["params"];
    else p.params = nlohmann::json::object();
    if (p.id.empty() || p.type.empty() || p.source.empty()) {
      into->errors.push_back(path + ": /parts/" + std::to_string(i) +
                             " needs string fields id, type and source");
      ok = false;
      continue;
    }
    into->parts.push_back(std::move(p));
  }
  return ok;
}

PartsCatalog LoadPartsCatalog(const std::string& library_dir) {
  PartsCatalog cat;
  namespace fs = std::filesystem;
  std::error_code ec;
  fs::path dir = fs::path(library_dir) / "parts";
  std::vector<fs::path> files;
  for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec))
    if (it->path().extension() == ".json") files.push_back(it->path());
  if (ec) cat.errors.push_back(dir.string() + ": " + ec.message());
  std::sort(files.begin(), files.end());
  for (const auto& f : files) LoadPartsFile(f.string(), &cat);
  return cat;
}

bool IsContainedRelativePath(const std::string& relative) {
  if (relative.empty() || relative.size() > 255) return false;
  if (relative.front() == '/' || relative.find('\\') != std::string::npos ||
      relative.find('\0') != std::string::npos || relative.find(':') != std::string::npos)
    return false;
  std::filesystem::path p(relative);
  for (const auto& part : p)
    if (part == ".." || part == ".") return false;
  return true;
}

}  // namespace loopwright
