/* benchtau reference firmware: the binary frame encoder. */
#include "bt_frame.h"

uint16_t bt_crc16(uint16_t crc, const uint8_t* data, size_t length) {
  size_t i;
  int bit;
  for (i = 0; i < length; ++i) {
    crc = (uint16_t)(crc ^ (uint16_t)((uint16_t)data[i] << 8));
    for (bit = 0; bit < 8; ++bit) {
      if (crc & 0x8000u) {
        crc = (uint16_t)((uint16_t)(crc << 1) ^ 0x1021u);
      } else {
        crc = (uint16_t)(crc << 1);
      }
    }
  }
  return crc;
}

size_t bt_frame_encode(uint8_t* out, uint8_t flags, uint16_t sequence, uint8_t channels,
                       uint8_t sets, const uint16_t* counts) {
  size_t n = 0;
  size_t i;
  size_t values;
  uint16_t crc;
  if (channels < 1u || channels > BT_FRAME_MAX_CHANNELS || sets < 1u || sets > BT_FRAME_MAX_SETS) {
    return 0;
  }
  values = (size_t)channels * sets;
  out[n++] = BT_FRAME_SYNC0;
  out[n++] = BT_FRAME_SYNC1;
  out[n++] = flags;
  out[n++] = channels;
  out[n++] = sets;
  out[n++] = (uint8_t)(sequence & 0xFFu); /* little-endian, like the counts */
  out[n++] = (uint8_t)(sequence >> 8);
  for (i = 0; i < values; ++i) {
    out[n++] = (uint8_t)(counts[i] & 0xFFu);
    out[n++] = (uint8_t)(counts[i] >> 8);
  }
  /* The sync bytes are left out of the CRC: they are constant. */
  crc = bt_crc16(0xFFFFu, out + 2, n - 2);
  out[n++] = (uint8_t)(crc >> 8); /* most significant byte first */
  out[n++] = (uint8_t)(crc & 0xFFu);
  return n;
}
