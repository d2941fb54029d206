// StandaloneModel.cpp - reads the model and kernel table that `saltpan build` compiled in.
#include "StandaloneModel.h"

// Defined by the object file `saltpan build` emits (hidden, so two models loaded into one
// process do not see each other's).
extern "C" {
__attribute__((visibility("hidden"))) extern const char saltpan_embedded_model[];
__attribute__((visibility("hidden"))) extern const uint64_t saltpan_embedded_model_size;
__attribute__((visibility("hidden"))) extern const saltpan::EmbeddedKernel saltpan_embedded_kernels[];
__attribute__((visibility("hidden"))) extern const uint64_t saltpan_embedded_kernel_count;
}

namespace saltpan {

bool loadEmbeddedBundle(ModelBundle &bundle, std::string &error) {
  std::string text(saltpan_embedded_model, saltpan_embedded_model_size);
  return readModelBundle(text, bundle, error);
}

KernelFn embeddedKernel(const ir::Kernel &kernel, int lanes, std::string &error) {
  uint64_t wanted = kernelFingerprint(kernel, lanes);
  for (uint64_t i = 0; i < saltpan_embedded_kernel_count; ++i)
    if (saltpan_embedded_kernels[i].fingerprint == wanted)
      return saltpan_embedded_kernels[i].function;
  error = "no native code was compiled for this kernel (" + std::to_string(kernel.nodes().size()) + " nodes, " +
          std::to_string(lanes) + " lane(s))";
  return nullptr;
}

} // namespace saltpan
