#include "network/case/fast_parse.h"

#include <algorithm>
#include <atomic>
#include <string_view>
#include <vector>

#include <simdjson.h>

#include "network/case/case.h"
#include "network/case/json_view.h"
#include "network/case/window_scan.h"

namespace loopwright {

namespace dom = simdjson::dom;
using nlohmann::json;

namespace {
std::atomic<size_t> window_bytes{0};  // 0: CaseWindowBytesFor the text
std::atomic<size_t> windows_parsed{0};
std::atomic<size_t> largest_window{0};
}  // namespace

class LazyElements {
 public:
  // A cut array the skeleton holds as a loop's "nodes" or "components".
  struct Array {
    size_t loop = 0;
    bool nodes = false;
    size_t cut = 0;     // in `cuts`
    size_t window = 0;  // the window of the last element asked for
    size_t read = 0;    // elements before this one have been read
  };
  // One parsed window; two are held, so that the element before the last
  // one returned stays valid when the last one opened the next window.
  struct Held {
    size_t cut = SIZE_MAX, window = 0;
    std::vector<char> text;  // "[" + the window's text + "]" + padding
    dom::document document;
    dom::array items;
    dom::array::iterator at;  // element `next` of the window
    size_t next = 0;
  };
  CaseTextSource source;
  std::vector<CutArray> cuts;
  std::vector<Array> arrays;
  dom::parser parser;  // its buffers fit the largest window
  Held held[2];
  int last = 0;        // the slot of the last element returned
  bool exact = false;  // the exact parser must read the text
};

void LazyElementsDeleter::operator()(LazyElements* p) const { delete p; }

namespace {

// The cut array of loop `loop`'s "nodes" (or "components"), claimed once;
// -1 if none (a loop the scan did not see as one).
long ClaimCut(LazyElements* lazy, size_t loop, bool nodes, std::vector<bool>* claimed) {
  for (size_t k = 0; k < lazy->cuts.size(); ++k)
    if (lazy->cuts[k].loop == loop && lazy->cuts[k].nodes == nodes && !(*claimed)[k]) {
      (*claimed)[k] = true;
      return long(k);
    }
  return -1;
}

// One loop object: its "nodes" and "components" arrays left as nulls, to be
// filled element by element from their windows.
json LoopToJson(dom::object loop, size_t index, LazyElements* lazy, std::vector<bool>* claimed) {
  json j(json::value_t::object);
  auto& o = j.get_ref<json::object_t&>();
  for (dom::key_value_pair kv : loop) {
    dom::array items;
    const bool nodes = kv.key == "nodes";
    const long cut = (nodes || kv.key == "components") && kv.value.get(items) == simdjson::SUCCESS
                         ? ClaimCut(lazy, index, nodes, claimed)
                         : -1;
    if (cut >= 0 && items.size() == 0) {
      lazy->arrays.push_back({index, nodes, size_t(cut), 0, 0});
      if (!o.emplace(std::string(kv.key), json::array_t(lazy->cuts[cut].size)).second) lazy->exact = true;
    } else {
      if (cut >= 0) lazy->exact = true;  // the scan and the skeleton disagree
      if (!o.emplace(std::string(kv.key), DomToJson(kv.value, &lazy->exact)).second) lazy->exact = true;
    }
  }
  return j;
}

// The skeleton's root as an nlohmann document, the loops' cut arrays as nulls.
json SkeletonToJson(dom::element root, LazyElements* l) {
  std::vector<bool> claimed(l->cuts.size(), false);
  dom::object top;
  if (root.get(top) != simdjson::SUCCESS) return DomToJson(root, &l->exact);
  json j(json::value_t::object);
  auto& o = j.get_ref<json::object_t&>();
  for (dom::key_value_pair kv : top) {
    dom::array loops;
    if (kv.key != "loops" || kv.value.get(loops) != simdjson::SUCCESS) {
      if (!o.emplace(std::string(kv.key), DomToJson(kv.value, &l->exact)).second) l->exact = true;
      continue;
    }
    json list(json::value_t::array);
    auto& items = list.get_ref<json::array_t&>();
    for (dom::element loop : loops) {
      dom::object lo;
      items.push_back(loop.get(lo) == simdjson::SUCCESS ? LoopToJson(lo, items.size(), l, &claimed)
                                                         : DomToJson(loop, &l->exact));
    }
    if (!o.emplace("loops", std::move(list)).second) l->exact = true;
  }
  // Every array the scan cut out is one the skeleton names.
  if (std::find(claimed.begin(), claimed.end(), false) != claimed.end()) l->exact = true;
  return j;
}

// Scans l->source, parses the skeleton into *doc.
bool ParseSource(LazyElementsPtr l, json* doc, LazyElementsPtr* lazy) {
  ScannedCase scan;
  const size_t w = window_bytes.load();
  if (!ScanCaseText(l->source, w ? w : CaseWindowBytesFor(l->source.size()), &scan)) return false;
  largest_window = scan.max_window_bytes;
  l->cuts = std::move(scan.arrays);
  json j;
  {
    // The skeleton alone: its document is dropped once converted.
    dom::parser parser;
    dom::document skeleton;
    dom::element root;
    scan.skeleton.reserve(scan.skeleton.size() + simdjson::SIMDJSON_PADDING);
    if (parser.allocate(scan.skeleton.size(), kMaxCaseDepth) != simdjson::SUCCESS ||
        parser.parse_into_document(skeleton, reinterpret_cast<const uint8_t*>(scan.skeleton.data()),
                                   scan.skeleton.size(), false)
                .get(root) != simdjson::SUCCESS)
      return false;
    j = SkeletonToJson(root, l.get());
  }
  if (l->exact) return false;
  *doc = std::move(j);
  *lazy = std::move(l);
  return true;
}

// Parses window `w` of cut array `cut` into a held slot (not the last
// one's); null when simdjson refuses it or it does not hold its elements.
LazyElements::Held* LoadWindow(LazyElements* lazy, size_t cut, size_t w) {
  const TextWindow& tw = lazy->cuts[cut].windows[w];
  LazyElements::Held& h = lazy->held[1 - lazy->last];
  const size_t len = size_t(tw.end - tw.begin);
  if (h.text.size() < len + 2 + simdjson::SIMDJSON_PADDING) h.text.resize(len + 2 + simdjson::SIMDJSON_PADDING);
  h.cut = SIZE_MAX;
  h.text[0] = '[';
  h.text[len + 1] = ']';
  dom::element root;
  ++windows_parsed;
  if (lazy->source.Read(tw.begin, h.text.data() + 1, len) != len ||
      lazy->parser.parse_into_document(h.document, reinterpret_cast<const uint8_t*>(h.text.data()), len + 2, false)
              .get(root) != simdjson::SUCCESS ||
      root.get(h.items) != simdjson::SUCCESS || h.items.size() != tw.count)
    return nullptr;
  h.cut = cut;
  h.window = w;
  h.at = h.items.begin();
  h.next = 0;
  return &h;
}

// The held window `w` of cut array `cut`, parsed now if it is not held;
// it becomes the last one's slot.
LazyElements::Held* HeldWindow(LazyElements* lazy, size_t cut, size_t w) {
  for (int s = 0; s < 2; ++s)
    if (lazy->held[s].cut == cut && lazy->held[s].window == w) {
      lazy->last = s;
      return &lazy->held[s];
    }
  LazyElements::Held* h = LoadWindow(lazy, cut, w);
  if (h) lazy->last = int(h - lazy->held);
  return h;
}

// The window of cut array a holding element `index` (walking on from the
// last one asked for).
size_t WindowOf(const LazyElements* lazy, LazyElements::Array* a, size_t index) {
  const std::vector<TextWindow>& ws = lazy->cuts[a->cut].windows;
  size_t w = index < ws[a->window].first ? 0 : a->window;
  while (index >= ws[w].first + ws[w].count) ++w;
  a->window = w;
  return w;
}

}  // namespace

bool FastParse(const std::string& text, json* doc, LazyElementsPtr* lazy) {
  LazyElementsPtr l(new LazyElements);
  l->source.UseText(&text);
  return ParseSource(std::move(l), doc, lazy);
}

bool FastParseFile(const std::string& path, size_t max_bytes, json* doc, LazyElementsPtr* lazy) {
  LazyElementsPtr l(new LazyElements);
  return l->source.OpenFile(path, max_bytes) && ParseSource(std::move(l), doc, lazy);
}

// An element never read (a loop not read: too many components) might hold
// a repeated key the exact parser reports.
bool NeedsExactParse(const LazyElements* lazy) {
  if (!lazy) return false;
  for (const LazyElements::Array& a : lazy->arrays)
    if (a.read < lazy->cuts[a.cut].size) return true;
  return lazy->exact;
}

bool LoadAbandoned(const LazyElements* lazy) { return lazy && lazy->exact; }

void ReleaseDocument(LazyElements* lazy) {
  if (!lazy) return;
  lazy->exact = NeedsExactParse(lazy) || !lazy->source.Unchanged();
  lazy->arrays.clear();
  lazy->cuts.clear();
  for (LazyElements::Held& h : lazy->held) {
    h = LazyElements::Held();
  }
  lazy->parser = dom::parser();
  lazy->source.Close();
}

bool LazyElement(LazyElements* lazy, size_t loop, bool nodes, size_t index, JsonView* view) {
  if (!lazy) return false;
  for (LazyElements::Array& a : lazy->arrays) {
    if (a.loop != loop || a.nodes != nodes) continue;
    if (index >= lazy->cuts[a.cut].size) return false;
    const size_t w = WindowOf(lazy, &a, index);
    LazyElements::Held* h = HeldWindow(lazy, a.cut, w);
    if (!h) {
      lazy->exact = true;
      return false;
    }
    const size_t k = index - lazy->cuts[a.cut].windows[w].first;
    if (k < h->next) {
      h->at = h->items.begin();
      h->next = 0;
    }
    for (; h->next < k; ++h->next) ++h->at;
    *view = JsonView(*h->at);
    if ((nodes || !(*h->at).is_object()) && HasRepeatedKey(*h->at)) lazy->exact = true;
    ++h->at;
    ++h->next;
    a.read = std::max(a.read, index + 1);
    return true;
  }
  return false;
}

void MarkRepeatedKey(LazyElements* lazy) {
  if (lazy) lazy->exact = true;
}

void SetCaseWindowBytes(size_t bytes) { window_bytes = bytes; }
size_t CaseWindowsParsed() { return windows_parsed.load(); }
size_t LargestCaseWindow() { return largest_window.load(); }

}  // namespace loopwright
