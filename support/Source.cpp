// Source.cpp - line tables and UTF-8 handling for source files.
#include "Source.h"

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstring>

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

namespace saltpan {

namespace {
bool isContinuation(unsigned char c) { return (c & 0xC0) == 0x80; }
} // namespace

std::optional<size_t> findInvalidUtf8(std::string_view text) {
  size_t i = 0;
  while (i < text.size()) {
    auto c = static_cast<unsigned char>(text[i]);
    size_t len = 0;
    uint32_t cp = 0;
    if (c < 0x80) {
      ++i;
      continue;
    } else if ((c & 0xE0) == 0xC0) {
      len = 2;
      cp = c & 0x1F;
    } else if ((c & 0xF0) == 0xE0) {
      len = 3;
      cp = c & 0x0F;
    } else if ((c & 0xF8) == 0xF0) {
      len = 4;
      cp = c & 0x07;
    } else {
      return i;
    }
    if (i + len > text.size())
      return i;
    for (size_t k = 1; k < len; ++k) {
      auto d = static_cast<unsigned char>(text[i + k]);
      if (!isContinuation(d))
        return i;
      cp = (cp << 6) | (d & 0x3F);
    }
    // Reject overlong forms, surrogates and values past U+10FFFF.
    static const uint32_t minimum[] = {0, 0, 0x80, 0x800, 0x10000};
    if (cp < minimum[len] || (cp >= 0xD800 && cp <= 0xDFFF) || cp > 0x10FFFF)
      return i;
    i += len;
  }
  return std::nullopt;
}

SourceFile::SourceFile(std::string path, std::string text) : path_(std::move(path)), text_(std::move(text)) {
  lineStarts_.push_back(0);
  for (uint32_t i = 0; i < text_.size(); ++i) {
    auto c = static_cast<unsigned char>(text_[i]);
    if (!isContinuation(c))
      codePointOffsets_.push_back(i);
    if (c == '\n')
      lineStarts_.push_back(i + 1);
  }
}

std::string_view SourceFile::lineText(uint32_t line) const {
  if (line == 0 || line > lineStarts_.size())
    return {};
  uint32_t begin = lineStarts_[line - 1];
  uint32_t end = line < lineStarts_.size() ? lineStarts_[line] - 1 : static_cast<uint32_t>(text_.size());
  if (end > begin && text_[end - 1] == '\r')
    --end;
  return std::string_view(text_).substr(begin, end - begin);
}

SourceLoc SourceFile::locAtOffset(uint32_t offset) const {
  offset = std::min<uint32_t>(offset, static_cast<uint32_t>(text_.size()));
  auto it = std::upper_bound(lineStarts_.begin(), lineStarts_.end(), offset);
  uint32_t line = static_cast<uint32_t>(it - lineStarts_.begin());
  uint32_t lineStart = lineStarts_[line - 1];
  uint32_t column = 1;
  for (uint32_t i = lineStart; i < offset; ++i)
    if (!isContinuation(static_cast<unsigned char>(text_[i])))
      ++column;
  return SourceLoc{this, offset, line, column};
}

SourceLoc SourceFile::locAtCodePoint(size_t index) const {
  if (index >= codePointOffsets_.size())
    return endLoc();
  return locAtOffset(codePointOffsets_[index]);
}

SourceLoc SourceFile::endLoc() const { return locAtOffset(static_cast<uint32_t>(text_.size())); }

std::string escapeControls(std::string_view text) {
  std::string out;
  char buf[16];
  while (!text.empty()) {
    auto bad = findInvalidUtf8(text);
    std::string_view good = text.substr(0, bad ? *bad : text.size());
    for (size_t i = 0; i < good.size(); ++i) {
      auto c = static_cast<unsigned char>(good[i]);
      auto next = i + 1 < good.size() ? static_cast<unsigned char>(good[i + 1]) : 0;
      if (c < 0x20 || c == 0x7f) {
        std::snprintf(buf, sizeof buf, "\\x%02x", c);
        out += buf;
      } else if (c == 0xC2 && next >= 0x80 && next <= 0x9F) { // C1 controls, e.g. U+009B (CSI)
        std::snprintf(buf, sizeof buf, "\\u%04x", next);
        out += buf;
        ++i;
      } else {
        out += static_cast<char>(c);
      }
    }
    if (!bad)
      break;
    std::snprintf(buf, sizeof buf, "\\x%02x", static_cast<unsigned char>(text[*bad]));
    out += buf;
    text.remove_prefix(*bad + 1);
  }
  return out;
}

const SourceFile *SourceManager::load(const std::string &path, std::string &error) {
  if (auto *f = find(path))
    return f;
  // O_NONBLOCK: opening a FIFO must not wait for a writer; fstat then refuses it.
  int fd = ::open(path.c_str(), O_RDONLY | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0) {
    error = std::string("cannot open file (") + std::strerror(errno) + ")";
    return nullptr;
  }
  struct FdCloser {
    int fd;
    ~FdCloser() { ::close(fd); }
  } closer{fd};
  struct stat info {};
  if (::fstat(fd, &info) != 0 || !S_ISREG(info.st_mode)) {
    error = S_ISDIR(info.st_mode) ? "it is a directory, not a spec file"
                                  : "it is not a regular file (a device, FIFO or socket)";
    return nullptr;
  }
  std::string text;
  char chunk[65536];
  for (;;) { // read to the end, not to st_size: the file may still grow
    ssize_t n = ::read(fd, chunk, sizeof chunk);
    if (n < 0 && (errno == EINTR || errno == EAGAIN))
      continue;
    if (n < 0) {
      error = std::string("cannot read file (") + std::strerror(errno) + ")";
      return nullptr;
    }
    if (n == 0)
      break;
    text.append(chunk, static_cast<size_t>(n));
    if (text.size() > maxSourceBytes) {
      error = "it is larger than " + std::to_string(maxSourceBytes >> 20) + " MiB, the most saltpan reads";
      return nullptr;
    }
  }
  return add(path, std::move(text));
}

const SourceFile *SourceManager::add(std::string path, std::string text) {
  files_.push_back(std::make_unique<SourceFile>(std::move(path), std::move(text)));
  return files_.back().get();
}

const SourceFile *SourceManager::find(const std::string &path) const {
  for (auto &f : files_)
    if (f->path() == path)
      return f.get();
  return nullptr;
}

std::vector<std::string> SourceManager::paths() const {
  std::vector<std::string> out;
  for (auto &f : files_)
    out.push_back(f->path());
  return out;
}

} // namespace saltpan
