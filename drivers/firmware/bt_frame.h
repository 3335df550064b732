/* benchtau reference firmware: the binary frame encoder (layout in drivers/FRAMES.md). */
#ifndef BT_FRAME_H
#define BT_FRAME_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

#define BT_FRAME_SYNC0 0xB5u
#define BT_FRAME_SYNC1 0x3Cu
#define BT_FRAME_FLAG_START 0x01u /* one of the first frames since sampling began */
#define BT_FRAME_START_FRAMES 16u /* how many frames carry the start flag */
#define BT_FRAME_MAX_CHANNELS 8u
#define BT_FRAME_MAX_SETS 64u
#define BT_FRAME_HEADER_BYTES 7u
#define BT_FRAME_CRC_BYTES 2u
/* Bytes in a frame of c channels and s sample sets. */
#define BT_FRAME_BYTES(c, s) (BT_FRAME_HEADER_BYTES + 2u * (c) * (s) + BT_FRAME_CRC_BYTES)
#define BT_FRAME_MAX_BYTES BT_FRAME_BYTES(BT_FRAME_MAX_CHANNELS, BT_FRAME_MAX_SETS)

/* CRC-16/CCITT-FALSE (polynomial 0x1021, initial value 0xFFFF, no reflection,
   no final XOR), continued from crc; start with 0xFFFF. Bit by bit: small code
   matters more on a board than speed at these rates. */
uint16_t bt_crc16(uint16_t crc, const uint8_t* data, size_t length);

/* Writes one frame to out (BT_FRAME_BYTES(channels, sets) bytes) and returns
   its length, or 0 when channels or sets are out of range. counts holds sets
   rows of channels counts each, row by row. */
size_t bt_frame_encode(uint8_t* out, uint8_t flags, uint16_t sequence, uint8_t channels,
                       uint8_t sets, const uint16_t* counts);

#ifdef __cplusplus
}
#endif

#endif /* BT_FRAME_H */
