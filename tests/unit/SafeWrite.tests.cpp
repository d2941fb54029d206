// SafeWrite.tests.cpp - the one routine every output is written through (support/SafeWrite.h):
// atomic replacement, no link followed, no device replaced, mode kept, no temporary left by
// SIGTERM; the output clash checks; the names refused for the linker.
#include "SafeWrite.h"

#include <catch2/catch.hpp>

#include <csignal>
#include <cstdlib>
#include <dirent.h>
#include <fcntl.h>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/inotify.h>
#include <sys/stat.h>
#include <sys/sysmacros.h>
#include <sys/wait.h>
#include <unistd.h>

using namespace saltpan;

namespace {

// A fresh directory, removed afterwards.
struct Scratch {
  std::string dir;
  Scratch() {
    std::string pattern = (std::filesystem::temp_directory_path() / "saltpan-safewrite-XXXXXX").string();
    REQUIRE(mkdtemp(pattern.data()));
    dir = pattern;
  }
  ~Scratch() {
    std::error_code ec;
    std::filesystem::remove_all(dir, ec);
  }
  std::string at(const std::string &name) const { return dir + "/" + name; }
};

std::string readAll(const std::string &path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

void put(const std::string &path, const std::string &text) { std::ofstream(path, std::ios::binary) << text; }

mode_t modeOf(const std::string &path) {
  struct stat st {};
  REQUIRE(::lstat(path.c_str(), &st) == 0);
  return st.st_mode;
}

// The names in `dir` other than "." and "..".
std::vector<std::string> entries(const std::string &dir) {
  std::vector<std::string> names;
  for (auto &e : std::filesystem::directory_iterator(dir))
    names.push_back(e.path().filename().string());
  return names;
}

} // namespace

TEST_CASE("a write replaces the destination whole and leaves no temporary", "[safewrite]") {
  Scratch s;
  std::string error;
  REQUIRE(writeFileAtomically(s.at("out.csv"), "first\n", error));
  REQUIRE(writeFileAtomically(s.at("out.csv"), "second\n", error));
  CHECK(readAll(s.at("out.csv")) == "second\n");
  CHECK(entries(s.dir) == std::vector<std::string>{"out.csv"});
}

TEST_CASE("a new file gets the umask's mode, an existing one keeps its own", "[safewrite]") {
  Scratch s;
  std::string error;
  mode_t old = ::umask(027);
  REQUIRE(writeFileAtomically(s.at("new.csv"), "x", error));
  WriteOptions program;
  program.executable = true;
  REQUIRE(writeFileAtomically(s.at("new.exe"), "x", error, program));
  ::umask(old);
  CHECK((modeOf(s.at("new.csv")) & 07777) == 0640);
  CHECK((modeOf(s.at("new.exe")) & 07777) == 0750);

  put(s.at("private.csv"), "old");
  REQUIRE(::chmod(s.at("private.csv").c_str(), 0600) == 0);
  REQUIRE(writeFileAtomically(s.at("private.csv"), "new", error));
  CHECK((modeOf(s.at("private.csv")) & 07777) == 0600);
  // An executable rebuilt over a file keeps its mode, with execute wherever read is allowed;
  // set-user-ID never carries over.
  put(s.at("tool"), "old");
  REQUIRE(::chmod(s.at("tool").c_str(), 04640) == 0);
  REQUIRE(writeFileAtomically(s.at("tool"), "new", error, program));
  CHECK((modeOf(s.at("tool")) & 07777) == 0750);
}

TEST_CASE("a link at the destination is replaced, never written through", "[safewrite]") {
  Scratch s;
  put(s.at("victim"), "precious");
  REQUIRE(::symlink(s.at("victim").c_str(), s.at("out.csv").c_str()) == 0);
  REQUIRE(::link(s.at("victim").c_str(), s.at("hard.csv").c_str()) == 0);
  std::string error;
  REQUIRE(writeFileAtomically(s.at("out.csv"), "trace", error));
  REQUIRE(writeFileAtomically(s.at("hard.csv"), "trace", error));
  CHECK(readAll(s.at("victim")) == "precious");
  CHECK(S_ISREG(modeOf(s.at("out.csv"))));
  CHECK(readAll(s.at("out.csv")) == "trace");
  CHECK(readAll(s.at("hard.csv")) == "trace");
}

TEST_CASE("directories, FIFOs and devices are refused as destinations", "[safewrite]") {
  Scratch s;
  REQUIRE(::mkfifo(s.at("fifo").c_str(), 0644) == 0);
  REQUIRE(::mkdir(s.at("dir").c_str(), 0755) == 0);
  std::string error;
  CHECK_FALSE(writeFileAtomically(s.at("fifo"), "x", error));
  CHECK(error.find("is a FIFO, not a regular file") != std::string::npos);
  CHECK(S_ISFIFO(modeOf(s.at("fifo"))));
  CHECK_FALSE(writeFileAtomically(s.at("dir"), "x", error));
  CHECK(error.find("is a directory") != std::string::npos);
  // A device: a node of our own when root may make one; the real /dev/null is only looked at.
  if (::mknod(s.at("null").c_str(), S_IFCHR | 0666, makedev(1, 3)) == 0) {
    CHECK_FALSE(writeFileAtomically(s.at("null"), "x", error));
    CHECK(error.find("null' is a character device") != std::string::npos);
    CHECK(S_ISCHR(modeOf(s.at("null"))));
    ::unlink(s.at("null").c_str());
  }
  CHECK(unwritableReason("/dev/null").find("'/dev/null' is a character device") != std::string::npos);
  CHECK(unwritableReason("-").empty());
  CHECK(unwritableReason(s.at("absent")).empty());
  // Nothing was left beside them.
  CHECK(entries(s.dir).size() == 2);
}

TEST_CASE("a missing directory is a clear error", "[safewrite]") {
  Scratch s;
  std::string error;
  CHECK_FALSE(writeFileAtomically(s.at("missing/out.csv"), "x", error));
  CHECK(error.find("cannot open its directory") != std::string::npos);
}

TEST_CASE("SIGTERM during a write removes the temporary", "[safewrite]") {
  Scratch s;
  int watch = ::inotify_init1(IN_CLOEXEC);
  REQUIRE(watch >= 0);
  REQUIRE(::inotify_add_watch(watch, s.dir.c_str(), IN_CREATE) >= 0);
  pid_t child = ::fork();
  REQUIRE(child >= 0);
  if (child == 0) {
    // Catch2 handles SIGTERM itself; a command-line program has the default action.
    std::signal(SIGTERM, SIG_DFL);
    // Large enough that the write is still going when the parent's signal arrives.
    std::string big(size_t(128) << 20, 'x');
    std::string error;
    writeFileAtomically(s.at("out.csv"), big, error);
    ::_exit(0);
  }
  // Wait for the temporary to be created, then stop the writer.
  alignas(inotify_event) char buf[4096];
  bool created = false;
  while (!created) {
    ssize_t n = ::read(watch, buf, sizeof buf);
    REQUIRE(n > 0);
    for (char *p = buf; p < buf + n;) {
      auto *event = reinterpret_cast<inotify_event *>(p);
      if (event->len && std::string(event->name).find(".saltpan-") != std::string::npos)
        created = true;
      p += sizeof(inotify_event) + event->len;
    }
  }
  ::kill(child, SIGTERM);
  int status = 0;
  REQUIRE(::waitpid(child, &status, 0) == child);
  ::close(watch);
  INFO("the writer finished before the signal arrived, or did not die of it");
  REQUIRE(WIFSIGNALED(status));
  CHECK(WTERMSIG(status) == SIGTERM);
  CHECK(entries(s.dir).empty());
}

TEST_CASE("outputs that are one file, or an input, clash whatever their spelling", "[safewrite]") {
  Scratch s;
  put(s.at("spec.saltpan"), "model M \"m\"\n");
  REQUIRE(::link(s.at("spec.saltpan").c_str(), s.at("alias").c_str()) == 0);
  std::vector<NamedFile> spec = {{"the spec", s.at("spec.saltpan")}};
  CHECK(findOutputClash({{"-o", s.at("x.csv")}, {"--plot", s.at("x.svg")}}, spec).empty());
  // Absent outputs are the same by directory and name.
  std::string clash = findOutputClash({{"-o", s.at("x.csv")}, {"--plot", s.dir + "/./x.csv"}}, spec);
  CHECK(clash.find("are the same file") != std::string::npos);
  CHECK(findOutputClash({{"-o", s.at("spec.saltpan")}}, spec).find("is the same file as the spec") !=
        std::string::npos);
  // A hard link of the input is the input.
  CHECK(findOutputClash({{"-o", s.at("alias")}}, spec).find("is the same file as the spec") != std::string::npos);
  CHECK(findOutputClash({{"-o", "/dev/null"}}, spec).find("character device") != std::string::npos);
  CHECK(findOutputClash({{"-o", "-"}, {"--plot", "-"}}, spec).empty());
}

TEST_CASE("names the linker reads as syntax are named", "[safewrite]") {
  CHECK(linkerSpecialCharacter("libsquid.so").empty());
  CHECK(linkerSpecialCharacter("libm,@rsp.so").find("comma") != std::string::npos);
  CHECK(linkerSpecialCharacter("@rsp.so").find("leading '@'") != std::string::npos);
  CHECK(linkerSpecialCharacter("-shared.so").find("leading '-'") != std::string::npos);
  CHECK(linkerSpecialCharacter("lib m.so").find("quot") != std::string::npos);
  CHECK(linkerSpecialCharacter("lib\nm.so").find("control") != std::string::npos);
}
