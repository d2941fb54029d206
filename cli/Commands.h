// Commands.h - the subcommands of the saltpan executable.
#pragma once
#include "SafeWrite.h"

#include <string>
#include <vector>

namespace saltpan {
class SourceManager;
}

namespace saltpan::cli {

/// Exit codes (sysexits): documented in every --help.
enum ExitCode { Ok = 0, ExpectationsFailed = 1, Usage = 64, SpecErrors = 65, Internal = 70, CannotWrite = 73 };

int checkCommand(const std::vector<std::string> &args);
int showCommand(const std::vector<std::string> &args);
int runCommand(const std::vector<std::string> &args);
int testCommand(const std::vector<std::string> &args);
int snapshotCommand(const std::vector<std::string> &args);
int restCommand(const std::vector<std::string> &args);
int methodsCommand(const std::vector<std::string> &args);
int fmtCommand(const std::vector<std::string> &args);
int hashCommand(const std::vector<std::string> &args);
int sweepCommand(const std::vector<std::string> &args);
int mergeCommand(const std::vector<std::string> &args);
int buildCommand(const std::vector<std::string> &args);

/// If args[i] is "NAME=VALUE", or "NAME" followed by a value, stores the value (moving i
/// past it) and returns true.
bool optionValue(const std::vector<std::string> &args, size_t &i, const std::string &name, std::string &into);
/// findOutputClash (SafeWrite.h) against every file `sources` read: "" when the outputs (empty
/// paths skipped) may be written, else the message to refuse them with (exit status Usage).
std::string outputClash(const std::vector<NamedFile> &outputs, const SourceManager &sources);
} // namespace saltpan::cli
