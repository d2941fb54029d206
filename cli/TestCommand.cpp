// TestCommand.cpp - `saltpan test`: finds specs with expectations, measures every one (in
// parallel across files), reports measured vs expected, and writes JUnit XML and JSON.
#include "Commands.h"
#include "Version.h"

#include "Expect.h"
#include "JIT.h"
#include "Pipeline.h"
#include "Source.h"
#include "SpecFiles.h"

#include <algorithm>
#include <atomic>
#include <cstdio>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <thread>

namespace saltpan::cli {

namespace {

namespace fs = std::filesystem;

const char *testHelp = R"(usage: saltpan test [options] PATH...

Finds every .saltpan file under the PATHs (files starting with '_' are helpers and are skipped),
checks each, and measures each of its expectations:

  expect reversal(K, soma) == -91.49 mV within 0.01 mV source "Hille 2001, Table 1.1"
  expect step10: firing_rate(axon.V) in 67 Hz to 69 Hz

Prints every expectation with its measured value, the expected value or range, its source
and PASS or FAIL, then a summary line "N passed, M failed". Files run in parallel on all
cores; the output order is the sorted order of the files and does not depend on timing.

options:
  --junit FILE            also write JUnit XML (one test suite per file) atomically
  --json FILE             also write the results as JSON atomically
  --jobs N                files checked at once (default: the number of cores)
  --allow-empty           succeed when the paths hold no expectations (by default that
                          fails: a test run that tests nothing is a mistake)
  --engine jit|interpreter   native code (default) or the reference interpreter for runs
  --version               print the version
  --help                  show this help

A folder that cannot be read is reported and counted with the files with errors; the other
files are still measured. Control characters in names and strings are shown escaped (\x1b).

exit status: 0 every expectation passed, 1 some failed or there were none, 64 bad usage,
             65 a spec has errors or a folder cannot be read, 70 internal fault, 73 an output
             file could not be written or is an input

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

struct FileResult {
  std::string path;
  std::string diagnostics; // rendered, when the spec has errors
  bool specErrors = false;
  std::vector<ExpectResult> results;
  std::unique_ptr<Compilation> compilation; // keeps results' declarations alive
  std::string hash;                         // the model hash of the file, for reports
};

void runFile(FileResult &f, bool jit) {
  f.compilation = std::make_unique<Compilation>();
  Compilation &c = *f.compilation;
  compileFile(f.path, c);
  if (c.diags.errorCount() > 0) {
    f.specErrors = true;
    for (const Diagnostic &d : c.diags.all())
      f.diagnostics += renderText(d);
    return;
  }
  if (expectations(c.program).empty())
    return;
  f.hash = c.modelHash();
  KernelCompiler compile;
  std::shared_ptr<JIT> engine;
  if (jit)
    compile = [&engine](const ir::Kernel &k, int lanes, std::string &error) -> KernelFn {
      if (!engine)
        engine = JIT::create(error);
      return engine ? engine->compile(k, lanes, error) : nullptr;
    };
  f.results = runExpectations(c, compile);
}

// Text for XML 1.0 attributes and content: control characters and bytes that are not UTF-8
// are not allowed there, even as character references, so they are shown escaped first.
std::string xmlEscape(const std::string &s) {
  std::string out;
  for (char ch : escapeControls(s)) {
    switch (ch) {
    case '&': out += "&amp;"; break;
    case '<': out += "&lt;"; break;
    case '>': out += "&gt;"; break;
    case '"': out += "&quot;"; break;
    default: out += ch;
    }
  }
  return out;
}

// Diagnostics are rendered line by line; inside XML their newlines stay newlines.
std::string xmlEscapeLines(const std::string &s) {
  std::string out;
  size_t start = 0;
  while (start <= s.size()) {
    size_t end = s.find('\n', start);
    out += xmlEscape(s.substr(start, end == std::string::npos ? std::string::npos : end - start));
    if (end == std::string::npos)
      break;
    out += '\n';
    start = end + 1;
  }
  return out;
}

} // namespace

int testCommand(const std::vector<std::string> &args) {
  std::vector<std::string> paths;
  std::string junit, jsonPath, engine = "jit";
  bool allowEmpty = false;
  unsigned jobs = std::max(1u, std::thread::hardware_concurrency());
  OptionParser parser;
  addHelpAndVersion(parser, testHelp);
  parser.flag("--allow-empty", allowEmpty);
  parser.value("--junit", junit);
  parser.value("--json", jsonPath);
  parser.value("--engine", oneOf(engine, {"jit", "interpreter"}, "--engine must be 'jit' or 'interpreter'"));
  parser.value("--jobs", [&](const std::string &v) -> std::string {
    int n = std::atoi(v.c_str());
    if (n < 1)
      return "--jobs needs a positive number";
    jobs = static_cast<unsigned>(n);
    return "";
  });
  parser.positional(paths);
  if (auto code =
          parser.parse(args, [](const std::string &message) { return usageError("saltpan", message, testHelp); }))
    return *code;
  if (paths.empty())
    return usageError("saltpan", "no path given", testHelp);
  std::string error;
  std::vector<UnreadableFolder> unreadable; // reported like files with errors
  std::vector<std::string> files = discoverSpecs(paths, unreadable, error);
  if (!error.empty()) {
    std::fprintf(stderr, "saltpan: error: %s\n", error.c_str());
    return BadUsage;
  }
  std::vector<NamedFile> outputs, specs;
  for (const NamedFile &out : {NamedFile{"--junit", junit}, NamedFile{"--json", jsonPath}})
    if (!out.path.empty())
      outputs.push_back(out);
  for (const std::string &f : files)
    specs.push_back({"the spec", f});
  if (std::string clash = findOutputClash(outputs, specs); !clash.empty()) {
    std::fprintf(stderr, "saltpan: error: %s\n", clash.c_str());
    return CannotWrite;
  }
  std::vector<FileResult> results(files.size());
  for (size_t i = 0; i < files.size(); ++i)
    results[i].path = files[i];
  std::atomic<size_t> next{0};
  auto worker = [&] {
    for (size_t i = next++; i < results.size(); i = next++) {
      // An exception leaving a thread ends the process; it is this file's error instead.
      try {
        runFile(results[i], engine == "jit");
      } catch (const std::exception &e) {
        results[i].specErrors = true;
        results[i].diagnostics += "saltpan: error: " + escapeControls(results[i].path) +
                                  ": could not be checked: " + escapeControls(e.what()) + "\n";
      }
    }
  };
  std::vector<std::thread> pool;
  for (unsigned t = 0; t < std::min<size_t>(jobs, files.size()); ++t)
    pool.emplace_back(worker);
  for (auto &t : pool)
    t.join();

  size_t passed = 0, failed = 0, broken = unreadable.size();
  std::string out;
  for (const UnreadableFolder &u : unreadable) {
    std::fprintf(stderr, "saltpan: error: %s\n", escapeControls(u.text()).c_str());
    out += escapeControls(u.text()) + "; its expectations were not measured\n";
  }
  for (const FileResult &f : results) {
    if (f.specErrors) {
      ++broken;
      std::fputs(f.diagnostics.c_str(), stderr);
      out += escapeControls(f.path) + ": the spec has errors; its expectations were not measured\n";
      continue;
    }
    if (f.results.empty())
      continue;
    out += escapeControls(f.path) + "  (" + f.hash + ")\n";
    for (const ExpectResult &r : f.results) {
      (r.passed ? passed : failed)++;
      out += std::string("  ") + (r.passed ? "PASS" : "FAIL") + "  line " + std::to_string(r.decl->range.begin.line) +
             "  " + escapeControls(r.decl->text) + ": measured " + escapeControls(r.measuredText) +
             (r.expectedText.empty() ? "" : "; expected " + r.expectedText);
      if (!r.decl->source.empty())
        out += "  [" + escapeControls(r.decl->source) + "]";
      out += "\n";
    }
  }
  out += std::to_string(passed) + " passed, " + std::to_string(failed) + " failed";
  if (broken)
    out += ", " + std::to_string(broken) + " file" + (broken == 1 ? "" : "s") + " with errors";
  out += "\n";
  std::fputs(out.c_str(), stdout);

  if (!junit.empty()) {
    std::string xml = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<testsuites name=\"saltpan\" tests=\"" +
                      std::to_string(passed + failed) + "\" failures=\"" + std::to_string(failed) + "\" errors=\"" +
                      std::to_string(broken) + "\">\n";
    for (const UnreadableFolder &u : unreadable)
      xml += "  <testsuite name=\"" + xmlEscape(u.path) + "\" tests=\"0\" failures=\"0\" errors=\"1\">\n" +
             "    <testcase classname=\"" + xmlEscape(u.path) + "\" name=\"discover\">\n      <error message=\"" +
             xmlEscape(u.problem) + "\"/>\n    </testcase>\n  </testsuite>\n";
    for (const FileResult &f : results) {
      if (!f.specErrors && f.results.empty())
        continue;
      size_t fails = 0;
      for (const ExpectResult &r : f.results)
        fails += !r.passed;
      xml += "  <testsuite name=\"" + xmlEscape(f.path) + "\" tests=\"" + std::to_string(f.results.size()) +
             "\" failures=\"" + std::to_string(fails) + "\" errors=\"" + (f.specErrors ? "1" : "0") + "\">\n";
      if (!f.hash.empty())
        xml += "    <properties>\n      <property name=\"model_hash\" value=\"" + xmlEscape(f.hash) +
               "\"/>\n      <property name=\"saltpan_version\" value=\"" SALTPAN_VERSION "\"/>\n    </properties>\n";
      if (f.specErrors)
        xml += "    <testcase classname=\"" + xmlEscape(f.path) +
               "\" name=\"check\">\n      <error message=\"the spec has errors\">" + xmlEscapeLines(f.diagnostics) +
               "</error>\n    </testcase>\n";
      for (const ExpectResult &r : f.results) {
        xml += "    <testcase classname=\"" + xmlEscape(f.path) + "\" name=\"line " +
               std::to_string(r.decl->range.begin.line) + ": " + xmlEscape(r.decl->text) + "\">";
        std::string detail = "measured " + r.measuredText + "; expected " + r.expectedText +
                             (r.decl->source.empty() ? "" : "; source: " + r.decl->source);
        if (!r.passed)
          xml += "\n      <failure message=\"" + xmlEscape(detail) + "\"/>\n    ";
        else
          xml += "\n      <system-out>" + xmlEscape(detail) + "</system-out>\n    ";
        xml += "</testcase>\n";
      }
      xml += "  </testsuite>\n";
    }
    xml += "</testsuites>\n";
    if (!writeFileAtomically(junit, xml, error)) {
      std::fprintf(stderr, "saltpan: %s\n", error.c_str());
      return CannotWrite;
    }
  }
  if (!jsonPath.empty()) {
    nlohmann::ordered_json doc;
    doc["tool"] = "saltpan";
    doc["version"] = SALTPAN_VERSION;
    doc["caution"] = "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions";
    doc["passed"] = passed;
    doc["failed"] = failed;
    doc["files_with_errors"] = broken;
    nlohmann::ordered_json list = nlohmann::ordered_json::array();
    for (const FileResult &f : results)
      for (const ExpectResult &r : f.results)
        list.push_back(
            {{"file", f.path},
             {"model_hash", f.hash},
             {"line", r.decl->range.begin.line},
             {"expectation", r.decl->text},
             {"passed", r.passed},
             {"measured", r.measuredText},
             {"measured_si", r.measured ? nlohmann::ordered_json(*r.measured) : nlohmann::ordered_json(nullptr)},
             {"expected", r.expectedText},
             {"source", r.decl->source}});
    doc["expectations"] = list;
    // File names need not be UTF-8; JSON strings must be.
    if (!writeFileAtomically(jsonPath, doc.dump(2, ' ', false, nlohmann::ordered_json::error_handler_t::replace) + "\n",
                             error)) {
      std::fprintf(stderr, "saltpan: %s\n", error.c_str());
      return CannotWrite;
    }
  }
  if (broken)
    return BadInput;
  // CI that tests nothing must not pass by accident.
  if (passed + failed == 0 && !allowEmpty) {
    std::fprintf(stderr,
                 "saltpan: error: no expectations in %zu spec file%s: nothing was tested (--allow-empty "
                 "accepts this)\n",
                 files.size(), files.size() == 1 ? "" : "s");
    return ExpectationsFailed;
  }
  return failed ? ExpectationsFailed : Ok;
}

} // namespace saltpan::cli
