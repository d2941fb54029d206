// Nearest.h - names close to a mistyped one, for "did you mean" hints.
#pragma once
#include <string>
#include <vector>

namespace saltpan {

/// Levenshtein distance: insertions, deletions and substitutions of bytes.
size_t editDistance(const std::string &a, const std::string &b);

/// Up to `most` candidates close to `wanted` ignoring case, closest first: within a third of its
/// length in edit distance, or containing its last dotted part; none much farther than the closest.
std::vector<std::string> nearestNames(const std::string &wanted, const std::vector<std::string> &candidates,
                                      size_t most = 3);

} // namespace saltpan
