#include "network/warning_tally.h"

#include <cctype>

#include <fmt/format.h>

namespace loopwright {

std::string WarningKey(const std::string& text) {
  std::string out;
  for (size_t i = 0; i < text.size();) {
    const bool starts_number = std::isdigit(static_cast<unsigned char>(text[i])) ||
                               ((text[i] == '-' || text[i] == '.') && i + 1 < text.size() &&
                                std::isdigit(static_cast<unsigned char>(text[i + 1])));
    // A digit inside a word ("gp-08", "Re_d") belongs to the word.
    const bool in_word = i > 0 && (std::isalpha(static_cast<unsigned char>(text[i - 1])) || text[i - 1] == '_');
    if (!starts_number || in_word) {
      out += text[i++];
      continue;
    }
    ++i;
    while (i < text.size() && (std::isdigit(static_cast<unsigned char>(text[i])) || text[i] == '.' || text[i] == 'e' ||
                               ((text[i] == '-' || text[i] == '+') && (text[i - 1] == 'e'))))
      ++i;
    out += '#';
  }
  return out;
}

void WarningTally::Add(const std::string& text, const std::string& point) {
  std::string stripped = text;
  if (!point.empty())
    for (size_t at = stripped.find(point); at != std::string::npos; at = stripped.find(point, at))
      stripped.replace(at, point.size(), "{point}");
  const std::string key = WarningKey(stripped);
  for (auto& g : groups_)
    if (g.key == key) {
      ++g.count;
      return;
    }
  groups_.push_back({key, text, 1});
}

std::vector<std::string> WarningTally::Lines(size_t max_lines, const std::string& noun) const {
  std::vector<std::string> out;
  for (const auto& g : groups_) {
    if (out.size() == max_lines) {
      out.push_back(fmt::format("... and {} more kind(s) of warning", groups_.size() - max_lines));
      break;
    }
    out.push_back(g.count == 1 ? g.example : fmt::format("{} (\u00d7{} {}; the first shown)", g.example, g.count, noun));
  }
  return out;
}

}  // namespace loopwright
