// Source.h - source files, locations and ranges shared by every stage.
//
// Locations are 1-based lines and columns; columns count Unicode code points, which is
// what editors show and what the parser's UTF-32 stream counts.
#pragma once
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace saltpan {

class SourceFile;

struct SourceLoc {
  const SourceFile *file = nullptr;
  uint32_t offset = 0; // byte offset into the file's text
  uint32_t line = 0;   // 1-based; 0 means "no location"
  uint32_t column = 0; // 1-based, in code points
  bool valid() const { return file != nullptr && line != 0; }
};

struct SourceRange {
  SourceLoc begin;
  SourceLoc end; // the last character inside the range
  bool valid() const { return begin.valid(); }
  static SourceRange join(const SourceRange &a, const SourceRange &b) { return {a.begin, b.end}; }
};

class SourceFile {
public:
  SourceFile(std::string path, std::string text);
  const std::string &path() const { return path_; }
  const std::string &text() const { return text_; }
  /// The text of line `line` (1-based) without its newline.
  std::string_view lineText(uint32_t line) const;
  uint32_t lineCount() const { return static_cast<uint32_t>(lineStarts_.size()); }
  /// Location of a byte offset.
  SourceLoc locAtOffset(uint32_t offset) const;
  /// Location of a code point index (what the parser's input stream counts).
  SourceLoc locAtCodePoint(size_t index) const;
  /// Location of the end of the file (one past the last character).
  SourceLoc endLoc() const;

private:
  std::string path_;
  std::string text_;
  std::vector<uint32_t> lineStarts_;
  std::vector<uint32_t> codePointOffsets_; // byte offset of each code point
};

/// The largest spec file saltpan reads; far above any real spec, and it keeps `check /dev/zero`
/// or a runaway generated file from growing memory without bound (checking takes about 28
/// bytes of memory per byte of text, so about 120 MB at this limit).
constexpr size_t maxSourceBytes = 4u << 20;

/// Owns every loaded file so that locations stay valid for the whole run.
class SourceManager {
public:
  /// Reads a regular file of at most maxSourceBytes from disk; returns nullptr with `error` set
  /// when it cannot (a directory, device, FIFO or socket is refused without blocking).
  const SourceFile *load(const std::string &path, std::string &error);
  /// Adds in-memory text (stdlib modules, tests).
  const SourceFile *add(std::string path, std::string text);
  const SourceFile *find(const std::string &path) const;
  /// The paths of every file held, in load order (outputs must not replace any of them).
  std::vector<std::string> paths() const;

private:
  std::vector<std::unique_ptr<SourceFile>> files_;
};

/// `text` safe to print on a terminal or to put in XML: control characters (C0, DEL, C1) and
/// bytes that are not UTF-8 are shown as escapes (\x1b, \u009b, \xff); the rest is unchanged.
std::string escapeControls(std::string_view text);

/// Returns the byte offset of the first invalid UTF-8 sequence, or nullopt if valid.
std::optional<size_t> findInvalidUtf8(std::string_view text);

} // namespace saltpan
