// Driver.tests.cpp - the one driver for tests/diagnostics/, tests/golden/, and the
// no-diagnostics round trip of every stdlib module and shipped spec.
//
// A diagnostics file states what it expects in comments, clang -verify style:
//   # expected-error@+1:12 {{cannot add}}     next line, column 12, message contains text
//   x = 1 mV + 1 ms  # expected-error:12 {{cannot add}}   (same line)
//   # expected-warning@7 {{...}}              absolute line 7, any column
//   # expected-note@+2 {{...}}                notes are matched when written; a note with no
//                                             place of its own is on its diagnostic's line
// Every error and warning must be expected; notes only when a file expects one.
#include "Pipeline.h"
#include "parse/Parse.h"
#include "unit/TestSupport.h"

#include <catch2/catch.hpp>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <regex>
#include <sstream>

namespace fs = std::filesystem;
using namespace saltpan;

namespace {

struct Expectation {
  std::string severity;
  uint32_t line = 0;
  uint32_t column = 0; // 0: any
  std::string text;
  bool matched = false;
};

std::string readFile(const fs::path &p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

std::vector<Expectation> readExpectations(const std::string &text) {
  std::vector<Expectation> out;
  static const std::regex pattern(R"(expected-(error|warning|note)(@(\+|-)?(\d+))?(:(\d+))?\s*\{\{(.*?)\}\})");
  std::istringstream lines(text);
  std::string line;
  uint32_t number = 0;
  while (std::getline(lines, line)) {
    ++number;
    for (std::sregex_iterator it(line.begin(), line.end(), pattern), end; it != end; ++it) {
      const std::smatch &m = *it;
      Expectation e;
      e.severity = m[1];
      e.line = number;
      if (m[2].matched) {
        auto n = static_cast<uint32_t>(std::stoul(m[4]));
        e.line = m[3] == "+" ? number + n : m[3] == "-" ? number - n : n;
      }
      if (m[6].matched)
        e.column = static_cast<uint32_t>(std::stoul(m[6]));
      e.text = m[7];
      out.push_back(e);
    }
  }
  return out;
}

struct Seen {
  std::string severity;
  uint32_t line = 0, column = 0;
  std::string file, message;
  bool unplaced = false; // a note with no place of its own: matched if expected, never required
};

std::vector<Seen> flatten(const DiagnosticEngine &diags) {
  std::vector<Seen> out;
  for (const Diagnostic &d : diags.all()) {
    auto add = [&](Severity s, const SourceRange &r, const std::string &msg) {
      out.push_back({severityName(s), r.begin.line, r.begin.column, r.valid() ? r.begin.file->path() : "", msg});
    };
    add(d.severity, d.range, d.message);
    // A note with no place of its own is matched on its diagnostic's line, at any column.
    for (const Note &n : d.notes) {
      add(Severity::Note, n.range.valid() ? n.range : d.range, n.message);
      if (!n.range.valid()) {
        out.back().column = 0;
        out.back().unplaced = true;
      }
    }
  }
  return out;
}

std::string describe(const Seen &s) {
  return s.file + ":" + std::to_string(s.line) + ":" + std::to_string(s.column) + ": " + s.severity + ": " + s.message;
}

std::vector<fs::path> saltpanFiles(const fs::path &dir) {
  std::vector<fs::path> files;
  if (!fs::exists(dir))
    return files;
  for (auto &entry : fs::recursive_directory_iterator(dir))
    if (entry.is_regular_file() && entry.path().extension() == ".saltpan")
      files.push_back(entry.path());
  std::sort(files.begin(), files.end());
  return files;
}

// Files whose name starts with '_' are helpers used by other cases, not cases themselves.
bool isHelper(const fs::path &p) { return p.filename().string()[0] == '_'; }

void verify(const fs::path &path) {
  std::string text = readFile(path);
  auto expected = readExpectations(text);
  bool checkNotes = std::any_of(expected.begin(), expected.end(), [](auto &e) { return e.severity == "note"; });
  Compilation c;
  compileFile(path.string(), c);
  std::vector<std::string> unexpected;
  for (const Seen &s : flatten(c.diags)) {
    if (s.severity == "note" && !checkNotes)
      continue;
    bool inThisFile = s.file == path.string();
    auto it = std::find_if(expected.begin(), expected.end(), [&](const Expectation &e) {
      return !e.matched && e.severity == s.severity && inThisFile && e.line == s.line &&
             (e.column == 0 || e.column == s.column) && s.message.find(e.text) != std::string::npos;
    });
    if (it != expected.end())
      it->matched = true;
    else if (s.severity != "note" || (inThisFile && !s.unplaced))
      unexpected.push_back(describe(s));
  }
  std::vector<std::string> missing;
  for (const Expectation &e : expected)
    if (!e.matched)
      missing.push_back(path.string() + ":" + std::to_string(e.line) +
                        (e.column ? ":" + std::to_string(e.column) : "") + ": " + e.severity + ": " + e.text);
  for (auto &m : missing)
    UNSCOPED_INFO("expected but not seen: " << m);
  for (auto &u : unexpected)
    UNSCOPED_INFO("seen but not expected: " << u);
  CHECK(missing.empty());
  CHECK(unexpected.empty());
}

} // namespace

TEST_CASE("diagnostics corpus", "[diagnostics]") {
  auto files = saltpanFiles(fs::path(SALTPAN_TESTS_DIR) / "diagnostics");
  REQUIRE(!files.empty());
  for (const fs::path &p : files) {
    if (isHelper(p))
      continue;
    DYNAMIC_SECTION(p.lexically_relative(SALTPAN_TESTS_DIR).string()) {
      std::string text = readFile(p);
      // A corpus file must expect something, or say it expects nothing.
      bool declared = text.find("expected-") != std::string::npos;
      CHECK(declared);
      verify(p);
    }
  }
}

TEST_CASE("every stdlib module checks without diagnostics", "[stdlib]") {
  auto files = saltpanFiles(fs::path(SALTPAN_SOURCE_DIR) / "stdlib");
  REQUIRE(files.size() >= 4);
  for (const fs::path &p : files)
    DYNAMIC_SECTION(p.filename().string()) { verify(p); }
}

TEST_CASE("every shipped spec checks without diagnostics", "[specs]") {
  auto files = saltpanFiles(fs::path(SALTPAN_SOURCE_DIR) / "specs");
  REQUIRE(files.size() >= 2);
  for (const fs::path &p : files)
    DYNAMIC_SECTION(p.lexically_relative(SALTPAN_SOURCE_DIR).string()) { verify(p); }
}

// tests/golden/NAME.saltpan is paired with NAME.ast.expected (the --emit ast dump).
// Set SALTPAN_UPDATE_GOLDEN=1 to rewrite the expected files.
TEST_CASE("golden AST dumps", "[golden]") {
  auto files = saltpanFiles(fs::path(SALTPAN_TESTS_DIR) / "golden");
  REQUIRE(!files.empty());
  for (const fs::path &p : files) {
    DYNAMIC_SECTION(p.filename().string()) {
      SourceManager sources;
      DiagnosticEngine diags;
      std::string error;
      const SourceFile *file = sources.load(p.string(), error);
      REQUIRE(file);
      auto module = parse(*file, diags);
      REQUIRE(module);
      std::string actual = ast::dump(*module);
      fs::path expectedPath = p;
      expectedPath.replace_extension(".ast.expected");
      if (testing::updateGoldenFiles()) {
        std::ofstream(expectedPath, std::ios::binary) << actual;
        SUCCEED("updated " << expectedPath);
      } else {
        REQUIRE(fs::exists(expectedPath));
        CHECK(actual == readFile(expectedPath));
      }
    }
  }
}
