// RunSettings.h - the run options shared by `saltpan run` and the executables `saltpan build`
// writes: their declaration (--protocol, --set, --duration, --every, -o), quantities with units
// ("100 mS/cm2"), --set NAME=VALUE, --duration and --every.
//
// One implementation, so both accept the same text and refuse it with the same messages.
#pragma once
#include "IR.h"
#include "Units.h"

#include <optional>
#include <string>
#include <utility>
#include <vector>

namespace saltpan {
class OptionParser;

/// The options of a run as given on the command line; empty when not given.
struct RunArguments {
  std::string protocol, output, duration, every;
  std::vector<std::string> sets; // each "NAME=VALUE", in the order given
};

/// Declares --protocol, --set (repeatable), --duration, --every and -o, read into `into`.
void addRunOptions(OptionParser &parser, RunArguments &into);

/// "100 mS/cm2", "50ms", "-20 mV" -> SI value and dimension; nullopt if it cannot be read.
std::optional<std::pair<double, Dimension>> parseQuantity(const std::string &text);

/// The physics checks of a written value, for a value given to parameter `index` on the
/// command line or by a sweep: nullopt when plausible, else why not (it must be finite, a
/// capacitance positive, a membrane density not negative).
std::optional<std::string> implausibleParameter(const ir::Model &model, size_t index, double value);

/// Applies "NAME=VALUE" to `params` (laid out as model.params), checked with
/// implausibleParameter. On failure returns false with
/// `error` set; `listHint` says where the parameter names are listed (for an unknown name).
bool applyParameterSetting(const ir::Model &model, const std::string &assignment, std::vector<double> &params,
                           const std::string &listHint, std::string &error);

/// The most steps a fixed-step run, or recorded samples an adaptive run, may take: counts stay
/// exact in a double and in a long, and a run that long would take days anyway.
constexpr double maxTimingCount = 1e12;

/// What is wrong with a protocol's step, duration and recording interval, if anything.
struct TimingProblem {
  enum class Field { Step, Duration, Every };
  Field field;         // the value to point at
  std::string message; // e.g. "the duration must be a whole number of steps"
  std::string note;    // the numbers behind it; may be empty
};

/// Checks every count a run derives from its step, duration and recording interval: finite,
/// at most maxTimingCount, and whole where the steppers need whole numbers (a fixed step
/// divides the duration and the recording interval; the interval is not longer than the run).
std::optional<TimingProblem> checkTiming(const ir::Protocol &protocol);

/// Applies --duration and --every (each may be empty: keep the protocol's) to `protocol` and
/// checks the result with checkTiming.
bool applyTiming(ir::Protocol &protocol, const std::string &duration, const std::string &every, std::string &error);

} // namespace saltpan
