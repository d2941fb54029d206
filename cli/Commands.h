// Commands.h - the subcommands of the saltpan executable.
#pragma once
#include "ExitCode.h"
#include "Options.h"
#include "SafeWrite.h"

#include <string>
#include <vector>

namespace saltpan {
class SourceManager;
struct Compilation;
namespace ast {
struct ProtocolDecl;
}
namespace ir {
struct Model;
}
} // namespace saltpan

namespace saltpan::cli {

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

/// Prints "WHO: MESSAGE", a blank line and `help` on standard error; returns BadUsage.
int usageError(const std::string &who, const std::string &message, const char *help);
/// Whether text diagnostics on standard error are coloured: "always", "never", or "auto" (a
/// terminal, and NO_COLOR not set).
bool useColour(const std::string &setting = "auto");
/// Compiles `path` into `c` and prints its diagnostics on standard error; false when it has
/// errors (exit status BadInput).
bool compileAndReport(const std::string &path, Compilation &c, bool colour);
/// Prints "saltpan VERSION"; returns Ok.
int printVersion();
/// Declares --help and -h (print `help` on standard output) and --version, each ending the
/// reading with status Ok.
void addHelpAndVersion(OptionParser &parser, const char *help);
/// The stages `saltpan check --emit` prints, in pipeline order.
inline constexpr const char *emitStages[] = {"tokens", "ast",      "resolved", "values",
                                             "ir",     "fused-ir", "llvm",     "llvm-unoptimised"};
bool isEmitStage(const std::string &stage);
/// Prints one stage's output for `path` (for the lowered stages, of protocol `protocol`, or of
/// the first one when empty); returns the exit code.
int emitStage(const std::string &stage, const std::string &protocol, const std::string &path, bool colour);
/// The protocol of `c` named `name`, or nullptr after printing an error that lists the
/// protocols `file` has (exit status BadUsage).
const ast::ProtocolDecl *namedProtocol(const Compilation &c, const std::string &name, const std::string &file);
/// The model check lowered for `protocol` (Compilation::lowered), or nullptr after printing an
/// internal error (exit status Internal): a compilation without errors lowered every protocol.
const ir::Model *loweredModel(const Compilation &c, const ast::ProtocolDecl &protocol);

/// findOutputClash (SafeWrite.h) against every file `sources` read: "" when the outputs (empty
/// paths skipped) may be written, else the message to refuse them with (exit status BadUsage).
std::string outputClash(const std::vector<NamedFile> &outputs, const SourceManager &sources);
} // namespace saltpan::cli
