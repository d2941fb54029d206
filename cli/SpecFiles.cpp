// SpecFiles.cpp - turns command-line paths into the spec files to read.
#include "SpecFiles.h"

#include "Source.h"

#include <algorithm>
#include <filesystem>

namespace saltpan::cli {

namespace fs = std::filesystem;

std::vector<std::string> discoverSpecs(const std::vector<std::string> &paths, std::vector<UnreadableFolder> &unreadable,
                                       std::string &error) {
  std::vector<std::string> files;
  for (const std::string &p : paths) {
    std::error_code ec;
    if (fs::is_directory(p, ec)) {
      std::vector<fs::path> folders{fs::path(p)}; // a worklist, not recursion: depth is unbounded
      while (!folders.empty()) {
        fs::path folder = folders.back();
        folders.pop_back();
        fs::directory_iterator it(folder, ec), end;
        if (ec) {
          unreadable.push_back({folder.lexically_normal().string(), "cannot read the folder (" + ec.message() + ")"});
          continue;
        }
        for (; it != end; it.increment(ec)) {
          if (ec)
            break;
          const fs::path &path = it->path();
          std::error_code kind;
          if (it->is_directory(kind) && !it->is_symlink(kind))
            folders.push_back(path);
          else if (it->is_regular_file(kind) && path.extension() == ".saltpan" && path.filename().string()[0] != '_')
            files.push_back(path.lexically_normal().string());
        }
        if (ec)
          unreadable.push_back({folder.lexically_normal().string(), "cannot list the folder (" + ec.message() + ")"});
      }
    } else if (fs::is_regular_file(p, ec)) {
      files.push_back(fs::path(p).lexically_normal().string());
    } else {
      error = "cannot find '" + escapeControls(p) + "'";
      return {};
    }
  }
  std::sort(files.begin(), files.end());
  files.erase(std::unique(files.begin(), files.end()), files.end());
  std::sort(unreadable.begin(), unreadable.end());
  return files;
}

} // namespace saltpan::cli
