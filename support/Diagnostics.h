// Diagnostics.h - errors, warnings and notes, and how they are rendered.
//
// Stages report through a DiagnosticEngine and never print; the driver renders the
// collected diagnostics as text (file:line:col, source line, caret) or JSON.
#pragma once
#include "Source.h"

#include <string>
#include <vector>

namespace saltpan {

enum class Severity { Error, Warning, Note };

struct Note {
  SourceRange range; // may be invalid for a note without a place
  std::string message;
};

struct Diagnostic {
  Severity severity = Severity::Error;
  SourceRange range;
  std::string message;
  std::vector<Note> notes;
};

class DiagnosticEngine {
public:
  /// Reports a diagnostic; the returned reference stays valid until the next report.
  Diagnostic &error(SourceRange range, std::string message);
  Diagnostic &warning(SourceRange range, std::string message);
  static void note(Diagnostic &d, SourceRange range, std::string message) {
    d.notes.push_back({range, std::move(message)});
  }

  size_t errorCount() const { return errors_; }
  size_t warningCount() const { return warnings_; }
  const std::vector<Diagnostic> &all() const { return diagnostics_; }
  /// The most recent diagnostic, for a reporter that refines what it just said.
  Diagnostic *last() { return diagnostics_.empty() ? nullptr : &diagnostics_.back(); }

private:
  Diagnostic &report(Severity s, SourceRange range, std::string message);
  std::vector<Diagnostic> diagnostics_;
  size_t errors_ = 0;
  size_t warnings_ = 0;
};

/// Renders `file:line:col: severity: message`, the source line and a caret/underline.
std::string renderText(const Diagnostic &d, bool colour = false);
/// Renders every diagnostic as one JSON document (see docs/language.md, "Diagnostics").
std::string renderJson(const std::vector<Diagnostic> &all);
const char *severityName(Severity s);

} // namespace saltpan
