// The case loader's fast parse (simdjson, Debian libsimdjson-dev), reading
// the text in windows: a light scan (network/case/window_scan.h) splits it
// into a small skeleton (everything but the contents of each loop's "nodes"
// and "components" arrays), parsed whole into an nlohmann document in which
// those arrays hold nulls, and windows of whole elements of those arrays,
// each parsed by simdjson as an array of its own when the readers reach it.
// The readers read the elements straight from the window's tape
// (LazyElement, a JsonView) and keep in the slot only what the readers after
// the loops look up (case.cpp), so a plant-size case never holds its whole
// text, its whole simdjson document or a whole nlohmann document. Whenever
// the text needs the exact parser (any syntax error, a comment, a repeated
// key, a nesting deeper than the limit, a number simdjson refuses) FastParse
// or the windows say so and the loader parses with ParseJsonText instead,
// which reports every problem with its line and column or pointer. See
// DEVELOPERS.md, "Loading plant-size cases" and "Reading in windows".
#pragma once

#include <memory>
#include <string>

#include <nlohmann/json.hpp>

namespace loopwright {

class LazyElements;
class JsonView;

struct LazyElementsDeleter {
  void operator()(LazyElements* p) const;
};
using LazyElementsPtr = std::unique_ptr<LazyElements, LazyElementsDeleter>;

// How many case texts the loader has parsed with ParseJsonText (the exact
// parser) in this process, for tests: a case the fast parse cannot read
// exactly (a comment, a repeated key, a syntax error...). network/case/case.cpp.
size_t CaseTextsParsedExactly();

// Parses the skeleton of `text` into *doc (loop node and component arrays as
// nulls, their elements read through *lazy, which reads them from `text`:
// it must outlive *lazy); false when the exact parser must read it (nothing
// is reported: ParseJsonText then finds what is wrong, or reads the text if
// only the fast parse refused it, e.g. for a comment).
bool FastParse(const std::string& text, nlohmann::json* doc, LazyElementsPtr* lazy);

// The same for a regular file of at most max_bytes, read in pieces (*lazy
// keeps it open); false also when it cannot be opened, is not a regular file
// or is larger (the loader's reader then reports why).
bool FastParseFile(const std::string& path, size_t max_bytes, nlohmann::json* doc, LazyElementsPtr* lazy);

// Whether an element read through LazyElement repeated a key or its window
// could not be read exactly, or an element was never read: the load must
// start over with the exact parser.
bool NeedsExactParse(const LazyElements* lazy);

// Whether the load is already known to need the exact parser (a repeated
// key, a window simdjson refused): the readers may stop.
bool LoadAbandoned(const LazyElements* lazy);

// Frees the windows and closes the file once every loop has been read (what
// the readers after the loops look up was kept in the nlohmann slots), so
// that the sections read after the loops do not stack on them; whether an
// element was never read, or the file changed while it was read (its size
// or modification time), is settled first (NeedsExactParse keeps the
// answer). No view may be used after this.
void ReleaseDocument(LazyElements* lazy);

// A view of element `index` of /loops/<loop>/nodes (or /components) into
// *view when that array was cut out of the skeleton; false (view untouched)
// when the array was converted whole, or its window could not be read
// exactly (the load is then abandoned: LoadAbandoned). An element that
// repeats a key marks the load for the exact parser (NeedsExactParse),
// except a component object: its reader gathers its members in one pass
// that finds a repeated key too, and calls MarkRepeatedKey (case.cpp,
// GatherMembers).
// Elements are best read in order (each is found by walking on from the
// last one read). A view stays valid until an element two windows on is
// asked for: the last element returned and the one before are always
// valid (the readers' one-element look ahead), and so is every element of
// the window holding the last one, until ReleaseDocument.
bool LazyElement(LazyElements* lazy, size_t loop, bool nodes, size_t index, JsonView* view);

// Marks the load for the exact parser: an element read through LazyElement
// repeats a key.
void MarkRepeatedKey(LazyElements* lazy);

// For tests: the bytes of text per window (0: the default,
// CaseWindowBytesFor the text, network/case/window_scan.h), windows parsed
// in this process, and the largest window's text (bytes) of the last fast
// parse.
void SetCaseWindowBytes(size_t bytes);
size_t CaseWindowsParsed();
size_t LargestCaseWindow();

}  // namespace loopwright
