// Options.tests.cpp - the command-line option parser: flags, values in both forms, repeats,
// positional arguments, `--`, stops, and the messages of unknown options and missing values.
#include "Options.h"

#include <catch2/catch.hpp>

using namespace saltpan;

namespace {

// What one parse did: the exit status (or -1 to go on) and the usage error it reported.
struct Outcome {
  int code = -1;
  std::string error;
};

Outcome parse(const OptionParser &parser, const std::vector<std::string> &args) {
  Outcome out;
  auto code = parser.parse(args, [&](const std::string &message) {
    out.error = message;
    return 64;
  });
  out.code = code ? *code : -1;
  return out;
}

} // namespace

TEST_CASE("flags, values in both forms, repeats and positional arguments", "[options]") {
  OptionParser p;
  bool force = false;
  std::string format = "text";
  std::vector<std::string> sets, files;
  p.flag("--force", force);
  p.value("--format", format);
  p.repeated("--set", sets);
  p.positional(files);
  Outcome o = parse(p, {"a.saltpan", "--force", "--format", "json", "--set=x=1", "--set", "y=2", "-", "b"});
  CHECK(o.code == -1);
  CHECK(o.error.empty());
  CHECK(force);
  CHECK(format == "json");
  CHECK(sets == std::vector<std::string>{"x=1", "y=2"});
  CHECK(files == std::vector<std::string>{"a.saltpan", "-", "b"});
}

TEST_CASE("a value is the next argument whatever it looks like, and the last one wins", "[options]") {
  OptionParser p;
  std::string output, format;
  p.value("-o", output);
  p.value("--format", format);
  CHECK(parse(p, {"-o", "--format", "--format=a", "--format", "b"}).code == -1);
  CHECK(output == "--format");
  CHECK(format == "b");
  CHECK(parse(p, {"--format="}).code == -1);
  CHECK(format.empty());
}

TEST_CASE("unknown options, and flags given a value, are refused with their text", "[options]") {
  OptionParser p;
  bool force = false;
  std::vector<std::string> files;
  p.flag("--force", force);
  p.positional(files);
  Outcome o = parse(p, {"a", "--frobnicate", "b"});
  CHECK(o.code == 64);
  CHECK(o.error == "unknown option '--frobnicate'");
  CHECK(files == std::vector<std::string>{"a"}); // reading stops at the refused option
  CHECK(parse(p, {"--force=yes"}).error == "unknown option '--force=yes'");
  CHECK(parse(p, {"-x"}).error == "unknown option '-x'");
  CHECK(parse(p, {"--"}).error == "unknown option '--'"); // without endOfOptions()
  CHECK_FALSE(force);
}

TEST_CASE("without a positional handler every plain argument is an unknown option", "[options]") {
  OptionParser p;
  CHECK(parse(p, {"file"}).error == "unknown option 'file'");
  CHECK(parse(p, {"-"}).error == "unknown option '-'");
  CHECK(parse(p, {}).code == -1);
}

TEST_CASE("a missing value is an unknown option, a needed value, or the option's own message", "[options]") {
  std::string v;
  OptionParser asUnknown;
  asUnknown.value("--protocol", v);
  CHECK(parse(asUnknown, {"--protocol"}).error == "unknown option '--protocol'");

  OptionParser needs(OptionParser::MissingValue::NeedsAValue);
  needs.value("--protocol", v);
  needs.value("-o", v).ifMissing("-o needs a file name");
  CHECK(parse(needs, {"--protocol"}).error == "--protocol needs a value");
  CHECK(parse(needs, {"-o"}).error == "-o needs a file name");
  // Not missing when another argument follows, even an option.
  CHECK(parse(needs, {"--protocol", "-o"}).code == -1);
  CHECK(v == "-o");
}

TEST_CASE("separateOnly refuses NAME=VALUE", "[options]") {
  OptionParser p;
  std::string output;
  p.value("-o", output).separateOnly();
  CHECK(parse(p, {"-o=x"}).error == "unknown option '-o=x'");
  CHECK(parse(p, {"-o", "x"}).code == -1);
  CHECK(output == "x");
}

TEST_CASE("a handler's message stops the reading; a stop returns its action's status", "[options]") {
  OptionParser p;
  std::string engine;
  int helped = 0;
  p.value("--engine", [&](const std::string &value) -> std::string {
    engine = value;
    return value == "jit" ? "" : "--engine must be 'jit'";
  });
  p.stop({"--help", "-h"}, [&] {
    ++helped;
    return 0;
  });
  CHECK(parse(p, {"--engine", "x", "--help"}).error == "--engine must be 'jit'");
  CHECK(helped == 0);
  Outcome o = parse(p, {"--engine=jit", "-h", "--frobnicate"});
  CHECK(o.code == 0);
  CHECK(o.error.empty()); // nothing after the stop is read
  CHECK(helped == 1);
  CHECK(parse(p, {"--help=1"}).error == "unknown option '--help=1'");
}

TEST_CASE("after `--` every argument is positional", "[options]") {
  OptionParser p;
  bool force = false;
  std::vector<std::string> files;
  p.flag("--force", force);
  p.positional(files);
  p.endOfOptions();
  CHECK(parse(p, {"a", "--", "--force", "--", "-x"}).code == -1);
  CHECK_FALSE(force);
  CHECK(files == std::vector<std::string>{"a", "--force", "--", "-x"});
}

TEST_CASE("a positional handler may refuse an argument; one positional takes one", "[options]") {
  OptionParser p;
  std::vector<std::string> seen;
  p.positional([&](const std::string &a) -> std::string {
    seen.push_back(a);
    return a == "bad" ? "not that one" : "";
  });
  CHECK(parse(p, {"a", "bad", "c"}).error == "not that one");
  CHECK(seen == std::vector<std::string>{"a", "bad"});

  OptionParser one;
  std::string file;
  one.positional(file, "run takes one spec file");
  CHECK(parse(one, {"a"}).code == -1);
  CHECK(file == "a");
  file.clear();
  CHECK(parse(one, {"a", "b"}).error == "run takes one spec file");
  CHECK(file == "a");
}

TEST_CASE("an unknown handler receives what is not declared, in order", "[options]") {
  OptionParser p;
  std::vector<std::string> outputs, passed;
  p.repeated("-o", outputs);
  p.positional(passed);
  p.unknown([&](const std::string &a) {
    passed.push_back(a);
    return std::string();
  });
  CHECK(parse(p, {"--vary", "x=1:2:3", "-o", "a.csv", "spec", "-o"}).code == -1);
  CHECK(outputs == std::vector<std::string>{"a.csv"});
  CHECK(passed == std::vector<std::string>{"--vary", "x=1:2:3", "spec", "-o"});
}

TEST_CASE("namesOption and wholeNumber", "[options]") {
  CHECK(namesOption("--shard", "--shard"));
  CHECK(namesOption("--shard=0/2", "--shard"));
  CHECK_FALSE(namesOption("--shards", "--shard"));
  CHECK_FALSE(namesOption("-shard", "--shard"));
  long n = 0;
  CHECK(wholeNumber("4096", 1, 4096, n));
  CHECK(n == 4096);
  CHECK_FALSE(wholeNumber("4097", 1, 4096, n));
  CHECK_FALSE(wholeNumber("0", 1, 4096, n));
  CHECK_FALSE(wholeNumber("", 0, 10, n));
  CHECK_FALSE(wholeNumber("-1", -5, 10, n));
  CHECK_FALSE(wholeNumber(" 1", 0, 10, n));
  CHECK_FALSE(wholeNumber("12345678901234567", 0, 9007199254740992L, n)); // 17 digits
  CHECK(wholeNumber("9007199254740992", 0, 9007199254740992L, n));
}
