/* benchtau reference firmware: samples the ADC channels at each tick and sends frames. */
#ifndef BT_SAMPLER_H
#define BT_SAMPLER_H

#include <stdint.h>

#include "bt_frame.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
  uint8_t channels;     /* inputs sampled at each tick, 0 .. channels - 1 */
  uint8_t sets;         /* ticks per frame */
  uint8_t filled;       /* ticks in the block so far */
  uint8_t start_frames; /* frames sent since sampling began, up to BT_FRAME_START_FRAMES */
  uint16_t sequence;    /* of the next frame; wraps from 65535 to 0 */
  uint16_t counts[BT_FRAME_MAX_CHANNELS * BT_FRAME_MAX_SETS];
  uint8_t frame[BT_FRAME_MAX_BYTES];
} bt_sampler;

/* Returns 0 when channels or sets are out of range (1..8, 1..64), 1 otherwise. */
int bt_sampler_init(bt_sampler* s, uint8_t channels, uint8_t sets);

/* Waits for one tick, reads every channel, and sends a frame once sets ticks
   have been read. Call it in the main loop. */
void bt_sampler_step(bt_sampler* s);

#ifdef __cplusplus
}
#endif

#endif /* BT_SAMPLER_H */
