// main.cpp - the saltpan command line: dispatches to a subcommand.
#include "Commands.h"

#include <cstdio>
#include <exception>
#include <string>
#include <vector>

namespace {

const char *usage = R"(saltpan - checked specs of biophysical membrane models

usage: saltpan <command> [options] FILE...

commands:
  check FILE...   check specs for syntax, units, charge and physical plausibility
  show FILE       print the resolved model: concentrations, reversal potentials, GHK rest
  run FILE        simulate one of the spec's protocols and write the recorded traces
  test PATH...    measure every expectation of the specs under PATH; N passed, M failed
  snapshot FILE   record the protocols' traces as reference files for expectations
  rest FILE       find every steady state with no injected current, and its stability
  sweep FILE      run the model at every point of a parameter grid or sample; one row per point
  merge FILE...   join the JSON results of a sweep's shards into the file one run would write
  methods FILE    write a methods-section description (Markdown or LaTeX) of the model
  fmt FILE...     rewrite specs in the canonical layout (--check: only list those that differ)
  hash FILE       print the SHA-256 of the model: its modules in canonical form, no comments
  build FILE      compile the model into an executable (or, with --shared, a C library)
  help [COMMAND]  show this help, or a command's help

options:
  --help          show help (also after a command: saltpan check --help)
  --version       print the version

exit status: 0 success, 64 bad usage, 65 the spec has errors (or a run failed), 70 internal fault,
             73 an output file could not be written; 1 from `saltpan test` when expectations failed
             and from `saltpan fmt --check` when a file is not in canonical layout

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

} // namespace

int main(int argc, char **argv) {
  try {
    std::vector<std::string> args(argv + 1, argv + argc);
    if (args.empty()) {
      std::fputs(usage, stderr);
      return saltpan::BadUsage;
    }
    std::string command = args.front();
    std::vector<std::string> rest(args.begin() + 1, args.end());
    if (command == "--help" || command == "-h") {
      std::fputs(usage, stdout);
      return saltpan::Ok;
    }
    if (command == "--version")
      return saltpan::cli::printVersion();
    if (command == "help") {
      if (rest.empty() || rest.front() == "--help" || rest.front() == "-h") {
        std::fputs(usage, stdout);
        return saltpan::Ok;
      }
      command = rest.front();
      rest = {"--help"};
    }
    if (command == "check")
      return saltpan::cli::checkCommand(rest);
    if (command == "show")
      return saltpan::cli::showCommand(rest);
    if (command == "run")
      return saltpan::cli::runCommand(rest);
    if (command == "test")
      return saltpan::cli::testCommand(rest);
    if (command == "snapshot")
      return saltpan::cli::snapshotCommand(rest);
    if (command == "rest")
      return saltpan::cli::restCommand(rest);
    if (command == "fmt")
      return saltpan::cli::fmtCommand(rest);
    if (command == "hash")
      return saltpan::cli::hashCommand(rest);
    if (command == "methods")
      return saltpan::cli::methodsCommand(rest);
    if (command == "sweep")
      return saltpan::cli::sweepCommand(rest);
    if (command == "merge")
      return saltpan::cli::mergeCommand(rest);
    if (command == "build")
      return saltpan::cli::buildCommand(rest);
    std::fprintf(stderr, "saltpan: unknown command '%s'\n\n%s", command.c_str(), usage);
    return saltpan::BadUsage;
  } catch (const std::exception &e) {
    std::fprintf(stderr, "saltpan: internal error: %s\n", e.what());
    return saltpan::InternalFault;
  } catch (...) {
    std::fprintf(stderr, "saltpan: internal error\n");
    return saltpan::InternalFault;
  }
}
