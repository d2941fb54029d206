// RunSettings.h - the run options shared by `saltpan run` and the executables `saltpan build`
// writes: quantities with units ("100 mS/cm2"), --set NAME=VALUE, --duration and --every.
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

/// "100 mS/cm2", "50ms", "-20 mV" -> SI value and dimension; nullopt if it cannot be read.
std::optional<std::pair<double, Dimension>> parseQuantity(const std::string &text);

/// Applies "NAME=VALUE" to `params` (laid out as model.params). On failure returns false with
/// `error` set; `listHint` says where the parameter names are listed (for an unknown name).
bool applyParameterSetting(const ir::Model &model, const std::string &assignment, std::vector<double> &params,
                           const std::string &listHint, std::string &error);

/// Applies --duration and --every (each may be empty: keep the protocol's) to `protocol` and
/// checks that a fixed-step recording interval is a whole number of steps.
bool applyTiming(ir::Protocol &protocol, const std::string &duration, const std::string &every, std::string &error);

} // namespace saltpan
