// ModelFile.h - lowered models as JSON, for the executables and libraries `saltpan build` writes.
//
// A bundle holds every protocol's ir::Model (kernel nodes included, so the runtime has sizes,
// names and an interpreter-checkable kernel) with the model hash and the version that built it,
// and the spec's sweeps that need only protocol runs, planned (points in SI) by saltpan.
#pragma once
#include "IR.h"
#include "SweepTable.h"

#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

namespace saltpan {

/// A planned sweep: its points and, per measure, what to read from which protocol's run.
struct BundledSweep {
  struct Measure {
    sweep::Column column;  // as `saltpan sweep` heads it
    int protocol = 0;      // index into ModelBundle::protocols
    std::string measure;   // spike_count, peak, ...
    std::string recorded;  // the probe it reads
    double argument = NAN; // the threshold or time (SI); NaN when not given
  };
  struct Protocol {
    int protocol = 0;            // index into ModelBundle::protocols; run in this order
    std::vector<int> parameters; // the parameter of each sweep parameter column
  };
  std::string name, design;
  std::vector<sweep::Column> parameters;
  std::vector<std::vector<double>> points; // SI, one value per parameter column
  std::vector<Measure> measures;
  std::vector<Protocol> protocols;
};

struct ModelBundle {
  std::string toolVersion;          // saltpan's version at build time
  std::string modelHash;            // "sha256:..."
  std::string source;               // the spec's file name
  std::vector<ir::Model> protocols; // in declaration order
  std::vector<BundledSweep> sweeps; // the root file's, in declaration order
};

/// The bundle as one JSON document (every double exact).
std::string writeModelBundle(const ModelBundle &bundle);
/// Reads a document written by writeModelBundle; false with `error` set if it is malformed.
bool readModelBundle(const std::string &text, ModelBundle &bundle, std::string &error);

/// A 64-bit FNV-1a digest of a kernel's nodes and outputs (not its source locations) and of its
/// SIMD lanes when above 1: names the native code compiled for it, so a runtime can find the
/// code of a kernel it rebuilt.
uint64_t kernelFingerprint(const ir::Kernel &kernel, int lanes = 1);

} // namespace saltpan
