// Source.tests.cpp - line tables, code-point columns and UTF-8 validation.
#include "Source.h"

#include <catch2/catch.hpp>

using namespace saltpan;

TEST_CASE("the line table splits on newlines", "[source]") {
  SourceFile f("f.saltpan", "ab\ncd\n\nlast");
  CHECK(f.lineCount() == 4);
  CHECK(f.lineText(1) == "ab");
  CHECK(f.lineText(2) == "cd");
  CHECK(f.lineText(3) == "");
  CHECK(f.lineText(4) == "last");
  CHECK(f.lineText(0) == "");
  CHECK(f.lineText(5) == "");
}

TEST_CASE("a trailing newline starts an empty last line", "[source]") {
  SourceFile f("f.saltpan", "x\n");
  CHECK(f.lineCount() == 2);
  CHECK(f.lineText(1) == "x");
  CHECK(f.lineText(2) == "");
  SourceLoc end = f.endLoc();
  CHECK(end.line == 2);
  CHECK(end.column == 1);
  CHECK(end.offset == 2);
}

TEST_CASE("an empty file has one empty line", "[source]") {
  SourceFile f("empty.saltpan", "");
  CHECK(f.lineCount() == 1);
  CHECK(f.lineText(1) == "");
  SourceLoc end = f.endLoc();
  CHECK(end.valid());
  CHECK(end.line == 1);
  CHECK(end.column == 1);
  CHECK(f.locAtCodePoint(0).line == 1);
}

TEST_CASE("CRLF line ends are not part of the line text", "[source]") {
  SourceFile f("f.saltpan", "one\r\ntwo\r\n");
  CHECK(f.lineText(1) == "one");
  CHECK(f.lineText(2) == "two");
  SourceLoc t = f.locAtOffset(5);
  CHECK(t.line == 2);
  CHECK(t.column == 1);
}

TEST_CASE("locAtOffset gives 1-based lines and columns", "[source]") {
  SourceFile f("f.saltpan", "ab\ncd\n");
  SourceLoc a = f.locAtOffset(0);
  CHECK(a.file == &f);
  CHECK(a.line == 1);
  CHECK(a.column == 1);
  SourceLoc b = f.locAtOffset(1);
  CHECK(b.line == 1);
  CHECK(b.column == 2);
  SourceLoc newline = f.locAtOffset(2); // the '\n' itself belongs to line 1
  CHECK(newline.line == 1);
  CHECK(newline.column == 3);
  SourceLoc d = f.locAtOffset(4);
  CHECK(d.line == 2);
  CHECK(d.column == 2);
  // Past the end clamps to the end.
  SourceLoc past = f.locAtOffset(1000);
  CHECK(past.offset == 6);
  CHECK(past.line == 3);
}

TEST_CASE("columns count code points, not bytes", "[source]") {
  // "µ" is 2 bytes, "€" 3 bytes, "😀" 4 bytes in UTF-8.
  SourceFile f("f.saltpan", "a\u00B5b\u20ACc\U0001F600d\n\u00B5x");
  CHECK(f.locAtOffset(0).column == 1); // a
  CHECK(f.locAtOffset(1).column == 2); // µ
  CHECK(f.locAtOffset(3).column == 3); // b
  CHECK(f.locAtOffset(4).column == 4); // €
  CHECK(f.locAtOffset(7).column == 5); // c
  CHECK(f.locAtOffset(8).column == 6); // 😀
  CHECK(f.locAtOffset(12).column == 7); // d
  SourceLoc x = f.locAtOffset(16);
  CHECK(x.line == 2);
  CHECK(x.column == 2);
}

TEST_CASE("locAtCodePoint maps the parser's code-point index to bytes", "[source]") {
  SourceFile f("f.saltpan", "a\u00B5b\u20ACc\U0001F600d\n\u00B5x");
  CHECK(f.locAtCodePoint(0).offset == 0);
  CHECK(f.locAtCodePoint(1).offset == 1);
  CHECK(f.locAtCodePoint(2).offset == 3);
  CHECK(f.locAtCodePoint(3).offset == 4);
  CHECK(f.locAtCodePoint(4).offset == 7);
  CHECK(f.locAtCodePoint(5).offset == 8);
  CHECK(f.locAtCodePoint(6).offset == 12);
  CHECK(f.locAtCodePoint(7).offset == 13); // '\n'
  SourceLoc x = f.locAtCodePoint(9);
  CHECK(x.offset == 16);
  CHECK(x.line == 2);
  CHECK(x.column == 2);
  // One past the last code point is the end of the file.
  SourceLoc end = f.locAtCodePoint(10);
  CHECK(end.offset == f.text().size());
  CHECK(end.column == 3);
  CHECK(f.locAtCodePoint(999).offset == f.text().size());
}

TEST_CASE("SourceManager keeps files and finds them by path", "[source]") {
  SourceManager m;
  const SourceFile *a = m.add("a.saltpan", "x");
  const SourceFile *b = m.add("b.saltpan", "y");
  CHECK(m.find("a.saltpan") == a);
  CHECK(m.find("b.saltpan") == b);
  CHECK(m.find("c.saltpan") == nullptr);
  std::string error;
  CHECK(m.load("/nonexistent/dir/spec.saltpan", error) == nullptr);
  CHECK_FALSE(error.empty());
  // A path already added is not read again.
  error.clear();
  CHECK(m.load("a.saltpan", error) == a);
}

TEST_CASE("findInvalidUtf8 accepts well-formed UTF-8", "[source][utf8]") {
  CHECK_FALSE(findInvalidUtf8(""));
  CHECK_FALSE(findInvalidUtf8("plain ASCII\n\t~"));
  CHECK_FALSE(findInvalidUtf8("\u00B5m \u03BCm \u20AC \U0001F600"));
  CHECK_FALSE(findInvalidUtf8("\x7F"));
  CHECK_FALSE(findInvalidUtf8("\xC2\x80"));         // U+0080, smallest 2-byte
  CHECK_FALSE(findInvalidUtf8("\xE0\xA0\x80"));     // U+0800, smallest 3-byte
  CHECK_FALSE(findInvalidUtf8("\xED\x9F\xBF"));     // U+D7FF, just below the surrogates
  CHECK_FALSE(findInvalidUtf8("\xEE\x80\x80"));     // U+E000, just above them
  CHECK_FALSE(findInvalidUtf8("\xF0\x90\x80\x80")); // U+10000, smallest 4-byte
  CHECK_FALSE(findInvalidUtf8("\xF4\x8F\xBF\xBF")); // U+10FFFF, the last code point
  std::string nul("a\0b", 3);
  CHECK_FALSE(findInvalidUtf8(nul));
}

TEST_CASE("findInvalidUtf8 rejects overlong forms", "[source][utf8]") {
  // Overlong encodings of '/' (U+002F) and of U+0000: RFC 3629 section 3 / Unicode 15, table 3-7.
  CHECK(findInvalidUtf8("\xC0\xAF") == 0u);
  CHECK(findInvalidUtf8("\xC1\xBF") == 0u);
  CHECK(findInvalidUtf8("\xE0\x80\xAF") == 0u);
  CHECK(findInvalidUtf8("\xE0\x9F\xBF") == 0u);
  CHECK(findInvalidUtf8("\xF0\x80\x80\xAF") == 0u);
  CHECK(findInvalidUtf8("\xF0\x8F\xBF\xBF") == 0u);
  CHECK(findInvalidUtf8("ok \xC0\x80") == 3u);
}

TEST_CASE("findInvalidUtf8 rejects surrogates and values past U+10FFFF", "[source][utf8]") {
  CHECK(findInvalidUtf8("\xED\xA0\x80") == 0u); // U+D800
  CHECK(findInvalidUtf8("\xED\xBF\xBF") == 0u); // U+DFFF
  CHECK(findInvalidUtf8("ab\xED\xB0\x80") == 2u);
  CHECK(findInvalidUtf8("\xF4\x90\x80\x80") == 0u); // U+110000
  CHECK(findInvalidUtf8("\xF7\xBF\xBF\xBF") == 0u);
}

TEST_CASE("findInvalidUtf8 rejects truncated and stray bytes", "[source][utf8]") {
  CHECK(findInvalidUtf8("ab\xE2\x82") == 2u);     // € cut after 2 of 3 bytes
  CHECK(findInvalidUtf8("\xF0\x9F\x98") == 0u);   // 😀 cut after 3 of 4
  CHECK(findInvalidUtf8("x\xC2") == 1u);          // lead byte at the very end
  CHECK(findInvalidUtf8("\xE2\x82x") == 0u);      // cut, then ASCII
  CHECK(findInvalidUtf8("\x80") == 0u);           // a lone continuation byte
  CHECK(findInvalidUtf8("\u00B5\xBF") == 2u);     // a continuation after a complete char
  CHECK(findInvalidUtf8("\xC3\x28") == 0u);       // lead followed by ASCII
  CHECK(findInvalidUtf8("\xF8\x88\x80\x80\x80") == 0u); // 5-byte form
  CHECK(findInvalidUtf8("\xFE") == 0u);
  CHECK(findInvalidUtf8("\xFF") == 0u);
  CHECK(findInvalidUtf8("valid \u20AC then \xFF") == 15u);
}
