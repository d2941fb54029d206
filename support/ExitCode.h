// ExitCode.h - the exit status of every saltpan program (sysexits): the saltpan commands,
// saltpan-mpi and the executables `saltpan build` writes. Each --help documents the ones it uses.
#pragma once

namespace saltpan {

enum ExitCode : int {
  Ok = 0,
  ExpectationsFailed = 1, // `saltpan test`; also `saltpan fmt --check` when a file would change
  BadUsage = 64,          // unknown options, missing or unreadable option values
  BadInput = 65,          // a spec with errors, a failed simulation, shards that make no sweep
  InternalFault = 70,     // a bug or a broken installation, never the user's input
  CannotWrite = 73,       // an output file could not be written, or is an input or another output
};

} // namespace saltpan
