// SpecFiles.h - the spec files that command-line paths name (files, and folders searched).
#pragma once
#include <string>
#include <vector>

namespace saltpan::cli {

/// A folder that could not be read, and why ("cannot read the folder (Permission denied)").
struct UnreadableFolder {
  std::string path, problem;
  bool operator<(const UnreadableFolder &o) const { return path < o.path; }
  std::string text() const { return path + ": " + problem; }
};

/// Each path as a file, or for a folder every `*.saltpan` below it whose name does not start
/// with '_' (helpers that other specs use), without following links to folders. Sorted, each
/// once. A folder that cannot be read is added to `unreadable`, not a stop. Empty with `error`
/// set when a path does not exist.
std::vector<std::string> discoverSpecs(const std::vector<std::string> &paths, std::vector<UnreadableFolder> &unreadable,
                                       std::string &error);

} // namespace saltpan::cli
