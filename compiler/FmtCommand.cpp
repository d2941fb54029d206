// FmtCommand.cpp - `saltpan fmt`: rewrites specs in the canonical layout (parse/Format.h).
#include "Commands.h"
#include "Version.h"

#include "Diagnostics.h"
#include "Source.h"
#include "parse/Format.h"

#include <cstdio>
#include <unistd.h>

namespace saltpan::cli {

namespace {

const char *fmtHelp = R"(usage: saltpan fmt [options] FILE...

Rewrites each spec in place in the canonical layout (docs/language.md, "Canonical layout"):
two-space indentation, one item per line, single spaces around operators, a blank line
between declarations. Comments stay where they are; numbers and units keep their text.
Formatting is idempotent, and it never changes what a spec means: the result is re-parsed
and compared before anything is written. A file with syntax errors is left untouched.

options:
  --check      write nothing; list the files that are not in canonical layout
  --stdout     print the canonical form to standard output instead of rewriting
  --version    print the version
  --help       show this help

exit status: 0 success (with --check: every file is canonical), 1 with --check: some file
             would change, 64 bad usage, 65 a file has syntax errors or cannot be read,
             70 internal fault, 73 a file could not be written
)";

int usage(const std::string &message) {
  std::fprintf(stderr, "saltpan: %s\n\n%s", message.c_str(), fmtHelp);
  return Usage;
}

} // namespace

int fmtCommand(const std::vector<std::string> &args) {
  std::vector<std::string> files;
  bool check = false, toStdout = false;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string &a = args[i];
    if (a == "--help" || a == "-h") {
      std::fputs(fmtHelp, stdout);
      return Ok;
    }
    if (a == "--version") {
      std::printf("saltpan %s\n", SALTPAN_VERSION);
      return Ok;
    }
    if (a == "--check")
      check = true;
    else if (a == "--stdout")
      toStdout = true;
    else if (a == "--") {
      files.insert(files.end(), args.begin() + static_cast<long>(i) + 1, args.end());
      break;
    } else if (a.size() > 1 && a[0] == '-')
      return usage("unknown option '" + a + "'");
    else
      files.push_back(a);
  }
  if (files.empty())
    return usage("no spec file given");
  if (check && toStdout)
    return usage("--check and --stdout cannot be combined");

  bool colour = isatty(fileno(stderr)) && std::getenv("NO_COLOR") == nullptr;
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
    if (!writeFileAtomically(path, *text, error)) {
      std::fprintf(stderr, "saltpan: %s\n", error.c_str());
      cannotWrite = true;
    }
  }
  if (errors)
    return SpecErrors;
  if (cannotWrite)
    return CannotWrite;
  return check && changed ? ExpectationsFailed : Ok;
}

} // namespace saltpan::cli
