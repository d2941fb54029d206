// Nearest.cpp - edit distance and the candidates a hint offers.
#include "Nearest.h"

#include <algorithm>
#include <cctype>

namespace saltpan {

size_t editDistance(const std::string &a, const std::string &b) {
  std::vector<size_t> row(b.size() + 1);
  for (size_t j = 0; j <= b.size(); ++j)
    row[j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    size_t diagonal = row[0];
    row[0] = i;
    for (size_t j = 1; j <= b.size(); ++j) {
      size_t up = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] != b[j - 1])});
      diagonal = up;
    }
  }
  return row[b.size()];
}

namespace {

std::string lower(std::string s) {
  for (char &c : s)
    c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

} // namespace

std::vector<std::string> nearestNames(const std::string &wanted, const std::vector<std::string> &candidates,
                                      size_t most) {
  std::string key = lower(wanted);
  std::string lastPart = key.substr(key.rfind('.') == std::string::npos ? 0 : key.rfind('.') + 1);
  std::vector<std::pair<size_t, std::string>> ranked; // (distance, name)
  size_t limit = std::max<size_t>(1, wanted.size() / 3);
  for (const std::string &c : candidates) {
    std::string l = lower(c);
    size_t distance = editDistance(key, l);
    if (distance <= limit || (lastPart.size() >= 3 && l.find(lastPart) != std::string::npos))
      ranked.push_back({distance, c});
  }
  std::stable_sort(ranked.begin(), ranked.end(), [](auto &a, auto &b) { return a.first < b.first; });
  // Only names about as close as the closest: one near miss should not bring in its siblings.
  std::vector<std::string> out;
  for (auto &[distance, name] : ranked)
    if (out.size() < most && distance <= ranked.front().first + 2 &&
        std::find(out.begin(), out.end(), name) == out.end())
      out.push_back(name);
  return out;
}

} // namespace saltpan
