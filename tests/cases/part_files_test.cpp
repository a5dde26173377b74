// Case-local part files ("file.json#id") are read only when their real path,
// every symbolic link followed, lies inside the case's folder, and only when
// they are regular files within the 8 MiB limit. Links, a FIFO and a link to
// /dev/zero are made at run time in a temporary folder.

#include <doctest/doctest.h>

#include <sys/stat.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "network/case/case.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;
using loopwright::testing::ReadText;

namespace fs = std::filesystem;
using loopwright::LoadCaseFile;
using loopwright::LoadResult;

namespace {



void Write(const fs::path& p, const std::string& text) {
  std::ofstream out(p, std::ios::binary);
  out << text;
}

// A parts file with one displacement pump, "rig-pump" (invented data).
const char* kPartsFile = R"({"parts": [
  {"id": "rig-pump", "category": "pump", "type": "displacement_pump", "source": "invented test part",
   "params": {"displacement": "4 cm3/rev", "volumetric_efficiency": 0.9, "rated_pressure_rise": "5 bar",
              "rated_viscosity": "20 cP", "rated_speed": "1450 rpm"}}]})";

struct Folder {
  fs::path root, case_dir, outside;
  Folder() {
    root = fs::temp_directory_path() / ("loopwright_parts_" + std::to_string(::getpid()));
    fs::remove_all(root);
    case_dir = root / "case";
    outside = root / "elsewhere";
    fs::create_directories(case_dir);
    fs::create_directories(outside);
    Write(outside / "parts.json", kPartsFile);
  }
  ~Folder() {
    std::error_code ec;
    fs::remove_all(root, ec);
  }
  // The minimal valid case with its pump taken from `ref`.
  LoadResult Load(const std::string& ref) const {
    std::string text = ReadText(fs::path(SourceDir()) / "tests" / "malformed" / "000_valid_minimal.json");
    const std::string from = R"({"id": "pump", "type": "displacement_pump", "from": "sump", "to": "pump_out",
         "displacement": "4 cm3/rev", "speed": "1450 rpm", "volumetric_efficiency": 0.9,
         "rated_pressure_rise": "5 bar", "rated_viscosity": "20 cP", "rated_speed": "1450 rpm"})";
    const size_t at = text.find(from);
    REQUIRE(at != std::string::npos);
    text.replace(at, from.size(),
                 R"({"id": "pump", "part": ")" + ref + R"(", "from": "sump", "to": "pump_out", "speed": "1450 rpm"})");
    Write(case_dir / "rig.json", text);
    return LoadCaseFile((case_dir / "rig.json").string(), loopwright::DefaultLibraryDir());
  }
};

// The one error of a load (copied: the result is a temporary).
loopwright::Diagnostic Only(const LoadResult& r) {
  INFO(r.diagnostics.Format("rig.json"));
  REQUIRE(r.diagnostics.ErrorCount() == 1);
  CHECK(r.value == nullptr);
  for (const auto& d : r.diagnostics.items())
    if (!d.warning) return d;
  return {};
}

}  // namespace

TEST_CASE("a regular part file inside the case folder is read, also through a link that stays inside") {
  Folder f;
  Write(f.case_dir / "parts.json", kPartsFile);
  const LoadResult r = f.Load("parts.json#rig-pump");
  CHECK_MESSAGE(r.value != nullptr, r.diagnostics.Format("rig.json"));
  fs::create_directories(f.case_dir / "sub");
  fs::create_symlink(f.case_dir / "parts.json", f.case_dir / "sub" / "same.json");
  const LoadResult s = f.Load("sub/same.json#rig-pump");
  CHECK_MESSAGE(s.value != nullptr, s.diagnostics.Format("rig.json"));
}

TEST_CASE("a part file that links outside the case folder is refused") {
  Folder f;
  fs::create_symlink(f.outside / "parts.json", f.case_dir / "parts.json");
  const auto d = Only(f.Load("parts.json#rig-pump"));
  CHECK(d.id == "part-path-outside");
  CHECK(d.pointer == "/loops/0/components/0/part");
  CHECK(d.message.find("outside the case's folder") != std::string::npos);
}

TEST_CASE("a part file reached through a linked folder that leads outside is refused") {
  Folder f;
  fs::create_directory_symlink(f.outside, f.case_dir / "lib");
  const auto d = Only(f.Load("lib/parts.json#rig-pump"));
  CHECK(d.id == "part-path-outside");
  CHECK(d.message.find("outside the case's folder") != std::string::npos);
}

TEST_CASE("a FIFO part file is refused without being opened (it would block)") {
  Folder f;
  REQUIRE(::mkfifo((f.case_dir / "parts.json").c_str(), 0600) == 0);
  const auto d = Only(f.Load("parts.json#rig-pump"));
  CHECK(d.id == "bad-part-file");
  CHECK(d.message.find("is not a regular file") != std::string::npos);
}

TEST_CASE("a part file linked to /dev/zero is refused, not read without end") {
  Folder f;
  fs::create_symlink("/dev/zero", f.case_dir / "parts.json");
  const auto d = Only(f.Load("parts.json#rig-pump"));
  // Its real path, /dev/zero, is outside the case folder; were it inside, a
  // device is not a regular file either.
  CHECK(d.id == "part-path-outside");
}

TEST_CASE("a folder named as a part file, and a part file over 8 MiB, are refused") {
  Folder f;
  fs::create_directories(f.case_dir / "dir.json");
  const auto d = Only(f.Load("dir.json#rig-pump"));
  CHECK(d.id == "bad-part-file");
  CHECK(d.message.find("is not a regular file") != std::string::npos);
  {
    std::ofstream out(f.case_dir / "big.json", std::ios::binary);
    out << kPartsFile << std::string(8u << 20, ' ');
  }
  const auto b = Only(f.Load("big.json#rig-pump"));
  CHECK(b.id == "bad-part-file");
  CHECK(b.message.find("the limit is 8388608 bytes (8 MiB)") != std::string::npos);
}
