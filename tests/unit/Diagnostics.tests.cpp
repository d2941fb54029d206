// Diagnostics.tests.cpp - the diagnostic engine and its text and JSON renderings.
#include "Diagnostics.h"

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

using namespace saltpan;

namespace {

// The range of bytes [first, last] of `f` (last inclusive, as SourceRange::end is).
SourceRange bytes(const SourceFile &f, uint32_t first, uint32_t last) {
  return {f.locAtOffset(first), f.locAtOffset(last)};
}

} // namespace

TEST_CASE("the engine counts errors and warnings, not notes", "[diag]") {
  SourceFile f("spec.saltpan", "x\n");
  DiagnosticEngine e;
  auto &d = e.error(bytes(f, 0, 0), "first");
  DiagnosticEngine::note(d, {}, "a note");
  e.warning(bytes(f, 0, 0), "second");
  e.error({}, "third");
  CHECK(e.errorCount() == 2);
  CHECK(e.warningCount() == 1);
  REQUIRE(e.all().size() == 3);
  CHECK(e.all()[0].severity == Severity::Error);
  CHECK(e.all()[0].notes.size() == 1);
  CHECK(e.all()[1].severity == Severity::Warning);
  CHECK(std::string(severityName(Severity::Note)) == "note");
}

TEST_CASE("renderText: location, source line, caret and underline", "[diag]") {
  SourceFile f("spec.saltpan", "# units\nconst a = 1 mV + 2 ms\n");
  // "1 mV" is bytes 18..21 (columns 11..14 of line 2).
  Diagnostic d{Severity::Error, bytes(f, 18, 21), "cannot add a voltage (mV) with a time (ms)", {}};
  CHECK(renderText(d) == "spec.saltpan:2:11: error: cannot add a voltage (mV) with a time (ms)\n"
                         "  const a = 1 mV + 2 ms\n"
                         "            ^~~~\n");
}

TEST_CASE("renderText: a one-character range is a lone caret", "[diag]") {
  SourceFile f("spec.saltpan", "const a = 1 mV + 2 ms\n");
  Diagnostic d{Severity::Warning, bytes(f, 15, 15), "odd", {}};
  CHECK(renderText(d) == "spec.saltpan:1:16: warning: odd\n"
                         "  const a = 1 mV + 2 ms\n"
                         "                 ^\n");
  // An invalid end is treated like a single point.
  Diagnostic p{Severity::Warning, {f.locAtOffset(15), {}}, "odd", {}};
  CHECK(renderText(p) == renderText(d));
}

TEST_CASE("renderText: notes with and without a place", "[diag]") {
  SourceFile f("spec.saltpan", "const a = 1 mV + 2 ms\n");
  Diagnostic d{Severity::Error, bytes(f, 15, 15), "cannot add a voltage (mV) with a time (ms)", {}};
  DiagnosticEngine::note(d, bytes(f, 10, 13), "this is a voltage (mV)");
  DiagnosticEngine::note(d, bytes(f, 17, 20), "this is a time (ms)");
  DiagnosticEngine::note(d, {}, "convert one side first");
  CHECK(renderText(d) == "spec.saltpan:1:16: error: cannot add a voltage (mV) with a time (ms)\n"
                         "  const a = 1 mV + 2 ms\n"
                         "                 ^\n"
                         "spec.saltpan:1:11: note: this is a voltage (mV)\n"
                         "  const a = 1 mV + 2 ms\n"
                         "            ^~~~\n"
                         "spec.saltpan:1:18: note: this is a time (ms)\n"
                         "  const a = 1 mV + 2 ms\n"
                         "                   ^~~~\n"
                         "note: convert one side first\n");
}

TEST_CASE("renderText: a diagnostic without a place names the tool", "[diag]") {
  Diagnostic d{Severity::Error, {}, "cannot read 'x.saltpan': cannot open file", {}};
  CHECK(renderText(d) == "saltpan: error: cannot read 'x.saltpan': cannot open file\n");
}

TEST_CASE("renderText: the caret counts code points, so it lines up after µ", "[diag]") {
  // "µ" is two bytes but one column.
  SourceFile f("spec.saltpan", "const d = 5 \u00B5m + 1 s\n");
  // '+' is byte 16, column 16; "1 s" bytes 18..20.
  Diagnostic d{Severity::Error, bytes(f, 16, 16), "bad", {}};
  DiagnosticEngine::note(d, bytes(f, 18, 20), "this");
  CHECK(renderText(d) == "spec.saltpan:1:16: error: bad\n"
                         "  const d = 5 \u00B5m + 1 s\n"
                         "                 ^\n"
                         "spec.saltpan:1:18: note: this\n"
                         "  const d = 5 \u00B5m + 1 s\n"
                         "                   ^~~\n");
}

TEST_CASE("renderText: tabs are shown as single spaces", "[diag]") {
  SourceFile f("spec.saltpan", "\tx = 1\n");
  Diagnostic d{Severity::Error, bytes(f, 1, 1), "bad", {}};
  CHECK(renderText(d) == "spec.saltpan:1:2: error: bad\n"
                         "   x = 1\n"
                         "   ^\n");
}

TEST_CASE("renderText: a range over several lines underlines to the end of the first", "[diag]") {
  SourceFile f("spec.saltpan", "inside {\n  [K] = 1 mM\n}\n");
  Diagnostic d{Severity::Warning, bytes(f, 0, 21), "not neutral", {}};
  CHECK(renderText(d) == "spec.saltpan:1:1: warning: not neutral\n"
                         "  inside {\n"
                         "  ^~~~~~~~\n");
}

TEST_CASE("renderText: colour only when asked", "[diag]") {
  SourceFile f("spec.saltpan", "x\n");
  Diagnostic d{Severity::Error, bytes(f, 0, 0), "bad", {}};
  CHECK(renderText(d, false).find('\033') == std::string::npos);
  std::string coloured = renderText(d, true);
  CHECK(coloured.find("\033[1;31m") != std::string::npos); // red "error"
  CHECK(coloured.find("bad") != std::string::npos);
}

TEST_CASE("renderJson: one document with diagnostics, errors and warnings", "[diag]") {
  SourceFile f("spec.saltpan", "const a = 1 mV + 2 ms\n");
  std::vector<Diagnostic> all;
  all.push_back({Severity::Error, bytes(f, 15, 15), "cannot add", {}});
  all.back().notes.push_back({bytes(f, 10, 13), "this is a voltage (mV)"});
  all.back().notes.push_back({{}, "placeless"});
  all.push_back({Severity::Warning, bytes(f, 0, 4), "a warning", {}});
  all.push_back({Severity::Error, {}, "no place", {}});

  auto doc = nlohmann::json::parse(renderJson(all));
  REQUIRE(doc.is_object());
  CHECK(doc.size() == 3);
  CHECK(doc["errors"] == 2);
  CHECK(doc["warnings"] == 1);
  auto &list = doc["diagnostics"];
  REQUIRE(list.is_array());
  REQUIRE(list.size() == 3);

  auto &first = list[0];
  CHECK(first["severity"] == "error");
  CHECK(first["message"] == "cannot add");
  CHECK(first["location"]["file"] == "spec.saltpan");
  CHECK(first["location"]["line"] == 1);
  CHECK(first["location"]["column"] == 16);
  CHECK(first["location"]["end_line"] == 1);
  CHECK(first["location"]["end_column"] == 16);
  REQUIRE(first["notes"].size() == 2);
  CHECK(first["notes"][0]["message"] == "this is a voltage (mV)");
  CHECK(first["notes"][0]["location"]["column"] == 11);
  CHECK(first["notes"][0]["location"]["end_column"] == 14);
  CHECK(first["notes"][1]["location"].is_null());

  CHECK(list[1]["severity"] == "warning");
  CHECK(list[1]["notes"].is_array());
  CHECK(list[1]["notes"].empty());
  CHECK(list[2]["location"].is_null());
}

TEST_CASE("renderJson: no diagnostics is still a complete document", "[diag]") {
  auto doc = nlohmann::json::parse(renderJson({}));
  CHECK(doc["diagnostics"].is_array());
  CHECK(doc["diagnostics"].empty());
  CHECK(doc["errors"] == 0);
  CHECK(doc["warnings"] == 0);
}

TEST_CASE("renderJson: a file name that is not UTF-8 still gives a JSON document", "[diag]") {
  // Paths on Linux are bytes; a diagnostic must not turn into an internal error.
  SourceFile f("bad\xFF.saltpan", "x\n");
  std::vector<Diagnostic> all{{Severity::Error, bytes(f, 0, 0), "bad", {}}};
  std::string text;
  REQUIRE_NOTHROW(text = renderJson(all));
  REQUIRE_NOTHROW(nlohmann::json::parse(text));
  CHECK(nlohmann::json::parse(text)["errors"] == 1);
}

TEST_CASE("renderText: control characters and bytes that are not UTF-8 are shown escaped", "[diag]") {
  // A terminal must not obey an escape sequence quoted from a spec or a file name.
  Diagnostic d{Severity::Error, {}, "cannot find 'a\x1b[2Jb\x07\xff\xc2\x9b.saltpan'", {}};
  CHECK(renderText(d) == "saltpan: error: cannot find 'a\\x1b[2Jb\\x07\\xff\\u009b.saltpan'\n");
  CHECK(escapeControls("tab\there \xc2\xb5m") == "tab\\x09here \xc2\xb5m"); // µ stays
}
