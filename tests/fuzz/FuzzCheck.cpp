// FuzzCheck.cpp - libFuzzer target: the whole pipeline (parse, load, resolve, units,
// analyze, charge, physics) on arbitrary bytes. Any crash, sanitizer report, uncaught
// exception or hang is a finding; diagnostics, however many, are the expected outcome.
#include "Diagnostics.h"
#include "Pipeline.h"

#include <cstddef>
#include <cstdint>
#include <string>

extern "C" int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  saltpan::Compilation c;
  saltpan::compileText("fuzz.saltpan", std::string(reinterpret_cast<const char *>(data), size), c);
  // Render every diagnostic too: the renderer walks source lines and columns, and must
  // cope with whatever range a stage reported.
  size_t rendered = 0;
  for (const saltpan::Diagnostic &d : c.diags.all())
    rendered += saltpan::renderText(d).size();
  rendered += saltpan::renderJson(c.diags.all()).size();
  // A compilation that reports no error must have reached the end of the pipeline.
  if (c.diags.errorCount() == 0 && !c.checked)
    __builtin_trap();
  (void)rendered;
  return 0;
}
