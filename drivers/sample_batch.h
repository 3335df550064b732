// benchtau: decoded samples on their way from a stream decoder to the record and the live view.
#pragma once

#include <cstddef>
#include <cstdint>
#include <span>
#include <vector>

namespace benchtau {

// Rows of ADC counts with their times. A gap row marks samples that are
// missing (lost frames, a restarted board, a dropped link): its time is that
// of the first missing sample and its counts are meaningless. The record
// writes it as empty cells and the live view as NaN, so that nothing is ever
// bridged across it.
struct SampleBatch {
  std::size_t channels = 0;
  std::vector<double> t_s;            // one per row
  std::vector<std::uint16_t> counts;  // channels per row, row after row
  std::vector<std::uint8_t> gap;      // 1 for a gap row

  std::size_t rows() const { return t_s.size(); }
  std::span<const std::uint16_t> row(std::size_t i) const {
    return {counts.data() + i * channels, channels};
  }
  void add_gap(double t) {
    t_s.push_back(t);
    counts.resize(counts.size() + channels, 0);
    gap.push_back(1);
  }
  void clear() {
    t_s.clear();
    counts.clear();
    gap.clear();
  }
};

}  // namespace benchtau
