#include "network/case/window_scan.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <cstring>
#include <string_view>

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

#include "network/case/case.h"

namespace loopwright {

CaseTextSource::~CaseTextSource() { Close(); }

bool CaseTextSource::OpenFile(const std::string& path, size_t max_bytes) {
  Close();
  fd_ = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  struct stat st {};
  if (fd_ < 0 || ::fstat(fd_, &st) != 0 || !S_ISREG(st.st_mode) || uint64_t(st.st_size) > max_bytes) {
    Close();
    return false;
  }
  size_ = uint64_t(st.st_size);
  mtime_ns_ = int64_t(st.st_mtim.tv_sec) * 1000000000 + st.st_mtim.tv_nsec;
  return true;
}

bool CaseTextSource::Unchanged() const {
  if (text_) return true;
  struct stat st {};
  return fd_ >= 0 && ::fstat(fd_, &st) == 0 && uint64_t(st.st_size) == size_ &&
         int64_t(st.st_mtim.tv_sec) * 1000000000 + st.st_mtim.tv_nsec == mtime_ns_;
}

size_t CaseTextSource::Read(uint64_t offset, char* dest, size_t len) const {
  if (text_) {
    if (offset >= text_->size()) return 0;
    const size_t n = std::min<size_t>(len, text_->size() - offset);
    std::memcpy(dest, text_->data() + offset, n);
    return n;
  }
  size_t done = 0;
  while (fd_ >= 0 && done < len) {
    const ssize_t got = ::pread(fd_, dest + done, len - done, off_t(offset + done));
    if (got <= 0) break;
    done += size_t(got);
  }
  return done;
}

void CaseTextSource::Close() {
  if (fd_ >= 0) ::close(fd_);
  fd_ = -1;
  if (!text_) size_ = 0;
}

namespace {

// What each byte is outside strings, for the scan.
enum Class : uint8_t { kPlain, kSpace, kQuote, kOpen, kClose, kComma, kColon, kSlash };

constexpr std::array<uint8_t, 256> MakeClasses() {
  std::array<uint8_t, 256> c{};
  c[' '] = c['\t'] = c['\n'] = c['\r'] = kSpace;
  c['"'] = kQuote;
  c['{'] = c['['] = kOpen;
  c['}'] = c[']'] = kClose;
  c[','] = kComma;
  c[':'] = kColon;
  c['/'] = kSlash;
  return c;
}
constexpr std::array<uint8_t, 256> kClasses = MakeClasses();

inline uint8_t ClassOf(char ch) { return kClasses[static_cast<unsigned char>(ch)]; }

// The bytes that matter inside an element (below its array's own level):
// strings, brackets, a comment.
constexpr std::array<bool, 256> MakeStops() {
  std::array<bool, 256> s{};
  s['"'] = s['{'] = s['['] = s['}'] = s[']'] = s['/'] = true;
  return s;
}
constexpr std::array<bool, 256> kStops = MakeStops();

// What an open bracket is to the scan: the root object, the root's "loops"
// array, one loop object (an element of it), or anything else.
enum class Role : uint8_t { kOther, kRoot, kLoops, kLoop };
// What may come next at a cut array's own level.
enum class Expect : uint8_t { kFirst, kElement, kSeparator };

class Scanner {
 public:
  Scanner(size_t window_bytes, ScannedCase* out) : window_bytes_(window_bytes), out_(out) {}
  // One chunk of text, starting at byte `base` of the text.
  bool Chunk(const char* p, size_t n, uint64_t base);
  bool Finished() const { return depth_ == 0 && !in_string_ && cut_depth_ == 0; }

 private:
  bool SkeletonRun(const char* p, size_t n, size_t* i);
  bool CutRun(const char* p, size_t n, size_t* i, uint64_t base);
  bool CutBytes(const char* p, size_t n, size_t* i, uint64_t base);
  bool CutByte(char ch, uint64_t at);
  size_t CutBlock(const char* p, uint64_t at);
  bool OwnLevel(const char* p, size_t from, size_t to, size_t* k);
  bool Open(const char* p, size_t i);
  void Flush(const char* p, size_t i) {
    out_->skeleton.append(p + copy_from_, i - copy_from_);
    copy_from_ = i;
  }
  size_t SkeletonOffset(size_t i) const { return out_->skeleton.size() + (i - copy_from_); }
  bool StartElement(uint64_t at);
  void EndElement(uint64_t end);
  void CloseWindow();

  const size_t window_bytes_;
  ScannedCase* out_;
  size_t copy_from_ = 0;  // this chunk's bytes before it are in the skeleton
  bool in_string_ = false, escape_ = false;
  int depth_ = 0;
  std::array<Role, kMaxCaseDepth + 1> roles_{};
  size_t key_begin_ = 0, key_end_ = 0;  // the last string closed, in the skeleton
  bool key_escaped_ = false;
  size_t loop_index_ = 0, current_loop_ = 0;
  // Inside a cut array (cut_depth_ > 0: its level).
  int cut_depth_ = 0;
  Expect expect_ = Expect::kFirst;
  bool scalar_ = false;  // inside a number or literal element
  uint64_t element_begin_ = 0;
  TextWindow window_;
};

bool Scanner::Chunk(const char* p, size_t n, uint64_t base) {
  copy_from_ = 0;
  size_t i = 0;
  while (i < n) {
    const bool ok = cut_depth_ > 0 ? CutRun(p, n, &i, base) : SkeletonRun(p, n, &i);
    if (!ok) return false;
  }
  if (cut_depth_ == 0) Flush(p, n);
  return true;
}

// Copies the skeleton, following strings, nesting and the keys of the root
// and loop objects, up to the chunk's end or into a cut array.
bool Scanner::SkeletonRun(const char* p, size_t n, size_t* i) {
  for (; *i < n; ++*i) {
    const char ch = p[*i];
    if (in_string_) {
      if (escape_) {
        escape_ = false;
      } else if (ch == '\\') {
        escape_ = key_escaped_ = true;
      } else if (ch == '"') {
        in_string_ = false;
        key_end_ = SkeletonOffset(*i);
      }
      continue;
    }
    switch (ClassOf(ch)) {
      case kQuote:
        in_string_ = true;
        key_escaped_ = false;
        key_begin_ = SkeletonOffset(*i + 1);
        break;
      case kOpen:
        if (!Open(p, *i)) return false;
        if (cut_depth_ > 0) {
          ++*i;
          return true;
        }
        break;
      case kClose:
        if (--depth_ < 0) return false;
        break;
      case kComma:
        if (depth_ > 0 && roles_[depth_] == Role::kLoops) ++loop_index_;
        break;
      case kSlash: return false;  // a comment
      default: break;
    }
  }
  return true;
}

// An open bracket in the skeleton: the loops array, a loop, or the start of
// a cut array (its "[" kept in the skeleton, its contents not).
bool Scanner::Open(const char* p, size_t i) {
  const Role parent = depth_ > 0 ? roles_[depth_] : Role::kOther;
  if (++depth_ > kMaxCaseDepth) return false;
  Role role = depth_ == 1 && p[i] == '{' ? Role::kRoot : Role::kOther;
  if (p[i] == '[' && (parent == Role::kRoot || parent == Role::kLoop)) {
    if (key_escaped_) return false;  // its key could spell "loops", "nodes"...
    Flush(p, i);
    const std::string_view key(out_->skeleton.data() + key_begin_, key_end_ - key_begin_);
    if (parent == Role::kRoot && key == "loops") {
      role = Role::kLoops;
      loop_index_ = 0;
    } else if (parent == Role::kLoop && (key == "nodes" || key == "components")) {
      Flush(p, i + 1);
      out_->arrays.push_back({current_loop_, key == "nodes", 0, {}});
      cut_depth_ = depth_;
      expect_ = Expect::kFirst;
      window_ = TextWindow();
    }
  } else if (p[i] == '{' && parent == Role::kLoops) {
    role = Role::kLoop;
    current_loop_ = loop_index_;
  }
  roles_[depth_] = role;
  return true;
}

// Inside a cut array: 64 bytes at a time while they hold only whole
// strings (no escape) and, at the array's own level, brackets, commas and
// whitespace (CutBlock); byte by byte for the rest of a block it stops in.
bool Scanner::CutRun(const char* p, size_t n, size_t* i, uint64_t base) {
  while (*i < n && cut_depth_ > 0) {
    const size_t block = *i;
    if (!escape_ && !scalar_ && n - block >= 64) {
      *i += CutBlock(p + block, base + block);
      if (*i == block + 64) continue;
    }
    if (!CutBytes(p, std::min(n, block + 64), i, base)) return false;
  }
  return true;
}

// Byte by byte: strings and nesting followed, each element's bounds and the
// separators at the array's own level checked, windows closed.
bool Scanner::CutBytes(const char* p, size_t n, size_t* i, uint64_t base) {
  for (; *i < n; ++*i) {
    if (in_string_) {
      // Strings are most of a case's text: skip to the next quote or escape.
      size_t k = *i;
      if (escape_) {
        escape_ = false;
        continue;
      }
      while (k < n && p[k] != '"' && p[k] != '\\') ++k;
      *i = k;
      if (k == n) return true;
      if (p[k] == '\\') {
        escape_ = true;
        continue;
      }
      in_string_ = false;
      if (depth_ == cut_depth_) EndElement(base + k + 1);  // a string element
      continue;
    }
    if (depth_ > cut_depth_) {  // inside an element: on to its next string or bracket
      size_t k = *i;
      while (k < n && !kStops[static_cast<unsigned char>(p[k])]) ++k;
      *i = k;
      if (k == n) return true;
    }
    const char ch = p[*i];
    if (scalar_) {
      if (ClassOf(ch) == kPlain) continue;
      scalar_ = false;
      EndElement(base + *i);
    }
    if (depth_ == cut_depth_ && ch == ']' && expect_ != Expect::kElement) {  // the array's end
      CloseWindow();
      cut_depth_ = 0;
      copy_from_ = *i;  // the "]" is the skeleton's again (and closes the level there)
      return true;
    }
    if (!CutByte(ch, base + *i)) return false;
  }
  return true;
}

bool Scanner::CutByte(char ch, uint64_t at) {
  const bool own_level = depth_ == cut_depth_;
  switch (ClassOf(ch)) {
    case kSpace: return true;
    case kPlain:
      if (own_level && !StartElement(at)) return false;
      scalar_ = own_level;
      return true;
    case kQuote:
      if (own_level && !StartElement(at)) return false;
      in_string_ = true;
      return true;
    case kOpen:
      if (own_level && !StartElement(at)) return false;
      return ++depth_ <= kMaxCaseDepth;
    case kClose:
      if (own_level) return false;  // "}", or "]" after a comma
      if (--depth_ == cut_depth_) EndElement(at + 1);
      return true;
    case kComma:
      if (!own_level) return true;
      if (expect_ != Expect::kSeparator) return false;
      expect_ = Expect::kElement;
      return true;
    case kColon: return !own_level;
    default: return false;  // a comment
  }
}

#if defined(__SSE2__)
// Bit k of each mask: byte k of the 64 at p is one of those characters.
struct BlockMasks {
  uint64_t quote = 0;
  uint64_t rare = 0;      // a backslash or a slash (an escape, a comment, or "L/min")
  uint64_t brackets = 0;  // "{", "[", "}" or "]"
};

inline uint64_t Bits(__m128i v) { return static_cast<uint16_t>(_mm_movemask_epi8(v)); }

BlockMasks Classify(const char* p) {
  BlockMasks m;
  for (int k = 0; k < 4; ++k) {
    const __m128i v = _mm_loadu_si128(reinterpret_cast<const __m128i*>(p + 16 * k));
    auto is = [&v](char c) { return _mm_cmpeq_epi8(v, _mm_set1_epi8(c)); };
    // "{" and "[" differ from each other in bit 5 only, as "}" and "]" do.
    const __m128i folded = _mm_or_si128(v, _mm_set1_epi8(0x20));
    const __m128i brackets =
        _mm_or_si128(_mm_cmpeq_epi8(folded, _mm_set1_epi8('{')), _mm_cmpeq_epi8(folded, _mm_set1_epi8('}')));
    const int at = 16 * k;
    m.quote |= Bits(is('"')) << at;
    m.rare |= Bits(_mm_or_si128(is('\\'), is('/'))) << at;
    m.brackets |= Bits(brackets) << at;
  }
  return m;
}

// Bit k set when an odd number of bits 0..k of x are: with x the quotes,
// the bytes from an opening quote up to its closing one.
inline uint64_t PrefixXor(uint64_t x) {
  for (int s = 1; s < 64; s *= 2) x ^= x << s;
  return x;
}

inline uint64_t Below(size_t k) { return k >= 64 ? ~uint64_t(0) : (uint64_t(1) << k) - 1; }
#endif

// Bytes [from, to) of a block at the array's own level (no bracket among
// them; between elements a byte or two): whitespace and, after an element,
// one comma. False with *k the byte CutBytes must read on from (the state
// is that byte's).
bool Scanner::OwnLevel(const char* p, size_t from, size_t to, size_t* k) {
  for (*k = from; *k < to; ++*k) {
    const uint8_t c = ClassOf(p[*k]);
    if (c == kSpace) continue;
    if (c != kComma || expect_ != Expect::kSeparator) return false;
    expect_ = Expect::kElement;
  }
  return true;
}

// The 64 bytes at p (text byte `at`), outside any escape or scalar: how
// many of them were read (64, or fewer where one needs CutBytes: a
// backslash or a slash anywhere, a string at the array's own level,
// anything there but whitespace and one comma between elements, the
// array's end, nesting beyond the limit).
size_t Scanner::CutBlock(const char* p, uint64_t at) {
#if defined(__SSE2__)
  const BlockMasks m = Classify(p);
  if (m.rare || (in_string_ && depth_ == cut_depth_)) return 0;
  const uint64_t strings = PrefixXor(m.quote) ^ (in_string_ ? ~uint64_t(0) : 0);
  size_t from = 0;  // the array's own level since this byte, when depth_ == cut_depth_
  size_t k = 0;
  // Every stop is outside strings: at a bracket, or at the array's own level.
  auto stop = [this](size_t byte) {
    in_string_ = false;
    return byte;
  };
  for (uint64_t brackets = m.brackets & ~strings; brackets; brackets &= brackets - 1) {
    const size_t b = size_t(__builtin_ctzll(brackets));
    const bool own_level = depth_ == cut_depth_;
    if (own_level && !OwnLevel(p, from, b, &k)) return stop(k);
    if (p[b] == '{' || p[b] == '[') {
      if ((own_level && !StartElement(at + b)) || depth_ + 1 > kMaxCaseDepth) return stop(b);
      ++depth_;
    } else {
      if (own_level) return stop(b);  // the array's end, or a fault
      if (--depth_ == cut_depth_) {
        EndElement(at + b + 1);
        from = b + 1;
      }
    }
  }
  if (depth_ == cut_depth_ && !OwnLevel(p, from, 64, &k)) return stop(k);
  in_string_ = (strings >> 63) != 0;
  return 64;
#else
  (void)p;
  (void)at;
  return 0;
#endif
}

bool Scanner::StartElement(uint64_t at) {
  if (expect_ == Expect::kSeparator) return false;
  element_begin_ = at;
  return true;
}

void Scanner::EndElement(uint64_t end) {
  CutArray& a = out_->arrays.back();
  if (window_.count == 0) {
    window_.begin = element_begin_;
    window_.first = a.size;
  }
  window_.end = end;
  ++window_.count;
  ++a.size;
  expect_ = Expect::kSeparator;
  if (window_.end - window_.begin >= window_bytes_) CloseWindow();
}

void Scanner::CloseWindow() {
  if (window_.count == 0) return;
  out_->max_window_bytes = std::max<size_t>(out_->max_window_bytes, window_.end - window_.begin);
  out_->arrays.back().windows.push_back(window_);
  window_ = TextWindow();
}

}  // namespace

bool ScanCaseText(const CaseTextSource& source, size_t window_bytes, ScannedCase* out) {
  *out = ScannedCase();
  Scanner scan(std::max<size_t>(window_bytes, 1), out);
  constexpr size_t kChunk = size_t(1) << 20;
  std::string chunk(kChunk, '\0');
  for (uint64_t at = 0; at < source.size(); at += kChunk) {
    const size_t want = size_t(std::min<uint64_t>(kChunk, source.size() - at));
    if (source.Read(at, chunk.data(), want) != want || !scan.Chunk(chunk.data(), want, at)) return false;
  }
  return scan.Finished();
}

}  // namespace loopwright
