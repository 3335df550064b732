// benchtau: the binary frame's constants; drivers/FRAMES.md describes the layout byte by byte.
#pragma once

#include <cstddef>
#include <cstdint>

namespace benchtau::frame {

inline constexpr std::uint8_t kSync0 = 0xB5;
inline constexpr std::uint8_t kSync1 = 0x3C;
inline constexpr std::uint8_t kFlagStart = 0x01;  // one of the first frames since sampling began
inline constexpr std::uint8_t kKnownFlags = kFlagStart;
inline constexpr std::size_t kMaxChannels = 8;
inline constexpr std::size_t kMaxSets = 64;
inline constexpr std::size_t kHeaderBytes = 7;  // sync, sync, flags, channels, sets, sequence
inline constexpr std::size_t kCrcBytes = 2;

constexpr std::size_t bytes(std::size_t channels, std::size_t sets) {
  return kHeaderBytes + 2 * channels * sets + kCrcBytes;
}
inline constexpr std::size_t kMaxBytes = bytes(kMaxChannels, kMaxSets);

}  // namespace benchtau::frame
