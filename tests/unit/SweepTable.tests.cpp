// SweepTable.tests.cpp - sweep results (runtime/SweepTable): shard ranges, CSV quoting,
// the JSON round trip that `saltpan merge` relies on, and numbers that read back exactly.
#include "SweepTable.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <cstdlib>
#include <string>
#include <vector>

using namespace saltpan::sweep;

namespace {

Table sample() {
  Table t;
  t.sweep = "conductances";
  t.version = "0.0-test";
  t.modelHash = "abc123";
  t.sweepHash = "def456";
  t.engine = "batched, 4 lanes";
  t.design = "grid";
  t.parameters = {{"axon.SquidSodium1952.density", "mS/cm2", 10}, {"axon.SquidLeak1952.reversal", "mV", 1000}};
  t.measures = {{"euler10: spike_count(axon.V)", "", 1}, {"euler10: peak(axon.V, 0 mV)", "mV", 1000}};
  t.totalPoints = 3;
  t.parameterValues = {{60, -54.387}, {0.1, 1e-05}, {180, -1e300}};
  t.results.resize(3);
  t.results[0] = {true, {12, 41.25}, ""};
  t.results[1] = {true, {0, NAN}, ""};
  t.results[2] = {true, {NAN, NAN}, "euler10: the run failed at 1.5 ms: axon.V is not finite, \"NaN\""};
  return t;
}

std::vector<std::string> lines(const std::string &text) {
  std::vector<std::string> out;
  size_t pos = 0;
  for (size_t nl; (nl = text.find('\n', pos)) != std::string::npos; pos = nl + 1)
    out.push_back(text.substr(pos, nl - pos));
  CHECK(pos == text.size()); // every line ends with a newline
  return out;
}

} // namespace

TEST_CASE("shard ranges cover every point once, in order, with sizes within one", "[sweep]") {
  for (uint64_t total : {0ull, 1ull, 2ull, 3ull, 7ull, 10ull, 64ull, 100ull, 4096ull, 99991ull, 100000000ull})
    for (int count : {1, 2, 3, 4, 5, 7, 16, 64, 1000, 999983, 1000000}) {
      INFO("total " << total << ", " << count << " shards");
      uint64_t next = 0, smallest = UINT64_MAX, largest = 0;
      for (int i = 0; i < count; ++i) {
        uint64_t first = 0, size = 0;
        shardRange(total, i, count, first, size);
        if (first != next) {
          FAIL_CHECK("shard " << i << " starts at " << first << ", not " << next);
          break;
        }
        next = first + size;
        smallest = std::min(smallest, size);
        largest = std::max(largest, size);
      }
      CHECK(next == total);
      CHECK(largest - smallest <= 1);
    }
}

TEST_CASE("a sweep's CSV has a header with units and one row per point", "[sweep]") {
  std::vector<std::string> rows = lines(toCsv(sample()));
  REQUIRE(rows.size() == 4);
  // The measure names with commas are quoted (RFC 4180); a plain number has no unit.
  CHECK(rows[0] == "point,axon.SquidSodium1952.density (mS/cm2),axon.SquidLeak1952.reversal (mV),"
                   "euler10: spike_count(axon.V),\"euler10: peak(axon.V, 0 mV) (mV)\",failure");
  CHECK(rows[1] == "0,60,-54.387,12,41.25,");
  CHECK(rows[2] == "1,0.1,1e-05,0,,");
  // A failure with a comma and quotes is quoted, its quotes doubled.
  CHECK(rows[3] == "2,180,-1e+300,,,\"euler10: the run failed at 1.5 ms: axon.V is not finite, \"\"NaN\"\"\"");
}

TEST_CASE("a shard's CSV numbers its points globally", "[sweep]") {
  Table t = sample();
  t.first = 1000;
  t.shardIndex = 2;
  t.shardCount = 5;
  std::vector<std::string> rows = lines(toCsv(t));
  REQUIRE(rows.size() == 4);
  CHECK(rows[1].rfind("1000,", 0) == 0);
  CHECK(rows[3].rfind("1002,", 0) == 0);
}

TEST_CASE("a sweep's JSON reads back and writes the same bytes", "[sweep]") {
  for (int shardCount : {1, 3}) {
    Table t = sample();
    if (shardCount > 1) {
      t.shardIndex = 1;
      t.shardCount = shardCount;
      t.first = 17;
      t.totalPoints = 30;
    }
    std::string json = toJson(t);
    Table back;
    std::string error;
    REQUIRE(fromJson(json, back, error));
    CHECK(error.empty());
    CHECK(toJson(back) == json);
    CHECK(toCsv(back) == toCsv(t));
    CHECK(back.shardIndex == t.shardIndex);
    CHECK(back.shardCount == t.shardCount);
    CHECK(back.first == t.first);
    CHECK(back.totalPoints == t.totalPoints);
    // NaN is written as null and read back as NaN; other values exactly.
    CHECK(json.find("null") != std::string::npos);
    CHECK(std::isnan(back.results[1].measures[1]));
    CHECK(std::isnan(back.results[2].measures[0]));
    CHECK(back.results[0].measures[1] == 41.25);
    CHECK(back.parameterValues[2][1] == -1e300);
    CHECK(back.results[0].failure.empty());
    CHECK(back.results[2].failure == t.results[2].failure);
    CHECK(back.results[0].done);
  }
}

TEST_CASE("fromJson refuses what is not a sweep result", "[sweep]") {
  Table t;
  std::string error;
  CHECK_FALSE(fromJson("", t, error));
  CHECK_FALSE(error.empty());
  error.clear();
  CHECK_FALSE(fromJson("{\"saltpan_version\": \"1\"}", t, error));
  CHECK_FALSE(error.empty());
  // Points that skip an index, or hold the wrong number of values.
  std::string json = toJson(sample());
  std::string skipped = json;
  size_t at = skipped.find("\"point\": 1");
  REQUIRE(at != std::string::npos);
  skipped.replace(at, 10, "\"point\": 5");
  error.clear();
  CHECK_FALSE(fromJson(skipped, t, error));
  CHECK(error.find("consecutive") != std::string::npos);
  Table fewer = sample();
  fewer.results[1].measures.pop_back();
  error.clear();
  CHECK_FALSE(fromJson(toJson(fewer), t, error));
  CHECK(error.find("wrong number") != std::string::npos);
  // A shard index outside its count (an edited file) is refused, not used as an index.
  for (int index : {-1, 3, 7000000}) {
    Table shard = sample();
    shard.shardCount = 3;
    shard.shardIndex = index;
    error.clear();
    CHECK_FALSE(fromJson(toJson(shard), t, error));
    CHECK(error.find("does not exist") != std::string::npos);
  }
}

TEST_CASE("exactNumber reads back as the same double", "[sweep]") {
  for (double v : {0.0, -0.0, 0.1, 1e-05, -54.387, 1.0 / 3.0, 6.02214076e23, 5e-324, 1.7976931348623157e308, 120.0})
    CHECK(std::strtod(exactNumber(v).c_str(), nullptr) == v);
  CHECK(exactNumber(0.1) == "0.1");
  CHECK(exactNumber(120) == "120");
  CHECK(exactNumber(-54.387) == "-54.387");
}
