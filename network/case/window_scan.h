// Internal to the case loader's fast parse (network/case/fast_parse.h): a
// case text read in pieces, never held whole. A light scan goes once over
// the text (a file read in chunks, or a text in memory) and splits it in two:
// the skeleton, the whole document except the contents of each loop's
// "nodes" and "components" arrays (left as "[]"), which simdjson parses
// whole; and, for each of those arrays, its elements grouped into windows of
// whole elements (byte ranges of the text), each parsed later as an array of
// its own while the readers go through it. The scan tracks strings and
// nesting only; it checks what it cuts out (whitespace and one comma between
// elements, none before the first or after the last), and gives up (the exact
// parser then reads the text) on anything else it cannot split exactly: a
// comment, an escaped key where a loop or its arrays are looked for, nesting
// deeper than kMaxCaseDepth, a text over its size limit. Everything else is
// validated by simdjson: the skeleton, and each window with its count of
// elements. See DEVELOPERS.md, "Reading in windows".
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

namespace loopwright {

// Where a case text is read from: a regular file (read with pread, so the
// process holds no page of it) or a text in memory (not copied; it must
// outlive the source).
class CaseTextSource {
 public:
  CaseTextSource() = default;
  // Reads `text` (kept by the caller).
  void UseText(const std::string* text) {
    Close();
    text_ = text;
    size_ = text->size();
  }
  CaseTextSource(const CaseTextSource&) = delete;
  CaseTextSource& operator=(const CaseTextSource&) = delete;
  ~CaseTextSource();
  // Opens a regular file of at most max_bytes; false if it cannot (the
  // loader's ordinary reader then reports why).
  bool OpenFile(const std::string& path, size_t max_bytes);
  // Copies up to `len` bytes from `offset` into dest; the count copied
  // (short only at the end, or 0 on a read error).
  size_t Read(uint64_t offset, char* dest, size_t len) const;
  uint64_t size() const { return size_; }
  // Whether the file still has the size and modification time it had when
  // opened (a file rewritten while it is read in windows could mix two
  // versions: the loader then reads it whole again); a text always is.
  bool Unchanged() const;
  void Close();

 private:
  const std::string* text_ = nullptr;
  int fd_ = -1;
  uint64_t size_ = 0;
  int64_t mtime_ns_ = 0;
};

// `count` whole elements of an array, text bytes [begin, end) (the first
// element's first byte to the last one's last byte), the first being
// element `first` of the array.
struct TextWindow {
  uint64_t begin = 0, end = 0;
  size_t first = 0, count = 0;
};

// A loop's "nodes" (or "components") array cut out of the skeleton.
struct CutArray {
  size_t loop = 0;
  bool nodes = false;
  size_t size = 0;  // elements
  std::vector<TextWindow> windows;
};

struct ScannedCase {
  std::string skeleton;  // the text with each cut array's contents removed
  std::vector<CutArray> arrays;
  size_t max_window_bytes = 0;  // the largest window's text
};

// Default bytes of text per window (a window closes after the element that
// reaches it; an element larger than this is a window alone): 1/256 of the
// text, at least 4 KiB and at most 128 KiB. Two windows are held, each with
// its simdjson document (about 10 bytes per byte of text, allocated for the
// largest window), and the parser's index (4 bytes per byte): about 3 MB in
// all for a plant-size case, and a small case's windows stay a small part
// of its load (about 1/8 of its text).
inline size_t CaseWindowBytesFor(uint64_t text_bytes) {
  constexpr uint64_t kLeast = 4u << 10, kMost = 128u << 10;
  return size_t(text_bytes / 256 < kLeast ? kLeast : text_bytes / 256 > kMost ? kMost : text_bytes / 256);
}

// Scans the whole source; false when the exact parser must read the text.
bool ScanCaseText(const CaseTextSource& source, size_t window_bytes, ScannedCase* out);

}  // namespace loopwright
