// MethodsCommand.cpp - `saltpan methods`: a methods-section description of a checked model
// (the text is generated in Methods.cpp).
#include "Commands.h"

#include "Methods.h"
#include "Pipeline.h"

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <unistd.h>

namespace saltpan::cli {

namespace {

const char *methodsHelp = R"(usage: saltpan methods [options] FILE

Writes a methods-section description of the checked model, to paste into a paper and edit:
the temperature; the sign conventions (V inside minus outside, membrane current positive
outward); the solutions of each compartment with the Nernst reversal potentials at the model
temperature and the exact 2019 SI constants used; each compartment's geometry, membrane area
and specific capacitance; each cable's shape, how it was cut into pieces and its length
constant; each channel type with the ions it carries, its reversal (Nernst,
GHK with permeability ratios, or as written), its density in each compartment and its gating
equations as LaTeX math, with Q10; each pump and exchanger with its cycle, net charge and
activity law; each protocol with its stimuli, recordings and integration method (with
references); each expectation with its source and how its measure is taken; the tool
version. The output is deterministic.

options:
  --format markdown|latex  Markdown with $...$ math (default), or LaTeX: a complete document
                           (article class and amsmath only)
  --fragment               with --format latex: the body only, without \documentclass and
                           \begin{document} ... \end{document}
  -o FILE                  write to FILE (atomically) instead of standard output
  --version                print the version
  --help                   show this help

exit status: 0 success, 64 bad usage, 65 the spec has errors, 70 internal fault,
             73 the output file could not be written or is an input

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

int usage(const std::string &message) { return usageError("saltpan", message, methodsHelp); }

} // namespace

int methodsCommand(const std::vector<std::string> &args) {
  std::vector<std::string> files;
  std::string formatName = "markdown", output;
  bool fragment = false, help = false, version = false;
  OptionParser parser;
  parser.flag("--help", help);
  parser.flag("-h", help);
  parser.flag("--version", version);
  parser.flag("--fragment", fragment);
  parser.value("--format", oneOf(formatName, {"markdown", "latex"}, "--format must be 'markdown' or 'latex', not '{}'"))
      .ifMissing("--format needs a value: markdown or latex");
  parser
      .value("-o",
             [&](const std::string &v) -> std::string {
               output = v;
               return v.empty() ? "-o needs a file name" : "";
             })
      .separateOnly()
      .ifMissing("-o needs a file name");
  parser.positional(files);
  parser.endOfOptions();
  if (auto code = parser.parse(args, usage))
    return *code;
  if (help) {
    std::fputs(methodsHelp, stdout);
    return Ok;
  }
  if (version)
    return printVersion();
  if (files.size() != 1)
    return usage(files.empty() ? "no spec file given" : "methods takes exactly one spec file");
  if (fragment && formatName != "latex")
    return usage("--fragment needs --format latex");

  Compilation c;
  if (!compileAndReport(files[0], c, useColour()) || !c.checked)
    return BadInput;
  if (std::string clash = outputClash({{"-o", output}}, c.sources); !clash.empty()) {
    std::fprintf(stderr, "saltpan: error: %s\n", clash.c_str());
    return CannotWrite;
  }

  MethodsOptions options;
  options.format = formatName == "latex" ? MethodsFormat::Latex : MethodsFormat::Markdown;
  options.fragment = fragment;
  options.sourceName = std::filesystem::path(files[0]).filename().string();
  std::string text = methodsText(c, options);
  if (output.empty()) {
    std::fputs(text.c_str(), stdout);
    return Ok;
  }
  std::string error;
  if (!writeFileAtomically(output, text, error)) {
    std::fprintf(stderr, "saltpan: %s\n", error.c_str());
    return CannotWrite;
  }
  return Ok;
}

} // namespace saltpan::cli
