// Interpret.h - the reference interpreter of IR kernels: a plain loop over the nodes.
//
// The baseline the JIT is checked against (same results to 1e-12 relative) and compared
// with in benchmarks. No LLVM.
#pragma once
#include "IR.h"

#include <vector>

namespace saltpan {

class Interpreter {
public:
  explicit Interpreter(const ir::Kernel &kernel) : kernel_(kernel), values_(kernel.nodes().size()) {}
  /// out[i] = value of kernel.outputs[i] for state y, parameters p and time t (seconds).
  void run(const double *y, const double *p, double t, double *out);

private:
  const ir::Kernel &kernel_;
  std::vector<double> values_;
};

} // namespace saltpan
