// benchtau: CRC-16/CCITT-FALSE, the check on every binary frame.
#pragma once

#include <cstdint>
#include <span>

namespace benchtau {

// Polynomial 0x1021, initial value 0xFFFF, no reflection, no final XOR.
// Continue a running CRC by passing it back as crc.
std::uint16_t crc16_ccitt_false(std::span<const std::uint8_t> data, std::uint16_t crc = 0xFFFF);

}  // namespace benchtau
