// benchtau tests: the frames' CRC against its published check value, and the firmware's CRC.
#include <catch2/catch.hpp>

#include <random>
#include <string_view>
#include <vector>

#include "bt_frame.h"
#include "drivers/crc16.h"

using benchtau::crc16_ccitt_false;

namespace {
std::span<const std::uint8_t> bytes_of(std::string_view s) {
  return {reinterpret_cast<const std::uint8_t*>(s.data()), s.size()};
}
}  // namespace

TEST_CASE("CRC-16/CCITT-FALSE gives its published check value") {
  // The CRC catalogue's entry for CRC-16/CCITT-FALSE (width 16, poly 0x1021,
  // init 0xFFFF, no reflection, xorout 0) gives check = 0x29B1 for the ASCII
  // string "123456789" (common practice; the figure from memory).
  CHECK(crc16_ccitt_false(bytes_of("123456789")) == 0x29B1);
  const auto digits = bytes_of("123456789");
  CHECK(bt_crc16(0xFFFF, digits.data(), digits.size()) == 0x29B1);
  // No bytes leave the initial value.
  CHECK(crc16_ccitt_false({}) == 0xFFFF);
}

TEST_CASE("the CRC runs on across pieces, and the table matches the firmware's bitwise CRC") {
  std::mt19937 rng(7);
  std::vector<std::uint8_t> data(5000);
  for (auto& b : data) b = static_cast<std::uint8_t>(rng());
  const std::uint16_t whole = crc16_ccitt_false(data);
  const std::uint16_t first = crc16_ccitt_false(std::span(data).first(1234));
  CHECK(crc16_ccitt_false(std::span(data).subspan(1234), first) == whole);
  CHECK(bt_crc16(0xFFFF, data.data(), data.size()) == whole);
  // One flipped bit changes it (a CRC catches every single-bit error).
  for (std::size_t i = 0; i < data.size(); i += 97) {
    for (int bit = 0; bit < 8; ++bit) {
      data[i] ^= static_cast<std::uint8_t>(1u << bit);
      CHECK(crc16_ccitt_false(data) != whole);
      data[i] ^= static_cast<std::uint8_t>(1u << bit);
    }
  }
}
