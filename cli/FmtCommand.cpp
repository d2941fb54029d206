// FmtCommand.cpp - `saltpan fmt`: rewrites specs in the canonical layout (parse/Format.h).
#include "Commands.h"

#include "Diagnostics.h"
#include "Source.h"
#include "parse/Format.h"

#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <sys/stat.h>
#include <unistd.h>

namespace saltpan::cli {

namespace {

const char *fmtHelp = R"(usage: saltpan fmt [options] FILE...

Rewrites each spec in place in the canonical layout (docs/language.md, "Canonical layout"):
two-space indentation, one item per line, single spaces around operators, a blank line
between declarations. Comments stay where they are; numbers and units keep their text.
Formatting is idempotent, and it never changes what a spec means: the result is re-parsed
and compared before anything is written. A file with syntax errors is left untouched.

A file is rewritten through a temporary in its directory that is renamed over it: it keeps
its mode, owner and group. A symbolic link is followed and its target rewritten (the link
stays); a link that another user planted in a shared sticky directory (such as /tmp) is
refused. A read-only file, or one with several hard links (the other names would keep the
old text), is refused unless --force.

options:
  --check      write nothing; list the files that are not in canonical layout
  --stdout     print the canonical form to standard output instead of rewriting
  --force      also rewrite read-only files (they stay read-only) and files with several
               hard links (this name gets the new text, the other names keep the old)
  --version    print the version
  --help       show this help

exit status: 0 success (with --check: every file is canonical), 1 with --check: some file
             would change, 64 bad usage, 65 a file has syntax errors or cannot be read,
             70 internal fault, 73 a file could not be written or was refused (read-only,
             several hard links, a planted link)
)";

int usage(const std::string &message) { return usageError("saltpan", message, fmtHelp); }

// Where an in-place rewrite of `path` goes, or "" with `error` when it must not happen.
std::string rewriteTarget(const std::string &path, bool force, std::string &error) {
  struct stat link {};
  if (::lstat(path.c_str(), &link) != 0) {
    error = "cannot read '" + path + "': " + std::strerror(errno);
    return "";
  }
  std::string target = path;
  if (S_ISLNK(link.st_mode)) {
    // The rule the kernel's protected_symlinks applies, kept here whatever the sysctl says:
    // in a sticky world-writable directory only the directory's owner or the link's own
    // user may have planted a link that is followed.
    std::string directory = std::filesystem::path(path).parent_path().string();
    struct stat dir {};
    if (::stat(directory.empty() ? "." : directory.c_str(), &dir) == 0 && (dir.st_mode & S_ISVTX) &&
        (dir.st_mode & S_IWOTH) && link.st_uid != ::geteuid() && link.st_uid != dir.st_uid) {
      error = "'" + path + "' is a symbolic link that another user (uid " + std::to_string(link.st_uid) +
              ") made in a shared sticky directory; saltpan fmt does not write through it";
      return "";
    }
    char *resolved = ::realpath(path.c_str(), nullptr);
    if (!resolved) {
      error = "cannot follow the symbolic link '" + path + "': " + std::strerror(errno);
      return "";
    }
    target = resolved;
    std::free(resolved);
  }
  struct stat st {};
  if (::stat(target.c_str(), &st) != 0 || !S_ISREG(st.st_mode)) {
    error = "'" + path + "' is not a regular file";
    return "";
  }
  bool readOnly = !(st.st_mode & S_IWUSR) || (::geteuid() != 0 && ::access(target.c_str(), W_OK) != 0);
  if (readOnly && !force) {
    error = "'" + path + "' is read-only; saltpan fmt leaves it alone (--force rewrites it, and it stays read-only)";
    return "";
  }
  if (st.st_nlink > 1 && !force) {
    error = "'" + path + "' has " + std::to_string(st.st_nlink) +
            " hard links; rewriting it would give only this name the new text (--force does that)";
    return "";
  }
  return target;
}

} // namespace

int fmtCommand(const std::vector<std::string> &args) {
  std::vector<std::string> files;
  bool check = false, toStdout = false, force = false;
  OptionParser parser;
  addHelpAndVersion(parser, fmtHelp);
  parser.flag("--check", check);
  parser.flag("--force", force);
  parser.flag("--stdout", toStdout);
  parser.positional(files);
  parser.endOfOptions();
  if (auto code = parser.parse(args, usage))
    return *code;
  if (files.empty())
    return usage("no spec file given");
  if (check && toStdout)
    return usage("--check and --stdout cannot be combined");

  bool colour = useColour();
  bool errors = false, cannotWrite = false, changed = false;
  for (const std::string &path : files) {
    SourceManager sources;
    DiagnosticEngine diags;
    std::string error;
    const SourceFile *file = sources.load(path, error);
    if (!file) {
      std::fprintf(stderr, "saltpan: cannot read '%s': %s\n", path.c_str(), error.c_str());
      errors = true;
      continue;
    }
    std::optional<std::string> text = formatSpec(*file, diags);
    for (const Diagnostic &d : diags.all())
      std::fputs(renderText(d, colour).c_str(), stderr);
    if (!text) {
      errors = true;
      continue;
    }
    if (toStdout) {
      std::fputs(text->c_str(), stdout);
      continue;
    }
    if (*text == file->text())
      continue;
    changed = true;
    if (check) {
      std::printf("%s\n", path.c_str());
      continue;
    }
    std::string target = rewriteTarget(path, force, error);
    WriteOptions keep;
    keep.keepOwner = true;
    keep.ownerBestEffort = force;
    if (target.empty() || !writeFileAtomically(target, *text, error, keep)) {
      std::fprintf(stderr, "saltpan: error: %s\n", error.c_str());
      cannotWrite = true;
    }
  }
  if (errors)
    return BadInput;
  if (cannotWrite)
    return CannotWrite;
  return check && changed ? ExpectationsFailed : Ok;
}

} // namespace saltpan::cli
