#include "library/parts.h"

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

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

bool ReadRegularFile(const std::string& path, size_t max_bytes, std::string* out, std::string* error) {
  namespace fs = std::filesystem;
  std::error_code ec;
  const fs::file_status st = fs::status(path, ec);
  if (ec || !fs::exists(st)) {
    *error = "cannot be read (no such file)";
    return false;
  }
  if (!fs::is_regular_file(st)) {
    *error = "is not a regular file (a folder, device, pipe or socket is never read)";
    return false;
  }
  const auto size = fs::file_size(path, ec);
  if (!ec && size > max_bytes) {
    *error = "is " + std::to_string(size) + " bytes; the limit is " + std::to_string(max_bytes) + " bytes (" +
             fmt::format("{:g}", max_bytes / 1048576.0) + " MiB)";
    return false;
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    *error = "cannot be read";
    return false;
  }
  // Read at most one byte over the limit, whatever the file does meanwhile
  // (a raised limit allocates no more than the file needs): first the size
  // the file had and one byte more, straight into the text (no copy through
  // a chunk), then in chunks while it still grows.
  out->clear();
  // 64 bytes more than the file: slack only (the case loader reads a case
  // file in windows and parses no text in place: network/case/fast_parse.h).
  const size_t expected = std::min<size_t>(ec ? 0 : size, max_bytes);
  out->reserve(expected + 64);
  size_t next = expected + 1;
  while (out->size() <= max_bytes) {
    const size_t have = out->size(), want = std::min(next, max_bytes + 1 - have);
    out->resize(have + want);
    in.read(out->data() + have, static_cast<std::streamsize>(want));
    const size_t got = static_cast<size_t>(in.gcount());
    out->resize(have + got);
    if (got < want) break;
    next = size_t(1) << 16;
  }
  if (out->size() > max_bytes) {
    *error = "grew beyond the limit of " + std::to_string(max_bytes) + " bytes (" +
             fmt::format("{:g}", max_bytes / 1048576.0) + " MiB) while it was read";
    return false;
  }
  return true;
}

bool ResolveContainedFile(const std::string& base_dir, const std::string& relative, std::string* real,
                          std::string* error) {
  namespace fs = std::filesystem;
  if (!IsContainedRelativePath(relative)) {
    *error = "must be a relative path inside the case's folder (no \"..\", no absolute path)";
    return false;
  }
  std::error_code ec;
  const fs::path base = fs::weakly_canonical(fs::absolute(base_dir.empty() ? "." : base_dir, ec), ec);
  if (ec) {
    *error = "cannot resolve the case's folder: " + ec.message();
    return false;
  }
  const fs::path target = fs::weakly_canonical(base / relative, ec);
  if (ec) {
    *error = "cannot be resolved: " + ec.message();
    return false;
  }
  // Inside the folder once every symbolic link is followed: the relative path
  // from the folder to the real file must not climb out of it.
  const fs::path rel = target.lexically_relative(base);
  if (rel.empty() || *rel.begin() == ".." || rel.is_absolute()) {
    *error = "resolves to " + target.string() + ", outside the case's folder (through a symbolic link); refused";
    return false;
  }
  *real = target.string();
  return true;
}

bool LoadPartsFile(const std::string& path, PartsCatalog* into) {
  std::string text, error;
  if (!ReadRegularFile(path, kMaxPartsFileBytes, &text, &error)) {
    into->errors.push_back(path + ": " + error);
    return false;
  }
  nlohmann::json j = nlohmann::json::parse(text, nullptr, false, true);
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
