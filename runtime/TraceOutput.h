// TraceOutput.h - the recorded traces as CSV or JSON text (written with SafeWrite.h).
//
// `saltpan run` and the standalone executables built by `saltpan build` both write through these,
// so their outputs are the same bytes for the same run.
#pragma once
#include "IR.h"
#include "SafeWrite.h"
#include "Simulate.h"

#include <string>

namespace saltpan {

/// `time (ms),NAME (UNIT),...` then one row per recording time.
std::string traceCsv(const Trace &trace);
/// The JSON document of a run: tool, `version`, `model_hash`, protocol, method, step, columns.
std::string traceJson(const Trace &trace, const ir::Model &model, const std::string &modelHash,
                      const std::string &version);
/// True when `path` names a JSON output (ends in ".json"); anything else is CSV.
bool isJsonPath(const std::string &path);

} // namespace saltpan
