// StandaloneMain.h - pieces of the built executables' main() that its modes share.
#pragma once
#include "ExitCode.h"
#include "ModelFile.h"

#include <string>
#include <vector>

namespace saltpan::standalone {

/// Prints "PROGRAM: error: MESSAGE" and `hint` (where the options are listed); returns BadUsage.
int usage(const std::string &program, const std::string &message, const std::string &hint);

/// `PROGRAM sweep ARGS`: runs a built-in sweep as `saltpan sweep --engine scalar` would.
int sweepMode(const ModelBundle &bundle, const std::vector<std::string> &args, const std::string &program);
/// The lines of the main help that list the built-in sweeps.
std::string sweepList(const ModelBundle &bundle);

} // namespace saltpan::standalone
