// Sha256.h - a small SHA-256 (FIPS 180-4) for `saltpan hash` and sweep hashes; no external crypto library.
#pragma once
#include <array>
#include <cstdint>
#include <string>
#include <string_view>

namespace saltpan {

/// Incremental SHA-256: update() any number of times, then digest() once.
class Sha256 {
public:
  Sha256();
  void update(std::string_view bytes);
  /// Finishes the hash; the object must not be updated afterwards.
  std::array<uint8_t, 32> digest();

private:
  void block(const uint8_t *p);
  std::array<uint32_t, 8> state_;
  std::array<uint8_t, 64> buffer_{};
  size_t buffered_ = 0;
  uint64_t length_ = 0; // bytes hashed so far
};

/// The SHA-256 of `bytes` as 64 lowercase hex digits.
std::string sha256Hex(std::string_view bytes);
/// 32 digest bytes as 64 lowercase hex digits.
std::string toHex(const std::array<uint8_t, 32> &digest);

} // namespace saltpan
