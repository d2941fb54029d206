// SpecFiles.h - the spec files that command-line paths name (files, and directories searched).
#pragma once
#include <string>
#include <vector>

namespace saltpan::cli {

/// Each path as a file, or for a directory every `*.saltpan` below it whose name does not start
/// with '_' (helpers that other specs use). Sorted, each once. Empty with `error` set when a path
/// does not exist.
std::vector<std::string> discoverSpecs(const std::vector<std::string> &paths, std::string &error);

} // namespace saltpan::cli
