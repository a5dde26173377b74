// The parts library: generic demo parts as data.
//
// library/parts/*.json each hold {"parts": [ entry, ... ]}; an entry is
//   {"id": "...", "category": "pump"|"filter"|"valve"|"cooler"|"line"|"fluid"|...,
//    "type": component type or "fluid", "source": "...", "description": "...",
//    "params": { ... parameters exactly as a case file writes them ... }}
// Every shipped entry is invented and marked illustrative in its `source`.
// A case may also reference parts in a JSON file inside its own folder
// ("my_parts.json#id"); a reference that leaves the library folder or the
// case's folder (absolute paths, "..") is refused.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace loopwright {

struct PartEntry {
  std::string id;
  std::string category;
  std::string type;
  std::string source;
  std::string description;
  std::string file;  // which file it came from
  nlohmann::json params;
};

struct PartsCatalog {
  std::vector<PartEntry> parts;
  std::vector<std::string> errors;  // problems reading the files
  const PartEntry* Find(const std::string& id) const;
  std::vector<std::string> Ids() const;
};

// Reads every library/parts/*.json below `library_dir` (sorted by file name).
PartsCatalog LoadPartsCatalog(const std::string& library_dir);
// Reads one parts file (used for case-local part files).
bool LoadPartsFile(const std::string& path, PartsCatalog* into);

// Largest parts file read, as for case files.
inline constexpr size_t kMaxPartsFileBytes = 8u << 20;

// Reads `path` when it is a regular file (never a folder, FIFO or device: a
// FIFO would block, /dev/zero never ends) of at most `max_bytes`; else false
// with the reason in *error ("is not a regular file", "is N bytes; ...").
bool ReadRegularFile(const std::string& path, size_t max_bytes, std::string* out, std::string* error);

// Resolves `relative` below `base_dir` to its real path, every symbolic link
// followed (std::filesystem::weakly_canonical), and accepts it only when the
// real path is still inside the real `base_dir`: a part file that is a link to
// a file elsewhere, or reached through a linked folder that leads elsewhere,
// is refused. `relative` must also pass IsContainedRelativePath.
bool ResolveContainedFile(const std::string& base_dir, const std::string& relative, std::string* real,
                          std::string* error);

// True when `relative` is a plain relative path that stays inside its base
// folder: no absolute path, no "..", no backslashes, no NUL.
bool IsContainedRelativePath(const std::string& relative);

}  // namespace loopwright
