// SafeWrite.cpp - temporary, fsync, rename; the output clash checks; linker-safe names.
#include "SafeWrite.h"

#include <atomic>
#include <cerrno>
#include <csignal>
#include <cstdio>
#include <cstring>
#include <fcntl.h>
#include <pthread.h>
#include <random>
#include <sys/random.h>
#include <sys/stat.h>
#include <unistd.h>

namespace saltpan {

namespace {

// ---- temporaries that a signal must not leave behind ----

// The handler may only call async-signal-safe functions, so each temporary in flight is a
// fixed slot (directory descriptor and name) that unlinkat() can remove.
struct PendingTemporary {
  std::atomic<bool> taken{false};
  std::atomic<int> directory{-1};
  char name[256] = {};
};
constexpr int pendingSlots = 32;
PendingTemporary pending[pendingSlots];

extern "C" void removeTemporariesAndDie(int signal) {
  for (PendingTemporary &p : pending) {
    int dir = p.directory.load(std::memory_order_acquire);
    if (dir >= 0)
      ::unlinkat(dir, p.name, 0);
  }
  // Die of the same signal, so the parent sees what it sent.
  std::signal(signal, SIG_DFL);
  std::raise(signal);
}

// Installed over the default action only: a caller that ignores SIGINT (nohup) or handles it
// itself keeps its choice. Checked at every write, as the caller may change its mind.
void installSignalHandlers() {
  for (int s : {SIGINT, SIGTERM, SIGHUP}) {
    struct sigaction old {};
    if (::sigaction(s, nullptr, &old) != 0 || (old.sa_flags & SA_SIGINFO) || old.sa_handler != SIG_DFL)
      continue;
    struct sigaction act {};
    act.sa_handler = removeTemporariesAndDie;
    sigemptyset(&act.sa_mask);
    ::sigaction(s, &act, nullptr);
  }
}

// Holds a slot while a temporary exists; a full table only loses the clean-up, not the write.
class TemporaryGuard {
public:
  TemporaryGuard(int directory, const std::string &name) {
    if (directory < 0 || name.size() >= sizeof pending[0].name)
      return;
    for (PendingTemporary &p : pending) {
      bool expected = false;
      if (p.taken.compare_exchange_strong(expected, true)) {
        std::memcpy(p.name, name.c_str(), name.size() + 1);
        p.directory.store(directory, std::memory_order_release);
        slot_ = &p;
        return;
      }
    }
  }
  ~TemporaryGuard() { release(); }
  /// Before the directory descriptor closes: the handler must not use a reused descriptor.
  void release() {
    if (!slot_)
      return;
    slot_->directory.store(-1, std::memory_order_release);
    slot_->taken.store(false);
    slot_ = nullptr;
  }
  TemporaryGuard(const TemporaryGuard &) = delete;
  TemporaryGuard &operator=(const TemporaryGuard &) = delete;

private:
  PendingTemporary *slot_ = nullptr;
};

// ---- paths ----

void splitPath(const std::string &path, std::string &directory, std::string &name) {
  size_t slash = path.find_last_of('/');
  if (slash == std::string::npos) {
    directory = ".";
    name = path;
  } else {
    directory = slash == 0 ? "/" : path.substr(0, slash);
    name = path.substr(slash + 1);
  }
}

std::string describeType(mode_t mode) {
  if (S_ISDIR(mode))
    return "a directory";
  if (S_ISCHR(mode))
    return "a character device";
  if (S_ISBLK(mode))
    return "a block device";
  if (S_ISFIFO(mode))
    return "a FIFO";
  if (S_ISSOCK(mode))
    return "a socket";
  return "not a regular file";
}

std::string notRegular(const std::string &path, mode_t mode) {
  return "'" + path + "' is " + describeType(mode) +
         ", not a regular file; saltpan writes outputs only to regular files ('-' is standard output)";
}

std::string randomSuffix() {
  static const char alphabet[] = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789";
  unsigned char bytes[12];
  if (::getrandom(bytes, sizeof bytes, 0) != static_cast<ssize_t>(sizeof bytes)) {
    std::random_device device;
    for (unsigned char &b : bytes)
      b = static_cast<unsigned char>(device());
  }
  std::string s;
  for (unsigned char b : bytes)
    s += alphabet[b % (sizeof alphabet - 1)];
  return s;
}

bool writeAll(int fd, std::string_view text) {
  size_t done = 0;
  while (done < text.size()) {
    ssize_t n = ::write(fd, text.data() + done, text.size() - done);
    if (n < 0 && errno == EINTR)
      continue;
    if (n <= 0)
      return false;
    done += static_cast<size_t>(n);
  }
  return true;
}

bool writeStandardOutput(std::string_view text, std::string &error) {
  std::fflush(stdout);
  if (!writeAll(STDOUT_FILENO, text)) {
    error = std::string("cannot write to standard output: ") + std::strerror(errno);
    return false;
  }
  return true;
}

// What makes two names one file: the inode when it exists, else the directory and the name.
struct FileKey {
  bool valid = false;
  dev_t device = 0;
  ino_t inode = 0;
  std::string name; // empty for an existing file
  bool operator==(const FileKey &o) const {
    return valid && o.valid && device == o.device && inode == o.inode && name == o.name;
  }
};

FileKey keyOf(const std::string &path, bool followLinks) {
  FileKey key;
  struct stat st {};
  if ((followLinks ? ::stat(path.c_str(), &st) : ::lstat(path.c_str(), &st)) == 0) {
    key = {true, st.st_dev, st.st_ino, ""};
    return key;
  }
  std::string directory, name;
  splitPath(path, directory, name);
  if (::stat(directory.c_str(), &st) == 0 && !name.empty())
    key = {true, st.st_dev, st.st_ino, name};
  return key;
}

} // namespace

std::string unwritableReason(const std::string &path) {
  if (path == "-")
    return "";
  if (path.empty())
    return "an empty file name cannot be an output";
  struct stat st {};
  if (::lstat(path.c_str(), &st) != 0 || S_ISREG(st.st_mode) || S_ISLNK(st.st_mode))
    return "";
  return notRegular(path, st.st_mode);
}

bool writeFileAtomically(const std::string &path, std::string_view text, std::string &error,
                         const WriteOptions &options) {
  if (path == "-")
    return writeStandardOutput(text, error);
  std::string directoryPath, name;
  splitPath(path, directoryPath, name);
  if (name.empty() || name == "." || name == "..") {
    error = "'" + path + "' names a directory, not a file";
    return false;
  }
  // Everything below is relative to this descriptor, so a directory swapped for a link
  // between the checks and the rename cannot redirect the write.
  int directory = ::open(directoryPath.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (directory < 0) {
    error = "cannot create '" + path + "': cannot open its directory '" + directoryPath + "': " + std::strerror(errno);
    return false;
  }
  struct stat existing {};
  bool exists = ::fstatat(directory, name.c_str(), &existing, AT_SYMLINK_NOFOLLOW) == 0;
  bool keepMode = exists && S_ISREG(existing.st_mode);
  if (exists && !S_ISREG(existing.st_mode) && !S_ISLNK(existing.st_mode)) {
    error = notRegular(path, existing.st_mode);
    ::close(directory);
    return false;
  }

  installSignalHandlers();
  // A hidden name beside the destination: the rename stays on one file system.
  std::string stem = name.substr(0, 64);
  std::string temporary;
  int fd = -1;
  mode_t createMode = options.executable ? 0777 : 0666; // the umask applies
  // The signals wait until the temporary is registered for removal.
  sigset_t cleanUp, previous;
  sigemptyset(&cleanUp);
  for (int signal : {SIGINT, SIGTERM, SIGHUP})
    sigaddset(&cleanUp, signal);
  ::pthread_sigmask(SIG_BLOCK, &cleanUp, &previous);
  for (int attempt = 0; attempt < 100 && fd < 0; ++attempt) {
    temporary = "." + stem + ".saltpan-" + randomSuffix();
    fd = ::openat(directory, temporary.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, createMode);
    if (fd < 0 && errno != EEXIST)
      break;
  }
  int openError = errno;
  TemporaryGuard guard(fd >= 0 ? directory : -1, temporary);
  ::pthread_sigmask(SIG_SETMASK, &previous, nullptr);
  if (fd < 0) {
    error = "cannot create '" + path + "': cannot make a temporary file in '" + directoryPath +
            "': " + std::strerror(openError);
    ::close(directory);
    return false;
  }
  auto fail = [&](const std::string &message) {
    error = message;
    ::close(fd);
    ::unlinkat(directory, temporary.c_str(), 0);
    guard.release();
    ::close(directory);
    return false;
  };
  if (!writeAll(fd, text))
    return fail("cannot write '" + path + "': " + std::strerror(errno));
  if (keepMode) {
    mode_t mode = existing.st_mode & 01777; // never carry set-user-ID or set-group-ID over
    if (options.executable)
      mode |= (mode & 0444) >> 2;
    if (::fchmod(fd, mode) != 0)
      return fail("cannot keep the mode of '" + path + "': " + std::strerror(errno));
  }
  if (keepMode && options.keepOwner && ::fchown(fd, existing.st_uid, existing.st_gid) != 0 && !options.ownerBestEffort)
    return fail("cannot keep the owner of '" + path + "' (user " + std::to_string(existing.st_uid) + ", group " +
                std::to_string(existing.st_gid) + "): " + std::strerror(errno) + "; nothing was written");
  if (::fsync(fd) != 0)
    return fail("cannot write '" + path + "': " + std::strerror(errno));
  if (::close(fd) != 0) {
    fd = -1;
    error = "cannot write '" + path + "': " + std::strerror(errno);
    ::unlinkat(directory, temporary.c_str(), 0);
    guard.release();
    ::close(directory);
    return false;
  }
  if (::renameat(directory, temporary.c_str(), directory, name.c_str()) != 0) {
    error = "cannot rename the temporary '" + temporary + "' to '" + path + "': " + std::strerror(errno);
    ::unlinkat(directory, temporary.c_str(), 0);
    guard.release();
    ::close(directory);
    return false;
  }
  guard.release();
  ::fsync(directory); // the rename itself survives a crash
  ::close(directory);
  return true;
}

std::string findOutputClash(const std::vector<NamedFile> &outputs, const std::vector<NamedFile> &inputs) {
  auto label = [](const NamedFile &f) { return f.role + " '" + f.path + "'"; };
  std::vector<FileKey> keys;
  for (const NamedFile &out : outputs) {
    if (std::string why = unwritableReason(out.path); !why.empty())
      return label(out) + ": " + why;
    keys.push_back(out.path == "-" ? FileKey() : keyOf(out.path, false));
  }
  for (size_t a = 0; a < outputs.size(); ++a) {
    for (size_t b = 0; b < a; ++b)
      if (keys[a] == keys[b])
        return label(outputs[a]) + " and " + label(outputs[b]) + " are the same file; give each output its own name";
    for (const NamedFile &in : inputs) {
      struct stat st {};
      if (keys[a].valid && keys[a].name.empty() && ::stat(in.path.c_str(), &st) == 0 && keys[a] == keyOf(in.path, true))
        return label(outputs[a]) + " is the same file as " + label(in) + "; writing it would replace that input";
    }
  }
  return "";
}

std::string linkerSpecialCharacter(const std::string &name) {
  if (name.empty())
    return "";
  if (name[0] == '@')
    return "a leading '@' (the compiler driver and the linker read options from the file named after it)";
  if (name[0] == '-')
    return "a leading '-' (read as an option)";
  for (unsigned char c : name) {
    if (c == ',')
      return "a comma (the compiler driver splits -Wl, option lists at commas)";
    if (c == ' ' || c == '\t' || c == '\'' || c == '"' || c == '\\')
      return "a space, quote or backslash (quoting characters in the linker's response files)";
    if (c < 0x20 || c == 0x7f)
      return "a control character";
  }
  return "";
}

} // namespace saltpan
