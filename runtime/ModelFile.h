// ModelFile.h - lowered models as JSON, for the executables and libraries `brine build` writes.
//
// A bundle holds every protocol's ir::Model (kernel nodes included, so the runtime has sizes,
// names and an interpreter-checkable kernel) with the model hash and the version that built it.
#pragma once
#include "IR.h"

#include <cstdint>
#include <string>
#include <vector>

namespace brine {

struct ModelBundle {
  std::string toolVersion;          // brine's version at build time
  std::string modelHash;            // "sha256:..."
  std::string source;               // the spec's file name
  std::vector<ir::Model> protocols; // in declaration order
};

/// The bundle as one JSON document (every double exact).
std::string writeModelBundle(const ModelBundle &bundle);
/// Reads a document written by writeModelBundle; false with `error` set if it is malformed.
bool readModelBundle(const std::string &text, ModelBundle &bundle, std::string &error);

/// A 64-bit FNV-1a digest of a kernel's nodes and outputs (not its source locations): names
/// the native code compiled for it, so a runtime can find the code of a kernel it rebuilt.
uint64_t kernelFingerprint(const ir::Kernel &kernel);

} // namespace brine
