// Sha256.tests.cpp - the SHA-256 behind `saltpan hash`, against FIPS 180-2's test vectors.
#include "Sha256.h"

#include <catch2/catch.hpp>

#include <cstdio>
#include <fstream>
#include <sstream>

using namespace saltpan;

TEST_CASE("SHA-256 of the FIPS 180-2 messages", "[sha256]") {
  CHECK(sha256Hex("abc") == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  CHECK(sha256Hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq") ==
        "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  CHECK(sha256Hex("") == "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  // One million 'a' (FIPS 180-2, appendix B.3), fed in uneven pieces.
  Sha256 h;
  std::string chunk(997, 'a');
  size_t left = 1000000;
  while (left > 0) {
    size_t n = std::min(left, chunk.size());
    h.update(std::string_view(chunk).substr(0, n));
    left -= n;
  }
  CHECK(toHex(h.digest()) == "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST_CASE("SHA-256 across block boundaries", "[sha256]") {
  // Lengths around the 55/56/64-byte padding edges, split or whole, give one digest.
  for (size_t length : {55u, 56u, 57u, 63u, 64u, 65u, 119u, 120u, 128u}) {
    std::string text(length, 'x');
    Sha256 pieces;
    pieces.update(std::string_view(text).substr(0, length / 3));
    pieces.update(std::string_view(text).substr(length / 3));
    CHECK(toHex(pieces.digest()) == sha256Hex(text));
  }
  CHECK(sha256Hex(std::string(64, 'a')) == "ffe054fe7ae0cb6dc65c3af9b61d5209f439851db43d0ba5997337df154668eb");
}

TEST_CASE("SHA-256 agrees with sha256sum on shipped files", "[sha256]") {
  for (const char *name : {"stdlib/math.saltpan", "specs/demo/tidewater_cell.saltpan", "docs/language.md"}) {
    std::string path = std::string(SALTPAN_SOURCE_DIR) + "/" + name;
    std::ifstream in(path, std::ios::binary);
    std::stringstream text;
    text << in.rdbuf();
    std::string command = "sha256sum '" + path + "' 2>/dev/null";
    FILE *pipe = popen(command.c_str(), "r");
    REQUIRE(pipe);
    char line[256] = {0};
    bool got = std::fgets(line, sizeof line, pipe) != nullptr;
    pclose(pipe);
    if (!got) {
      WARN("sha256sum is not available; skipped " << name);
      continue;
    }
    INFO(name);
    CHECK(sha256Hex(text.str()) == std::string(line).substr(0, 64));
  }
}
