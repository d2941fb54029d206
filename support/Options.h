// Options.h - the one command-line option parser: every saltpan command, saltpan-mpi and the
// executables `saltpan build` writes declare their flags, options with a value and positional
// arguments here, and read their arguments with it.
#pragma once

#include <functional>
#include <map>
#include <optional>
#include <string>
#include <vector>

namespace saltpan {

/// A command's options, declared once, then read from its arguments in the order given, so
/// each check runs where the user wrote it (whether `--engine foo --help` is an error or the
/// help is the command's choice: stop() prints at once, flag() leaves it for later).
///
/// An argument of more than one character that starts with '-' is an option; anything else is
/// positional. An option with a value takes it as `NAME=VALUE` or as the next argument,
/// whatever that argument looks like. A flag never takes `=VALUE`.
class OptionParser {
public:
  /// Checks (and stores) a value: returns "" to go on, or the usage error to stop with.
  using Handler = std::function<std::string(const std::string &value)>;

  /// What a missing value (an option with a value as the last argument) is.
  enum class MissingValue {
    UnknownOption, // refused as "unknown option 'NAME'", as saltpan's commands always have
    NeedsAValue,   // refused as "NAME needs a value"
  };

  explicit OptionParser(MissingValue missing = MissingValue::UnknownOption) : missing_(missing) {}

  /// The settings of one option with a value.
  class Valued {
  public:
    /// Accepts only `NAME VALUE`: `NAME=...` is then an unknown option.
    Valued &separateOnly() {
      equalsForm_ = false;
      return *this;
    }
    /// What to say when the value is missing, instead of the parser's MissingValue rule.
    Valued &ifMissing(std::string message) {
      ifMissing_ = std::move(message);
      return *this;
    }

  private:
    friend class OptionParser;
    Handler handler_;
    bool equalsForm_ = true;
    std::string ifMissing_;
  };

  /// NAME sets `into`.
  void flag(const std::string &name, bool &into);
  /// Any of `names` ends the reading at once: `action` runs (it prints the help or the version)
  /// and what it returns is the exit status.
  void stop(const std::vector<std::string> &names, std::function<int()> action);
  /// NAME VALUE: `handler` checks and keeps the value.
  Valued &value(const std::string &name, Handler handler);
  /// NAME VALUE into `into` (the last one given wins).
  Valued &value(const std::string &name, std::string &into);
  /// NAME VALUE, repeatable: each value is appended to `into`.
  Valued &repeated(const std::string &name, std::vector<std::string> &into);
  /// Positional arguments go to `handler`; without one, each is refused as an unknown option.
  void positional(Handler handler);
  /// Positional arguments are appended to `into`.
  void positional(std::vector<std::string> &into);
  /// One positional argument, into `into`; another is refused with the message `another`.
  void positional(std::string &into, const std::string &another);
  /// `--` ends the options: every argument after it is positional.
  void endOfOptions() { endOfOptions_ = true; }
  /// Unknown options (and missing values they stand for) go to `handler` instead of being
  /// refused: saltpan-mpi passes them on to `saltpan sweep`.
  void unknown(Handler handler) { unknown_ = std::move(handler); }

  /// Reads `args`. Returns nullopt when the command goes on with what its handlers kept;
  /// otherwise the exit status: a stop() action's, or what `usage` returns for the usage error
  /// (an unknown option, a missing value, or a handler's message).
  std::optional<int> parse(const std::vector<std::string> &args,
                           const std::function<int(const std::string &message)> &usage) const;

private:
  struct Option {
    bool *flag = nullptr;
    std::function<int()> stop;
    Valued *valued = nullptr;
  };
  Option &declare(const std::string &name);
  std::string refuse(const std::string &arg) const;

  MissingValue missing_;
  std::map<std::string, Option> options_;
  std::map<std::string, Valued> valued_; // map nodes stay put, so Option::valued stays valid
  Handler positional_, unknown_;
  bool endOfOptions_ = false;
};

/// A handler that keeps the value in `into` and accepts only one of `allowed`; anything else
/// is refused with `message`, its "{}" (if any) replaced by the value.
OptionParser::Handler oneOf(std::string &into, std::vector<std::string> allowed, std::string message);

/// Whether `arg` is the option `name`, alone or as `name=VALUE` (for arguments passed on unread).
bool namesOption(const std::string &arg, const std::string &name);

/// A whole number of at most 16 digits from `low` to `high`, read into `into` (no sign, no
/// spaces): what --threads, --checkpoint and --seed take.
bool wholeNumber(const std::string &text, long low, long high, long &into);

} // namespace saltpan
