#include "network/envelope/warning_tally.h"

#include <cctype>

#include <fmt/format.h>

namespace loopwright {

std::string WarningKey(const std::string& text) {
  auto digit = [&](size_t k) { return k < text.size() && std::isdigit(static_cast<unsigned char>(text[k])); };
  auto word_char = [&](size_t k) {
    const char ch = text[k];
    return std::isalnum(static_cast<unsigned char>(ch)) || ch == '_' || ch == '^' || ch == '-';
  };
  std::string out;
  for (size_t i = 0; i < text.size();) {
    // A word ("gp-08", "FL^2", "Re_d", "p1") is kept whole, digits and all.
    if (std::isalpha(static_cast<unsigned char>(text[i])) || text[i] == '_') {
      while (i < text.size() && word_char(i)) out += text[i++];
      continue;
    }
    const bool number = digit(i) || ((text[i] == '-' || text[i] == '.') && digit(i + 1));
    if (!number) {
      out += text[i++];
      continue;
    }
    ++i;
    while (digit(i) || (i < text.size() && (text[i] == '.' || text[i] == 'e' ||
                                            ((text[i] == '-' || text[i] == '+') && text[i - 1] == 'e'))))
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
  const auto [it, added] = index_.emplace(key, groups_.size());
  if (!added) {
    ++groups_[it->second].count;
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
