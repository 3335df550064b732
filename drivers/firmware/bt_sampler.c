/* benchtau reference firmware: samples the ADC channels at each tick and sends frames. */
#include "bt_sampler.h"

#include "hw.h"

int bt_sampler_init(bt_sampler* s, uint8_t channels, uint8_t sets) {
  if (channels < 1u || channels > BT_FRAME_MAX_CHANNELS || sets < 1u || sets > BT_FRAME_MAX_SETS) {
    return 0;
  }
  s->channels = channels;
  s->sets = sets;
  s->filled = 0;
  s->start_frames = 0;
  s->sequence = 0;
  return 1;
}

void bt_sampler_step(bt_sampler* s) {
  uint8_t ch;
  uint16_t* row;
  uint8_t flags;
  size_t length;
  hw_wait_tick();
  /* Read right after the tick, so the sample times do not depend on how long
     the last frame took to send. */
  row = s->counts + (size_t)s->filled * s->channels;
  for (ch = 0; ch < s->channels; ++ch) row[ch] = hw_adc_read(ch);
  if (++s->filled < s->sets) return;

  /* The first frames carry the start flag, so that the receiver can tell a
     restarted board from lost frames even when the very first frame is lost. */
  flags = 0;
  if (s->start_frames < BT_FRAME_START_FRAMES) {
    flags = BT_FRAME_FLAG_START;
    ++s->start_frames;
  }
  length = bt_frame_encode(s->frame, flags, s->sequence, s->channels, s->sets, s->counts);
  hw_uart_write(s->frame, length);
  s->sequence = (uint16_t)(s->sequence + 1u);
  s->filled = 0;
}
