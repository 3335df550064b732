// benchtau: CRC-16/CCITT-FALSE, table-driven (one table lookup per byte).
#include "drivers/crc16.h"

#include <array>

namespace benchtau {
namespace {

constexpr std::array<std::uint16_t, 256> make_table() {
  std::array<std::uint16_t, 256> t{};
  for (unsigned i = 0; i < 256; ++i) {
    auto c = static_cast<std::uint16_t>(i << 8);
    for (int bit = 0; bit < 8; ++bit) {
      c = static_cast<std::uint16_t>((c & 0x8000u) ? (c << 1) ^ 0x1021u : (c << 1));
    }
    t[i] = c;
  }
  return t;
}

constexpr std::array<std::uint16_t, 256> kTable = make_table();

}  // namespace

std::uint16_t crc16_ccitt_false(std::span<const std::uint8_t> data, std::uint16_t crc) {
  for (const std::uint8_t b : data) {
    crc = static_cast<std::uint16_t>((crc << 8) ^ kTable[((crc >> 8) ^ b) & 0xFFu]);
  }
  return crc;
}

}  // namespace benchtau
