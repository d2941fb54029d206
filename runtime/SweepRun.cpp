// SweepRun.cpp - the thread pool, the journal and the progress display of a sweep.
#include "SweepRun.h"

#include <nlohmann/json.hpp>

#include <atomic>
#include <cerrno>
#include <chrono>
#include <cmath>
#include <condition_variable>
#include <cstdio>
#include <cstring>
#include <fcntl.h>
#include <mutex>
#include <sys/file.h>
#include <sys/stat.h>
#include <thread>
#include <unistd.h>

namespace saltpan::sweep {

namespace {

using Clock = std::chrono::steady_clock;

// ---- journal: a header line, then one JSON line per chunk of finished points ----

std::string headerLine(const std::string &fingerprint, size_t points) {
  nlohmann::json h = {{"saltpan_sweep_journal", 1}, {"fingerprint", fingerprint}, {"points", points}};
  return h.dump() + "\n";
}

// Reads everything in the journal from its start.
bool readWhole(int fd, std::string &text) {
  text.clear();
  char buf[65536];
  for (off_t at = 0;;) {
    ssize_t n = ::pread(fd, buf, sizeof buf, at);
    if (n < 0 && errno == EINTR)
      continue;
    if (n < 0)
      return false;
    if (n == 0)
      return true;
    text.append(buf, static_cast<size_t>(n));
    at += n;
  }
}

// One journal line of finished points, checked against the table before anything is taken
// from it: a line that parses but does not fit (another column count, a value that is no
// number, a point outside the table) was not written by this sweep, so the journal is refused
// rather than copied into the output.
bool readChunk(const nlohmann::json &j, const Table &table, std::vector<size_t> &where, std::vector<PointResult> &rows,
               std::string &why) {
  if (!j.is_object() || !j.contains("points") || !j["points"].is_array()) {
    why = "it is not a list of points";
    return false;
  }
  for (auto &p : j["points"]) {
    if (!p.is_array() || p.size() != 3 || !p[0].is_number_unsigned()) {
      why = "an entry is not [point, measures, failure]";
      return false;
    }
    uint64_t i = p[0].get<uint64_t>();
    std::string point = "point " + std::to_string(i);
    if (i >= table.results.size()) {
      why = point + " is outside this sweep's " + std::to_string(table.results.size()) + " points";
      return false;
    }
    if (!p[1].is_array() || p[1].size() != table.measures.size()) {
      why = point + " has " + std::to_string(p[1].is_array() ? p[1].size() : 0) + " measures; the sweep has " +
            std::to_string(table.measures.size());
      return false;
    }
    PointResult r;
    r.done = true;
    for (size_t m = 0; m < p[1].size(); ++m) {
      if (!p[1][m].is_number() && !p[1][m].is_null()) {
        why = point + ": the value of '" + table.measures[m].name + "' is neither a number nor null";
        return false;
      }
      r.measures.push_back(p[1][m].is_null() ? NAN : p[1][m].get<double>());
    }
    if (!p[2].is_null() && !p[2].is_string()) {
      why = point + ": its failure is neither text nor null";
      return false;
    }
    if (p[2].is_string())
      r.failure = p[2].get<std::string>();
    rows.push_back(std::move(r));
    where.push_back(static_cast<size_t>(i));
  }
  return true;
}

// Reads the journal's complete lines into `table`; `goodBytes` is where the last complete
// line ends. A line cut short or damaged by a kill does not parse: it and all after it are
// dropped and recomputed. Returns false with `error` when the journal belongs to another
// sweep or holds a line that parses but does not fit this one.
bool readJournal(const Journal &journal, const std::string &fingerprint, Table &table, uint64_t &resumed,
                 off_t &goodBytes, std::string &error) {
  const std::string &path = journal.path();
  goodBytes = 0;
  std::string text;
  if (!readWhole(journal.fd(), text)) {
    error = "cannot read the checkpoint journal '" + path + "': " + std::strerror(errno);
    return false;
  }
  size_t pos = 0, lineNumber = 0;
  bool first = true;
  while (pos < text.size()) {
    size_t end = text.find('\n', pos);
    if (end == std::string::npos)
      break; // cut short
    ++lineNumber;
    std::string line = text.substr(pos, end - pos);
    nlohmann::json j = nlohmann::json::parse(line, nullptr, false);
    if (j.is_discarded())
      break;
    if (first) {
      if (!j.is_object() || !j.contains("fingerprint") || j["fingerprint"] != fingerprint || !j.contains("points") ||
          !j["points"].is_number_unsigned() || j["points"].get<uint64_t>() != table.results.size()) {
        error = "the checkpoint journal '" + path +
                "' was written for a different sweep (another spec, sweep, shard, engine or option); remove it "
                "to start afresh";
        return false;
      }
      first = false;
    } else {
      std::vector<PointResult> rows;
      std::vector<size_t> where;
      std::string why;
      if (!readChunk(j, table, where, rows, why)) {
        error = "line " + std::to_string(lineNumber) + " of the checkpoint journal '" + path +
                "' does not fit this sweep: " + why +
                "; it was not written by this sweep, so nothing is resumed "
                "(remove the journal, or run again with --restart)";
        return false;
      }
      for (size_t k = 0; k < rows.size(); ++k) {
        if (!table.results[where[k]].done)
          ++resumed;
        table.results[where[k]] = std::move(rows[k]);
      }
    }
    pos = end + 1;
    goodBytes = static_cast<off_t>(pos);
  }
  if (first)
    goodBytes = 0; // no valid header: start the file again
  return true;
}

std::string chunkLine(const Table &t, const std::vector<size_t> &indices) {
  nlohmann::json points = nlohmann::json::array();
  for (size_t i : indices) {
    nlohmann::json measures = nlohmann::json::array();
    for (double v : t.results[i].measures)
      measures.push_back(std::isnan(v) ? nlohmann::json() : nlohmann::json(v));
    points.push_back(
        {i, measures, t.results[i].failure.empty() ? nlohmann::json() : nlohmann::json(t.results[i].failure)});
  }
  return nlohmann::json{{"points", points}}.dump() + "\n";
}

bool writeAll(int fd, const std::string &s) {
  size_t done = 0;
  while (done < s.size()) {
    ssize_t n = ::write(fd, s.data() + done, s.size() - done);
    if (n < 0)
      return false;
    done += static_cast<size_t>(n);
  }
  return ::fdatasync(fd) == 0;
}

// ---- progress ----

class ProgressDisplay {
public:
  ProgressDisplay(Progress mode, const std::string &label, uint64_t total)
      : label_(label), total_(total), started_(Clock::now()), lastLog_(started_) {
    mode_ = mode == Progress::Auto ? (::isatty(2) ? Progress::Bar : Progress::Log) : mode;
  }

  void update(uint64_t done, bool final) {
    if (mode_ == Progress::Quiet)
      return;
    auto now = Clock::now();
    double elapsed = std::chrono::duration<double>(now - started_).count();
    double rate = elapsed > 0 ? static_cast<double>(done) / elapsed : 0;
    double left = rate > 0 ? static_cast<double>(total_ - done) / rate : 0;
    if (mode_ == Progress::Bar) {
      int width = 30;
      int filled = total_ ? static_cast<int>(30.0 * static_cast<double>(done) / static_cast<double>(total_)) : width;
      std::fprintf(stderr, "\r%s [%s%s] %llu/%llu points, %.0f points/s, %s left ", label_.c_str(),
                   std::string(static_cast<size_t>(filled), '#').c_str(),
                   std::string(static_cast<size_t>(width - filled), '.').c_str(), static_cast<unsigned long long>(done),
                   static_cast<unsigned long long>(total_), rate, clock(left).c_str());
      if (final)
        std::fputc('\n', stderr);
      std::fflush(stderr);
      return;
    }
    // A log: one line every 10 s and one at the end, nothing that needs a terminal.
    if (!final && std::chrono::duration<double>(now - lastLog_).count() < 10)
      return;
    lastLog_ = now;
    std::fprintf(stderr, "%s: %llu of %llu points (%.0f%%), %.0f points/s, %s\n", label_.c_str(),
                 static_cast<unsigned long long>(done), static_cast<unsigned long long>(total_),
                 total_ ? 100.0 * static_cast<double>(done) / static_cast<double>(total_) : 100.0, rate,
                 final ? ("done in " + clock(elapsed)).c_str() : ("about " + clock(left) + " left").c_str());
  }

private:
  static std::string clock(double seconds) {
    char buf[32];
    long s = std::lround(seconds);
    if (s < 60)
      std::snprintf(buf, sizeof buf, "%lds", s);
    else if (s < 3600)
      std::snprintf(buf, sizeof buf, "%ldm%02lds", s / 60, s % 60);
    else
      std::snprintf(buf, sizeof buf, "%ldh%02ldm", s / 3600, s / 60 % 60);
    return buf;
  }
  Progress mode_;
  std::string label_;
  uint64_t total_;
  Clock::time_point started_, lastLog_;
};

} // namespace

Journal::~Journal() {
  if (fd_ >= 0)
    ::close(fd_);
}

bool Journal::open(const std::string &path, bool restart, std::string &error) {
  path_ = path;
  auto refuse = [&](const std::string &why) {
    error = "cannot write the checkpoint journal '" + path + "': " + why;
    if (fd_ >= 0)
      ::close(fd_);
    fd_ = -1;
    return false;
  };
  // A few tries: another sweep may delete the file between our open and our lock.
  for (int attempt = 0; attempt < 10; ++attempt) {
    fd_ = ::open(path.c_str(), O_RDWR | O_CREAT | O_NOFOLLOW | O_NONBLOCK | O_CLOEXEC, 0666);
    int openError = fd_ < 0 ? errno : 0;
    struct stat st {};
    // On a failed open, say why from the name: the kernel reports a link as ELOOP, or in a
    // sticky directory as EACCES.
    if (fd_ < 0 ? ::lstat(path.c_str(), &st) != 0 : ::fstat(fd_, &st) != 0)
      return refuse(std::strerror(fd_ < 0 ? openError : errno));
    if (S_ISLNK(st.st_mode))
      return refuse("it is a symbolic link, which saltpan does not follow there; remove it");
    if (st.st_uid != ::geteuid() && restart && ::unlink(path.c_str()) == 0) {
      if (fd_ >= 0)
        ::close(fd_);
      fd_ = -1;
      continue; // --restart discards another user's journal where this user may delete it
    }
    if (st.st_uid != ::geteuid())
      return refuse("it belongs to another user (uid " + std::to_string(st.st_uid) +
                    "); saltpan resumes only its own user's journals; remove it");
    if (!S_ISREG(st.st_mode))
      return refuse("it is not a regular file");
    if (fd_ < 0)
      return refuse(std::strerror(openError));
    ::fcntl(fd_, F_SETFL, ::fcntl(fd_, F_GETFL) & ~O_NONBLOCK);
    if (::flock(fd_, LOCK_EX | LOCK_NB) != 0)
      return refuse(errno == EWOULDBLOCK ? std::string("another sweep on the same output holds its lock (two sweeps "
                                                       "would mix their points); wait for it to finish, or choose "
                                                       "another -o")
                                         : std::string(std::strerror(errno)));
    // Locked; but is it still the file the name points to?
    struct stat now {};
    if (::lstat(path.c_str(), &now) == 0 && now.st_dev == st.st_dev && now.st_ino == st.st_ino) {
      if (restart && ::ftruncate(fd_, 0) != 0)
        return refuse(std::strerror(errno));
      return true;
    }
    ::close(fd_);
    fd_ = -1;
  }
  return refuse("it keeps being replaced");
}

void Journal::remove() {
  if (fd_ < 0)
    return;
  ::unlink(path_.c_str());
  ::close(fd_);
  fd_ = -1;
}

bool runSweep(Table &t, const Evaluate &evaluate, const RunOptions &o, RunReport &report, std::string &error) {
  auto started = Clock::now();
  int fd = -1;
  if (o.journal && o.journal->isOpen()) {
    off_t good = 0;
    if (!readJournal(*o.journal, o.fingerprint, t, report.resumed, good, error))
      return false;
    fd = o.journal->fd();
    if (::ftruncate(fd, good) != 0 || ::lseek(fd, 0, SEEK_END) < 0) {
      error = "cannot write the checkpoint journal '" + o.journal->path() + "'";
      return false;
    }
    if (good == 0 && !writeAll(fd, headerLine(o.fingerprint, t.results.size()))) {
      error = "cannot write the checkpoint journal '" + o.journal->path() + "'";
      return false;
    }
  }
  std::vector<size_t> pending;
  for (size_t i = 0; i < t.results.size(); ++i)
    if (!t.results[i].done)
      pending.push_back(i);

  size_t batch = std::max<size_t>(1, o.batch);
  size_t batches = (pending.size() + batch - 1) / batch;
  int threads = o.threads > 0 ? o.threads : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  threads = static_cast<int>(std::min<size_t>(static_cast<size_t>(threads), std::max<size_t>(1, batches)));

  std::mutex mutex;
  std::condition_variable wake;
  std::vector<size_t> unflushed;
  std::atomic<size_t> next{0};
  std::atomic<bool> stop{false};
  std::string workerError;
  const uint64_t alreadyDone = t.results.size() - pending.size();
  uint64_t done = alreadyDone;
  size_t finishedBatches = 0;

  auto work = [&](int worker) {
    std::vector<size_t> local;
    std::vector<PointResult> out;
    for (;;) {
      size_t b = next.fetch_add(1);
      if (b >= batches || stop)
        break;
      local.assign(pending.begin() + static_cast<long>(b * batch),
                   pending.begin() + static_cast<long>(std::min(pending.size(), (b + 1) * batch)));
      out.assign(local.size(), PointResult());
      try {
        evaluate(local, out, worker);
      } catch (const std::exception &e) {
        std::lock_guard<std::mutex> lock(mutex);
        workerError = e.what();
        stop = true;
        wake.notify_all();
        break;
      }
      std::lock_guard<std::mutex> lock(mutex);
      for (size_t k = 0; k < local.size(); ++k) {
        out[k].done = true;
        t.results[local[k]] = std::move(out[k]);
        unflushed.push_back(local[k]);
      }
      done += local.size();
      ++finishedBatches;
      wake.notify_all();
    }
  };

  ProgressDisplay progress(o.progress, o.label, t.results.size());
  std::vector<std::thread> pool;
  for (int w = 0; w < threads; ++w)
    pool.emplace_back(work, w);

  bool writeFailed = false;
  auto flush = [&](std::unique_lock<std::mutex> &) {
    if (unflushed.empty() || fd < 0)
      return;
    if (!writeAll(fd, chunkLine(t, unflushed)))
      writeFailed = true;
    unflushed.clear();
  };
  {
    std::unique_lock<std::mutex> lock(mutex);
    auto lastFlush = Clock::now();
    while (finishedBatches < batches && !stop) {
      wake.wait_for(lock, std::chrono::milliseconds(100));
      auto now = Clock::now();
      if (unflushed.size() >= o.chunk || (now - lastFlush > std::chrono::seconds(1) && !unflushed.empty())) {
        flush(lock);
        lastFlush = now;
        if (writeFailed) {
          stop = true;
          break;
        }
      }
      progress.update(done, false);
    }
  }
  for (std::thread &th : pool)
    th.join();
  {
    std::unique_lock<std::mutex> lock(mutex);
    flush(lock);
  }
  report.computed = done - alreadyDone;
  report.seconds = std::chrono::duration<double>(Clock::now() - started).count();
  if (!workerError.empty()) {
    error = workerError;
    return false;
  }
  if (writeFailed) {
    error = "cannot write the checkpoint journal '" + o.journal->path() + "'";
    return false;
  }
  progress.update(done, true);
  return true;
}

} // namespace saltpan::sweep
