// The case loader's fast parse (simdjson, Debian libsimdjson-dev): the text
// is parsed into simdjson's compact tape, and an nlohmann document is built
// from it in which each loop's "nodes" and "components" arrays hold nulls;
// the readers read their elements straight from the tape (LazyElement, a
// JsonView) and keep in the slot only what the readers after the loops look
// up (case.cpp), so a plant-size case never holds a whole nlohmann document. Whenever the text needs the exact parser
// (any syntax error, a comment, a repeated key, a nesting deeper than the
// limit, a number simdjson refuses) FastParse says so and the loader parses with
// ParseJsonText instead, which reports every problem with its line and
// column or pointer. See DEVELOPERS.md, "Loading plant-size cases".
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

// A text whose capacity exceeds its size by this much is parsed in place
// (else simdjson copies it first).
inline constexpr size_t kFastParsePadding = 64;

// Parses `text` into *doc (loop node and component arrays as nulls, filled
// through *lazy); false when the exact parser must read it (nothing is
// reported: ParseJsonText then finds what is wrong, or reads the text if
// only simdjson refused it, e.g. for a comment).
bool FastParse(const std::string& text, nlohmann::json* doc, LazyElementsPtr* lazy);

// Whether an element read through LazyElement repeated a key, or an element
// was never read: the load must start over with the exact parser.
bool NeedsExactParse(const LazyElements* lazy);

// Frees the parsed document once every loop has been read (what the readers
// after the loops look up was kept in the nlohmann slots), so that the
// sections read after the loops (the check sites: 56 B per component) do
// not stack on it; whether an element was never read is settled first
// (NeedsExactParse keeps its answer). No view may be used after this.
void ReleaseDocument(LazyElements* lazy);

// A view of element `index` of /loops/<loop>/nodes (or /components) into
// *view when that array was left to be read from the fast parse; false
// (view untouched) when the array was converted whole. An element that
// repeats a key marks the load for the exact parser (NeedsExactParse),
// except a component object: its reader gathers its members in one pass
// that finds a repeated key too, and calls MarkRepeatedKey (case.cpp,
// GatherMembers).
// Elements are best read in order (each is found by walking on from the
// last one read); a view is valid while *lazy lives.
bool LazyElement(LazyElements* lazy, size_t loop, bool nodes, size_t index, JsonView* view);

// Marks the load for the exact parser: an element read through LazyElement
// repeats a key.
void MarkRepeatedKey(LazyElements* lazy);

}  // namespace loopwright
