/* benchtau reference firmware: two ADC channels at a fixed rate, sent as frames. */
#include "bt_sampler.h"
#include "hw.h"

/* 10 kS/s on two channels is 2 * 2 * 10000 * 73 / 64 = 45.6 kB/s of frames,
   which needs at least 456 kbaud (ten bits on the wire per byte). */
#define SAMPLE_RATE_HZ 10000u
#define UART_BAUD 500000u
#define CHANNELS 2u
#define SETS_PER_FRAME 16u

static bt_sampler sampler;

int main(void) {
  hw_init(SAMPLE_RATE_HZ, UART_BAUD);
  if (!bt_sampler_init(&sampler, CHANNELS, SETS_PER_FRAME)) return 1;
  for (;;) bt_sampler_step(&sampler);
}
