// Diagnostics.cpp - collecting diagnostics and rendering them as text or JSON.
#include "Diagnostics.h"

#include <nlohmann/json.hpp>

namespace saltpan {

Diagnostic &DiagnosticEngine::report(Severity s, SourceRange range, std::string message) {
  diagnostics_.push_back(Diagnostic{s, range, std::move(message), {}});
  return diagnostics_.back();
}

Diagnostic &DiagnosticEngine::error(SourceRange range, std::string message) {
  ++errors_;
  return report(Severity::Error, range, std::move(message));
}

Diagnostic &DiagnosticEngine::warning(SourceRange range, std::string message) {
  ++warnings_;
  return report(Severity::Warning, range, std::move(message));
}

const char *severityName(Severity s) {
  switch (s) {
  case Severity::Error: return "error";
  case Severity::Warning: return "warning";
  case Severity::Note: return "note";
  }
  return "error";
}

namespace {

// Tabs are shown as single spaces so the caret lines up; bytes that are not UTF-8 (in a
// file reported as binary) as '?' so the terminal shows something sane.
std::string displayLine(std::string_view line) {
  std::string out;
  while (!line.empty()) {
    auto bad = findInvalidUtf8(line);
    std::string_view good = line.substr(0, bad ? *bad : line.size());
    out += good;
    if (!bad)
      break;
    out += '?';
    line.remove_prefix(*bad + 1);
  }
  for (char &c : out)
    if (c == '\t' || (static_cast<unsigned char>(c) < 0x20 && c != 0))
      c = ' ';
  std::string cleaned;
  for (char c : out)
    cleaned += c == 0 ? ' ' : c;
  return cleaned;
}

void renderOne(std::string &out, Severity s, const SourceRange &range, const std::string &message, bool colour) {
  const char *bold = colour ? "\033[1m" : "";
  const char *reset = colour ? "\033[0m" : "";
  const char *tint = "";
  if (colour)
    tint = s == Severity::Error ? "\033[1;31m" : s == Severity::Warning ? "\033[1;35m" : "\033[1;36m";
  if (range.valid()) {
    const SourceFile &file = *range.begin.file;
    // Paths and messages may quote the user's text: escaped, a terminal never obeys it.
    out += bold + escapeControls(file.path()) + ":" + std::to_string(range.begin.line) + ":" +
           std::to_string(range.begin.column) + ": " + reset;
  } else if (s != Severity::Note) {
    out += bold + std::string("saltpan: ") + reset;
  }
  out += tint + std::string(severityName(s)) + ": " + reset + bold + escapeControls(message) + reset + "\n";
  if (!range.valid())
    return;
  std::string_view line = range.begin.file->lineText(range.begin.line);
  out += "  " + displayLine(line) + "\n";
  // Count code points up to the caret and the end of the underline.
  uint32_t lineCodePoints = 0;
  for (unsigned char c : line)
    if ((c & 0xC0) != 0x80)
      ++lineCodePoints;
  uint32_t first = range.begin.column;
  uint32_t last = first;
  if (range.end.valid() && range.end.line == range.begin.line && range.end.column >= first)
    last = range.end.column;
  else if (range.end.valid() && range.end.line > range.begin.line)
    last = std::max(first, lineCodePoints);
  std::string marker(first - 1, ' ');
  marker += '^';
  if (last > first)
    marker += std::string(last - first, '~');
  out += "  " + std::string(colour ? "\033[1;32m" : "") + marker + reset + "\n";
}

nlohmann::json locationJson(const SourceRange &r) {
  if (!r.valid())
    return nullptr;
  nlohmann::json j{{"file", r.begin.file->path()}, {"line", r.begin.line}, {"column", r.begin.column}};
  if (r.end.valid()) {
    j["end_line"] = r.end.line;
    j["end_column"] = r.end.column;
  }
  return j;
}

} // namespace

std::string renderText(const Diagnostic &d, bool colour) {
  std::string out;
  renderOne(out, d.severity, d.range, d.message, colour);
  for (const Note &n : d.notes)
    renderOne(out, Severity::Note, n.range, n.message, colour);
  return out;
}

std::string renderJson(const std::vector<Diagnostic> &all) {
  nlohmann::json list = nlohmann::json::array();
  size_t errors = 0, warnings = 0;
  for (const Diagnostic &d : all) {
    errors += d.severity == Severity::Error;
    warnings += d.severity == Severity::Warning;
    nlohmann::json notes = nlohmann::json::array();
    for (const Note &n : d.notes)
      notes.push_back({{"message", n.message}, {"location", locationJson(n.range)}});
    list.push_back({{"severity", severityName(d.severity)},
                    {"message", d.message},
                    {"location", locationJson(d.range)},
                    {"notes", notes}});
  }
  nlohmann::json doc{{"diagnostics", list}, {"errors", errors}, {"warnings", warnings}};
  return doc.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) + "\n";
}

} // namespace saltpan
