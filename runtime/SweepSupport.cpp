// SweepSupport.cpp - the table, hash, journal and outputs of a sweep, for every front end.
#include "SweepSupport.h"

#include "Options.h"
#include "Sha256.h"
#include "TraceOutput.h"

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>

namespace saltpan::sweep {

void addRunOptions(OptionParser &parser, RunArguments &into) {
  // A whole number from `low` to `high` kept by `keep`, or `message`.
  auto number = [](long low, long high, const char *message, auto keep) {
    return [=](const std::string &v) -> std::string {
      long n = 0;
      if (!wholeNumber(v, low, high, n))
        return message;
      keep(n);
      return "";
    };
  };
  parser.flag("--restart", into.restart);
  parser.value("--sweep", into.sweep);
  parser.value("--shard", into.shard);
  parser.value("--threads", number(1, 4096, "--threads needs a whole number from 1 to 4096",
                                   [&into](long n) { into.threads = static_cast<int>(n); }));
  parser.value("--checkpoint", number(1, 100000000, "--checkpoint needs a whole number of points",
                                      [&into](long n) { into.checkpoint = static_cast<size_t>(n); }));
  parser.value("--progress", [&into](const std::string &v) -> std::string {
    into.progress = v;
    Progress p;
    return parseProgress(v, p) ? "" : "--progress must be auto, bar, log or none";
  });
}

void setUpTable(Table &t, const std::vector<Point> &points, const ShardChoice &shard) {
  t.totalPoints = points.size();
  t.shardIndex = shard.index;
  t.shardCount = shard.count;
  uint64_t count = 0;
  shardRange(t.totalPoints, shard.index, shard.count, t.first, count);
  t.parameterValues.clear();
  for (uint64_t k = 0; k < count; ++k) {
    std::vector<double> shown;
    // 15 digits: the unit conversion's last-bit noise (-54.387000000000001 mV) is not shown.
    for (size_t a = 0; a < t.parameters.size(); ++a) {
      char buf[32];
      std::snprintf(buf, sizeof buf, "%.15g", points[t.first + k][a] * t.parameters[a].scale);
      shown.push_back(std::strtod(buf, nullptr));
    }
    t.parameterValues.push_back(std::move(shown));
  }
  t.results.assign(count, PointResult());
}

std::string sweepHash(const Table &t) {
  return sha256Hex(t.version + "\n" + t.modelHash + "\n" + t.sweep + "\n" + t.engine + "\n" +
                   std::to_string(t.totalPoints));
}

std::string journalFingerprint(const Table &t) {
  return t.sweepHash + " shard " + std::to_string(t.shardIndex) + "/" + std::to_string(t.shardCount);
}

bool parseProgress(const std::string &text, Progress &progress) {
  if (text == "auto")
    progress = Progress::Auto;
  else if (text == "bar")
    progress = Progress::Bar;
  else if (text == "log")
    progress = Progress::Log;
  else if (text == "none")
    progress = Progress::Quiet;
  else
    return false;
  return true;
}

void recordOnly(ir::Model &m, const std::vector<std::string> &paths) {
  m.protocol.record.clear();
  for (const std::string &path : paths) {
    int r = m.findProbe(path);
    if (std::find(m.protocol.record.begin(), m.protocol.record.end(), r) == m.protocol.record.end())
      m.protocol.record.push_back(r);
  }
}

std::string failureText(const std::string &protocol, const SimulationFailure &f) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.6g ms", f.time * 1e3);
  return protocol + ": the run failed at " + buf + ": " + f.variable + " " + f.reason;
}

void addFailure(PointResult &r, const std::string &text) { r.failure += (r.failure.empty() ? "" : "; ") + text; }

bool writeOutputs(const Table &t, const std::vector<std::string> &outputs, Journal *journal, std::string &error) {
  if (outputs.empty())
    std::fputs(toCsv(t).c_str(), stdout);
  for (const std::string &out : outputs)
    if (!writeFileAtomically(out, isJsonPath(out) ? toJson(t) : toCsv(t), error))
      return false;
  if (journal)
    journal->remove();
  return true;
}

bool cannotWriteJournal(const std::string &error) {
  return error.find("journal") != std::string::npos && error.find("cannot write") != std::string::npos;
}

std::string summary(const Table &t, const RunReport &report, int threads) {
  size_t failed = 0;
  for (const PointResult &r : t.results)
    failed += r.failure.empty() ? 0 : 1;
  auto count = static_cast<unsigned long long>(t.results.size());
  auto total = static_cast<unsigned long long>(t.totalPoints);
  auto first = static_cast<unsigned long long>(t.first);
  char buf[512];
  std::string text = "swept " + t.sweep + ": " + std::to_string(count) + " point" + (count == 1 ? "" : "s");
  if (t.shardCount > 1 && count == 0) // more shards than points: "points 0 to -1" would wrap round
    std::snprintf(buf, sizeof buf, " (shard %d of %d, none of the %llu)", t.shardIndex, t.shardCount, total);
  else if (t.shardCount > 1)
    std::snprintf(buf, sizeof buf, " (shard %d of %d, points %llu to %llu of %llu)", t.shardIndex, t.shardCount, first,
                  first + count - 1, total);
  else
    buf[0] = '\0';
  text += buf;
  if (report.resumed)
    text += ", " + std::to_string(report.resumed) + " from the journal";
  std::snprintf(buf, sizeof buf, ", %zu failed; %s, %d thread%s, %.3g s (%.0f points/s)\n", failed, t.engine.c_str(),
                threads, threads == 1 ? "" : "s", report.seconds,
                report.seconds > 0 ? static_cast<double>(report.computed) / report.seconds : 0.0);
  return text + buf;
}

} // namespace saltpan::sweep
