// ModelFile.tests.cpp - the JSON bundle built models carry: every shipped protocol survives a
// round trip exactly (kernels by fingerprint, every double bit for bit), and a damaged
// document is refused with a message, never a crash.
#include "ModelFile.h"
#include "FixedStep.h"
#include "Lower.h"
#include "TestSupport.h"

#include <cstring>
#include <filesystem>

using namespace saltpan;

namespace {

bool sameBits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

ModelBundle shippedBundle(Compilation &c, const std::string &spec) {
  compileFile(std::string(SALTPAN_SOURCE_DIR) + "/" + spec, c);
  INFO(spec << "\n" << testing::allDiagnostics(c));
  REQUIRE(c.checked);
  ModelBundle bundle;
  bundle.toolVersion = "test";
  bundle.modelHash = "sha256:0";
  bundle.source = spec;
  for (const ast::ProtocolDecl *p : protocols(c.program))
    bundle.protocols.push_back(c.lowered.at(p));
  return bundle;
}

} // namespace

TEST_CASE("every shipped protocol's model survives the bundle round trip exactly", "[modelfile]") {
  for (const auto &entry : std::filesystem::recursive_directory_iterator(std::string(SALTPAN_SOURCE_DIR) + "/specs")) {
    if (entry.path().extension() != ".saltpan")
      continue;
    std::string spec = std::filesystem::relative(entry.path(), SALTPAN_SOURCE_DIR).string();
    Compilation c;
    ModelBundle bundle = shippedBundle(c, spec);
    std::string text = writeModelBundle(bundle);
    ModelBundle back;
    std::string error;
    INFO(spec);
    REQUIRE(readModelBundle(text, back, error));
    CHECK(writeModelBundle(back) == text);
    REQUIRE(back.protocols.size() == bundle.protocols.size());
    for (size_t i = 0; i < bundle.protocols.size(); ++i) {
      const ir::Model &a = bundle.protocols[i], &b = back.protocols[i];
      CHECK(kernelFingerprint(a.kernel) == kernelFingerprint(b.kernel));
      CHECK(a.stateNames == b.stateNames);
      CHECK(a.paramNames == b.paramNames);
      REQUIRE(a.params.size() == b.params.size());
      for (size_t k = 0; k < a.params.size(); ++k)
        CHECK(sameBits(a.params[k], b.params[k]));
      for (size_t k = 0; k < a.initialState.size(); ++k)
        CHECK(sameBits(a.initialState[k], b.initialState[k]));
      CHECK(sameBits(a.protocol.step, b.protocol.step));
      CHECK(sameBits(a.protocol.every, b.protocol.every));
      CHECK(a.protocol.method == b.protocol.method);
      CHECK(a.protocol.record == b.protocol.record);
    }
  }
}

TEST_CASE("a damaged bundle is refused with a message", "[modelfile]") {
  Compilation c;
  ModelBundle bundle = shippedBundle(c, "specs/reference/squid_axon_1952.saltpan");
  std::string text = writeModelBundle(bundle);
  // Cut anywhere: never accepted, never thrown through.
  for (size_t cut : {size_t(0), size_t(1), text.size() / 3, text.size() / 2, text.size() - 2}) {
    ModelBundle back;
    std::string error;
    INFO("cut at " << cut);
    CHECK_FALSE(readModelBundle(text.substr(0, cut), back, error));
    CHECK_FALSE(error.empty());
  }
  // Well-formed JSON of the wrong shape.
  for (const char *wrong : {"{}", "[]", "{\"protocols\": 3}", "null"}) {
    ModelBundle back;
    std::string error;
    INFO(wrong);
    CHECK_FALSE(readModelBundle(wrong, back, error));
    CHECK_FALSE(error.empty());
  }
}
