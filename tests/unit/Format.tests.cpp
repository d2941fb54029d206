// Format.tests.cpp - `saltpan fmt`'s canonical layout: pinned outputs, comments kept,
// idempotence and an unchanged syntax tree on every shipped spec, stdlib module and test file.
#include "Diagnostics.h"
#include "Source.h"
#include "parse/Format.h"
#include "parse/Parse.h"

#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <regex>
#include <sstream>

using namespace saltpan;

namespace {

std::optional<std::string> fmt(const std::string &text, bool bare = false) {
  SourceFile file("test.saltpan", text);
  DiagnosticEngine diags;
  return bare ? bareSpec(file, diags) : formatSpec(file, diags);
}

// The --emit ast dump without its <line:col> locations; nullopt when the text does not parse.
std::optional<std::string> astWithoutLocations(const std::string &path, const std::string &text) {
  SourceFile file(path, text);
  DiagnosticEngine diags;
  auto module = parse(file, diags);
  if (!module)
    return std::nullopt;
  static const std::regex location("<[0-9]+:[0-9]+(-[0-9]+:[0-9]+)?>");
  return std::regex_replace(ast::dump(*module), location, "<>");
}

std::string readFile(const std::filesystem::path &path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

std::vector<std::filesystem::path> shippedFiles() {
  namespace fs = std::filesystem;
  std::vector<fs::path> files;
  fs::path root = SALTPAN_SOURCE_DIR;
  for (const char *dir : {"specs", "stdlib", "tests/diagnostics"})
    for (const auto &entry : fs::recursive_directory_iterator(root / dir))
      if (entry.is_regular_file() && entry.path().extension() == ".saltpan")
        files.push_back(entry.path());
  std::sort(files.begin(), files.end());
  return files;
}

} // namespace

TEST_CASE("canonical layout of a messy spec", "[format]") {
  const char *messy = "model   Demo \"a demo\"\nuse std.ions\n\n\n\nuse std.math\ntemperature 37 degC\n"
                      "outside bath { [Na] = 145 mM ; [K]=4.5 mM\n impermeant 33.5 mM valence -1}\n"
                      "compartment soma{sphere diameter 20 um;capacitance 1 uF/cm2\n"
                      "  initial V=-65 mV   outside bath\n"
                      "  inside { [Na]=11 mM [K] = 138 mM impermeant 140 mM valence -1 }\n"
                      "membrane{KLeak 1e-6 cm/s;NaLeakage 4e-8 cm/s reversal 50 mV\nG 36 mS/cm2 reversal -77 mV}}\n"
                      "channel KLeak {\n carries K\n}\n"
                      "channel G{carries K gate n power 4{opening=0.1 /ms/ exprel(-(V+55 mV)/ 10 mV);"
                      "closing = 0.125/ms*  exp (-(V + 65 mV) /80 mV)}}\n"
                      "const r: 1/ms = 2.50 /ms   const half: mV = -0.5e1mV\n";
  const char *canonical = R"(model Demo "a demo"

use std.ions

use std.math

temperature 37 degC

outside bath {
  [Na] = 145 mM
  [K] = 4.5 mM
  impermeant 33.5 mM valence -1
}

compartment soma {
  sphere diameter 20 um
  capacitance 1 uF/cm2
  initial V = -65 mV
  outside bath
  inside {
    [Na] = 11 mM
    [K] = 138 mM
    impermeant 140 mM valence -1
  }
  membrane {
    KLeak     1e-6 cm/s
    NaLeakage 4e-8 cm/s reversal 50 mV
    G         36 mS/cm2 reversal -77 mV
  }
}

channel KLeak { carries K }

channel G {
  carries K
  gate n power 4 {
    opening = 0.1 /ms / exprel(-(V + 55 mV) / 10 mV)
    closing = 0.125 /ms * exp(-(V + 65 mV) / 80 mV)
  }
}

const r: 1/ms = 2.50 /ms
const half: mV = -0.5e1 mV
)";
  auto out = fmt(messy);
  REQUIRE(out);
  CHECK(*out == canonical);
  CHECK(fmt(*out) == out);
  CHECK(astWithoutLocations("test.saltpan", *out) == astWithoutLocations("test.saltpan", messy));
}

TEST_CASE("canonical layout: small pinned cases", "[format]") {
  // Numbers and units keep their text exactly; a sign sticks to its operand.
  CHECK(fmt("const a=1.50E+3 mV\n") == "const a = 1.50E+3 mV\n");
  CHECK(fmt("ion Na valence + 1\n") == "ion Na valence +1\n");
  // A call, a power, a concentration, a record list.
  CHECK(fmt("const x = pow( 2 , 3 )^2\n") == "const x = pow(2, 3)^2\n");
  CHECK(fmt("pump P { activity = hill( [Na] in , 10 mM, 1 ) }\n") ==
        "pump P { activity = hill([Na]in, 10 mM, 1) }\n");
  CHECK(fmt("protocol p { record soma . V , soma.m every 1 ms duration 1 ms }\n") ==
        "protocol p {\n  record soma.V, soma.m every 1 ms\n  duration 1 ms\n}\n");
  // Places along a cable: a number and its unit or '%', each a word of its own.
  CHECK(fmt("protocol p { record d.V at 450um, d.V at 50%\n inject d at 90 %0.1 nA from 0 ms to 1 ms }\n") ==
        "protocol p {\n  record d.V at 450 um, d.V at 50 %\n  inject d at 90 % 0.1 nA from 0 ms to 1 ms\n}\n");
  // Places in expectations and sweep measures, and the cutting rule of a cable.
  CHECK(fmt("expect p: peak( d.V at 450um ) > 0 mV\n") == "expect p: peak(d.V at 450 um) > 0 mV\n");
  CHECK(fmt("expect p: conduction_velocity(a.V at 2 mm,a.V at 50%) in 1 m/s to 2 m/s\n") ==
        "expect p: conduction_velocity(a.V at 2 mm, a.V at 50 %) in 1 m/s to 2 m/s\n");
  CHECK(fmt("sweep s { vary d.Leak.density values 1 mS/cm2 measure p: peak(d.V at 90%) }\n") ==
        "sweep s {\n  vary d.Leak.density values 1 mS/cm2\n  measure p: peak(d.V at 90 %)\n}\n");
  CHECK(fmt("cable d { pieces 10 per length  constant at 100Hz }\n") ==
        "cable d { pieces 10 per length constant at 100 Hz }\n");
  // A division written without spaces stays a division by that name, glued.
  CHECK(fmt("fn f(x: 1, t: ms) -> 1/ms = x /t\n") == "fn f(x: 1, t: ms) -> 1/ms = x/t\n");
  // Empty blocks; several one-line declarations of one kind stay together.
  CHECK(fmt("channel A {  }\nchannel B {}\n") == "channel A {}\nchannel B {}\n");
  CHECK(fmt("ion Na valence +1\nion K valence +1\nconst a = 1\n") ==
        "ion Na valence +1\nion K valence +1\n\nconst a = 1\n");
  // ';' separators go; nothing else is printed for an empty file.
  CHECK(fmt("const a = 1; const b = 2;;\n") == "const a = 1\nconst b = 2\n");
  CHECK(fmt("") == "");
  CHECK(fmt("  \n\n") == "");
}

TEST_CASE("a ';' between items goes only when the parse stays the same", "[format]") {
  // "3 Bar" could read as the number 3 with the unit 'Bar'; the parse that follows settles it,
  // and the formatter re-parses its result to be sure.
  const char *text = "compartment c { membrane { Foo 3; Bar 4 mS } }\n";
  auto out = fmt(text);
  REQUIRE(out);
  CHECK(*out == "compartment c {\n  membrane {\n    Foo 3\n    Bar 4 mS\n  }\n}\n");
  CHECK(astWithoutLocations("t.saltpan", *out) == astWithoutLocations("t.saltpan", text));
  CHECK(fmt(*out) == out);
}

TEST_CASE("comments are kept at their lines", "[format]") {
  const char *text = "# header\n#   second line   \n\n## The leak.\nchannel Leak{carries K # trailing\n"
                     "  # own line\n  reversal -70 mV}  # after the block\n"
                     "const a = 1 +  # inside an expression\n  2\n# at the end\n";
  const char *canonical = "# header\n#   second line\n\n## The leak.\nchannel Leak {\n  carries K  # trailing\n"
                          "  # own line\n  reversal -70 mV\n}  # after the block\n\n"
                          "const a = 1 +  # inside an expression\n    2\n# at the end\n";
  auto out = fmt(text);
  REQUIRE(out);
  CHECK(*out == canonical);
  CHECK(fmt(*out) == out);
  CHECK(astWithoutLocations("t.saltpan", *out) == astWithoutLocations("t.saltpan", text));
  // The bare form has no comments and no layout of the source left.
  CHECK(fmt(text, true) == "channel Leak {\n  carries K\n  reversal -70 mV\n}\n\nconst a = 1 + 2\n");
}

TEST_CASE("a line break inside an item is kept as a continuation line", "[format]") {
  const char *text = "const a = if 1 > 2\n then 3 else\n        4\n";
  CHECK(fmt(text) == "const a = if 1 > 2\n    then 3 else\n    4\n");
  CHECK(fmt(text, true) == "const a = if 1 > 2 then 3 else 4\n");
  CHECK(fmt(*fmt(text)) == fmt(text));
}

TEST_CASE("a file with syntax errors is not formatted", "[format]") {
  SourceFile file("bad.saltpan", "channel { carries K }\n");
  DiagnosticEngine diags;
  CHECK_FALSE(formatSpec(file, diags));
  CHECK(diags.errorCount() > 0);
}

TEST_CASE("every shipped file: idempotent, same syntax tree, same comments", "[format]") {
  auto files = shippedFiles();
  CHECK(files.size() > 100);
  for (const auto &path : files) {
    DYNAMIC_SECTION(path.string()) {
      std::string text = readFile(path);
      SourceFile file(path.string(), text);
      DiagnosticEngine diags;
      auto out = formatSpec(file, diags);
      if (!astWithoutLocations(path.string(), text)) {
        CHECK_FALSE(out); // does not parse: not touched
        continue;
      }
      REQUIRE(out);
      CHECK(fmt(*out) == out);
      CHECK(astWithoutLocations(path.string(), *out) == astWithoutLocations(path.string(), text));
      // Every comment survives, in order.
      auto comments = [](const std::string &s) {
        std::vector<std::string> all;
        std::istringstream lines(s);
        for (std::string line; std::getline(lines, line);) {
          size_t hash = line.find('#');
          size_t quote = line.find('"');
          if (hash != std::string::npos && (quote == std::string::npos || quote > hash)) {
            std::string c = line.substr(hash);
            while (!c.empty() && (c.back() == ' ' || c.back() == '\t' || c.back() == '\r'))
              c.pop_back();
            all.push_back(c);
          }
        }
        return all;
      };
      CHECK(comments(*out) == comments(text));
      // The bare form is what formatting leaves alone.
      SourceFile again(path.string(), *out);
      DiagnosticEngine d1, d2;
      CHECK(bareSpec(again, d1) == bareSpec(file, d2));
    }
  }
}
