// Repeated warnings, printed once with a count.
//
// An envelope of many points raises the same warning at many of them (a
// relief lifting at every cold grid point, a valve beyond its range at every
// hot one), each with its own numbers and point name. WarningTally groups
// warnings whose text differs only in numbers and in the point's name, keeps
// the first one seen as the example, and counts the points: "oil/filter:
// bypass open at sweep[...]: 12.3% unfiltered (x12 points; the first shown)".
#pragma once

#include <string>
#include <unordered_map>
#include <vector>

namespace loopwright {

class WarningTally {
 public:
  // `point` (may be empty) is removed from the text before grouping.
  void Add(const std::string& text, const std::string& point = "");
  // One line per group, in order of first appearance, at most `max_lines`
  // (then one line saying how many more groups there were).
  // `noun` names what was counted ("points", or "times" within one point).
  std::vector<std::string> Lines(size_t max_lines = 1000, const std::string& noun = "points") const;
  bool empty() const { return groups_.empty(); }

 private:
  struct Group {
    std::string key, example;
    int count = 0;
  };
  std::vector<Group> groups_;                  // in order of first appearance
  std::unordered_map<std::string, size_t> index_;  // key -> position in groups_ (linear in warnings)
};

// The text with every number replaced by '#' (the grouping key).
std::string WarningKey(const std::string& text);

}  // namespace loopwright
