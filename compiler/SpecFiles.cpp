// SpecFiles.cpp - turns command-line paths into the spec files to read.
#include "SpecFiles.h"

#include <algorithm>
#include <filesystem>

namespace saltpan::cli {

namespace fs = std::filesystem;

std::vector<std::string> discoverSpecs(const std::vector<std::string> &paths, std::string &error) {
  std::vector<std::string> files;
  for (const std::string &p : paths) {
    std::error_code ec;
    if (fs::is_directory(p, ec)) {
      for (auto &entry : fs::recursive_directory_iterator(p, ec))
        if (entry.is_regular_file() && entry.path().extension() == ".saltpan" &&
            entry.path().filename().string()[0] != '_')
          files.push_back(entry.path().lexically_normal().string());
    } else if (fs::is_regular_file(p, ec)) {
      files.push_back(fs::path(p).lexically_normal().string());
    } else {
      error = "cannot find '" + p + "'";
      return {};
    }
  }
  std::sort(files.begin(), files.end());
  files.erase(std::unique(files.begin(), files.end()), files.end());
  return files;
}

} // namespace saltpan::cli
